/**
 * The Floor's snapshot: every dip line, oven and coater with its channels, the window each
 * channel is held to now, the latest values, open alarms, device states and the oven load in
 * progress. The server page renders it for first paint; `GET /api/v1/floor` answers the same so
 * the island can refresh after alarm, load and device events (readings arrive over the stream).
 */
import { arrheniusFactor } from '../../domain/cure/arrhenius.ts';
import { ovenLoadPhase } from '../../domain/cure/cure-record.ts';
import {
  shortChannelName,
  type FloorAlarm,
  type FloorChannel,
  type FloorDevice,
  type FloorLoad,
  type FloorSnapshot,
  type FloorTile,
} from '../../shared/floor.ts';
import { windowRangeFor } from '../../shared/trend.ts';
import type { ProcessWindowInForce } from '../../shared/windows.ts';
import { sequelize } from '../db.ts';
import { selectRows } from '../../core/record-db.ts';

/** A raw SELECT through the web process's Sequelize instance (bind parameters). */
const rawRows = <T extends object>(sql: string, bind: unknown[] = []) => selectRows<T>(sequelize(), sql, bind);
import { ovenChannels } from '../../core/load-store.ts';
import { siteTimeZone } from '../../core/settings-store.ts';
import { windowInForce } from '../../core/window-store.ts';
import { latestReadings, listChannels } from './plant.ts';

const TILE_KINDS = ['line', 'oven', 'coater'] as const;
type TileKind = (typeof TILE_KINDS)[number];
const TILE_ORDER: Record<TileKind, number> = { line: 0, oven: 1, coater: 2 };

/** Alarm states that are annunciated (need the operator); shelved / suppressed / out of service are set aside. */
const ANNUNCIATED = new Set(['unacked', 'acked', 'rtn-unacked']);
const RANK = { high: 3, medium: 2, low: 1 } as const;

interface AssetLite {
  id: number;
  parent_id: number | null;
  kind: string;
  code: string;
  name: string;
}

/** The site's name and time zone (sites.time_zone; the first site). */
export async function siteInfo(): Promise<{ name: string; timeZone: string }> {
  const rows = await rawRows<{ name: string }>('select name from sites order by id limit 1');
  return { name: rows[0]?.name ?? 'Coatrail', timeZone: await siteTimeZone(sequelize()) };
}

export async function floorSnapshot(nowMs = Date.now()): Promise<FloorSnapshot> {
  const [site, assetsQ, channels, latest, devicesQ, alarmsQ, loadsQ] = await Promise.all([
    siteInfo(),
    rawRows<AssetLite>('select id, parent_id, kind, code, name from assets order by code'),
    listChannels(),
    latestReadings(),
    rawRows<{ id: number; name: string; username: string; online: boolean; last_seen_ms: number | null }>(
      `select id, name, username, online, (extract(epoch from last_seen_at) * 1000)::float8 as last_seen_ms
         from devices where enabled order by username`,
    ),
    rawRows<{
      id: number;
      priority: FloorAlarm['priority'];
      state: string;
      message: string;
      raised_ms: number;
      channel_id: number | null;
      asset_id: number | null;
    }>(
      `select id, priority, state, message, (extract(epoch from last_activated_at) * 1000)::float8 as raised_ms, channel_id, asset_id
         from alarms where state <> 'normal' order by last_activated_at desc limit 1000`,
    ),
    rawRows<{ id: number; oven_asset_id: number; opened_ms: number; jobs: number }>(
      `select l.id, l.oven_asset_id, (extract(epoch from l.opened_at) * 1000)::float8 as opened_ms,
              (select count(*)::int from load_jobs j where j.load_id = l.id) as jobs
         from oven_loads l where l.status = 'open'`,
    ),
  ]);

  const assets = new Map(assetsQ.map((a) => [a.id, a]));
  const topOf = (id: number | null): AssetLite | null => {
    let a = id === null ? undefined : assets.get(id);
    for (let depth = 0; a && a.parent_id !== null && depth < 16; depth++) a = assets.get(a.parent_id);
    return a ?? null;
  };

  // The window in force now, once per asset that carries channels.
  const windows = new Map<number, ProcessWindowInForce | null>();
  await Promise.all(
    [...new Set(channels.map((c) => c.assetId))].map(async (assetId) => {
      windows.set(assetId, await windowInForce(sequelize(), assetId, nowMs));
    }),
  );

  const channelAsset = new Map(channels.map((c) => [c.id, c.assetId]));
  const tiles = new Map<number, FloorTile>();
  for (const a of assetsQ) {
    if (a.parent_id !== null || !(TILE_KINDS as readonly string[]).includes(a.kind)) continue;
    tiles.set(a.id, {
      id: a.id,
      code: a.code,
      name: a.name,
      kind: a.kind as TileKind,
      channels: [],
      deviceIds: [],
      alarms: [],
      alarmCount: 0,
      shelvedCount: 0,
      load: null,
    });
  }

  const channelAlarms = new Map<number, { n: number; top: FloorAlarm['priority'] }>();
  for (const r of alarmsQ) {
    const tile = tiles.get(
      topOf(r.asset_id ?? (r.channel_id !== null ? (channelAsset.get(r.channel_id) ?? null) : null))?.id ?? -1,
    );
    if (!tile) continue;
    if (!ANNUNCIATED.has(r.state)) {
      tile.shelvedCount++;
      continue;
    }
    tile.alarmCount++;
    if (tile.alarms.length < 5) {
      tile.alarms.push({
        id: r.id,
        priority: r.priority,
        state: r.state,
        message: r.message,
        raisedAtMs: r.raised_ms,
        channelId: r.channel_id,
      });
    }
    if (r.channel_id !== null) {
      const c = channelAlarms.get(r.channel_id);
      if (!c) channelAlarms.set(r.channel_id, { n: 1, top: r.priority });
      else {
        c.n++;
        if (RANK[r.priority] > RANK[c.top]) c.top = r.priority;
      }
    }
  }
  for (const t of tiles.values()) t.alarms.sort((a, b) => RANK[b.priority] - RANK[a.priority] || b.raisedAtMs - a.raisedAtMs);

  for (const c of channels) {
    const tile = tiles.get(topOf(c.assetId)?.id ?? -1);
    if (!tile) continue;
    const w = windows.get(c.assetId) ?? null;
    const al = channelAlarms.get(c.id);
    const l = latest.get(c.id);
    const ch: FloorChannel = {
      id: c.id,
      name: c.name,
      shortName: shortChannelName(c.name, tile.name),
      kind: c.kind,
      unit: c.unit,
      min: c.min,
      max: c.max,
      assetId: c.assetId,
      deviceId: c.deviceId,
      window: windowRangeFor(c.kind, w?.limits),
      windowName: w ? `${w.name} v${w.version}` : null,
      latest: l ? { tMs: l.tMs, value: l.value } : null,
      alarms: al?.n ?? 0,
      alarmPriority: al?.top ?? null,
    };
    tile.channels.push(ch);
    if (!tile.deviceIds.includes(c.deviceId)) tile.deviceIds.push(c.deviceId);
  }

  await Promise.all(
    loadsQ.map(async (l) => {
      const tile = tiles.get(l.oven_asset_id);
      if (tile) tile.load = await loadState(l.id, l.oven_asset_id, l.opened_ms, l.jobs, nowMs);
    }),
  );

  const devices: FloorDevice[] = devicesQ.map((d) => ({
    id: d.id,
    name: d.name,
    username: d.username,
    online: d.online,
    lastSeenMs: d.last_seen_ms,
  }));
  const ordered = [...tiles.values()].sort((a, b) => TILE_ORDER[a.kind] - TILE_ORDER[b.kind] || a.code.localeCompare(b.code));
  return { siteName: site.name, timeZone: site.timeZone, atMs: nowMs, tiles: ordered, devices };
}

