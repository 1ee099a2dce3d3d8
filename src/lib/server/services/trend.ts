/**
 * What the channel trend draws besides the readings: the process window in force over the
 * range (as stretches, so a window change shows where it happened) and the plant events near
 * the channel — alarms, bath additions and filter changes on its line, door openings and load
 * starts/ends of its oven.
 */
import { stepsFromSamples, type AnnotationsResponse, type TrendEvent, type WindowSegment } from '../../shared/trend.ts';
import type { ProcessWindowInForce } from '../../shared/windows.ts';
import { QueryTypes } from 'sequelize';
import { pgPool, sequelize } from '../db.ts';
import { windowInForce } from '../../core/window-store.ts';

/** Most events one answer carries (the earliest are kept; `truncated` says when more exist). */
export const MAX_EVENTS = 3000;
/** Up to this range door openings come from raw readings (to the second); beyond, from the minute rollup. */
const RAW_DOOR_RANGE_MS = 2 * 86_400_000;

const at = (ms: number) => new Date(ms);

/** One read-only statement with bind parameters through the web app's Sequelize instance. */
function select<T extends object>(sql: string, bind: unknown[]): Promise<T[]> {
  return sequelize().query<T>(sql, { bind, type: QueryTypes.SELECT });
}

export interface TrendChannel {
  id: number;
  name: string;
  kind: string;
  unit: string;
  min: number;
  max: number;
  assetId: number;
  assetName: string;
  topAssetId: number;
}

/** One channel with its asset and top-level asset (line, oven, coater), or null. */
export async function trendChannel(id: number): Promise<TrendChannel | null> {
  const rows = await select<TrendChannel>(
    `with recursive up(id, parent_id, depth) as (
       select a.id, a.parent_id, 0 from channels c join assets a on a.id = c.asset_id where c.id = $1
       union all select a.id, a.parent_id, up.depth + 1 from assets a join up on a.id = up.parent_id where up.depth < 16)
     select c.id, c.name, c.kind, c.unit, c.min, c.max, c.asset_id as "assetId", a.name as "assetName",
            (select id from up where parent_id is null limit 1) as "topAssetId"
       from channels c join assets a on a.id = c.asset_id where c.id = $1`,
    [id],
  );
  return rows[0] ?? null;
}

/** The windows in force for the channel's asset over [from, to): evaluated at the start and at every change instant inside. */
async function windowSegments(assetId: number, from: number, to: number): Promise<WindowSegment[]> {
  const rows = await select<{ t: number }>(
    `with recursive up(id, parent_id, depth) as (
       select id, parent_id, 0 from assets where id = $1
       union all select a.id, a.parent_id, up.depth + 1 from assets a join up on a.id = up.parent_id where up.depth < 16),
     instants(t) as (
       select wa.valid_from from window_assignments wa join up on up.id = wa.asset_id
       union select wa.valid_to from window_assignments wa join up on up.id = wa.asset_id where wa.valid_to is not null
       union select effective_from from process_windows where effective_from is not null
       union select superseded_at from process_windows where superseded_at is not null)
     select (extract(epoch from t) * 1000)::float8 as t from instants where t > $2 and t < $3 order by t limit 500`,
    [assetId, at(from), at(to)],
  );
  const samples: { tMs: number; value: ProcessWindowInForce | null }[] = [];
  for (const tMs of [from, ...rows.map((r) => r.t)]) samples.push({ tMs, value: await windowInForce(pgPool(), assetId, tMs) });
  return stepsFromSamples(samples, from, to, (a, b) => (a?.id ?? null) === (b?.id ?? null)).map((s) => ({
    fromMs: s.fromMs,
    toMs: s.toMs,
    window: s.value
      ? {
          id: s.value.id,
          version: s.value.version,
          name: s.value.name,
          limits: s.value.limits,
          effectiveFrom: s.value.effectiveFrom,
        }
      : null,
  }));
}

const kg = (x: number) => `${Number(x.toFixed(3))} kg`;
const secondsWords = (s: number) => (s < 90 ? `${Math.round(s)} s` : `${Math.round(s / 60)} min`);

/** Door openings of one door channel in [from, to] (value ≥ 0.5 = open). */
async function doorOpenings(doorId: number, from: number, to: number): Promise<TrendEvent[]> {
  if (to - from <= RAW_DOOR_RANGE_MS) {
    const rows = await select<{ t: number; open: boolean }>(
      `select t, open from (
         select (extract(epoch from ts) * 1000)::float8 as t, value >= 0.5 as open, lag(value >= 0.5) over (order by ts) as was
           from readings where channel_id = $1 and ts >= $2 and ts <= $3) x
        where was is distinct from open order by t`,
      [doorId, at(from - 3_600_000), at(to)],
    );
    const out: TrendEvent[] = [];
    for (let i = 0; i < rows.length; i++) {
      const r = rows[i]!;
      if (!r.open || r.t < from) continue;
      const close = rows.slice(i + 1).find((x) => !x.open);
      out.push({
        tMs: r.t,
        kind: 'door-open',
        label: close
          ? `Door opened for ${secondsWords((close.t - r.t) / 1000)}`
          : 'Door opened (still open at the end of the view)',
      });
    }
    return out;
  }
  // Long ranges: runs of consecutive minutes in which the door was open at some point.
  const rows = await select<{ t: number; minutes: number }>(
    `select (extract(epoch from min(b)) * 1000)::float8 as t, count(*)::int as minutes from (
       select bucket as b, bucket - (row_number() over (order by bucket)) * interval '1 minute' as grp
         from readings_1m where channel_id = $1 and bucket >= $2 and bucket <= $3 and vmax >= 0.5) x
      group by grp order by 1`,
    [doorId, at(from), at(to)],
  );
  return rows.map((r) => ({
    tMs: r.t,
    kind: 'door-open',
    label:
      r.minutes === 1
        ? 'Door open within one minute (minute resolution)'
        : `Door open in ${r.minutes} consecutive minutes (minute resolution)`,
  }));
}

