/**
 * The readings message kind: parse a payload with the shared schema, resolve its topic to a
 * channel, check each sample against the channel (range, unit, time) and add the good samples
 * to the batch being built. Everything refused becomes a rejection with the raw payload and
 * a reason; nothing is dropped silently and nothing here throws on bad input.
 */
import { z } from 'zod';
import { parseTelemetryPayload, sameUnit, type RejectionReason, type TelemetryPayload } from '../../src/lib/shared/telemetry.ts';
import { iso, some, storedPayload, type Batch } from '../batch.ts';
import type { ChannelMap } from '../channel-map.ts';
import { deviceTopicPrefix, type ParsedTopic } from '../../src/lib/shared/topics.ts';

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

const DAY_MS = 86_400_000;

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
  const prefix = deviceTopicPrefix(topic.site, topic.device);
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
