/**
 * The flush loop and its two modes. In `memory` mode arriving messages wait in the
 * {@link ArrivalBuffer} and are flushed every INGEST_FLUSH_MS, or at once at
 * INGEST_BATCH_ROWS rows. While PostgreSQL is away the buffer fills; once it holds
 * INGEST_BUFFER_ROWS rows the worker switches to `journal` mode, where arriving messages are
 * appended to the local journal (and acknowledged once fsynced). When the database answers
 * again the loop rotates the journal and replays its closed segments in order, interleaved
 * with the memory buffer by arrival time. A failed store is retried with a growing delay
 * (250 ms → 2 s); nothing taken from the buffer is dropped.
 */
import { BackPressure, type ArrivalBuffer, type Entry } from './arrivals.ts';
import type { IngestConfig } from './config.ts';
import { segmentTime, type Journal, type JournalRecord } from './journal.ts';

/** Most samples in one flush. */
export const MAX_BATCH_ROWS = 20_000;
/** Journal records replayed per transaction. */
const REPLAY_RECORDS = 5_000;
/** Journal bytes queued for writing before the pump is held. */
const JOURNAL_PENDING_MAX = 64 << 20;

export type FlushConfig = Pick<
  IngestConfig,
  'INGEST_FLUSH_MS' | 'INGEST_BATCH_ROWS' | 'INGEST_BUFFER_ROWS' | 'INGEST_JOURNAL_MAX_BYTES'
>;

export interface FlushLoopOptions {
  config: FlushConfig;
  buffer: ArrivalBuffer;
  journal: Journal;
  /** Store one run (throws when the database fails); `live` is false for journal replays. */
  store(entries: Entry[], live: boolean): Promise<void>;
  /** An entry for a replayed journal record (nothing to acknowledge). */
  replayEntry(record: JournalRecord): Entry;
  log?: (line: string) => void;
}

export class FlushLoop {
  mode: 'memory' | 'journal' = 'memory';
  dbHealthy = true;
  /** The last live run's arrival → commit time. */
  lastBatchLatencyMs = 0;
  readonly backPressure: BackPressure;
  private journalSince: number | null = null;
  private closing = false;
  private stopped = false;
  private retryDelay = 250;
  private wakeUp: (() => void) | null = null;
  private running: Promise<void> | null = null;
  private journalTimer: NodeJS.Timeout | null = null;
  private syncing = false;
  private readonly log: (line: string) => void;

  constructor(private readonly opts: FlushLoopOptions) {
    this.log = opts.log ?? (() => {});
    this.backPressure = new BackPressure(() => this.overHighWater());
  }

  /** Whether the pump must wait: the buffer (memory mode) or the journal is full. */
  overHighWater(): boolean {
    const { config, buffer, journal } = this.opts;
    return (
      (this.mode === 'memory' && buffer.rows >= config.INGEST_BUFFER_ROWS) ||
      journal.pendingSize >= JOURNAL_PENDING_MAX ||
      (this.mode === 'journal' && journal.bytes >= config.INGEST_JOURNAL_MAX_BYTES)
    );
  }

  /** An entry was added to the buffer: spill to the journal when the database is away and the buffer full; flush early when a batch is ready. */
  arrived(): void {
    const { config, buffer } = this.opts;
    if (!this.dbHealthy && buffer.rows >= config.INGEST_BUFFER_ROWS && this.mode === 'memory') this.toJournal();
    if (buffer.rows >= config.INGEST_BATCH_ROWS) this.wake();
  }

  /** The age of the oldest message not yet committed, and at least the last batch's arrival → commit time. */
  lagMs(now = Date.now()): number {
    const { buffer, journal } = this.opts;
    let lag = this.lastBatchLatencyMs;
    const oldest = buffer.oldest();
    if (oldest) lag = Math.max(lag, now - oldest.rxMs);
    const seg = journal.closedSegments()[0];
    if (seg) lag = Math.max(lag, now - segmentTime(seg));
    if (this.mode === 'journal' && this.journalSince !== null) lag = Math.max(lag, now - this.journalSince);
    return lag;
  }

  start(): void {
    if (this.running) return;
    this.running = this.run();
    // Journal writes run on their own timer so that they continue while the loop waits for the database.
    this.journalTimer = setInterval(() => this.syncJournal(), this.opts.config.INGEST_FLUSH_MS);
  }

