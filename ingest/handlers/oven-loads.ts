/**
 * Oven-load detection in the ingest worker: opens a load when an oven's cycle starts and
 * closes it when the cycle has ended, then the load store computes the cure record.
 *
 * - Cycle start: the oven's setpoint rises at least 50 °C above the lowest setpoint seen
 *   since the last load closed (a controller stepping from standby to the cure setpoint, or
 *   ramping its setpoint in steps). The load opens at that reading's time.
 * - Cycle end: the setpoint has fallen back at least 50 °C below the load's highest setpoint,
 *   and then every reporting zone thermocouple reads at or below the unload temperature
 *   (the larger of 60 °C and the new setpoint + 10 °C; common practice for handling lenses).
 *   Without zone data for 10 minutes after the fall, or 4 hours after it in any case, the load
 *   closes anyway (the record will say what is missing).
 * - A load an operator opened by hand on the oven is adopted (the cycle's end closes it); a load
 *   closed by hand is forgotten. The database is re-read every 5 s for such changes.
 *
 * Publishes `loads` {loadId, ovenAssetId, phase, status} on opening, on every phase change
 * (ramp / soak / cool from the latest setpoint and the coldest zone, ±5 °C soak band) and on
 * closing; the load store publishes the cure alarm.
 *
 * Scale-out note: like the limit alarms, detection assumes one worker sees all of an oven's
 * readings. Opening is safe to repeat (one open load per oven in the database).
 */
import { SOAK_BAND_C } from '../../src/lib/domain/cure/cure-record.ts';
import { closeLoad, openLoad } from '../../src/lib/core/load-store.ts';
import type { PostCommitHandler, StoredReading, WorkerContext } from './index.ts';
import { isDomainError } from '../../src/lib/core/errors.ts';
import { selectRows } from '../../src/lib/core/record-db.ts';

/** Setpoint rise that starts a cycle, and fall that ends it, °C. */
export const CYCLE_SETPOINT_STEP_C = 50;
/** Zones at or below this (or the new setpoint + 10 °C, whichever is higher) count as cooled, °C. */
export const UNLOAD_C = 60;
/** After the setpoint falls: close without zone data for this long, min; close in any case after, h. */
export const NO_DATA_CLOSE_MIN = 10;
export const MAX_COOL_HOURS = 4;
/** A zone reading older than this is not "reporting", ms. */
const ZONE_FRESH_MS = 5 * 60_000;
const REFRESH_MS = 60_000;
const SYNC_MS = 5_000;

interface OvenState {
  id: number;
  name: string;
  setpointId: number | null;
  zoneIds: number[];
  lastSp: number | null;
  lastSpMs: number;
  baselineSp: number | null;
  loadId: number | null;
  peakSp: number;
  fellAtMs: number | null;
  zones: Map<number, { t: number; v: number }>;
  phase: string | null;
  busy: boolean;
}

type Role = { ovenId: number; kind: 'setpoint' | 'zone' };

const ovens = new Map<number, OvenState>();
const roles = new Map<number, Role>();
let refreshedAt = 0;
let syncedAt = 0;
/** Highest channel id known at the last refresh: a reading from a newer channel triggers a refresh. */
let maxChannelId = 0;

