/**
 * The post-commit handlers' queue. Committed rows and configuration changes are queued in
 * order and handed to every handler by one runner, so ingest never waits for a handler and a
 * handler never sees two calls at once: rows that queued up while a slow handler was busy
 * reach it as one larger batch. `onTick` runs about once a second beside it. A handler's
 * error is logged and never stops ingest or the other handlers.
 */
import type { ConfigChange, PostCommitHandler, StoredReading, WorkerContext } from './handlers/types.ts';

type Item = { rows: StoredReading[] } | { change: ConfigChange };

export class HandlerQueue {
  private items: Item[] = [];
  private running: Promise<void> | null = null;
  private ticking = false;
  private tickTimer: NodeJS.Timeout | null = null;

  constructor(
    private readonly handlers: readonly PostCommitHandler[],
    private readonly ctx: WorkerContext,
  ) {}

  /** Start every handler (one failing to start is logged; the others go on). */
  async init(): Promise<void> {
    for (const h of this.handlers) {
      try {
        await h.init?.(this.ctx);
      } catch (e) {
        this.ctx.log(`handler ${h.name} failed to start: ${(e as Error).message}`);
      }
    }
  }

  get length(): number {
    return this.items.length;
  }

  /** Whether the runner is busy. */
  get busy(): boolean {
    return this.running !== null;
  }

  push(rows: StoredReading[]): void {
    if (!this.handlers.length || !rows.length) return;
    this.items.push({ rows });
    this.run();
  }

  configChanged(change: ConfigChange): void {
    if (!this.handlers.some((h) => h.onConfigChange)) return;
    this.items.push({ change });
    this.run();
  }

  /** Resolves when the queue is empty, or after `timeoutMs`. */
  async drain(timeoutMs: number): Promise<void> {
    const until = Date.now() + timeoutMs;
    while ((this.running || this.items.length) && Date.now() < until) {
      await Promise.race([this.running, new Promise((r) => setTimeout(r, Math.max(1, until - Date.now())))]);
    }
  }

  private run(): void {
    if (this.running || !this.items.length) return;
    this.running = (async () => {
      while (this.items.length) {
        const head = this.items[0]!;
        if ('change' in head) {
          this.items.shift();
          await this.each('config change', (h) => h.onConfigChange?.(this.ctx, head.change));
          continue;
        }
        // Every consecutive batch of rows, as one.
        let n = 0;
        while (n < this.items.length && 'rows' in this.items[n]!) n++;
        const rows = (this.items.splice(0, n) as { rows: StoredReading[] }[]).flatMap((i) => i.rows);
        await this.each(`${rows.length} readings`, (h) => h.onReadings(this.ctx, rows));
      }
    })().finally(() => {
      this.running = null;
      if (this.items.length) this.run();
    });
  }

  private async each(what: string, call: (h: PostCommitHandler) => Promise<void> | undefined): Promise<void> {
    for (const h of this.handlers) {
      try {
        await call(h);
      } catch (e) {
        this.ctx.log(`handler ${h.name} failed on ${what}: ${(e as Error).stack ?? String(e)}`);
      }
    }
  }

  /** Call every handler's `onTick` about every `everyMs` (a tick still running is not overlapped). */
  startTicking(everyMs = 1000): void {
    if (this.tickTimer) return;
    this.tickTimer = setInterval(() => void this.tick(Date.now()), everyMs);
  }

  stopTicking(): void {
    if (this.tickTimer) clearInterval(this.tickTimer);
    this.tickTimer = null;
  }

  /** One round of `onTick` (skipped while the previous one runs). */
  async tick(nowMs: number): Promise<void> {
    if (this.ticking) return;
    this.ticking = true;
    try {
      for (const h of this.handlers) {
        if (!h.onTick) continue;
        try {
          await h.onTick(this.ctx, nowMs);
        } catch (e) {
          this.ctx.log(`handler ${h.name} tick failed: ${(e as Error).message}`);
        }
      }
    } finally {
      this.ticking = false;
    }
  }
}