  /** Flush what is buffered (giving an unreachable database up to `graceMs`), then stop and close the journal. */
  async close(graceMs = 8000): Promise<void> {
    this.closing = true;
    this.wake();
    const until = Date.now() + graceMs;
    while (this.opts.buffer.size && this.dbHealthy && Date.now() < until) await new Promise((r) => setTimeout(r, 20));
    this.stopped = true;
    this.wake();
    await this.running;
    if (this.journalTimer) clearInterval(this.journalTimer);
    await this.opts.journal.close().catch((e: Error) => this.log(`journal close: ${e.message}`));
  }

  wake(): void {
    const w = this.wakeUp;
    this.wakeUp = null;
    w?.();
  }

  private sleep(ms: number): Promise<void> {
    return new Promise<void>((resolve) => {
      const t = setTimeout(() => {
        this.wakeUp = null;
        resolve();
      }, ms);
      this.wakeUp = () => {
        clearTimeout(t);
        resolve();
      };
    });
  }

  private toJournal(): void {
    this.mode = 'journal';
    this.journalSince = Date.now();
    this.log(
      `database unavailable and ${this.opts.buffer.rows} rows buffered: spilling to the journal in ${this.opts.journal.dir}`,
    );
  }

  private syncJournal(): void {
    const { journal } = this.opts;
    if (this.syncing || journal.pendingCount === 0) return;
    this.syncing = true;
    journal
      .sync()
      .catch((e: Error) => this.log(`journal write failed: ${e.message}`))
      .finally(() => {
        this.syncing = false;
        this.backPressure.release();
      });
  }

  private async flushMemory(): Promise<void> {
    const { buffer } = this.opts;
    const run = buffer.take(MAX_BATCH_ROWS);
    try {
      await this.opts.store(run.entries, true);
    } catch (e) {
      buffer.putBack(run);
      throw e;
    }
    buffer.done(run);
    this.lastBatchLatencyMs = Date.now() - run.entries[0]!.rxMs;
  }

  private async replayOne(file: string): Promise<void> {
    const { journal } = this.opts;
    const { records, start, end, eof } = await journal.read(file, REPLAY_RECORDS);
    if (records.length)
      await this.opts.store(
        records.map((r) => this.opts.replayEntry(r)),
        false,
      );
    await journal.advance(file, start, end, eof);
  }

  /** One unit of work; false when there was nothing to do. */
  private async step(): Promise<boolean> {
    const { buffer, journal, config } = this.opts;
    const first = journal.closedSegments()[0];
    const next = buffer.next();
    if (first && (!next || segmentTime(first) <= next.rxMs)) {
      await this.replayOne(first);
      return true;
    }
    if (next) {
      const age = Date.now() - next.rxMs;
      if (buffer.rows >= config.INGEST_BATCH_ROWS || age >= config.INGEST_FLUSH_MS || this.closing || this.mode === 'journal') {
        await this.flushMemory();
        return true;
      }
      await this.sleep(config.INGEST_FLUSH_MS - age);
      return true;
    }
    if (this.mode === 'journal' && this.dbHealthy) {
      this.mode = 'memory'; // first, so nothing more is appended while the active segment closes
      this.journalSince = null;
      await journal.rotate();
      this.log('journal: database back; switching to the memory buffer and replaying the journal');
      return true;
    }
    return false;
  }

  private async run(): Promise<void> {
    const { buffer, journal, config } = this.opts;
    while (!this.stopped) {
      try {
        const worked = await this.step();
        if (!this.dbHealthy)
          this.log(`database reachable again after an outage; ${buffer.rows} rows buffered, journal ${journal.bytes} bytes`);
        this.dbHealthy = true;
        this.retryDelay = 250;
        this.backPressure.release();
        if (!worked) {
          if (this.closing) break;
          await this.sleep(config.INGEST_FLUSH_MS);
        }
      } catch (e) {
        if (this.dbHealthy) this.log(`storing failed, will retry: ${(e as Error).message}`);
        this.dbHealthy = false;
        if (buffer.rows >= config.INGEST_BUFFER_ROWS && this.mode === 'memory') this.toJournal();
        this.backPressure.release();
        if (this.closing) break;
        await this.sleep(this.retryDelay);
        this.retryDelay = Math.min(this.retryDelay * 2, 2000);
      }
    }
  }
}
