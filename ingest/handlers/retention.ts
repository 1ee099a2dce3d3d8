/**
 * Daily retention (README "Retention"): once a day one worker (a PostgreSQL advisory lock
 * keeps a second worker out) drops whole weekly partitions older than the longest raw
 * retention, deletes older raw rows channel by channel, and trims rollups and refused
 * messages. The time of the last run and its result are kept in site_settings
 * (`retentionLastRun`), so restarts do not repeat it.
 */
import type pg from 'pg';
import { applyRetention } from '../../src/lib/core/readings-store.ts';
import { forgetPartitions } from '../partitions.ts';
import type { PostCommitHandler } from './types.ts';

const DAY_MS = 86_400_000;
/** Let the worker settle before the first check. */
const FIRST_CHECK_AFTER_MS = 60_000;
const LOCK_KEY = 0x636f6174; // 'coat'

let startedAt = 0;
let nextCheckAt = 0;
let running = false;

export const retentionHandler: PostCommitHandler = {
  name: 'retention',
  async init() {
    startedAt = Date.now();
    nextCheckAt = startedAt + FIRST_CHECK_AFTER_MS;
  },
  async onReadings() {},
  async onTick(ctx, nowMs) {
    if (running || nowMs < nextCheckAt) return;
    running = true;
    nextCheckAt = nowMs + 10 * 60_000;
    // A session-level advisory lock: taken and released on one connection borrowed from the process's pool.
    const manager = ctx.sequelize.connectionManager;
    const client = (await manager.getConnection({ type: 'write' }).catch((e: Error) => {
      running = false;
      throw e;
    })) as pg.ClientBase;
    try {
      const { rows } = await client.query<{ at: number | null }>(
        `select (value->>'atMs')::float8 as at from site_settings where key = 'retentionLastRun'`,
      );
      const last = rows[0]?.at ?? null;
      if (last !== null && nowMs - last < DAY_MS) return;
      const lock = await client.query<{ ok: boolean }>('select pg_try_advisory_lock($1) as ok', [LOCK_KEY]);
      if (!lock.rows[0]?.ok) return;
      try {
        const result = await applyRetention(ctx.sequelize, nowMs);
        if (result.droppedPartitions.length) forgetPartitions();
        await client.query(
          `insert into site_settings(key, value) values ('retentionLastRun', $1::jsonb)
           on conflict (key) do update set value = excluded.value, updated_at = now()`,
          [JSON.stringify({ atMs: nowMs, ...result })],
        );
        ctx.log(
          `retention: dropped ${result.droppedPartitions.length} partition(s), deleted ${result.deletedRaw} raw rows, ` +
            `${result.deletedMinute} minute and ${result.deletedHour} hour rollups, ${result.deletedRejections} refused messages`,
        );
      } finally {
        await client.query('select pg_advisory_unlock($1)', [LOCK_KEY]);
      }
    } finally {
      manager.releaseConnection(client as never);
      running = false;
    }
  },
};
