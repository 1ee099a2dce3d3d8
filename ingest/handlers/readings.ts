/**
 * The readings message kind: parse a payload with the shared schema, resolve its topic to a
 * channel, check each sample against the channel (range, unit, time) and add the good samples
 * to the batch being built. Everything refused becomes a rejection with the raw payload and
 * a reason; nothing is dropped silently and nothing here throws on bad input.
 */
import { z } from 'zod';
import { parseTelemetryPayload, sameUnit, type RejectionReason, type TelemetryPayload } from '../../src/lib/shared/telemetry.ts';
import type { ChannelMap } from '../channel-map.ts';
import type { ParsedTopic } from '../topics.ts';

export type ParsedPayload =
  | { ok: true; payload: TelemetryPayload }
  | { ok: false; reason: 'malformed-json' | 'schema'; detail: string };

/** "samples[3].t: an ISO 8601 time needs a zone designator …; v: expected number, received string". */
function describeIssues(error: z.ZodError): string {
  return error.issues
    .slice(0, 5)
    .map((i) => {
      const at = i.path.map((p, k) => (typeof p === 'number' ? `[${p}]` : k ? `.${String(p)}` : String(p))).join('');
      return at ? `${at}: ${i.message}` : i.message;
    })
    .join('; ');
}

/** JSON.parse, then the shared schema. */
export function parseTelemetry(text: string): ParsedPayload {
  let json: unknown;
  try {
    json = JSON.parse(text);
  } catch (e) {
    return { ok: false, reason: 'malformed-json', detail: (e as Error).message.slice(0, 200) };
  }
  const r = parseTelemetryPayload(json);
  if (!r.success) return { ok: false, reason: 'schema', detail: describeIssues(r.error).slice(0, 500) };
  return { ok: true, payload: r.data };
}

export interface Rejection {
  rxMs: number;
  topic: string;
  deviceUsername: string | null;
  channelId: number | null;
  reason: RejectionReason;
  detail: string | null;
  payload: string;
}

export interface UnknownSighting {
  deviceId: number;
  topic: string;
  assetCode: string;
  channelKey: string;
  payload: string;
  rxMs: number;
}

export interface StatusChange {
  deviceId: number;
  online: boolean;
  rxMs: number;
  topic: string;
}

/** A batch of rows in column arrays (the shape `unnest` takes), plus everything refused. */
export class Batch {
  ch: number[] = [];
  t: number[] = [];
  v: number[] = [];
  q: number[] = [];
  /** Index of the message each row came from (to attribute duplicates). */
  owner: number[] = [];
  /** Per message: topic, payload, device, receive time. */
  messages: { topic: string; payload: string; deviceUsername: string | null; channelId: number | null; rxMs: number }[] = [];
  rejections: Rejection[] = [];
  unknown: UnknownSighting[] = [];
  status: StatusChange[] = [];
  private seen = new Map<number, Set<number>>();

  get rows(): number {
    return this.ch.length;
  }

  /** Add a row unless the batch already holds this channel and time; returns false for a duplicate. */
  add(channelId: number, tMs: number, value: number, quality: number, owner: number): boolean {
    let s = this.seen.get(channelId);
    if (!s) this.seen.set(channelId, (s = new Set()));
    if (s.has(tMs)) return false;
    s.add(tMs);
    this.ch.push(channelId);
    this.t.push(tMs);
    this.v.push(value);
    this.q.push(quality);
    this.owner.push(owner);
    return true;
  }
}

const MAX_PAYLOAD_STORED = 64 * 1024;
const DAY_MS = 86_400_000;

/** The raw payload as stored with a rejection (very large batches are cut, and say so). */
export function storedPayload(text: string): string {
  return text.length <= MAX_PAYLOAD_STORED
    ? text
    : text.slice(0, MAX_PAYLOAD_STORED) + `… [${text.length - MAX_PAYLOAD_STORED} more characters not kept]`;
}

function iso(ms: number): string {
  return new Date(ms).toISOString();
}

/** Summary of the refused samples of one message: "2 of 10 samples …: v at t, …". */
function some(n: number, of: number, what: string, examples: string[]): string {
  const head = of === 1 ? what : `${n} of ${of} samples ${what}`;
  return examples.length ? `${head}: ${examples.slice(0, 3).join(', ')}${examples.length > 3 ? ', …' : ''}` : head;
}

export interface ProcessOptions {
  futureToleranceMs: number;
}

/**
 * Add one readings message to the batch. `topic` has been parsed as a sample topic;
 * `parsed` is the payload's parse result (computed on arrival, or now on journal replay).
 */
