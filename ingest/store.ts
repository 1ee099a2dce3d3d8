/**
 * The storage fast path: one transaction per batch.
 *
 * Readings go in by binary COPY (the fastest way into PostgreSQL; duplicates inside the batch
 * were already removed), and the per-minute and per-hour rollups are upserted in the same
 * transaction from the batch's own aggregates. COPY cannot skip rows that are already stored,
 * so when one is (a redelivery after a crash, a journal replayed twice) the COPY fails with a
 * unique violation and the batch is stored again by the exact path:
 * `insert … select from unnest(…) on conflict do nothing`, with the rollups maintained in the
 * same statement from the rows actually inserted, and the refused rows returned as row indexes
 * to become 'duplicate' rejections in the same transaction. Either way a reading is stored and
 * counted in the rollups once.
 */
import { Readable } from 'node:stream';
import { pipeline } from 'node:stream/promises';
import type pg from 'pg';
import { from as copyFrom } from 'pg-copy-streams';
import type { StoredReading } from './handlers/index.ts';
import { duplicateRejections, type Batch, type Rejection } from './handlers/readings.ts';

const DAY_MS = 86_400_000;
const WEEK_MS = 7 * DAY_MS;
/** 1970-01-05 was a Monday: partitions run Monday 00:00 UTC to Monday 00:00 UTC. */
const MONDAY_MS = 4 * DAY_MS;

export function weekStartMs(tMs: number): number {
  return Math.floor((tMs - MONDAY_MS) / WEEK_MS) * WEEK_MS + MONDAY_MS;
}

/** Weekly partitions this process knows to exist. */
const knownWeeks = new Set<number>();

/** Create the weekly partitions the batch needs (outside the batch transaction; cached per week). */
export async function ensurePartitions(pool: pg.Pool, t: readonly number[]): Promise<void> {
  const missing = new Set<number>();
  for (const x of t) {
    const w = weekStartMs(x);
    if (!knownWeeks.has(w)) missing.add(w);
  }
  for (const w of missing) {
    for (let attempt = 0; ; attempt++) {
      try {
        await pool.query(
          "select ensure_reading_partitions(to_timestamp($1::float8 / 1000), to_timestamp($1::float8 / 1000) + interval '1 ms')",
          [w],
        );
        break;
      } catch (e) {
        // Two workers creating the same week at once: the loser sees "already exists"; look again.
        if (attempt >= 2 || (e as { code?: string }).code !== '42P07') throw e;
      }
    }
    knownWeeks.add(w);
  }
}

/** Forget the cache (after retention dropped partitions). */
export function forgetPartitions(): void {
  knownWeeks.clear();
}

const INSERT_READINGS = `
  with src as materialized (
    select c, to_timestamp(t / 1000) as ts, v, q, i
      from unnest($1::int[], $2::float8[], $3::float8[], $4::int2[]) with ordinality as u(c, t, v, q, i)
  ), ins as (
    insert into readings(channel_id, ts, value, quality)
    select c, ts, v, q from src
    on conflict do nothing
    returning channel_id, ts, value
  ), m as (
    insert into readings_1m(channel_id, bucket, vmin, vmax, vsum, n)
    select channel_id, date_bin('1 minute', ts, 'epoch'::timestamptz), min(value), max(value), sum(value), count(*)
      from ins group by 1, 2 order by 1, 2
    on conflict (channel_id, bucket) do update set
      vmin = least(readings_1m.vmin, excluded.vmin), vmax = greatest(readings_1m.vmax, excluded.vmax),
      vsum = readings_1m.vsum + excluded.vsum, n = readings_1m.n + excluded.n
  ), h as (
    insert into readings_1h(channel_id, bucket, vmin, vmax, vsum, n)
    select channel_id, date_bin('1 hour', ts, 'epoch'::timestamptz), min(value), max(value), sum(value), count(*)
      from ins group by 1, 2 order by 1, 2
    on conflict (channel_id, bucket) do update set
      vmin = least(readings_1h.vmin, excluded.vmin), vmax = greatest(readings_1h.vmax, excluded.vmax),
      vsum = readings_1h.vsum + excluded.vsum, n = readings_1h.n + excluded.n
  )
  select (i - 1)::int as i from src s
   where not exists (select 1 from ins where ins.channel_id = s.c and ins.ts = s.ts)`;

const INSERT_REJECTIONS = `
  insert into ingest_rejections(received_at, topic, device_username, channel_id, reason, detail, payload)
  select to_timestamp(r / 1000), tp, du, ci, re, de, pa
    from unnest($1::float8[], $2::text[], $3::text[], $4::int[], $5::text[], $6::text[], $7::text[]) as u(r, tp, du, ci, re, de, pa)`;

