/**
 * The demo plant's seeded history: a few weeks of readings for every demo channel from the
 * generators of `plant-model.ts`, loaded fast (binary COPY through pg-copy-streams, one
 * transaction), then the per-minute and per-hour rollups rebuilt from raw for the whole range.
 *
 * Idempotent: does nothing when the readings table already holds rows older than 7 days. When
 * younger readings exist (a database that ran the live simulator before it had a history), each
 * channel's history stops just before that channel's first stored reading, so nothing collides.
 * Reversible: `unseedHistory` deletes what `seedHistory` wrote for the same range.
 */
import { Readable } from 'node:stream';
import { pipeline } from 'node:stream/promises';
import type pg from 'pg';
import { from as copyFrom } from 'pg-copy-streams';
import { DAY_MS, DEFAULT_HISTORY_DAYS, HOUR_MS, buildPlantModel, historySeries, type ChannelSeries } from './plant-model.ts';
import { DEMO_SITE } from './demo-plant.ts';

export interface SeedHistoryOptions {
  /** "Now" of the history (default Date.now()); the lists of plant-model.ts use the same value. */
  nowMs?: number;
  /** Days of history before now (default 21). */
  days?: number;
  log?: (line: string) => void;
}

export interface SeedHistoryResult {
  seeded: boolean;
  /** Why nothing was seeded. */
  reason?: string;
  rows: number;
  fromMs: number;
  toMs: number;
  /** Wall time of each step, ms. */
  timings: { generate: number; copy: number; rollups: number; total: number };
}

/** PostgreSQL's binary COPY epoch (2000-01-01T00:00:00Z) in Unix ms. */
const PG_EPOCH_MS = 946_684_800_000;
const COPY_SIGNATURE = Buffer.from('PGCOPY\n\xff\r\n\0', 'binary');
const ROW_BYTES = 40;

interface Target {
  channelId: number;
  series: ChannelSeries;
  count: number;
}

/** Encodes rows as PostgreSQL binary COPY tuples (channel_id int4, ts timestamptz, value float8, quality int2). */
async function* binaryCopy(targets: readonly Target[]): AsyncGenerator<Buffer> {
  const header = Buffer.alloc(COPY_SIGNATURE.length + 8);
  COPY_SIGNATURE.copy(header, 0);
  yield header; // flags and header-extension length are both 0
  const CHUNK_ROWS = 16_384;
  for (const { channelId, series, count } of targets) {
    for (let start = 0; start < count; start += CHUNK_ROWS) {
      const end = Math.min(count, start + CHUNK_ROWS);
      const buf = Buffer.allocUnsafe((end - start) * ROW_BYTES);
      let o = 0;
      for (let i = start; i < end; i++) {
        const us = ((series.tMs[i] as number) - PG_EPOCH_MS) * 1000;
        const hi = Math.floor(us / 4294967296);
        o = buf.writeInt16BE(4, o);
        o = buf.writeInt32BE(4, o);
        o = buf.writeInt32BE(channelId, o);
        o = buf.writeInt32BE(8, o);
        o = buf.writeInt32BE(hi, o);
        o = buf.writeUInt32BE(us - hi * 4294967296, o);
        o = buf.writeInt32BE(8, o);
        o = buf.writeDoubleBE(series.values[i] as number, o);
        o = buf.writeInt32BE(2, o);
        o = buf.writeInt16BE(0, o);
      }
      yield buf;
    }
  }
  const trailer = Buffer.alloc(2);
  trailer.writeInt16BE(-1, 0);
  yield trailer;
}

/** Index of the first time ≥ limit (time-ordered array). */
function countBefore(tMs: readonly number[], limit: number): number {
  let lo = 0;
  let hi = tMs.length;
  while (lo < hi) {
    const mid = (lo + hi) >> 1;
    if ((tMs[mid] as number) < limit) lo = mid + 1;
    else hi = mid;
  }
  return lo;
}

