/**
 * Reading the time series back (worker-safe: takes the process's Sequelize instance, imports
 * nothing from Astro). The bucketed reads are the measured hot path (`npm run bench:charts`):
 * raw SQL through `sequelize.query` with bind parameters.
 *
 * - {@link queryReadings}: raw rows when the range holds at most `maxPoints` samples (estimated
 *   from the rollups' counts), else epoch-aligned min/max/mean buckets — from the hourly
 *   rollup, the minute rollup or raw rows (`date_bin`) depending on the bucket width
 *   (src/lib/domain/series/buckets.ts) — never more than `maxPoints` buckets. Times are epoch
 *   ms computed in SQL (pg's Date conversion costs more than the query; see stack.md).
 * - {@link rebuildRollups}: recompute readings_1m / readings_1h of one channel over a range
 *   from raw rows (after bulk loads with generate_series or COPY, which bypass the worker).
 * - {@link applyRetention}: the retention policy (README "Retention").
 */
import { Op, QueryTypes, type Sequelize } from 'sequelize';
import { Channel, IngestRejection } from '../../../db/models/index.ts';
import { BUCKET_LADDER_MS, chooseBucketMs, chooseSource } from '../domain/series/buckets.ts';
import {
  RetentionSettingsSchema,
  type ReadingsQuery,
  type ReadingsResponse,
  type RetentionSettings,
} from '../shared/telemetry.ts';

const MINUTE_MS = 60_000;
const HOUR_MS = 3_600_000;
const DAY_MS = 86_400_000;

export interface ChannelBrief {
  id: number;
  unit: string;
}

export async function channelBrief(sequelize: Sequelize, channelId: number): Promise<ChannelBrief | null> {
  void sequelize; // the models are initialised on it
  const c = await Channel.findByPk(channelId, { attributes: ['id', 'unit'], raw: true });
  return c ? { id: c.id, unit: c.unit } : null;
}

/**
 * The bucket width for `[from, to)`: the ladder's choice, widened until the epoch-aligned
 * buckets touching the range number at most `maxPoints` (alignment can add a partial bucket
 * at each end).
 */
export function alignedBucketMs(from: number, to: number, maxPoints: number): number {
  let w = chooseBucketMs(to - from, maxPoints);
  const count = (x: number) => Math.ceil(to / x) - Math.floor(from / x);
  while (count(w) > maxPoints) {
    const next = BUCKET_LADDER_MS.find((l) => l > w);
    w = next ?? Math.max(w + DAY_MS, Math.ceil((to - from) / Math.max(1, maxPoints - 1) / DAY_MS) * DAY_MS);
  }
  return w;
}

/** Samples of one channel in `[from, to)`, estimated from the rollups (exact for whole minutes). */
export async function estimateCount(sequelize: Sequelize, channelId: number, from: number, to: number): Promise<number> {
  const table = to - from > 2 * DAY_MS ? 'readings_1h' : 'readings_1m';
  const width = table === 'readings_1h' ? HOUR_MS : MINUTE_MS;
  const rows = await sequelize.query<{ n: number }>(
    `select coalesce(sum(n), 0)::float8 as n from ${table}
      where channel_id = $1 and bucket >= to_timestamp($2::float8 / 1000) and bucket < to_timestamp($3::float8 / 1000)`,
    { bind: [channelId, Math.floor(from / width) * width, to], type: QueryTypes.SELECT },
  );
  return rows[0]?.n ?? 0;
}