/** Window stretches and events for a channel's trend over [from, to]; null when the channel does not exist. */
export async function channelAnnotations(channelId: number, from: number, to: number): Promise<AnnotationsResponse | null> {
  const ch = await trendChannel(channelId);
  if (!ch) return null;
  const [windows, alarms, additions, filters, loads, doors] = await Promise.all([
    windowSegments(ch.assetId, from, to),
    select<{ t: number; priority: 'high' | 'medium' | 'low'; message: string; source_label: string; state: string }>(
      `with recursive up(id, parent_id, depth) as (
         select id, parent_id, 0 from assets where id = $2
         union all select a.id, a.parent_id, up.depth + 1 from assets a join up on a.id = up.parent_id where up.depth < 16)
       select (extract(epoch from raised_at) * 1000)::float8 as t, priority, message, source_label, state from alarms
        where (channel_id = $1 or (channel_id is null and asset_id in (select id from up)))
          and raised_at >= $3 and raised_at <= $4
        order by raised_at limit ${MAX_EVENTS}`,
      [channelId, ch.assetId, at(from), at(to)],
    ),
    select<{ t: number; kind: 'solvent' | 'fresh-lacquer'; mass_kg: number; by_label: string; tank: string }>(
      `with recursive down(id) as (select $1::int union all select a.id from assets a join down on a.parent_id = down.id)
       select (extract(epoch from b.at) * 1000)::float8 as t, b.kind, b.mass_kg, b.by_label, a.name as tank
         from bath_additions b join assets a on a.id = b.tank_asset_id
        where b.tank_asset_id in (select id from down) and b.at >= $2 and b.at <= $3 order by b.at limit ${MAX_EVENTS}`,
      [ch.topAssetId, at(from), at(to)],
    ),
    select<{ t: number; filter_type: string; rating_um: number | null; by_label: string; tank: string }>(
      `with recursive down(id) as (select $1::int union all select a.id from assets a join down on a.parent_id = down.id)
       select (extract(epoch from f.at) * 1000)::float8 as t, f.filter_type, f.rating_um, f.by_label, a.name as tank
         from filter_changes f join assets a on a.id = f.tank_asset_id
        where f.tank_asset_id in (select id from down) and f.at >= $2 and f.at <= $3 order by f.at limit ${MAX_EVENTS}`,
      [ch.topAssetId, at(from), at(to)],
    ),
    select<{ id: number; opened: number; closed: number | null; opened_by: string; verdict: string | null }>(
      `select id, (extract(epoch from opened_at) * 1000)::float8 as opened, (extract(epoch from closed_at) * 1000)::float8 as closed,
              opened_by, verdict
         from oven_loads
        where oven_asset_id = $1 and ((opened_at >= $2 and opened_at <= $3) or (closed_at >= $2 and closed_at <= $3))
        order by opened_at limit ${MAX_EVENTS}`,
      [ch.topAssetId, at(from), at(to)],
    ),
    (async () => {
      const rows = await select<{ id: number }>(
        `with recursive down(id) as (select $1::int union all select a.id from assets a join down on a.parent_id = down.id)
         select id from channels where kind = 'door' and asset_id in (select id from down)`,
        [ch.topAssetId],
      );
      return (await Promise.all(rows.map((r) => doorOpenings(r.id, from, to)))).flat();
    })(),
  ]);

  const events: TrendEvent[] = [
    ...alarms.map(
      (r): TrendEvent => ({
        tMs: r.t,
        kind: 'alarm',
        label: r.message,
        detail: `${r.source_label} · ${r.priority} priority · now ${r.state}`,
        priority: r.priority,
      }),
    ),
    ...additions.map(
      (r): TrendEvent => ({
        tMs: r.t,
        kind: r.kind === 'solvent' ? 'solvent-addition' : 'lacquer-addition',
        label: `${r.kind === 'solvent' ? 'Solvent' : 'Fresh lacquer'} ${kg(r.mass_kg)} added to ${r.tank}`,
        detail: `by ${r.by_label}`,
      }),
    ),
    ...filters.map(
      (r): TrendEvent => ({
        tMs: r.t,
        kind: 'filter-change',
        label: `Filter changed on ${r.tank}: ${r.filter_type}${r.rating_um !== null ? ` ${r.rating_um} µm` : ''}`,
        detail: `by ${r.by_label}`,
      }),
    ),
    ...loads.flatMap((r): TrendEvent[] => {
      const out: TrendEvent[] = [];
      if (r.opened >= from && r.opened <= to)
        out.push({
          tMs: r.opened,
          kind: 'load-start',
          label: `Load ${r.id} opened (${r.opened_by === 'auto' ? 'detected from the setpoint' : 'by hand'})`,
        });
      if (r.closed !== null && r.closed >= from && r.closed <= to) {
        out.push({ tMs: r.closed, kind: 'load-end', label: `Load ${r.id} closed${r.verdict ? ` — cure ${r.verdict}` : ''}` });
      }
      return out;
    }),
    ...doors,
  ].sort((a, b) => a.tMs - b.tMs);

  return { channelId, from, to, windows, events: events.slice(0, MAX_EVENTS), truncated: events.length > MAX_EVENTS };
}