/** Channel ids of the demo site by "asset/channel key", with each channel's first stored reading (epoch ms or null). */
async function demoChannels(client: pg.PoolClient): Promise<Map<string, { id: number; firstMs: number | null }>> {
  const { rows } = await client.query<{ id: number; asset: string; key: string; first_ms: number | null }>(
    `select c.id, a.code as asset, c.key,
            (select extract(epoch from min(r.ts)) * 1000 from readings r where r.channel_id = c.id)::float8 as first_ms
       from channels c join assets a on a.id = c.asset_id join sites s on s.id = a.site_id
      where s.code = $1`,
    [DEMO_SITE.code],
  );
  return new Map(rows.map((r) => [`${r.asset}/${r.key}`, { id: r.id, firstMs: r.first_ms }]));
}

/**
 * Rebuilds readings_1m and readings_1h for [fromMs, toMs) from the raw readings (one statement
 * each; buckets on the epoch-aligned minute/hour grid by date_bin, as the ingest worker's). The hourly rollup is built from the
 * freshly rebuilt minute rollup — min of mins, max of maxes, sums of sums and counts give
 * exactly what the raw rows give, at a fraction of the work. Rows go in ordered by the primary
 * key (about half the time of hash order: the index grows at its right edge). Existing
 * buckets are overwritten: raw is the truth.
 */
export async function rebuildRollups(client: pg.ClientBase, fromMs: number, toMs: number): Promise<void> {
  const from = new Date(Math.floor(fromMs / HOUR_MS) * HOUR_MS);
  const to = new Date(Math.ceil(toMs / HOUR_MS) * HOUR_MS);
  await client.query(
    `insert into readings_1m (channel_id, bucket, vmin, vmax, vsum, n)
     select channel_id, date_bin('1 minute', ts, 'epoch'::timestamptz), min(value), max(value), sum(value), count(*)
       from readings where ts >= $1 and ts < $2
      group by 1, 2 order by 1, 2
     on conflict (channel_id, bucket) do update
        set vmin = excluded.vmin, vmax = excluded.vmax, vsum = excluded.vsum, n = excluded.n`,
    [from, to],
  );
  await client.query(
    `insert into readings_1h (channel_id, bucket, vmin, vmax, vsum, n)
     select channel_id, date_bin('1 hour', bucket, 'epoch'::timestamptz), min(vmin), max(vmax), sum(vsum), sum(n)
       from readings_1m where bucket >= $1 and bucket < $2
      group by 1, 2 order by 1, 2
     on conflict (channel_id, bucket) do update
        set vmin = excluded.vmin, vmax = excluded.vmax, vsum = excluded.vsum, n = excluded.n`,
    [from, to],
  );
}

