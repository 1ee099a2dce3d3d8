/**
 * The worker's local journal: while PostgreSQL is down and the in-memory buffer is full,
 * arriving messages are appended here, one JSON line per message (`{"topic", "payload", "rx"}`),
 * fsynced, and only then acknowledged to the broker. When the database returns the closed
 * segments are replayed in order through the normal path (idempotent: `on conflict do nothing`).
 *
 * Files: `{dir}/{workerId}/seg-{epochMs}-{seq}.jsonl`, one active segment being written and
 * any number of closed ones waiting for replay; a `.pos` sidecar holds the byte offset
 * replayed and committed so far, so a crash during replay resumes where it stopped (at most one
 * chunk is replayed twice, and its rows then show as duplicates). A torn last line (a crash
 * during a write, before the fsync and so before the acknowledgement) is skipped: the broker
 * redelivers that message.
 */
import fs from 'node:fs';
import fsp from 'node:fs/promises';
import path from 'node:path';

export interface JournalRecord {
  topic: string;
  payload: string;
  rx: number;
}

interface PendingWrite {
  line: string;
  rx: number;
  ack: (() => void) | null;
}

const SEGMENT_MAX_BYTES = 64 << 20;

/** Receive time of a segment's first record (from its name), for ordering against the memory buffer. */
export function segmentTime(file: string): number {
  return segmentOrder(path.basename(file));
}

export class Journal {
  readonly dir: string;
  private active: { file: string; handle: fsp.FileHandle; bytes: number } | null = null;
  private pending: PendingWrite[] = [];
  private pendingBytes = 0;
  private writing: Promise<void> | null = null;
  private seq = 0;
  /** Bytes on disk across all segments (active and closed). */
  bytes = 0;
  /** Records appended since the journal was last empty (for the status line). */
  records = 0;

  /** Closed segments waiting for replay, oldest first. */
  private closed: string[];

  constructor(
    baseDir: string,
    workerId: string,
    private log: (s: string) => void = () => {},
  ) {
    this.dir = path.join(baseDir, workerId.replace(/[^A-Za-z0-9._-]/g, '_'));
    fs.mkdirSync(this.dir, { recursive: true });
    // Segments left by an earlier run (crash or stop while the database was away) come first.
    this.closed = fs
      .readdirSync(this.dir)
      .filter((f) => f.endsWith('.jsonl'))
      .sort((a, b) => segmentOrder(a) - segmentOrder(b) || (a < b ? -1 : 1))
      .map((f) => path.join(this.dir, f));
    this.bytes = this.closed.reduce((s, f) => s + fs.statSync(f).size - this.position(f), 0);
  }

  /** Closed segments waiting for replay, oldest first. */
  closedSegments(): readonly string[] {
    return this.closed;
  }

  get hasActive(): boolean {
    return this.active !== null;
  }

  /** Records waiting to be written and fsynced. */
  get pendingCount(): number {
    return this.pending.length;
  }

  get pendingSize(): number {
    return this.pendingBytes;
  }

  /** Queue a record; it is written, fsynced and acknowledged by the next {@link sync}. */
  append(rec: JournalRecord, ack: (() => void) | null): void {
    const line = JSON.stringify(rec) + '\n';
    this.pending.push({ line, rx: rec.rx, ack });
    this.pendingBytes += Buffer.byteLength(line);
  }

  /** Write every queued record to the active segment, fsync, then acknowledge them. */
  sync(): Promise<void> {
    if (!this.writing) {
      this.writing = this.doSync().finally(() => (this.writing = null));
    }
    return this.writing;
  }

