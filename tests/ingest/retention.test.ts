/**
 * Retention (README "Retention"), on a throwaway cluster of its own: raw readings are kept per
 * channel kind (the `retention` setting) or per channel (`raw_retention_days`), whole weekly
 * partitions older than the longest raw retention are dropped, rollups and refused messages
 * are trimmed, and the worker's daily job runs once a day.
 */
import fs from 'node:fs';
import path from 'node:path';
import pg from 'pg';
import type { Sequelize } from 'sequelize';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createPool, createSequelize } from '../../db/connection.ts';
import { migrateUp } from '../../db/migrate.ts';
import { startLocalPostgres, stopLocalPostgres } from '../../db/pg-control.ts';
import { retentionHandler } from '../../ingest/handlers/retention.ts';
import { applyRetention } from '../../src/lib/core/readings-store.ts';
import { initModels } from '../../db/models/index.ts';
import { root } from '../support/test-stack.ts';

const DAY = 86_400_000;
const dir = path.join(root, 'var', `test-ingest-retention-${process.pid}`);
let pool: pg.Pool;
let sequelize: Sequelize;
const now = Date.now();
const ch: Record<string, number> = {};

async function insert(channelId: number, daysAgo: number) {
  await pool.query('insert into readings(channel_id, ts, value) values ($1, to_timestamp($2::float8 / 1000), 1)', [
    channelId,
    now - daysAgo * DAY,
  ]);
}
async function ages(channelId: number): Promise<number[]> {
  const { rows } = await pool.query<{ d: number }>(
    'select round((($2::float8 - extract(epoch from ts) * 1000) / 86400000))::int as d from readings where channel_id = $1 order by ts',
    [channelId, now],
  );
  return rows.map((r) => r.d);
}

beforeAll(async () => {
  fs.rmSync(dir, { recursive: true, force: true });
  const saved = process.env['DATABASE_URL'];
  delete process.env['DATABASE_URL'];
  let url: string;
  try {
    url = (await startLocalPostgres({ baseDir: dir, database: 'retention' })).url;
  } finally {
    if (saved) process.env['DATABASE_URL'] = saved;
  }
  // Two connections at least: the retention job holds one for its advisory lock while it deletes on another.
  const seq = createSequelize({ url, max: 3 });
  await migrateUp(seq);
  initModels(seq);
  sequelize = seq;
  pool = createPool({ url, max: 3 });
  const site = (await pool.query<{ id: number }>(`insert into sites(code, name) values ('ret', 'Retention site') returning id`))
    .rows[0]!.id;
  const dev = (
    await pool.query<{ id: number }>(
      `insert into devices(site_id, name, username, password_hash, topic_prefix) values ($1, 'g', 'gw-ret', 'x', 'coatrail/v1/ret/gw-ret') returning id`,
      [site],
    )
  ).rows[0]!.id;
  const asset = (
    await pool.query<{ id: number }>(
      `insert into assets(site_id, kind, code, name) values ($1, 'tank', 'tank', 'Tank') returning id`,
      [site],
    )
  ).rows[0]!.id;
  for (const [key, kind, days] of [
    ['door', 'door', 400], // the kind's setting (180 days) wins over the column
    ['visc', 'viscosity', 400], // kind not in the setting: the column, 400 days
    ['other', 'other', 30], // the column, 30 days
  ] as const) {
    ch[key] = (
      await pool.query<{ id: number }>(
        `insert into channels(asset_id, device_id, key, name, kind, unit, min, max, raw_retention_days) values ($1, $2, $3, $3, $4, 'u', 0, 10, $5) returning id`,
        [asset, dev, key, kind, days],
      )
    ).rows[0]!.id;
  }
  await pool.query(`select ensure_reading_partitions(to_timestamp($1::float8 / 1000), to_timestamp($2::float8 / 1000))`, [
    now - 460 * DAY,
    now,
  ]);
  for (const id of Object.values(ch)) for (const d of [450, 200, 100, 40, 1]) await insert(id, d);
  await pool.query(
    `insert into readings_1m(channel_id, bucket, vmin, vmax, vsum, n) values ($1, to_timestamp($2::float8 / 1000), 1, 1, 1, 1), ($1, to_timestamp($3::float8 / 1000), 1, 1, 1, 1)`,
    [ch['visc'], Math.floor((now - 1200 * DAY) / 60_000) * 60_000, Math.floor((now - 10 * DAY) / 60_000) * 60_000],
  );
  await pool.query(
    `insert into readings_1h(channel_id, bucket, vmin, vmax, vsum, n) values ($1, to_timestamp($2::float8 / 1000), 1, 1, 1, 1)`,
    [ch['visc'], Math.floor((now - 1200 * DAY) / 3_600_000) * 3_600_000],
  );
  await pool.query(
    `insert into ingest_rejections(received_at, topic, reason, payload) values (to_timestamp($1::float8 / 1000), 'x', 'schema', 'old'), (to_timestamp($2::float8 / 1000), 'x', 'schema', 'new')`,
    [now - 100 * DAY, now - 10 * DAY],
  );
}, 90_000);