/** The readings endpoint's answer for one channel (product.md §6). */
export async function queryReadings(sequelize: Sequelize, channel: ChannelBrief, q: ReadingsQuery): Promise<ReadingsResponse> {
  const { from, to, maxPoints } = q;
  const head = { channelId: channel.id, unit: channel.unit, from, to };
  const estimate = await estimateCount(sequelize, channel.id, from, to);
  if (estimate <= maxPoints) {
    // Rollups can lag a bulk load that bypassed them; the limit keeps the promise regardless.
    const rows = await sequelize.query<{ t: number; v: number; q: number }>(
      `select (extract(epoch from ts) * 1000)::float8 as t, value as v, quality as q from readings
        where channel_id = $1 and ts >= to_timestamp($2::float8 / 1000) and ts < to_timestamp($3::float8 / 1000)
        order by ts limit $4`,
      { bind: [channel.id, from, to, maxPoints + 1], type: QueryTypes.SELECT },
    );
    if (rows.length <= maxPoints) {
      return {
        ...head,
        mode: 'raw',
        bucketMs: null,
        points: rows.map((r) => (r.q ? { t: r.t, v: r.v, q: r.q } : { t: r.t, v: r.v })),
      };
    }
  }
  const bucketMs = alignedBucketMs(from, to, maxPoints);
  const preferred = chooseSource(to - from, maxPoints);
  // A rollup serves only widths that are whole multiples of its own bucket.
  const source: 'raw' | 'minute' | 'hour' =
    preferred === 'hour' && bucketMs % HOUR_MS === 0
      ? 'hour'
      : preferred !== 'raw' && bucketMs % MINUTE_MS === 0
        ? 'minute'
        : 'raw';
  const sql =
    source === 'raw'
      ? `select (extract(epoch from b) * 1000)::float8 as t, min(value) as min, max(value) as max, avg(value) as mean, count(*)::int as n
           from (select date_bin($4::float8 * interval '1 millisecond', ts, 'epoch'::timestamptz) as b, value from readings
                  where channel_id = $1 and ts >= to_timestamp($2::float8 / 1000) and ts < to_timestamp($3::float8 / 1000)) x
          group by b order by b`
      : `select (extract(epoch from b) * 1000)::float8 as t, min(vmin) as min, max(vmax) as max, sum(vsum) / sum(n) as mean, sum(n)::int as n
           from (select date_bin($4::float8 * interval '1 millisecond', bucket, 'epoch'::timestamptz) as b, vmin, vmax, vsum, n
                   from ${source === 'hour' ? 'readings_1h' : 'readings_1m'}
                  where channel_id = $1 and bucket >= to_timestamp($2::float8 / 1000) and bucket < to_timestamp($3::float8 / 1000)) x
          group by b order by b`;
  const rollupWidth = source === 'hour' ? HOUR_MS : source === 'minute' ? MINUTE_MS : 1;
  const rows = await sequelize.query<{ t: number; min: number; max: number; mean: number; n: number }>(sql, {
    bind: [channel.id, Math.floor(from / rollupWidth) * rollupWidth, to, bucketMs],
    type: QueryTypes.SELECT,
  });
  return { ...head, mode: 'bucketed', bucketMs, source, buckets: rows.slice(0, maxPoints) };
}

/**
 * Recompute the minute and hour rollups of one channel over `[fromMs, toMs)` (widened to
 * whole hours) from the raw rows. Idempotent; use after loading readings in bulk.
 */
export async function rebuildRollups(sequelize: Sequelize, channelId: number, fromMs: number, toMs: number): Promise<void> {
  const from = Math.floor(fromMs / HOUR_MS) * HOUR_MS;
  const to = Math.ceil(toMs / HOUR_MS) * HOUR_MS;
  await sequelize.transaction(async (transaction) => {
    for (const [table, width] of [
      ['readings_1m', '1 minute'],
      ['readings_1h', '1 hour'],
    ] as const) {
      await sequelize.query(
        `delete from ${table} where channel_id = $1 and bucket >= to_timestamp($2::float8 / 1000) and bucket < to_timestamp($3::float8 / 1000)`,
        { bind: [channelId, from, to], transaction, type: QueryTypes.BULKDELETE },
      );
      await sequelize.query(
        `insert into ${table}(channel_id, bucket, vmin, vmax, vsum, n)
         select channel_id, date_bin('${width}', ts, 'epoch'::timestamptz), min(value), max(value), sum(value), count(*)
           from readings where channel_id = $1 and ts >= to_timestamp($2::float8 / 1000) and ts < to_timestamp($3::float8 / 1000)
          group by 1, 2`,
        { bind: [channelId, from, to], transaction, type: QueryTypes.INSERT },
      );
    }
  });
}