const UPSERT_UNKNOWN = `
  insert into unknown_channels(device_id, topic, asset_code, channel_key, first_seen_at, last_seen_at, messages, sample_payload)
  select d, tp, ac, ck, to_timestamp(f / 1000), to_timestamp(l / 1000), n, pa
    from unnest($1::int[], $2::text[], $3::text[], $4::text[], $5::float8[], $6::float8[], $7::int[], $8::text[]) as u(d, tp, ac, ck, f, l, n, pa)
  on conflict (topic) do update set
    last_seen_at = greatest(unknown_channels.last_seen_at, excluded.last_seen_at),
    messages = unknown_channels.messages + excluded.messages,
    sample_payload = excluded.sample_payload,
    resolved_at = null, resolution = null`;

const DEVICE_STATUS = `
  with u as (
    update devices set online = $2, last_seen_at = greatest(last_seen_at, to_timestamp($3::float8 / 1000))
     where id = $1 and online is distinct from $2 returning id
  )
  insert into device_events(device_id, kind, reason, at)
  select id, case when $2 then 'online' else 'offline' end, $4, to_timestamp($3::float8 / 1000) from u
  returning device_id`;

export interface CommitResult {
  inserted: StoredReading[];
  rejections: number;
  /** Devices whose online state changed. */
  devices: { deviceId: number; online: boolean }[];
}

/** 2000-01-01T00:00:00Z in epoch ms: PostgreSQL's binary timestamps count µs from there. */
const PG_EPOCH_MS = 946_684_800_000;
const COPY_SIGNATURE = Buffer.from('PGCOPY\n\xff\r\n\0', 'latin1');

/** The batch's rows in PostgreSQL's binary COPY format: (int4, timestamptz, float8, int2) per row. */
export function copyBinary(batch: Batch): Buffer {
  const n = batch.rows;
  const buf = Buffer.allocUnsafe(19 + n * 40 + 2);
  COPY_SIGNATURE.copy(buf, 0);
  buf.writeInt32BE(0, 11); // flags
  buf.writeInt32BE(0, 15); // header extension length
  let o = 19;
  for (let i = 0; i < n; i++) {
    buf.writeInt16BE(4, o);
    buf.writeInt32BE(4, o + 2);
    buf.writeInt32BE(batch.ch[i]!, o + 6);
    buf.writeInt32BE(8, o + 10);
    const us = (batch.t[i]! - PG_EPOCH_MS) * 1000; // whole ms → whole µs, exact below 2^53
    const hi = Math.floor(us / 4_294_967_296);
    buf.writeInt32BE(hi, o + 14);
    buf.writeUInt32BE(us - hi * 4_294_967_296, o + 18);
    buf.writeInt32BE(8, o + 22);
    buf.writeDoubleBE(batch.v[i]!, o + 26);
    buf.writeInt32BE(2, o + 34);
    buf.writeInt16BE(batch.q[i]!, o + 38);
    o += 40;
  }
  buf.writeInt16BE(-1, o);
  return buf;
}

interface Aggregates {
  c: number[];
  b: number[];
  min: number[];
  max: number[];
  sum: number[];
  n: number[];
}

/** min, max, sum and count per channel and epoch-aligned bucket of `widthMs`, sorted by (channel, bucket). */
export function aggregate(batch: Batch, widthMs: number): Aggregates {
  const byChannel = new Map<number, Map<number, { min: number; max: number; sum: number; n: number }>>();
  for (let i = 0; i < batch.rows; i++) {
    const c = batch.ch[i]!;
    const v = batch.v[i]!;
    const b = Math.floor(batch.t[i]! / widthMs) * widthMs;
    let m = byChannel.get(c);
    if (!m) byChannel.set(c, (m = new Map()));
    const a = m.get(b);
    if (a) {
      if (v < a.min) a.min = v;
      if (v > a.max) a.max = v;
      a.sum += v;
      a.n++;
    } else m.set(b, { min: v, max: v, sum: v, n: 1 });
  }
  const out: Aggregates = { c: [], b: [], min: [], max: [], sum: [], n: [] };
  for (const c of [...byChannel.keys()].sort((x, y) => x - y)) {
    const m = byChannel.get(c)!;
    for (const b of [...m.keys()].sort((x, y) => x - y)) {
      const a = m.get(b)!;
      out.c.push(c);
      out.b.push(b);
      out.min.push(a.min);
      out.max.push(a.max);
      out.sum.push(a.sum);
      out.n.push(a.n);
    }
  }
  return out;
}

const UPSERT_ROLLUPS = (table: 'readings_1m' | 'readings_1h', from: number) => `
  insert into ${table}(channel_id, bucket, vmin, vmax, vsum, n)
  select c, to_timestamp(b / 1000), mn, mx, sm, n
    from unnest($${from}::int[], $${from + 1}::float8[], $${from + 2}::float8[], $${from + 3}::float8[], $${from + 4}::float8[], $${from + 5}::int[]) as u(c, b, mn, mx, sm, n)
  on conflict (channel_id, bucket) do update set
    vmin = least(${table}.vmin, excluded.vmin), vmax = greatest(${table}.vmax, excluded.vmax),
    vsum = ${table}.vsum + excluded.vsum, n = ${table}.n + excluded.n`;
