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
 *
 * Every transaction runs on a connection of the process's one Sequelize pool. A batch of
 * readings only (the common case) runs begin/COPY/rollups/commit on a borrowed connection; a
 * batch with records uses a Sequelize transaction: COPY and rollups on its own pg client, the
 * exact path through `sequelize.query` with bind parameters, and the records (rejections,
 * unknown channels, device status and events) through their models, all in that transaction.
 */
import { Readable } from 'node:stream';
import { pipeline } from 'node:stream/promises';
import type pg from 'pg';
import { from as copyFrom } from 'pg-copy-streams';
import { Op, QueryTypes, type Sequelize, type Transaction } from 'sequelize';
import { Device, DeviceEvent, IngestRejection, UnknownChannel } from '../db/models/index.ts';
import { duplicateRejections, type Batch, type Rejection, type StatusChange, type UnknownSighting } from './batch.ts';
import type { StoredReading } from './handlers/types.ts';
import { ensurePartitions, pgCode } from './partitions.ts';

export { ensurePartitions, forgetPartitions, weekStartMs } from './partitions.ts';

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

/**
 * Store one batch in one transaction (COPY first; the exact path when a row is already stored),
 * on a connection of the process's Sequelize pool. Throws when the database fails.
 */
export async function commitBatch(sequelize: Sequelize, batch: Batch): Promise<CommitResult> {
  if (batch.rows) await ensurePartitions(sequelize, batch.t);
  if (batch.rows) {
    try {
      return await commitOnce(sequelize, batch, 'copy');
    } catch (e) {
      if (!(e instanceof DuplicateInBatch)) throw e;
    }
  }
  return commitOnce(sequelize, batch, 'exact');
}

/** The pg client under a Sequelize transaction (Sequelize does not type it). */
function clientOf(t: Transaction): pg.ClientBase {
  return (t as unknown as { connection: pg.ClientBase }).connection;
}

async function commitOnce(sequelize: Sequelize, batch: Batch, how: 'copy' | 'exact'): Promise<CommitResult> {
  if (how === 'copy' && !batch.rejections.length && !batch.unknown.length && !batch.status.length) {
    return commitReadings(sequelize, batch);
  }
  // A managed transaction: rolled back when anything throws; a connection whose rollback fails is destroyed, not pooled.
  const { refused, rejections, devices } = await sequelize.transaction(async (transaction) => {
    let refused: number[] = [];
    if (batch.rows && how === 'copy') {
      try {
        await pipeline(
          Readable.from([copyBinary(batch)]),
          clientOf(transaction).query(copyFrom('copy readings(channel_id, ts, value, quality) from stdin (format binary)')),
        );
      } catch (e) {
        if (pgCode(e) === '23505') throw new DuplicateInBatch();
        throw e;
      }
      // On the same pg client as the COPY: one statement per batch, no result to map.
      await clientOf(transaction).query(UPSERT_BOTH_ROLLUPS, [
        ...params(aggregate(batch, 60_000)),
        ...params(aggregate(batch, 3_600_000)),
      ]);
    } else if (batch.rows) {
      const rows = await sequelize.query<{ i: number }>(INSERT_READINGS, {
        bind: [batch.ch, batch.t, batch.v, batch.q],
        transaction,
        type: QueryTypes.SELECT,
      });
      refused = rows.map((x) => x.i);
    }
    const rejections: Rejection[] = refused.length
      ? [...batch.rejections, ...duplicateRejections(batch, refused)]
      : batch.rejections;
    if (rejections.length) await storeRejections(rejections, transaction);
    if (batch.unknown.length) await storeUnknown(sequelize, batch.unknown, transaction);
    const devices: CommitResult['devices'] = [];
    for (const s of batch.status)
      if (await storeStatus(sequelize, s, transaction)) devices.push({ deviceId: s.deviceId, online: s.online });
    return { refused, rejections, devices };
  });
  const skip = new Set(refused);
  const inserted: StoredReading[] = [];
  for (let i = 0; i < batch.rows; i++) {
    if (!skip.has(i)) inserted.push({ channelId: batch.ch[i]!, tMs: batch.t[i]!, value: batch.v[i]!, quality: batch.q[i]! });
  }
  return { inserted, rejections: rejections.length, devices };
}

/**
 * The common case, readings and nothing else: begin, COPY, rollups, commit on one connection
 * borrowed from the Sequelize pool, without a Sequelize transaction object (it costs about
 * half a millisecond of CPU per batch, measured, and the batch has no record for a model).
 */
