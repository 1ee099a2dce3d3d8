/**
 * Arrival: each MQTT message becomes an {@link Entry} (topic parsed once per topic, payload
 * parsed with the shared schema on arrival) in the in-memory {@link ArrivalBuffer}, which the
 * flush takes batches from. {@link BackPressure} holds MQTT.js's packet pump while the buffer
 * or the journal is over its high-water mark.
 */
import { parseTelemetry, type ParsedPayload } from './handlers/readings.ts';
import { parseTopic, type ParsedTopic } from '../src/lib/shared/topics.ts';

export interface Entry {
  topic: string;
  payload: string;
  rxMs: number;
  /** The MQTT packet id to acknowledge after commit (-1: none, QoS 0 or replayed from the journal) … */
  mid: number;
  /** … on this connection (an acknowledgement for an older connection is dropped). */
  gen: number;
  route: ParsedTopic;
  parsed: ParsedPayload | null;
  samples: number;
}

/** The largest payload taken (a full batch of 10 000 samples is well under 1 MiB). */
export const MAX_PAYLOAD_BYTES = 2 << 20;
const MAX_ROUTES = 100_000;

/** Makes entries; topics repeat (one per channel), so each is parsed once. */
export class EntryMaker {
  private routes = new Map<string, ParsedTopic>();

  route(topic: string): ParsedTopic {
    let r = this.routes.get(topic);
    if (!r) {
      if (this.routes.size >= MAX_ROUTES) this.routes.clear();
      this.routes.set(topic, (r = parseTopic(topic)));
    }
    return r;
  }

  /** `size` is the payload's size in bytes (an oversized payload arrives as '' and is refused with its size). */
  make(topic: string, payload: string, rxMs: number, mid: number, gen: number, size = payload.length): Entry {
    const route = this.route(topic);
    let parsed: ParsedPayload | null = null;
    let samples = 1;
    if (route.kind === 'sample') {
      parsed =
        size > MAX_PAYLOAD_BYTES
          ? { ok: false, reason: 'schema', detail: `payload of ${size} bytes is larger than 2 MiB` }
          : parseTelemetry(payload);
      if (parsed.ok) samples = parsed.payload.samples.length;
    }
    return { topic, payload, rxMs, mid, gen, route, parsed, samples };
  }
}

/**
 * Entries waiting for the flush, oldest first. The flush takes a run from the front
 * ({@link take}); the run stays counted until it is committed ({@link done}) or handed back
 * after a failure ({@link putBack}), so nothing is lost while the database is away.
 */
export class ArrivalBuffer {
  private entries: Entry[] = [];
  /** Entries before `head` are taken by the flush in progress. */
  private head = 0;
  /** Samples held, taken ones included. */
  rows = 0;

  push(e: Entry): void {
    this.entries.push(e);
    this.rows += e.samples;
  }

  /** Entries not yet taken. */
  get pending(): number {
    return this.entries.length - this.head;
  }

  /** Entries held, taken ones included. */
  get size(): number {
    return this.entries.length;
  }

  /** The oldest entry not yet taken. */
  next(): Entry | undefined {
    return this.entries[this.head];
  }

  /** The oldest entry held (taken or not): the age of the buffer. */
  oldest(): Entry | undefined {
    return this.entries[0];
  }

  /** Take the oldest untaken entries up to `maxRows` samples (at least one entry). */
  take(maxRows: number): { entries: Entry[]; rows: number } {
    let rows = 0;
    let end = this.head;
    while (end < this.entries.length && (rows < maxRows || end === this.head)) rows += this.entries[end++]!.samples;
    const entries = this.entries.slice(this.head, end);
    this.head = end;
    return { entries, rows };
  }

  /** The run taken last is committed: forget it. */
  done(run: { entries: Entry[]; rows: number }): void {
    this.entries.splice(0, run.entries.length);
    this.head -= run.entries.length;
    this.rows -= run.rows;
  }

  /** The run taken last failed: it is the next to take again. */
  putBack(run: { entries: Entry[] }): void {
    this.head -= run.entries.length;
  }
}

/** Holds MQTT.js's packet pump (its `handleMessage` callback) while `over()` says so. */
export class BackPressure {
  private waiting: (() => void)[] = [];

  constructor(private readonly over: () => boolean) {}

  /** For `client.handleMessage`: let the pump go on now, or once the pressure is off. */
  admit(callback: () => void): void {
    if (this.over()) this.waiting.push(callback);
    else callback();
  }

  /** Let held messages through while under the high-water mark. */
  release(): void {
    while (this.waiting.length && !this.over()) this.waiting.shift()!();
  }

  get held(): number {
    return this.waiting.length;
  }
}