/** Re-read the ovens and their channels; `initial` also takes each oven's last stored setpoint (worker start). */
async function refresh(ctx: WorkerContext, initial = false): Promise<void> {
  const rows = await selectRows<{
    oven_id: number;
    oven_name: string;
    channel_id: number | null;
    kind: string | null;
    on_oven: boolean | null;
  }>(
    ctx.sequelize,
    `select o.id as oven_id, o.name as oven_name, c.id as channel_id, c.kind, c.asset_id = o.id as on_oven
       from assets o
       left join assets z on z.parent_id = o.id and z.kind = 'zone'
       left join channels c on (c.asset_id = o.id and c.kind = 'setpoint') or (c.asset_id = z.id and c.kind = 'air-temperature')
      where o.kind = 'oven'`,
  );
  roles.clear();
  maxChannelId = (await selectRows<{ m: number | null }>(ctx.sequelize, 'select max(id) as m from channels'))[0]?.m ?? 0;
  for (const r of rows) {
    let o = ovens.get(r.oven_id);
    if (!o) {
      o = {
        id: r.oven_id,
        name: r.oven_name,
        setpointId: null,
        zoneIds: [],
        lastSp: null,
        lastSpMs: 0,
        baselineSp: null,
        loadId: null,
        peakSp: -Infinity,
        fellAtMs: null,
        zones: new Map(),
        phase: null,
        busy: false,
      };
      ovens.set(r.oven_id, o);
      // An oven set up while the worker runs starts from its first live setpoint instead.
      const sp = !initial
        ? []
        : await selectRows<{ v: number; t: number }>(
            ctx.sequelize,
            `select value as v, (extract(epoch from ts) * 1000)::float8 as t from readings r join channels c on c.id = r.channel_id
          where c.asset_id = $1 and c.kind = 'setpoint' order by ts desc limit 1`,
            [o.id],
          );
      if (sp[0]) {
        o.lastSp = sp[0].v;
        o.lastSpMs = sp[0].t;
        o.baselineSp = sp[0].v;
      }
    }
    o.name = r.oven_name;
    if (r.channel_id === null) continue;
    if (r.on_oven && r.kind === 'setpoint') {
      o.setpointId = r.channel_id;
      roles.set(r.channel_id, { ovenId: o.id, kind: 'setpoint' });
    } else if (!r.on_oven && r.kind === 'air-temperature') {
      if (!o.zoneIds.includes(r.channel_id)) o.zoneIds.push(r.channel_id);
      roles.set(r.channel_id, { ovenId: o.id, kind: 'zone' });
    }
  }
  refreshedAt = Date.now();
}

/** Adopt loads opened by hand; forget loads closed by hand. */
async function sync(ctx: WorkerContext): Promise<void> {
  const rows = await selectRows<{ id: number; oven_asset_id: number; peak: number | null }>(
    ctx.sequelize,
    `select l.id, l.oven_asset_id,
            (select max(r.value) from readings r join channels c on c.id = r.channel_id
              where c.asset_id = l.oven_asset_id and c.kind = 'setpoint' and r.ts >= l.opened_at) as peak
       from oven_loads l where l.status = 'open'`,
  );
  const open = new Map(rows.map((r) => [r.oven_asset_id, r]));
  for (const o of ovens.values()) {
    if (o.busy) continue;
    const row = open.get(o.id);
    if (row && o.loadId !== row.id) {
      o.loadId = row.id;
      o.peakSp = Math.max(row.peak ?? -Infinity, o.lastSp ?? -Infinity);
      o.fellAtMs = null;
      o.phase = null;
    } else if (!row && o.loadId !== null) {
      o.loadId = null;
      o.baselineSp = o.lastSp;
      o.fellAtMs = null;
      o.phase = null;
    }
  }
  syncedAt = Date.now();
}

function coldestFresh(o: OvenState, nowMs: number): { cold: number; hot: number } | null {
  let cold = Infinity;
  let hot = -Infinity;
  for (const id of o.zoneIds) {
    const z = o.zones.get(id);
    if (!z || nowMs - z.t > ZONE_FRESH_MS) continue;
    cold = Math.min(cold, z.v);
    hot = Math.max(hot, z.v);
  }
  return Number.isFinite(cold) ? { cold, hot } : null;
}

async function open(ctx: WorkerContext, o: OvenState, atMs: number): Promise<void> {
  o.busy = true;
  try {
    const r = await openLoad(ctx.sequelize, { ovenAssetId: o.id, atMs, by: 'auto' }, { publish: ctx.publishLive });
    o.loadId = r.id;
    o.phase = 'ramp';
    ctx.log(`oven-loads: ${o.name} cycle started, load ${r.id} opened`);
  } catch (e) {
    const openId = isDomainError(e, 'conflict') ? (e.extra['openLoadId'] as number | null | undefined) : null;
    if (openId)
      o.loadId = openId; // opened by hand before the cycle started: adopt it
    else throw e;
  } finally {
    o.busy = false;
  }
  o.peakSp = o.lastSp ?? -Infinity;
  o.fellAtMs = null;
  o.baselineSp = null;
}