export async function retentionSettings(sequelize: Sequelize): Promise<RetentionSettings | null> {
  const rows = await sequelize.query<{ value: unknown }>(`select value from site_settings where key = 'retention'`, {
    type: QueryTypes.SELECT,
  });
  const r = RetentionSettingsSchema.safeParse(rows[0]?.value);
  return r.success ? r.data : null;
}

export interface RetentionResult {
  droppedPartitions: string[];
  deletedRaw: number;
  deletedMinute: number;
  deletedHour: number;
  deletedRejections: number;
}

/**
 * Apply the retention policy at `nowMs`:
 * 1. whole weekly partitions ending before the longest raw retention of any channel are dropped;
 * 2. raw rows older than each channel's own retention are deleted (channel by channel);
 * 3. minute rollups older than `minuteRollupDays`, hourly ones older than `hourRollupDays`
 *    (when set) and refused messages older than `rejectionDays` are deleted.
 * A channel's raw retention is `rawDaysByKind[kind]`, else its `raw_retention_days` column.
 */
export async function applyRetention(
  sequelize: Sequelize,
  nowMs: number,
  settings?: RetentionSettings,
): Promise<RetentionResult> {
  const s = settings ?? (await retentionSettings(sequelize));
  const out: RetentionResult = { droppedPartitions: [], deletedRaw: 0, deletedMinute: 0, deletedHour: 0, deletedRejections: 0 };
  if (!s) return out;
  const channels = await Channel.findAll({ attributes: ['id', 'kind', 'rawRetentionDays'], raw: true });
  const days = (c: { kind: string; rawRetentionDays: number }) => s.rawDaysByKind[c.kind] ?? c.rawRetentionDays;
  const longest = channels.reduce((m, c) => Math.max(m, days(c)), 0);
  const remove = (sql: string, bind: unknown[]) => sequelize.query(sql, { bind, type: QueryTypes.BULKDELETE });
  if (longest > 0) {
    const cutoff = nowMs - longest * DAY_MS;
    const parts = await sequelize.query<{ name: string; upper_ms: number }>(
      `
      select c.relname as name,
             (extract(epoch from (regexp_match(pg_get_expr(c.relpartbound, c.oid), 'TO \\(''([^'']+)''\\)'))[1]::timestamptz) * 1000)::float8 as upper_ms
        from pg_inherits i join pg_class c on c.oid = i.inhrelid join pg_class p on p.oid = i.inhparent
       where p.relname = 'readings'`,
      { type: QueryTypes.SELECT },
    );
    for (const p of parts) {
      if (p.upper_ms !== null && p.upper_ms <= cutoff && /^readings_\d{4}w\d{2}$/.test(p.name)) {
        await sequelize.query(`drop table if exists "${p.name}"`, { type: QueryTypes.RAW });
        out.droppedPartitions.push(p.name);
      }
    }
  }
  for (const c of channels) {
    out.deletedRaw += await remove(`delete from readings where channel_id = $1 and ts < to_timestamp($2::float8 / 1000)`, [
      c.id,
      nowMs - days(c) * DAY_MS,
    ]);
  }
  out.deletedMinute = await remove(`delete from readings_1m where bucket < to_timestamp($1::float8 / 1000)`, [
    nowMs - s.minuteRollupDays * DAY_MS,
  ]);
  if (s.hourRollupDays !== null) {
    out.deletedHour = await remove(`delete from readings_1h where bucket < to_timestamp($1::float8 / 1000)`, [
      nowMs - s.hourRollupDays * DAY_MS,
    ]);
  }
  out.deletedRejections = await IngestRejection.destroy({
    where: { receivedAt: { [Op.lt]: new Date(nowMs - s.rejectionDays * DAY_MS) } },
  });
  return out;
}