afterAll(async () => {
  await pool?.end();
  await sequelize?.close();
  await stopLocalPostgres(dir).catch(() => {});
  fs.rmSync(dir, { recursive: true, force: true });
});

describe('applyRetention with the default policy (migration 20261202-1000)', () => {
  it('keeps raw readings per kind or per channel, drops old partitions whole, trims rollups and refused messages', async () => {
    const partsBefore = (
      await pool.query(
        `select count(*)::int as n from pg_inherits i join pg_class p on p.oid = i.inhparent where p.relname = 'readings'`,
      )
    ).rows[0].n;
    const r = await applyRetention(sequelize, now);
    // The longest raw retention is 400 days: the partition holding the 450-day-old rows is dropped whole.
    expect(r.droppedPartitions.length).toBeGreaterThan(0);
    const partsAfter = (
      await pool.query(
        `select count(*)::int as n from pg_inherits i join pg_class p on p.oid = i.inhparent where p.relname = 'readings'`,
      )
    ).rows[0].n;
    expect(partsAfter).toBe(partsBefore - r.droppedPartitions.length);
    expect(await ages(ch['door']!)).toEqual([100, 40, 1]); // 180 days (kind setting)
    expect(await ages(ch['visc']!)).toEqual([200, 100, 40, 1]); // 400 days (column)
    expect(await ages(ch['other']!)).toEqual([1]); // 30 days (column)
    expect(r.deletedRaw).toBe(1 + 3); // door at 200 d; other at 200, 100 and 40 d
    // Minute rollups 1 100 days; hourly ones kept for ever; refused messages 90 days.
    expect(r.deletedMinute).toBe(1);
    expect(r.deletedHour).toBe(0);
    expect((await pool.query('select count(*)::int as n from readings_1h')).rows[0].n).toBe(1);
    expect(r.deletedRejections).toBe(1);
    expect((await pool.query('select payload from ingest_rejections')).rows).toEqual([{ payload: 'new' }]);
  });
});

describe('the daily retention job in the worker', () => {
  it('runs a minute after start, records the run, and not again within the day', async () => {
    const ctx = { sequelize, pool, publishLive: () => {}, log: () => {} };
    await retentionHandler.init!(ctx);
    const t = Date.now();
    await retentionHandler.onTick!(ctx, t + 1_000); // too early after start
    expect((await pool.query(`select 1 from site_settings where key = 'retentionLastRun'`)).rowCount).toBe(0);
    await retentionHandler.onTick!(ctx, t + 61_000);
    const first = (await pool.query(`select value from site_settings where key = 'retentionLastRun'`)).rows[0].value;
    expect(first.atMs).toBe(t + 61_000);
    await retentionHandler.onTick!(ctx, t + 61_000 + 11 * 60_000); // checks again, but a day has not passed
    const second = (await pool.query(`select value from site_settings where key = 'retentionLastRun'`)).rows[0].value;
    expect(second.atMs).toBe(t + 61_000);
    await retentionHandler.onTick!(ctx, t + 61_000 + DAY + 1);
    const third = (await pool.query(`select value from site_settings where key = 'retentionLastRun'`)).rows[0].value;
    expect(third.atMs).toBe(t + 61_000 + DAY + 1);
  });
});