async function close(ctx: WorkerContext, o: OvenState, atMs: number, why: string): Promise<void> {
  const id = o.loadId;
  if (id === null) return;
  o.busy = true;
  try {
    const r = await closeLoad(ctx.sequelize, id, { atMs, by: 'auto', note: why }, { publish: ctx.publishLive });
    ctx.log(`oven-loads: ${o.name} load ${id} closed (${why}); verdict ${r.verdict}`);
  } catch (e) {
    if (!isDomainError(e, 'conflict', 'not-found')) throw e; // already closed by hand: nothing to do
  } finally {
    o.busy = false;
  }
  o.loadId = null;
  o.baselineSp = o.lastSp;
  o.fellAtMs = null;
  o.phase = null;
}

function phaseOf(o: OvenState, nowMs: number): string | null {
  const z = coldestFresh(o, nowMs);
  if (!z || o.lastSp === null) return null;
  if (o.fellAtMs !== null) return 'cool';
  if (z.cold < o.lastSp - SOAK_BAND_C) return 'ramp';
  if (z.cold > o.lastSp + SOAK_BAND_C) return 'cool';
  return 'soak';
}

async function step(ctx: WorkerContext, o: OvenState, r: StoredReading, kind: Role['kind']): Promise<void> {
  if (kind === 'setpoint') {
    if (r.tMs < o.lastSpMs) return; // late, out-of-order sample: the newer one already counted
    o.lastSp = r.value;
    o.lastSpMs = r.tMs;
    if (o.loadId === null) {
      o.baselineSp = o.baselineSp === null ? r.value : Math.min(o.baselineSp, r.value);
      if (r.value - o.baselineSp >= CYCLE_SETPOINT_STEP_C) await open(ctx, o, r.tMs);
    } else {
      o.peakSp = Math.max(o.peakSp, r.value);
      if (r.value <= o.peakSp - CYCLE_SETPOINT_STEP_C) o.fellAtMs ??= r.tMs;
      else o.fellAtMs = null;
    }
    return;
  }
  o.zones.set(r.channelId, { t: r.tMs, v: r.value });
  if (o.loadId === null) return;
  const z = coldestFresh(o, r.tMs);
  if (o.fellAtMs !== null && r.tMs > o.fellAtMs && z && z.hot <= Math.max(UNLOAD_C, (o.lastSp ?? 0) + 10)) {
    await close(ctx, o, r.tMs, `cycle end: setpoint back to ${o.lastSp} °C and the oven cooled to ${z.hot.toFixed(1)} °C`);
    return;
  }
  const phase = phaseOf(o, r.tMs);
  if (phase && phase !== o.phase) {
    o.phase = phase;
    ctx.publishLive('loads', { loadId: o.loadId, ovenAssetId: o.id, phase, status: 'open' });
  }
}

export const ovenLoadsHandler: PostCommitHandler = {
  name: 'oven-loads',
  async init(ctx) {
    await refresh(ctx, true);
    await sync(ctx);
  },
  async onReadings(ctx, rows) {
    const since = Date.now() - refreshedAt;
    if (since > REFRESH_MS || (since > 2000 && rows.some((r) => r.channelId > maxChannelId))) await refresh(ctx);
    const mine = rows.filter((r) => roles.has(r.channelId) && r.quality < 2).sort((a, b) => a.tMs - b.tMs);
    for (const r of mine) {
      const role = roles.get(r.channelId) as Role;
      const o = ovens.get(role.ovenId);
      if (o && !o.busy) await step(ctx, o, r, role.kind);
    }
  },
  async onTick(ctx, nowMs) {
    if (nowMs - syncedAt < SYNC_MS) return;
    await sync(ctx);
    for (const o of ovens.values()) {
      if (o.loadId === null || o.fellAtMs === null || o.busy) continue;
      const lastZone = Math.max(0, ...[...o.zones.values()].map((z) => z.t));
      if (nowMs - o.fellAtMs > MAX_COOL_HOURS * 3_600_000) {
        await close(ctx, o, nowMs, `cycle end: setpoint fell ${MAX_COOL_HOURS} h ago and the oven has not reported cooling`);
      } else if (nowMs - Math.max(lastZone, o.fellAtMs) > NO_DATA_CLOSE_MIN * 60_000) {
        await close(
          ctx,
          o,
          Math.max(lastZone, o.fellAtMs + 1000),
          `cycle end: setpoint fell and no zone data for ${NO_DATA_CLOSE_MIN} min`,
        );
      }
    }
  },
};
