/**
 * The flush loop (ingest/flush-loop.ts) with a real journal in a scratch folder and a store
 * that stands for the database: flushes in arrival order with nothing lost or repeated; a
 * store that fails keeps the run and retries it; when the buffer fills while the database is
 * away the loop spills to the journal, and when the store succeeds again it replays the
 * journal before newer messages, in arrival order.
 */
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { ArrivalBuffer, EntryMaker, type Entry } from '../../ingest/arrivals.ts';
import { FlushLoop } from '../../ingest/flush-loop.ts';
import { Journal } from '../../ingest/journal.ts';
import { waitFor } from '../support/ingest-harness.ts';

const dirs: string[] = [];
afterAll(() => {
  for (const d of dirs) fs.rmSync(d, { recursive: true, force: true });
});

const config = { INGEST_FLUSH_MS: 5, INGEST_BATCH_ROWS: 1000, INGEST_BUFFER_ROWS: 100, INGEST_JOURNAL_MAX_BYTES: 1 << 30 };
const topic = 'coatrail/v1/site/gw/tank/temp';

function setUp() {
  const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'flush-loop-'));
  dirs.push(dir);
  const journal = new Journal(dir, 'w1');
  const buffer = new ArrivalBuffer();
  const maker = new EntryMaker();
  const stored: number[] = [];
  let failing = false;
  let attempts = 0;
  const loop = new FlushLoop({
    config,
    buffer,
    journal,
    async store(entries: Entry[]) {
      attempts++;
      if (failing) throw new Error('database away');
      for (const e of entries) stored.push(JSON.parse(e.payload).v as number);
    },
    replayEntry: (r) => maker.make(r.topic, r.payload, r.rx, -1, 0),
  });
  let rx = Date.now() - 10_000;
  /** One message arriving: into the journal in journal mode, else the buffer (as the subscriber does). */
  const arrive = (v: number) => {
    rx++;
    const payload = JSON.stringify({ t: rx, v });
    if (loop.mode === 'journal') journal.append({ topic, payload, rx }, null);
    else {
      buffer.push(maker.make(topic, payload, rx, -1, 0));
      loop.arrived();
    }
  };
  return {
    loop,
    buffer,
    journal,
    stored,
    arrive,
    fail: (on: boolean) => (failing = on),
    attempts: () => attempts,
  };
}

describe('FlushLoop', () => {
  it('stores every message once, in arrival order', async () => {
    const s = setUp();
    s.loop.start();
    for (let i = 0; i < 50; i++) s.arrive(i);
    await waitFor(async () => s.stored.length === 50, 5000, 'all 50 stored');
    expect(s.stored).toEqual(Array.from({ length: 50 }, (_, i) => i));
    expect(s.buffer.rows).toBe(0);
    await s.loop.close();
  });

  it('keeps a failed run and retries it; spills to the journal when the buffer fills, and replays it in order', async () => {
    const s = setUp();
    s.fail(true);
    s.loop.start();
    for (let i = 0; i < 10; i++) s.arrive(i);
    await waitFor(async () => !s.loop.dbHealthy && s.attempts() >= 2, 5000, 'the store to fail twice');
    expect(s.stored).toEqual([]);
    expect(s.buffer.rows).toBe(10);
    for (let i = 10; i < 100; i++) s.arrive(i); // the buffer reaches INGEST_BUFFER_ROWS
    expect(s.loop.mode).toBe('journal');
    expect(s.loop.overHighWater()).toBe(false); // in journal mode the buffer no longer holds the pump
    for (let i = 100; i < 130; i++) s.arrive(i); // these go to the journal
    await waitFor(async () => s.journal.pendingCount === 0 && s.journal.bytes > 0, 5000, 'the journal written');
    expect(s.loop.lagMs()).toBeGreaterThan(0);
    s.fail(false);
    await waitFor(async () => s.stored.length === 130 && s.loop.mode === 'memory', 10_000, 'buffer and journal stored');
    expect(s.stored).toEqual(Array.from({ length: 130 }, (_, i) => i));
    for (let i = 130; i < 135; i++) s.arrive(i); // back in memory mode
    await waitFor(async () => s.stored.length === 135, 5000, 'the newest stored');
    expect(s.stored.slice(130)).toEqual([130, 131, 132, 133, 134]);
    expect(s.journal.closedSegments()).toEqual([]);
    await s.loop.close();
  });
});