const UPSERT_BOTH_ROLLUPS = `with m as (${UPSERT_ROLLUPS('readings_1m', 1)}) ${UPSERT_ROLLUPS('readings_1h', 7)}`;

const params = (a: Aggregates) => [a.c, a.b, a.min, a.max, a.sum, a.n];

class DuplicateInBatch extends Error {}

/** Store one batch in one transaction (COPY first; the exact path when a row is already stored). Throws when the database fails. */
export async function commitBatch(pool: pg.Pool, batch: Batch): Promise<CommitResult> {
  if (batch.rows) await ensurePartitions(pool, batch.t);
  if (batch.rows) {
    try {
      return await commitOnce(pool, batch, 'copy');
    } catch (e) {
      if (!(e instanceof DuplicateInBatch)) throw e;
    }
  }
  return commitOnce(pool, batch, 'exact');
}

async function commitOnce(pool: pg.Pool, batch: Batch, how: 'copy' | 'exact'): Promise<CommitResult> {
  const client = await pool.connect();
  let ok = false;
  let healthy = false;
  try {
    await client.query('begin');
    let refused: number[] = [];
    if (batch.rows && how === 'copy') {
      try {
        await pipeline(
          Readable.from([copyBinary(batch)]),
          client.query(copyFrom('copy readings(channel_id, ts, value, quality) from stdin (format binary)')),
        );
      } catch (e) {
        if ((e as { code?: string }).code === '23505') throw new DuplicateInBatch();
        throw e;
      }
      await client.query(UPSERT_BOTH_ROLLUPS, [...params(aggregate(batch, 60_000)), ...params(aggregate(batch, 3_600_000))]);
    } else if (batch.rows) {
      const r = await client.query<{ i: number }>(INSERT_READINGS, [batch.ch, batch.t, batch.v, batch.q]);
      refused = r.rows.map((x) => x.i);
    }
    const rejections: Rejection[] = refused.length
      ? [...batch.rejections, ...duplicateRejections(batch, refused)]
      : batch.rejections;
    if (rejections.length) {
      await client.query(INSERT_REJECTIONS, [
        rejections.map((r) => r.rxMs),
        rejections.map((r) => r.topic),
        rejections.map((r) => r.deviceUsername),
        rejections.map((r) => r.channelId),
        rejections.map((r) => r.reason),
        rejections.map((r) => r.detail),
        rejections.map((r) => r.payload),
      ]);
    }
    if (batch.unknown.length) {
      const agg = new Map<string, { d: number; ac: string; ck: string; f: number; l: number; n: number; pa: string }>();
      for (const u of batch.unknown) {
        const a = agg.get(u.topic);
        if (a) {
          a.f = Math.min(a.f, u.rxMs);
          a.l = Math.max(a.l, u.rxMs);
          a.n++;
          a.pa = u.payload;
        } else agg.set(u.topic, { d: u.deviceId, ac: u.assetCode, ck: u.channelKey, f: u.rxMs, l: u.rxMs, n: 1, pa: u.payload });
      }
      const list = [...agg.entries()].sort(([a], [b]) => (a < b ? -1 : 1));
      await client.query(UPSERT_UNKNOWN, [
        list.map(([, a]) => a.d),
        list.map(([t]) => t),
        list.map(([, a]) => a.ac),
        list.map(([, a]) => a.ck),
        list.map(([, a]) => a.f),
        list.map(([, a]) => a.l),
        list.map(([, a]) => a.n),
        list.map(([, a]) => a.pa),
      ]);
    }
    const devices: CommitResult['devices'] = [];
    for (const s of batch.status) {
      const r = await client.query(DEVICE_STATUS, [s.deviceId, s.online, s.rxMs, `status message on ${s.topic}`]);
      if (r.rowCount) devices.push({ deviceId: s.deviceId, online: s.online });
    }
    await client.query('commit');
    ok = true;
    const skip = new Set(refused);
    const inserted: StoredReading[] = [];
    for (let i = 0; i < batch.rows; i++) {
      if (!skip.has(i)) inserted.push({ channelId: batch.ch[i]!, tMs: batch.t[i]!, value: batch.v[i]!, quality: batch.q[i]! });
    }
    return { inserted, rejections: rejections.length, devices };
  } catch (e) {
    if (e instanceof DuplicateInBatch) healthy = true;
    throw e;
  } finally {
    if (!ok) await client.query('rollback').catch(() => (healthy = false));
    // A client whose connection broke must not go back to the pool.
    client.release(ok || healthy ? undefined : true);
  }
}