/** Seeds `days` of history up to nowMs (see the module comment). */
export async function seedHistory(pool: pg.Pool, opts: SeedHistoryOptions = {}): Promise<SeedHistoryResult> {
  const t0 = performance.now();
  const log = opts.log ?? (() => {});
  const nowMs = opts.nowMs ?? Date.now();
  const days = opts.days ?? DEFAULT_HISTORY_DAYS;
  const model = buildPlantModel(nowMs);
  const fromMs = model.anchorMs - days * DAY_MS;
  const timings = { generate: 0, copy: 0, rollups: 0, total: 0 };
  const skip = (reason: string): SeedHistoryResult => {
    timings.total = performance.now() - t0;
    return { seeded: false, reason, rows: 0, fromMs, toMs: nowMs, timings };
  };
  const client = await pool.connect();
  try {
    const old = await client.query<{ hit: boolean }>(`select exists (select 1 from readings where ts < $1) as hit`, [
      new Date(nowMs - 7 * DAY_MS),
    ]);
    if (old.rows[0]?.hit) return skip('the readings table already holds a history');
    const channels = await demoChannels(client);
    if (channels.size === 0) return skip('the demo plant is not seeded');

    let tg = performance.now();
    const targets: Target[] = [];
    for (const series of historySeries(model, fromMs, nowMs)) {
      const ch = channels.get(`${series.asset}/${series.channel}`);
      if (!ch) continue;
      const count = ch.firstMs === null ? series.tMs.length : countBefore(series.tMs, Math.min(nowMs, ch.firstMs));
      if (count > 0) targets.push({ channelId: ch.id, series, count });
    }
    const rows = targets.reduce((s, t) => s + t.count, 0);
    timings.generate = performance.now() - tg;

    tg = performance.now();
    await client.query('begin');
    await client.query(`select ensure_reading_partitions($1, $2)`, [new Date(fromMs - DAY_MS), new Date(nowMs + 7 * DAY_MS)]);
    const copy = client.query(copyFrom('copy readings (channel_id, ts, value, quality) from stdin with (format binary)'));
    await pipeline(Readable.from(binaryCopy(targets)), copy);
    timings.copy = performance.now() - tg;

    tg = performance.now();
    await rebuildRollups(client, fromMs, nowMs);
    // Where the lists of plant-model.ts come from, for anyone who rebuilds them later.
    await client.query(
      `insert into site_settings (key, value, updated_at) values ('demoHistory', $1::jsonb, now())
       on conflict (key) do update set value = excluded.value, updated_at = now()`,
      [JSON.stringify({ nowMs, anchorMs: model.anchorMs, days, fromMs, rows })],
    );
    await client.query('commit');
    timings.rollups = performance.now() - tg;
    timings.total = performance.now() - t0;
    log(
      `Seeded ${rows.toLocaleString('en-GB')} readings of history (${days} days) in ${(timings.total / 1000).toFixed(1)} s ` +
        `(generate ${(timings.generate / 1000).toFixed(1)} s, COPY ${(timings.copy / 1000).toFixed(1)} s, rollups ${(timings.rollups / 1000).toFixed(1)} s).`,
    );
    return { seeded: true, rows, fromMs, toMs: nowMs, timings };
  } catch (e) {
    await client.query('rollback').catch(() => {});
    throw e;
  } finally {
    client.release();
  }
}

/** What `seedHistory` recorded in site_settings 'demoHistory' (null when no history was seeded). */
export interface DemoHistoryRecord {
  nowMs: number;
  anchorMs: number;
  days: number;
  fromMs: number;
  rows: number;
}

/** The seeded history's nowMs and days, to rebuild the same lists: `demoOvenCycles(r.nowMs, {days: r.days})`. */
export async function demoHistoryRecord(pool: pg.Pool): Promise<DemoHistoryRecord | null> {
  const { rows } = await pool.query<{ value: DemoHistoryRecord }>(`select value from site_settings where key = 'demoHistory'`);
  return rows[0]?.value ?? null;
}

/**
 * Reverses `seedHistory` for the same range: deletes the demo channels' readings and rollups
 * in [fromMs, toMs] (on a database that holds nothing else there).
 */
export async function unseedHistory(pool: pg.Pool, range: { fromMs: number; toMs: number }): Promise<void> {
  const from = new Date(Math.floor(range.fromMs / HOUR_MS) * HOUR_MS);
  const to = new Date(Math.ceil(range.toMs / HOUR_MS) * HOUR_MS);
  const ids = `select c.id from channels c join assets a on a.id = c.asset_id join sites s on s.id = a.site_id where s.code = $3`;
  for (const [table, col] of [
    ['readings', 'ts'],
    ['readings_1m', 'bucket'],
    ['readings_1h', 'bucket'],
  ] as const) {
    await pool.query(`delete from ${table} where ${col} >= $1 and ${col} <= $2 and channel_id in (${ids})`, [
      from,
      to,
      DEMO_SITE.code,
    ]);
  }
  await pool.query(`delete from site_settings where key = 'demoHistory'`);
}
