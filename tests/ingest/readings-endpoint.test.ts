/**
 * GET /api/v1/channels/{id}/readings (product.md §6) over a day of 1 Hz data loaded with
 * generate_series (bypassing the worker) and rollups rebuilt with rebuildRollups: raw points
 * for small ranges, min/max/mean buckets from the right source for long ones, never more than
 * maxPoints; 400 for bad parameters, 404 for an unknown channel.
 *
 * The signal is a sawtooth: v = (seconds since the hour) / 36, so within any bucket that lies
 * inside one hour and starts at second s with width w seconds: min = s/36,
 * max = (s + w − 1)/36, mean = (s + (w − 1)/2)/36 (hand-computed from the definition).
 */
import pg from 'pg';
import { afterAll, beforeAll, describe, expect, inject, it } from 'vitest';
import type { Sequelize } from 'sequelize';
import { createPool, createSequelize } from '../../db/connection.ts';
import { initModels } from '../../db/models/index.ts';
import { rebuildRollups } from '../../src/lib/core/readings-store.ts';
import { api, signIn, type Session } from '../support/http.ts';
import { createTestDevice } from '../support/ingest-harness.ts';

const DAY = 86_400_000;
let pool: pg.Pool;
let sequelize: Sequelize;
let channelId: number;
let day0: number;
let viewer: Session;

beforeAll(async () => {
  pool = createPool({ url: inject('stack').databaseUrl, max: 2 });
  sequelize = createSequelize({ url: inject('stack').databaseUrl, max: 2 });
  initModels(sequelize);
  const dev = await createTestDevice(pool, [{ key: 'saw', unit: 'mm/s', min: 0, max: 100 }], 'rep');
  channelId = dev.channels['saw']!.id;
  day0 = Math.floor(Date.now() / DAY) * DAY - 3 * DAY; // a whole UTC day, three days ago
  await pool.query('select ensure_reading_partitions(to_timestamp($1::float8 / 1000), to_timestamp($2::float8 / 1000))', [
    day0,
    day0 + DAY,
  ]);
  await pool.query(
    `insert into readings(channel_id, ts, value)
     select $1, ts, (extract(epoch from ts)::bigint % 3600) / 36.0
       from generate_series(to_timestamp($2::float8 / 1000), to_timestamp($3::float8 / 1000) - interval '1 second', interval '1 second') ts`,
    [channelId, day0, day0 + DAY],
  );
  await rebuildRollups(sequelize, channelId, day0, day0 + DAY);
  viewer = await signIn('viewer');
});

afterAll(async () => {
  await pool?.end();
  await sequelize?.close();
});

const get = (qs: string, session: Session | null = viewer) => api(`/api/v1/channels/${channelId}/readings?${qs}`, { session });

describe('rebuildRollups', () => {
  it('puts the day into 1 440 minute and 24 hour buckets of 60 and 3 600 samples', async () => {
    const { rows } = await pool.query<{ m: number; mn: number; h: number; hn: number }>(
      `select (select count(*)::int from readings_1m where channel_id = $1) as m, (select sum(n)::int from readings_1m where channel_id = $1) as mn,
              (select count(*)::int from readings_1h where channel_id = $1) as h, (select sum(n)::int from readings_1h where channel_id = $1) as hn`,
      [channelId],
    );
    expect(rows[0]).toEqual({ m: 1440, mn: 86_400, h: 24, hn: 86_400 });
    // Idempotent.
    await rebuildRollups(sequelize, channelId, day0, day0 + DAY);
    const again = await pool.query<{ n: number }>('select sum(n)::int as n from readings_1m where channel_id = $1', [channelId]);
    expect(again.rows[0]!.n).toBe(86_400);
  });
});