export function processReadings(
  map: ChannelMap,
  batch: Batch,
  msg: { topic: string; payload: string; rxMs: number },
  topic: Extract<ParsedTopic, { kind: 'sample' }>,
  parsed: ParsedPayload,
  opts: ProcessOptions,
): void {
  const prefix = `coatrail/v1/${topic.site}/${topic.device}`;
  const device = map.device(prefix);
  const reject = (reason: RejectionReason, detail: string | null, channelId: number | null = null): void => {
    batch.rejections.push({
      rxMs: msg.rxMs,
      topic: msg.topic,
      deviceUsername: device?.username ?? topic.device,
      channelId,
      reason,
      detail,
      payload: storedPayload(msg.payload),
    });
  };
  if (!device) return reject('unknown-device', `no device publishes under ${prefix}`);
  const channel = map.channel(msg.topic);
  if (!channel) {
    const assetKnown = map.hasAsset(device.siteCode, topic.asset);
    batch.unknown.push({
      deviceId: device.id,
      topic: msg.topic,
      assetCode: topic.asset,
      channelKey: topic.channel,
      payload: storedPayload(msg.payload),
      rxMs: msg.rxMs,
    });
    return assetKnown
      ? reject(
          'unknown-channel',
          `device ${device.username} has no channel “${topic.channel}” on asset ${topic.asset}; listed for an engineer to approve`,
        )
      : reject('unknown-asset', `no asset “${topic.asset}” at site ${topic.site}; listed for an engineer to approve`);
  }
  if (!parsed.ok) return reject(parsed.reason, parsed.detail, channel.id);
  const { payload } = parsed;
  if (payload.u !== undefined && !sameUnit(payload.u, channel.unit)) {
    return reject('wrong-unit', `sent in “${payload.u}”, the channel records “${channel.unit}”`, channel.id);
  }

  const index = batch.messages.length;
  batch.messages.push({
    topic: msg.topic,
    payload: msg.payload,
    deviceUsername: device.username,
    channelId: channel.id,
    rxMs: msg.rxMs,
  });
  const n = payload.samples.length;
  const latest = msg.rxMs + opts.futureToleranceMs;
  const oldest = msg.rxMs - channel.rawRetentionDays * DAY_MS;
  const bad = { range: [] as string[], unit: [] as string[], future: [] as string[], old: [] as string[], dup: [] as string[] };
  for (const s of payload.samples) {
    if (s.u !== undefined && !sameUnit(s.u, channel.unit)) bad.unit.push(`“${s.u}” at ${iso(s.t)}`);
    else if (s.v < channel.min || s.v > channel.max) bad.range.push(`${s.v} at ${iso(s.t)}`);
    else if (s.t > latest) bad.future.push(iso(s.t));
    else if (s.t < oldest) bad.old.push(iso(s.t));
    else if (!batch.add(channel.id, s.t, s.v, s.q ?? 0, index)) bad.dup.push(iso(s.t));
  }
  const range = `${channel.min}–${channel.max} ${channel.unit}`;
  if (bad.unit.length) reject('wrong-unit', some(bad.unit.length, n, `not in “${channel.unit}”`, bad.unit), channel.id);
  if (bad.range.length) reject('out-of-range', some(bad.range.length, n, `outside ${range}`, bad.range), channel.id);
  if (bad.future.length) {
    reject(
      'future-timestamp',
      some(bad.future.length, n, `more than ${opts.futureToleranceMs / 1000} s ahead of arrival (${iso(msg.rxMs)})`, bad.future),
      channel.id,
    );
  }
  if (bad.old.length)
    reject(
      'too-old',
      some(bad.old.length, n, `older than the raw retention of ${channel.rawRetentionDays} days`, bad.old),
      channel.id,
    );
  if (bad.dup.length)
    reject('duplicate', some(bad.dup.length, n, 'repeated in the same batch (same channel and time)', bad.dup), channel.id);
}

/** After commit: the rows the database refused as already stored, as one rejection per message. */
export function duplicateRejections(batch: Batch, refusedRowIndexes: number[]): Rejection[] {
  const byMsg = new Map<number, number[]>();
  for (const i of refusedRowIndexes) {
    const m = batch.owner[i]!;
    let l = byMsg.get(m);
    if (!l) byMsg.set(m, (l = []));
    l.push(batch.t[i]!);
  }
  const totals = new Map<number, number>();
  for (const o of batch.owner) if (byMsg.has(o)) totals.set(o, (totals.get(o) ?? 0) + 1);
  const out: Rejection[] = [];
  for (const [m, ts] of byMsg) {
    const msg = batch.messages[m]!;
    const total = totals.get(m) ?? ts.length;
    out.push({
      rxMs: msg.rxMs,
      topic: msg.topic,
      deviceUsername: msg.deviceUsername,
      channelId: msg.channelId,
      reason: 'duplicate',
      detail: some(ts.length, total, 'already stored (same channel and time)', ts.map(iso)),
      payload: storedPayload(msg.payload),
    });
  }
  return out;
}
