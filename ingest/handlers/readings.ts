/**
 * The readings message kind: parse a payload with the shared schema, resolve its topic to a
 * channel, check each sample against the channel (range, unit, time) and add the good samples
 * to the batch being built. Everything refused becomes a rejection with the raw payload and
 * a reason; nothing is dropped silently and nothing here throws on bad input.
 */
import { z } from 'zod';
import { parseTelemetryPayload, sameUnit, type RejectionReason, type TelemetryPayload } from '../../src/lib/shared/telemetry.ts';
import type { ChannelMap } from '../channel-map.ts';
import type { ParsedTopic } from '../../src/lib/shared/topics.ts';

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
  messages: { topic: string; payload: string; rxMs: number }[] = [];
  /** The device of each message (parallel to `messages`). */
  messageDevices: string[] = [];
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
  // The hot path (one good message) allocates little: no closures, the refusal lists only when needed.
  const prefix = `coatrail/v1/${topic.site}/${topic.device}`;
  const device = map.device(prefix);
  if (!device) return reject(batch, msg, topic.device, null, 'unknown-device', `no device publishes under ${prefix}`);
  if (!device.enabled)
    return reject(batch, msg, device.username, null, 'unknown-device', `device ${device.username} is disabled`);
  const channel = map.channel(msg.topic);
  if (!channel) {
    batch.unknown.push({
      deviceId: device.id,
      topic: msg.topic,
      assetCode: topic.asset,
      channelKey: topic.channel,
      payload: storedPayload(msg.payload),
      rxMs: msg.rxMs,
    });
    return map.hasAsset(device.siteCode, topic.asset)
      ? reject(
          batch,
          msg,
          device.username,
          null,
          'unknown-channel',
          `device ${device.username} has no channel “${topic.channel}” on asset ${topic.asset}; listed for an engineer to approve`,
        )
      : reject(
          batch,
          msg,
          device.username,
          null,
          'unknown-asset',
          `no asset “${topic.asset}” at site ${topic.site}; listed for an engineer to approve`,
        );
  }
  if (!parsed.ok) return reject(batch, msg, device.username, channel.id, parsed.reason, parsed.detail);
  const { payload } = parsed;
  if (payload.u !== undefined && !sameUnit(payload.u, channel.unit)) {
    return reject(
      batch,
      msg,
      device.username,
      channel.id,
      'wrong-unit',
      `sent in “${payload.u}”, the channel records “${channel.unit}”`,
    );
  }

  const index = batch.messages.length;
  batch.messages.push(msg);
  batch.messageDevices.push(device.username);
  const latest = msg.rxMs + opts.futureToleranceMs;
  const oldest = msg.rxMs - channel.rawRetentionDays * DAY_MS;
  let bad: Refused | null = null;
  for (const s of payload.samples) {
    if (s.u !== undefined && !sameUnit(s.u, channel.unit)) (bad ??= refused()).unit.push(`“${s.u}” at ${iso(s.t)}`);
    else if (s.v < channel.min || s.v > channel.max) (bad ??= refused()).range.push(`${s.v} at ${iso(s.t)}`);
    else if (s.t > latest) (bad ??= refused()).future.push(iso(s.t));
    else if (s.t < oldest) (bad ??= refused()).old.push(iso(s.t));
    else if (!batch.add(channel.id, s.t, s.v, s.q ?? 0, index)) (bad ??= refused()).dup.push(iso(s.t));
  }
  if (bad) rejectSamples(batch, msg, device.username, channel, payload.samples.length, bad, opts);
}

interface Refused {
  range: string[];
  unit: string[];
  future: string[];
  old: string[];
  dup: string[];
}

function refused(): Refused {
  return { range: [], unit: [], future: [], old: [], dup: [] };
}

function reject(
  batch: Batch,
  msg: { topic: string; payload: string; rxMs: number },
  deviceUsername: string | null,
  channelId: number | null,
  reason: RejectionReason,
  detail: string | null,
): void {
  batch.rejections.push({
    rxMs: msg.rxMs,
    topic: msg.topic,
    deviceUsername,
    channelId,
    reason,
    detail,
    payload: storedPayload(msg.payload),
  });
}

function rejectSamples(
  batch: Batch,
  msg: { topic: string; payload: string; rxMs: number },
  deviceUsername: string,
  channel: { id: number; min: number; max: number; unit: string; rawRetentionDays: number },
  n: number,
  bad: Refused,
  opts: ProcessOptions,
): void {
  const r = (reason: RejectionReason, detail: string) => reject(batch, msg, deviceUsername, channel.id, reason, detail);
  if (bad.unit.length) r('wrong-unit', some(bad.unit.length, n, `not in “${channel.unit}”`, bad.unit));
  if (bad.range.length)
    r('out-of-range', some(bad.range.length, n, `outside ${channel.min}–${channel.max} ${channel.unit}`, bad.range));
  if (bad.future.length) {
    r(
      'future-timestamp',
      some(bad.future.length, n, `more than ${opts.futureToleranceMs / 1000} s ahead of arrival (${iso(msg.rxMs)})`, bad.future),
    );
  }
  if (bad.old.length)
    r('too-old', some(bad.old.length, n, `older than the raw retention of ${channel.rawRetentionDays} days`, bad.old));
  if (bad.dup.length) r('duplicate', some(bad.dup.length, n, 'repeated in the same batch (same channel and time)', bad.dup));
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
  const channelOf = new Map<number, number>();
  for (const i of refusedRowIndexes) channelOf.set(batch.owner[i]!, batch.ch[i]!);
  for (const [m, ts] of byMsg) {
    const msg = batch.messages[m]!;
    const total = totals.get(m) ?? ts.length;
    out.push({
      rxMs: msg.rxMs,
      topic: msg.topic,
      deviceUsername: batch.messageDevices[m] ?? null,
      channelId: channelOf.get(m) ?? null,
      reason: 'duplicate',
      detail: some(ts.length, total, 'already stored (same channel and time)', ts.map(iso)),
      payload: storedPayload(msg.payload),
    });
  }
  return out;
}