  private async doSync(): Promise<void> {
    while (this.pending.length) {
      const batch = this.pending;
      this.pending = [];
      this.pendingBytes = 0;
      if (!this.active) {
        const file = path.join(this.dir, `seg-${batch[0]!.rx}-${String(this.seq++).padStart(6, '0')}.jsonl`);
        this.active = { file, handle: await fsp.open(file, 'a'), bytes: 0 };
        this.log(`journal: writing ${path.basename(file)}`);
      }
      const buf = Buffer.from(batch.map((p) => p.line).join(''), 'utf8');
      await this.active.handle.write(buf);
      await this.active.handle.sync();
      this.active.bytes += buf.length;
      this.bytes += buf.length;
      this.records += batch.length;
      for (const p of batch) p.ack?.();
      if (this.active.bytes >= SEGMENT_MAX_BYTES) {
        // Keep segments a manageable size; the closed one waits for replay.
        const a = this.active;
        this.active = null;
        await a.handle.close();
        this.closed.push(a.file);
      }
    }
  }

  /** Close the active segment (after syncing what is queued) so it can be replayed. */
  async rotate(): Promise<void> {
    await this.sync();
    if (!this.active) return;
    const a = this.active;
    this.active = null;
    await a.handle.close();
    if (a.bytes === 0) fs.rmSync(a.file, { force: true });
    else this.closed.push(a.file);
  }

  private position(file: string): number {
    try {
      return Number(fs.readFileSync(file + '.pos', 'utf8')) || 0;
    } catch {
      return 0;
    }
  }

  /**
   * Read up to `maxRecords` complete records of `file` from its replay position (at most
   * 8 MiB at a time; a message is at most 2 MiB). `eof` is true when nothing after `end`
   * remains but, possibly, a torn last line.
   */
  async read(file: string, maxRecords: number): Promise<{ records: JournalRecord[]; start: number; end: number; eof: boolean }> {
    const start = this.position(file);
    const handle = await fsp.open(file, 'r');
    try {
      const size = (await handle.stat()).size;
      const len = Math.max(0, Math.min(size - start, 8 << 20));
      const buf = Buffer.alloc(len);
      if (len) await handle.read(buf, 0, len, start);
      const records: JournalRecord[] = [];
      let pos = 0;
      while (records.length < maxRecords) {
        const nl = buf.indexOf(10, pos);
        if (nl < 0) break;
        const line = buf.toString('utf8', pos, nl);
        pos = nl + 1;
        try {
          const r = JSON.parse(line) as JournalRecord;
          if (typeof r.topic === 'string' && typeof r.payload === 'string' && typeof r.rx === 'number') records.push(r);
          else this.log(`journal: skipped a malformed line in ${path.basename(file)}`);
        } catch {
          this.log(`journal: skipped an unreadable line in ${path.basename(file)}`);
        }
      }
      const end = start + pos;
      // What is left after the last newline, when everything up to the end of the file was read,
      // is a torn line that was never acknowledged: the broker redelivers that message.
      const eof = end >= size || (records.length < maxRecords && start + len === size);
      return { records, start, end, eof };
    } finally {
      await handle.close();
    }
  }

  /** Mark `file` replayed and committed up to `end`; remove it when finished. */
  async advance(file: string, start: number, end: number, finished: boolean): Promise<void> {
    this.bytes = Math.max(0, this.bytes - (end - start));
    if (finished) {
      fs.rmSync(file, { force: true });
      fs.rmSync(file + '.pos', { force: true });
      this.closed = this.closed.filter((f) => f !== file);
      if (this.closed.length === 0 && !this.active) {
        this.bytes = 0;
        this.records = 0;
      }
      this.log(`journal: replayed and removed ${path.basename(file)}`);
      return;
    }
    const tmp = file + '.pos.tmp';
    await fsp.writeFile(tmp, String(end));
    const h = await fsp.open(tmp, 'r');
    await h.sync();
    await h.close();
    await fsp.rename(tmp, file + '.pos');
  }

  async close(): Promise<void> {
    await this.rotate();
  }
}

function segmentOrder(name: string): number {
  const m = /^seg-(\d+)-/.exec(name);
  return m ? Number(m[1]) : 0;
}
