/**
 * The post-commit handlers' queue (ingest/handler-queue.ts): every handler sees every
 * committed row once and in commit order, configuration changes in their place between
 * batches, never two calls at once; a slow handler gets the rows that queued meanwhile as one
 * batch; a failing handler is logged and neither stops the others nor loses later batches.
 */
import { describe, expect, it } from 'vitest';
import type { Sequelize } from 'sequelize';
import type pg from 'pg';
import { HandlerQueue } from '../../ingest/handler-queue.ts';
import type { ConfigChange, PostCommitHandler, StoredReading, WorkerContext } from '../../ingest/handlers/types.ts';

const rows = (from: number, n: number): StoredReading[] =>
  Array.from({ length: n }, (_, i) => ({ channelId: 1, tMs: from + i, value: i, quality: 0 }));

function context(lines: string[]): WorkerContext {
  return {
    sequelize: null as unknown as Sequelize,
    pool: null as unknown as pg.Pool,
    publishLive: () => {},
    log: (l) => lines.push(l),
  };
}

/** A handler that records what it saw and can be held inside onReadings until released. */
function recorder(name: string) {
  const seen: (number[] | string)[] = [];
  let gate: Promise<void> | null = null;
  let open: (() => void) | null = null;
  let active = 0;
  let maxActive = 0;
  const h: PostCommitHandler = {
    name,
    async onReadings(_ctx, r) {
      active++;
      maxActive = Math.max(maxActive, active);
      seen.push(r.map((x) => x.tMs));
      if (gate) await gate;
      active--;
    },
    async onConfigChange(_ctx, c: ConfigChange) {
      seen.push(`${c.table}:${c.op}:${c.id}`);
    },
  };
  return {
    h,
    seen,
    hold() {
      gate = new Promise((r) => (open = r));
    },
    release() {
      gate = null;
      open?.();
    },
    maxActive: () => maxActive,
  };
}

describe('HandlerQueue', () => {
  it('delivers rows and configuration changes in order, one call at a time, batching what queued behind a slow call', async () => {
    const a = recorder('a');
    const b = recorder('b');
    const q = new HandlerQueue([a.h, b.h], context([]));
    a.hold();
    q.push(rows(0, 2)); // a is now busy with [0, 1]
    q.push(rows(2, 2));
    q.push(rows(4, 1));
    q.configChanged({ table: 'channels', op: 'insert', id: 7, key: null });
    q.push(rows(5, 1));
    a.release();
    await q.drain(5000);
    expect(q.busy).toBe(false);
    const expected = [[0, 1], [2, 3, 4], 'channels:insert:7', [5]];
    expect(a.seen).toEqual(expected);
    expect(b.seen).toEqual(expected);
    expect(a.maxActive()).toBe(1);
  });

  it('logs a failing handler and goes on with the others and with later batches', async () => {
    const lines: string[] = [];
    const good = recorder('good');
    const bad: PostCommitHandler = {
      name: 'bad',
      async onReadings() {
        throw new Error('boom');
      },
    };
    const q = new HandlerQueue([bad, good.h], context(lines));
    q.push(rows(0, 1));
    await q.drain(5000);
    q.push(rows(1, 1));
    await q.drain(5000);
    expect(good.seen).toEqual([[0], [1]]);
    expect(lines.filter((l) => l.startsWith('handler bad failed on 1 readings: Error: boom'))).toHaveLength(2);
  });

  it('skips empty batches and changes no handler listens to; a tick never overlaps the previous one', async () => {
    const lines: string[] = [];
    let ticks = 0;
    let release: (() => void) | null = null;
    const h: PostCommitHandler = {
      name: 'ticker',
      async onReadings() {
        throw new Error('no rows expected');
      },
      async onTick() {
        ticks++;
        await new Promise<void>((r) => (release = r));
      },
    };
    const q = new HandlerQueue([h], context(lines));
    q.push([]);
    q.configChanged({ table: 'sites', op: 'update', id: 1, key: null });
    expect(q.length).toBe(0);
    const first = q.tick(1);
    await q.tick(2); // the first is still running: skipped
    expect(ticks).toBe(1);
    release!();
    await first;
    const third = q.tick(3);
    expect(ticks).toBe(2);
    release!();
    await third;
    expect(lines).toEqual([]);
  });
});
