/**
 * The seeded readings history in the test database (tests/support/test-stack.ts seeds
 * TEST_HISTORY_DAYS of it through seedAll): recorded, idempotent, rollups consistent with raw,
 * the same samples the generators make, and the story load under-cured in the stored data.
 */
import pg from 'pg';
import { afterAll, beforeAll, describe, expect, it, inject } from 'vitest';
import { equivalentMinutes, type ProfilePoint } from '../../src/lib/domain/cure/arrhenius.ts';
import { demoHistoryRecord, seedHistory, type DemoHistoryRecord } from '../../seeds/history.ts';
import {
  HOUR_MS,
  MINUTE_MS,
  buildPlantModel,
  demoOvenCycles,
  demoStoryLoad,
  historySeries,
  type OvenCycle,
} from '../../seeds/plant-model.ts';
import { TEST_HISTORY_DAYS } from '../support/test-stack.ts';

let pool: pg.Pool;
let rec: DemoHistoryRecord;

async function channelId(asset: string, key: string): Promise<number> {
  const { rows } = await pool.query<{ id: number }>(
    `select c.id from channels c join assets a on a.id = c.asset_id where a.code = $1 and c.key = $2`,
    [asset, key],
  );
  return rows[0]!.id;
}

beforeAll(async () => {
  pool = new pg.Pool({ connectionString: inject('stack').databaseUrl, max: 2 });
  const r = await demoHistoryRecord(pool);
  if (!r) throw new Error('the test stack seeded no history');
  rec = r;
});
afterAll(async () => {
  await pool.end();
});

describe('seeded history', () => {
  it('is recorded with its now and length, and a second seed does nothing', async () => {
    expect(rec.days).toBe(TEST_HISTORY_DAYS);
    expect(rec.anchorMs).toBe(Math.floor(rec.nowMs / HOUR_MS) * HOUR_MS);
    expect(rec.rows).toBeGreaterThan(100_000);
    const again = await seedHistory(pool, { nowMs: rec.nowMs, days: rec.days });
    expect(again.seeded).toBe(false);
    expect(again.reason).toMatch(/already/);
  });

  it('stores exactly the samples the generators make (one oven zone, one bath channel)', async () => {
    const model = buildPlantModel(rec.nowMs);
    const want = new Map([...historySeries(model, rec.fromMs, rec.nowMs)].map((s) => [`${s.asset}/${s.channel}`, s]));
    for (const [asset, key] of [
      ['oven-b-z2', 'air-temp'],
      ['dip-1-hc', 'viscosity'],
    ] as const) {
      const id = await channelId(asset, key);
      const { rows } = await pool.query<{ t: number; v: number }>(
        `select (extract(epoch from ts) * 1000)::float8 as t, value as v from readings
          where channel_id = $1 and ts >= to_timestamp($2::float8 / 1000) and ts < to_timestamp($3::float8 / 1000) order by ts`,
        [id, rec.fromMs, rec.nowMs],
      );
      const s = want.get(`${asset}/${key}`)!;
      expect(rows.length).toBe(s.tMs.length);
      expect(rows.map((r) => r.t)).toEqual(s.tMs);
      expect(rows.map((r) => r.v)).toEqual(s.values);
    }
  });

  it('has per-minute and per-hour rollups that agree with the raw rows (count, min, max, sum)', async () => {
    const id = await channelId('oven-a-z1', 'air-temp');
    // Whole hours inside the history, before its anchor (nothing published live is that old).
    const from = Math.ceil(rec.fromMs / HOUR_MS) * HOUR_MS;
    const to = rec.anchorMs;
    const q = async (sql: string) =>
      (await pool.query<{ n: number; lo: number; hi: number; sum: number }>(sql, [id, from, to])).rows[0]!;
    const range = (col: string) =>
      `channel_id = $1 and ${col} >= to_timestamp($2::float8 / 1000) and ${col} < to_timestamp($3::float8 / 1000)`;
    const raw = await q(
      `select count(*)::int as n, min(value) as lo, max(value) as hi, sum(value) as sum from readings where ${range('ts')}`,
    );
    const m = await q(
      `select sum(n)::int as n, min(vmin) as lo, max(vmax) as hi, sum(vsum) as sum from readings_1m where ${range('bucket')}`,
    );
    const h = await q(
      `select sum(n)::int as n, min(vmin) as lo, max(vmax) as hi, sum(vsum) as sum from readings_1h where ${range('bucket')}`,
    );
    // Oven zones are sampled every 30 s: two per minute, less thermocouple dropouts.
    expect(raw.n).toBeGreaterThan(((to - from) / MINUTE_MS) * 2 * 0.97);
    for (const r of [m, h]) {
      expect(r.n).toBe(raw.n);
      expect(r.lo).toBe(raw.lo);
      expect(r.hi).toBe(raw.hi);
      expect(r.sum).toBeCloseTo(raw.sum, 6);
    }
    // Every minute bucket's count matches its raw rows (no bucket off by one sample).
    const { rows: bad } = await pool.query(
      `select m.bucket from readings_1m m
         left join lateral (select count(*)::int as n from readings r where r.channel_id = m.channel_id and r.ts >= m.bucket and r.ts < m.bucket + interval '1 minute') r on true
        where m.${range('bucket')} and m.n <> r.n limit 5`,
      [id, from, to],
    );
    expect(bad).toEqual([]);
  });

  it('holds the under-cured story load on oven-b: its stored profile gets far fewer equivalent minutes than a normal load', async () => {
    const story = demoStoryLoad(rec.nowMs);
    const normal = demoOvenCycles(rec.nowMs, { days: rec.days }).find((c) => c.oven === 'oven-b' && c.kind === 'normal')!;
    expect(story.loadStartMs).toBeGreaterThan(rec.fromMs);
    const zones = [await channelId('oven-b-z1', 'air-temp'), await channelId('oven-b-z2', 'air-temp')];
    const profile = async (c: OvenCycle): Promise<ProfilePoint[]> => {
      const { rows } = await pool.query<{ t: number; v: number }>(
        `select (extract(epoch from ts) * 1000)::float8 as t, min(value) as v from readings
          where channel_id = any($1) and ts >= to_timestamp($2::float8 / 1000) and ts <= to_timestamp($3::float8 / 1000)
          group by ts order by ts`,
        [zones, c.rampStartMs, c.loadEndMs],
      );
      return rows.map((r) => ({ minutes: (r.t - c.rampStartMs) / MINUTE_MS, tempC: r.v }));
    };
    // The example window of seeds/windows.ts: Ea 75 kJ/mol at 110 °C, at least 150 equivalent minutes.
    const params = { activationEnergyKJMol: 75, referenceC: 110 };
    const eqStory = equivalentMinutes(await profile(story), params);
    const eqNormal = equivalentMinutes(await profile(normal), params);
    // Hand-computed: 70 min soak at 108.5 °C × 0.912 = 63.8 equivalent minutes plus ramp and cool tails.
    expect(eqStory).toBeGreaterThan(63.8);
    expect(eqStory).toBeLessThan(85);
    expect(eqStory).toBeLessThan(150);
    expect(eqNormal).toBeGreaterThan(150);
    expect(eqStory).toBeLessThan(eqNormal / 2);
  });
});
