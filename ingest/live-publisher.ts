/**
 * Live readings for the web app's live views: the newest committed value per channel,
 * published on `coatrail/v1/_live/readings` at most every 250 ms (QoS 0; a view that misses
 * one gets the next). A value older than one already published for its channel is not sent.
 */
import type { StoredReading } from './handlers/types.ts';

export const LIVE_EVERY_MS = 250;

export interface LiveReading {
  channelId: number;
  tMs: number;
  value: number;
}

export class LivePublisher {
  private latest = new Map<number, { tMs: number; value: number }>();
  private published = new Map<number, number>();
  private timer: NodeJS.Timeout | null = null;

  constructor(private readonly publish: (kind: string, payload: unknown) => void) {}

  /** Committed rows: remember the newest per channel. */
  committed(rows: readonly StoredReading[]): void {
    for (const r of rows) {
      if ((this.published.get(r.channelId) ?? -Infinity) < r.tMs) {
        this.published.set(r.channelId, r.tMs);
        this.latest.set(r.channelId, { tMs: r.tMs, value: r.value });
      }
    }
  }

  /** Publish what is waiting (one message for all channels); returns what was sent. */
  flush(): LiveReading[] {
    if (!this.latest.size) return [];
    const out: LiveReading[] = [];
    for (const [channelId, r] of this.latest) out.push({ channelId, tMs: r.tMs, value: r.value });
    this.latest.clear();
    this.publish('readings', out);
    return out;
  }

  start(everyMs = LIVE_EVERY_MS): void {
    if (!this.timer) this.timer = setInterval(() => this.flush(), everyMs);
  }

  stop(): void {
    if (this.timer) clearInterval(this.timer);
    this.timer = null;
  }
}