async function commitReadings(sequelize: Sequelize, batch: Batch): Promise<CommitResult> {
  const manager = sequelize.connectionManager;
  const client = (await manager.getConnection({ type: 'write' })) as unknown as pg.ClientBase;
  let ok = false;
  let healthy = false;
  try {
    await client.query('begin');
    try {
      await pipeline(
        Readable.from([copyBinary(batch)]),
        client.query(copyFrom('copy readings(channel_id, ts, value, quality) from stdin (format binary)')),
      );
    } catch (e) {
      if (pgCode(e) === '23505') throw new DuplicateInBatch();
      throw e;
    }
    await client.query(UPSERT_BOTH_ROLLUPS, [...params(aggregate(batch, 60_000)), ...params(aggregate(batch, 3_600_000))]);
    await client.query('commit');
    ok = true;
    const inserted: StoredReading[] = [];
    for (let i = 0; i < batch.rows; i++) {
      inserted.push({ channelId: batch.ch[i]!, tMs: batch.t[i]!, value: batch.v[i]!, quality: batch.q[i]! });
    }
    return { inserted, rejections: 0, devices: [] };
  } catch (e) {
    if (e instanceof DuplicateInBatch) healthy = true;
    throw e;
  } finally {
    if (!ok) await client.query('rollback').catch(() => (healthy = false));
    // A connection that broke (or whose state is unknown) must not go back to the pool.
    if (ok || healthy) manager.releaseConnection(client as never);
    else await manager.destroyConnection(client as never).catch(() => {});
  }
}

async function storeRejections(rejections: readonly Rejection[], transaction: Transaction): Promise<void> {
  await IngestRejection.bulkCreate(
    rejections.map((r) => ({
      receivedAt: new Date(r.rxMs),
      topic: r.topic,
      deviceUsername: r.deviceUsername,
      channelId: r.channelId,
      reason: r.reason,
      detail: r.detail,
      payload: r.payload,
    })),
    { transaction, validate: false },
  );
}

interface UnknownCount {
  d: number;
  ac: string;
  ck: string;
  f: number;
  l: number;
  n: number;
  pa: string;
}

/**
 * Topics of known devices that no channel matches: one row per topic, counted. An entry an
 * engineer had resolved or dismissed is listed again when the topic comes back.
 */
async function storeUnknown(
  sequelize: Sequelize,
  sightings: readonly UnknownSighting[],
  transaction: Transaction,
): Promise<void> {
  const agg = new Map<string, UnknownCount>();
  for (const u of sightings) {
    const a = agg.get(u.topic);
    if (a) {
      a.f = Math.min(a.f, u.rxMs);
      a.l = Math.max(a.l, u.rxMs);
      a.n++;
      a.pa = u.payload;
    } else agg.set(u.topic, { d: u.deviceId, ac: u.assetCode, ck: u.channelKey, f: u.rxMs, l: u.rxMs, n: 1, pa: u.payload });
  }
  const fresh: (UnknownCount & { topic: string })[] = [];
  // Sorted, so two workers updating the same topics take their row locks in the same order.
  for (const [topic, a] of [...agg.entries()].sort(([x], [y]) => (x < y ? -1 : 1))) {
    const [n] = await UnknownChannel.update(
      {
        lastSeenAt: sequelize.fn('greatest', sequelize.col('last_seen_at'), new Date(a.l)),
        messages: sequelize.literal(`messages + ${Math.trunc(a.n)}`),
        samplePayload: a.pa,
        resolvedAt: null,
        resolution: null,
      },
      { where: { topic }, transaction },
    );
    if (n === 0) fresh.push({ ...a, topic });
  }
  if (fresh.length) {
    await UnknownChannel.bulkCreate(
      fresh.map((a) => ({
        deviceId: a.d,
        topic: a.topic,
        assetCode: a.ac,
        channelKey: a.ck,
        firstSeenAt: new Date(a.f),
        lastSeenAt: new Date(a.l),
        messages: a.n,
        samplePayload: a.pa,
        resolvedAt: null,
        resolution: null,
      })),
      // Another worker may list the same new topic at the same moment: keep its row.
      { transaction, ignoreDuplicates: true, validate: false },
    );
  }
}

/** A status message: the device's online state and, when it changed, a device event. Returns whether it changed. */
async function storeStatus(sequelize: Sequelize, s: StatusChange, transaction: Transaction): Promise<boolean> {
  const at = new Date(s.rxMs);
  const [n] = await Device.update(
    { online: s.online, lastSeenAt: sequelize.fn('greatest', sequelize.col('last_seen_at'), at) },
    { where: { id: s.deviceId, online: { [Op.ne]: s.online } }, transaction },
  );
  if (n === 0) return false;
  await DeviceEvent.create(
    { deviceId: s.deviceId, kind: s.online ? 'online' : 'offline', reason: `status message on ${s.topic}`, at },
    { transaction },
  );
  return true;
}
