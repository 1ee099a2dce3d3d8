/**
 * A batch being built by the flush: rows in column arrays (the shape COPY and `unnest` take),
 * everything refused, unknown topics and device status changes. Shared by the message kinds
 * (handlers/readings.ts, handlers/status.ts) and storage (store.ts).
 */
import type { RejectionReason } from '../src/lib/shared/telemetry.ts';

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

/** The raw payload as stored with a rejection (very large batches are cut, and say so). */
export function storedPayload(text: string): string {
  return text.length <= MAX_PAYLOAD_STORED
    ? text
    : text.slice(0, MAX_PAYLOAD_STORED) + `… [${text.length - MAX_PAYLOAD_STORED} more characters not kept]`;
}

export function iso(ms: number): string {
  return new Date(ms).toISOString();
}

/** Summary of the refused samples of one message: "2 of 10 samples …: v at t, …". */
export function some(n: number, of: number, what: string, examples: string[]): string {
  const head = of === 1 ? what : `${n} of ${of} samples ${what}`;
  return examples.length ? `${head}: ${examples.slice(0, 3).join(', ')}${examples.length > 3 ? ', …' : ''}` : head;
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