/**
 * The phase of an open load (lib/domain/cure ovenLoadPhase) from the coldest zone per minute
 * over the last 6 hours of the load and the latest setpoint. The soak needed is the window's
 * minimum equivalent minutes at the reference temperature converted to minutes at the setpoint
 * by the Arrhenius factor (ASTM C1074 equivalent-age form, as the cure record computes it).
 */
async function loadState(id: number, ovenAssetId: number, openedMs: number, jobs: number, nowMs: number): Promise<FloorLoad> {
  const oven = await ovenChannels(sequelize(), ovenAssetId);
  const base: FloorLoad = {
    id,
    openedAtMs: openedMs,
    phase: 'idle',
    soakStartMs: null,
    predictedEndMs: null,
    setpointC: null,
    jobs,
  };
  if (!oven || oven.zones.length === 0) return base;
  const sp = oven.setpointId
    ? ((
        await rawRows<{ v: number }>('select value as v from readings where channel_id = $1 order by ts desc limit 1', [
          oven.setpointId,
        ])
      )[0]?.v ?? null)
    : null;
  const from = Math.max(openedMs, nowMs - 6 * 3_600_000);
  const [rows, w] = await Promise.all([
    rawRows<{ t: number; v: number }>(
      `select (extract(epoch from date_bin('1 minute', ts, 'epoch'::timestamptz)) * 1000)::float8 as t, min(value) as v
         from readings where channel_id = any($1::int[]) and ts >= to_timestamp($2::float8 / 1000) and quality < 2
        group by 1 order by 1`,
      [oven.zones.map((z) => z.id), from],
    ),
    windowInForce(sequelize(), ovenAssetId, openedMs),
  ]);
  let soakMinutes = Number.NaN;
  if (w) {
    const f =
      sp !== null && sp > 0
        ? arrheniusFactor(sp, { activationEnergyKJMol: w.limits.activationEnergyKJMol, referenceC: w.limits.referenceC })
        : 1;
    soakMinutes = w.limits.minEquivalentMinutes / f;
  }
  const ph = ovenLoadPhase({
    setpointC: sp,
    readings: rows.map((r) => ({ tMs: r.t, tempC: r.v })),
    soakMinutesRequired: Number.isFinite(soakMinutes) ? soakMinutes : 0,
  });
  return {
    ...base,
    phase: ph.phase,
    setpointC: sp,
    soakStartMs: ph.soakStartMs ?? null,
    predictedEndMs: ph.predictedEndMs !== undefined && Number.isFinite(soakMinutes) ? ph.predictedEndMs : null,
  };
}