describe('GET /api/v1/channels/{id}/readings', () => {
  it('buckets a day into 5-minute min/max/mean from the minute rollup at maxPoints 1000', async () => {
    const r = await get(`from=${day0}&to=${day0 + DAY}&maxPoints=1000`);
    expect(r.status).toBe(200);
    expect(r.body).toMatchObject({
      channelId,
      unit: 'mm/s',
      from: day0,
      to: day0 + DAY,
      mode: 'bucketed',
      bucketMs: 300_000,
      source: 'minute',
    });
    const b = r.body.buckets as { t: number; min: number; max: number; mean: number; n: number }[];
    expect(b).toHaveLength(288); // 86 400 s / 300 s
    expect(b.reduce((s, x) => s + x.n, 0)).toBe(86_400);
    // Bucket 13 starts 65 min into the day: second 300 of its hour (hand-computed as in the file comment).
    expect(b[13]!.t).toBe(day0 + 13 * 300_000);
    expect(b[13]!.n).toBe(300);
    expect(b[13]!.min).toBeCloseTo(300 / 36, 9);
    expect(b[13]!.max).toBeCloseTo(599 / 36, 9);
    expect(b[13]!.mean).toBeCloseTo(449.5 / 36, 9);
  });

  it('takes the hourly rollup for 2-hour buckets at maxPoints 20', async () => {
    const r = await get(`from=${new Date(day0).toISOString()}&to=${new Date(day0 + DAY).toISOString()}&maxPoints=20`);
    expect(r.status).toBe(200);
    expect(r.body).toMatchObject({ mode: 'bucketed', bucketMs: 7_200_000, source: 'hour' });
    expect(r.body.buckets).toHaveLength(12);
    for (const x of r.body.buckets) {
      expect(x.n).toBe(7200);
      expect(x.min).toBe(0);
      expect(x.max).toBeCloseTo(3599 / 36, 9);
      expect(x.mean).toBeCloseTo(1799.5 / 36, 9);
    }
  });

  it('buckets raw rows (date_bin) when the bucket is under a minute', async () => {
    const r = await get(`from=${day0}&to=${day0 + 3_600_000}&maxPoints=1000`);
    expect(r.body).toMatchObject({ mode: 'bucketed', bucketMs: 5000, source: 'raw' });
    expect(r.body.buckets).toHaveLength(720);
    const b1 = r.body.buckets[1];
    expect(b1.t).toBe(day0 + 5000);
    expect(b1.n).toBe(5);
    expect(b1.min).toBeCloseTo(5 / 36, 12);
    expect(b1.max).toBeCloseTo(9 / 36, 12);
    expect(b1.mean).toBeCloseTo(7 / 36, 12);
  });

  it('returns raw points when the range holds at most maxPoints samples', async () => {
    const r = await get(`from=${day0 + 600_000}&to=${day0 + 1_200_000}`);
    expect(r.body.mode).toBe('raw');
    expect(r.body.bucketMs).toBeNull();
    expect(r.body.points).toHaveLength(600);
    expect(r.body.points[0].t).toBe(day0 + 600_000);
    expect(r.body.points[0].v).toBeCloseTo(600 / 36, 12);
  });

  it('never returns more than maxPoints buckets, also for ranges off the bucket grid', async () => {
    for (const [from, to, max] of [
      [day0 + 12_345, day0 + 3_612_345, 7],
      [day0 + 1, day0 + DAY - 1, 1],
      [day0 - DAY, day0 + DAY, 3],
      [day0 + 777, day0 + 5 * 3_600_000 + 999, 5000],
      [day0 + 59_999, day0 + 61_001, 1],
    ] as const) {
      const r = await get(`from=${from}&to=${to}&maxPoints=${max}`);
      expect(r.status).toBe(200);
      const n = r.body.mode === 'raw' ? r.body.points.length : r.body.buckets.length;
      expect(n).toBeLessThanOrEqual(max);
      expect(n).toBeGreaterThan(0);
    }
  });

  it('defaults to the last hour (empty here) and answers 400 for bad parameters, 404 for an unknown channel', async () => {
    const d = await get('');
    expect(d.status).toBe(200);
    expect(d.body.mode).toBe('raw');
    expect(d.body.points).toEqual([]);
    expect(d.body.to - d.body.from).toBe(3_600_000);
    for (const qs of [
      `from=${day0 + 10}&to=${day0}`,
      `from=${day0}&to=${day0}`,
      'maxPoints=0',
      'maxPoints=5001',
      'maxPoints=abc',
      'from=yesterday',
      'from=2026-12-01T10:00:00',
    ]) {
      const r = await get(qs);
      expect(r.status, qs).toBe(400);
      expect(r.headers.get('content-type')).toContain('application/problem+json');
    }
    const missing = await api('/api/v1/channels/2000000000/readings', { session: viewer });
    expect(missing.status).toBe(404);
    expect((await get('', null)).status).toBe(401);
  });
});
