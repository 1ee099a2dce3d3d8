/**
 * Oven loads for the web app: lists with filters and CSV, the load detail behind the printable
 * cure record (jobs, alarms during the load, the oven trend), opening/closing/filling loads by
 * hand and recomputing a record. Every change is audited; the record maths is in the load store.
 */
import { ovenLoadPhase } from '../../domain/cure/cure-record.ts';
import { lttb } from '../../domain/series/lttb.ts';
import { toCsv } from '../../shared/csv-table.ts';
import {
  VERDICT_LABELS,
  type LoadAddJobs,
  type LoadClose,
  type LoadListQuery,
  type LoadOpen,
  type StoredCureRecord,
} from '../../shared/jobs.ts';
import type { SessionUser } from '../auth.ts';
import { publishLive } from '../broker-link.ts';
import { Asset, Job, LoadJob, Rack } from '../../../../db/models/index.ts';
import { testCountsOf } from '../../core/quality-store.ts';
import { sequelize } from '../db.ts';
import { selectRows } from '../../core/record-db.ts';

/** A raw SELECT through the web process's Sequelize instance (bind parameters). */
const rawRows = <T extends object>(sql: string, bind: unknown[] = []) => selectRows<T>(sequelize(), sql, bind);
import { actorOf } from '../guard.ts';
import { HttpProblem } from '../http.ts';
import { addJobsToLoad, closeLoad, openLoad, ovenChannels, recomputeLoad, type RecomputeResult } from '../../core/load-store.ts';
import { siteTimeZone } from '../../core/settings-store.ts';
import { windowInForce } from '../../core/window-store.ts';
import type { LoadAlarm, LoadDetail, LoadListItem, OpenLoadPhase, OvenRow, TrendSeries } from '../../shared/trace-views.ts';

const iso = (d: Date | null): string | null => (d ? d.toISOString() : null);
const bad = (path: string, message: string) =>
  new HttpProblem(400, 'Invalid input', `${path}: ${message}`, { errors: [{ path, message }] });

/** Most points per series sent to a chart (product.md §4: ≤ ~2,000). */
export const TREND_MAX_POINTS = 1500;
/** Trend margin around a load, minutes. */
export const TREND_MARGIN_MIN = 30;

/** Every oven of the site. */
export async function listOvens(): Promise<OvenRow[]> {
  sequelize();
  return Asset.findAll({ attributes: ['id', 'code', 'name'], where: { kind: 'oven' }, order: [['code', 'ASC']], raw: true });
}

interface LoadRow {
  id: number;
  oven_asset_id: number;
  oven_code: string;
  oven_name: string;
  opened_at: Date;
  closed_at: Date | null;
  status: 'open' | 'closed';
  opened_by: 'auto' | 'user';
  opened_by_name: string | null;
  closed_by: 'auto' | 'user' | null;
  closed_by_name: string | null;
  verdict: StoredCureRecord['verdict'] | null;
  record: StoredCureRecord | null;
  jobs: number;
  window_id: number | null;
  window_name: string | null;
  window_version: number | null;
  alarm_id: number | null;
  note: string | null;
  computed_at: Date | null;
}

const LOAD_SELECT = `
  select l.id, l.oven_asset_id, o.code as oven_code, o.name as oven_name, l.opened_at, l.closed_at, l.status, l.opened_by,
         ou.display_name as opened_by_name, l.closed_by, cu.display_name as closed_by_name, l.verdict, l.record,
         (select count(*)::int from load_jobs lj where lj.load_id = l.id) as jobs,
         l.window_id, pw.name as window_name, pw.version as window_version, l.alarm_id, l.note, l.computed_at
    from oven_loads l
    join assets o on o.id = l.oven_asset_id
    left join users ou on ou.id = l.opened_by_user
    left join users cu on cu.id = l.closed_by_user
    left join process_windows pw on pw.id = l.window_id`;

function toItem(r: LoadRow, phase: string | null): LoadListItem {
  const rec = r.record;
  return {
    id: r.id,
    ovenAssetId: r.oven_asset_id,
    ovenCode: r.oven_code,
    ovenName: r.oven_name,
    openedAt: r.opened_at.toISOString(),
    closedAt: iso(r.closed_at),
    status: r.status,
    openedBy: r.opened_by,
    openedByName: r.opened_by_name,
    verdict: r.verdict,
    jobs: r.jobs,
    equivalentMinutes: rec?.equivalentMinutes ?? null,
    peakC: rec?.peakC ?? null,
    minutesAtOrAboveMin: rec?.minutesAtOrAboveMin ?? null,
    doorOpenings: rec ? rec.door.openings : null,
    gaps: rec ? rec.gaps.length : null,
    windowName: r.window_name,
    windowVersion: r.window_version,
    alarmId: r.alarm_id,
    phase,
  };
}

/** The phase of an open load from the last 3 h of zone readings (1-minute minima) and the latest setpoint. */
export async function openLoadPhase(ovenAssetId: number, openedAtMs: number): Promise<OpenLoadPhase> {
  const oven = await ovenChannels(sequelize(), ovenAssetId);
  if (!oven) return { phase: 'idle', setpointC: null, coldestC: null };
  const sp = oven.setpointId
    ? ((
        await rawRows<{ v: number }>(`select value as v from readings where channel_id = $1 order by ts desc limit 1`, [
          oven.setpointId,
        ])
      )[0]?.v ?? null)
    : null;
  const from = Math.max(openedAtMs, Date.now() - 3 * 3_600_000);
  const rows = await rawRows<{ t: number; v: number }>(
    `select (floor(extract(epoch from ts) / 60) * 60000)::float8 as t, min(value) as v from readings
      where channel_id = any($1::int[]) and ts >= to_timestamp($2 / 1000.0) and quality < 2
      group by 1 order by 1`,
    [oven.zones.map((z) => z.id), from],
  );
  const w = await windowInForce(sequelize(), ovenAssetId, openedAtMs);
  const ph = ovenLoadPhase({
    setpointC: sp,
    readings: rows.map((r) => ({ tMs: r.t, tempC: r.v })),
    soakMinutesRequired: w?.limits.minEquivalentMinutes ?? 0,
  });
  return { ...ph, setpointC: sp, coldestC: rows.at(-1)?.v ?? null };
}

/** Loads, newest first, filtered (oven code, status, verdict, period, job). */
export async function listLoads(q: LoadListQuery): Promise<LoadListItem[]> {
  const where: string[] = [];
  const args: unknown[] = [];
  const arg = (v: unknown) => `$${args.push(v)}`;
  if (q.oven) where.push(`o.code = ${arg(q.oven)}`);
  if (q.status) where.push(`l.status = ${arg(q.status)}`);
  if (q.verdict) where.push(`l.verdict = ${arg(q.verdict)}`);
  if (q.from) where.push(`l.opened_at >= ${arg(q.from)}`);
  if (q.to) where.push(`l.opened_at < ${arg(q.to)}`);
  if (q.job)
    where.push(
      `exists (select 1 from load_jobs lj join jobs j on j.id = lj.job_id where lj.load_id = l.id and j.job_number = ${arg(q.job)})`,
    );
  const rows = await rawRows<LoadRow>(
    `${LOAD_SELECT} ${where.length ? 'where ' + where.join(' and ') : ''} order by l.opened_at desc limit ${arg(q.limit)}`,
    args,
  );
  const out: LoadListItem[] = [];
  for (const r of rows) {
    const phase = r.status === 'open' ? (await openLoadPhase(r.oven_asset_id, r.opened_at.getTime())).phase : null;
    out.push(toItem(r, phase));
  }
  return out;
}

/** The load list as CSV (times in the site's zone with the zone named in the header). */
export async function loadsCsv(items: LoadListItem[]): Promise<string> {
  const tz = await siteTimeZone(sequelize());
  const fmt = (s: string | null) => (s ? new Date(s).toLocaleString('sv-SE', { timeZone: tz }) : '');
  return toCsv(
    [
      'load',
      'oven',
      `opened (${tz})`,
      `closed (${tz})`,
      'status',
      'phase',
      'opened by',
      'verdict',
      'jobs',
      'equivalent min',
      'peak °C',
      'min at/above minimum',
      'door openings',
      'data gaps',
      'window',
      'window version',
    ],
    items.map((i) => [
      i.id,
      i.ovenCode,
      fmt(i.openedAt),
      fmt(i.closedAt),
      i.status,
      i.phase ?? '',
      i.openedBy === 'auto' ? 'cycle start' : (i.openedByName ?? 'by hand'),
      i.verdict ? VERDICT_LABELS[i.verdict] : '',
      i.jobs,
      i.equivalentMinutes?.toFixed(1) ?? '',
      i.peakC?.toFixed(1) ?? '',
      i.minutesAtOrAboveMin?.toFixed(1) ?? '',
      i.doorOpenings ?? '',
      i.gaps ?? '',
      i.windowName ?? '',
      i.windowVersion ?? '',
    ]),
  );
}

/** Alarms on the oven, its zones or its channels (or on the load itself) raised or re-activated during [from, to]. */
export async function alarmsDuring(
  ovenAssetId: number,
  loadId: number | null,
  fromMs: number,
  toMs: number,
): Promise<LoadAlarm[]> {
  const rows = await rawRows<{
    id: number;
    priority: string;
    state: string;
    source_label: string;
    message: string;
    raised_at: Date;
    cleared_at: Date | null;
    acked_by: string | null;
  }>(
    `select a.id, a.priority, a.state, a.source_label, a.message, a.raised_at, a.cleared_at, u.display_name as acked_by
       from alarms a left join users u on u.id = a.acked_by
      where (a.load_id = $4
             or a.asset_id in (select id from assets where id = $1 or parent_id = $1)
             or a.channel_id in (select c.id from channels c join assets s on s.id = c.asset_id where s.id = $1 or s.parent_id = $1))
        and ((a.raised_at between to_timestamp($2 / 1000.0) and to_timestamp($3 / 1000.0))
             or (a.last_activated_at between to_timestamp($2 / 1000.0) and to_timestamp($3 / 1000.0))
             or a.load_id = $4)
      order by a.raised_at`,
    [ovenAssetId, fromMs, toMs, loadId ?? -1],
  );
  return rows.map((r) => ({
    id: r.id,
    priority: r.priority,
    state: r.state,
    sourceLabel: r.source_label,
    message: r.message,
    raisedAt: r.raised_at.toISOString(),
    clearedAt: iso(r.cleared_at),
    ackedBy: r.acked_by,
  }));
}

/** The oven's setpoint, zone air temperatures and door over [from, to], each downsampled (LTTB) to ≤ 1500 points. */
export async function ovenTrend(ovenAssetId: number, fromMs: number, toMs: number): Promise<TrendSeries[]> {
  const oven = await ovenChannels(sequelize(), ovenAssetId);
  if (!oven) return [];
  const chans: { id: number; key: string; label: string; unit: string; kind: TrendSeries['kind'] }[] = [];
  if (oven.setpointId) chans.push({ id: oven.setpointId, key: 'setpoint', label: 'Setpoint', unit: '°C', kind: 'setpoint' });
  for (const z of oven.zones) chans.push({ id: z.id, key: `zone-${z.id}`, label: z.name, unit: '°C', kind: 'zone' });
  if (oven.doorId) chans.push({ id: oven.doorId, key: 'door', label: 'Door (1 = open)', unit: '', kind: 'door' });
  const out: TrendSeries[] = [];
  for (const c of chans) {
    const rows = await rawRows<{ x: number; y: number }>(
      `select (extract(epoch from ts) * 1000)::float8 as x, value as y from readings
        where channel_id = $1 and ts between to_timestamp($2 / 1000.0) and to_timestamp($3 / 1000.0) and quality < 2 order by ts`,
      [c.id, fromMs, toMs],
    );
    // The door and the setpoint are steps: keep every change rather than a triangle-picked sample.
    const points =
      c.kind === 'zone'
        ? lttb(rows, TREND_MAX_POINTS)
        : rows.filter((r, i) => i === 0 || i === rows.length - 1 || r.y !== rows[i - 1]!.y || r.y !== rows[i + 1]!.y);
    out.push({
      key: c.key,
      label: c.label,
      unit: c.unit,
      kind: c.kind,
      points: points.length > TREND_MAX_POINTS * 2 ? lttb(points, TREND_MAX_POINTS) : points,
    });
  }
  return out;
}

/** One load with its record, jobs and the alarms during it; null when unknown. */
export async function getLoad(id: number): Promise<LoadDetail | null> {
  const rows = await rawRows<LoadRow>(`${LOAD_SELECT} where l.id = $1`, [id]);
  const r = rows[0];
  if (!r) return null;
  const openPhase = r.status === 'open' ? await openLoadPhase(r.oven_asset_id, r.opened_at.getTime()) : null;
  const inLoad = (await LoadJob.findAll({
    where: { loadId: id },
    attributes: ['jobId', 'addedAt'],
    include: [
      { model: Job, attributes: ['jobNumber', 'status'], required: true },
      { model: Rack, attributes: ['code'] },
    ],
    order: [
      [Rack, 'code', 'ASC NULLS LAST'],
      [Job, 'jobNumber', 'ASC'],
    ],
  })) as (LoadJob & { Job: Job; Rack: Rack | null })[];
  const counts = await testCountsOf(
    sequelize(),
    inLoad.map((lj) => lj.jobId),
  );
  const toMs = r.closed_at?.getTime() ?? Date.now();
  const alarms = await alarmsDuring(r.oven_asset_id, r.id, r.opened_at.getTime(), toMs);
  const w = r.window_id
    ? ((
        await rawRows<{ id: number; name: string; version: number; lacquer: string; substrate: string }>(
          `select pw.id, pw.name, pw.version, l.name as lacquer, m.name as substrate
             from process_windows pw join lacquers l on l.id = pw.lacquer_id join materials m on m.id = pw.material_id where pw.id = $1`,
          [r.window_id],
        )
      )[0] ?? null)
    : null;
  return {
    ...toItem(r, openPhase?.phase ?? null),
    closedBy: r.closed_by,
    closedByName: r.closed_by_name,
    record: r.record,
    computedAt: iso(r.computed_at),
    note: r.note,
    jobList: inLoad.map((lj) => ({
      jobId: lj.jobId,
      jobNumber: lj.Job.jobNumber,
      status: lj.Job.status,
      rackCode: lj.Rack?.code ?? null,
      addedAt: lj.addedAt.toISOString(),
      tests: counts.get(lj.jobId)?.tests ?? 0,
      failed: counts.get(lj.jobId)?.failed ?? 0,
    })),
    alarms,
    openPhase,
    window: w,
  };
}

function when(at: string | undefined, what: string): number {
  const now = Date.now();
  if (!at) return now;
  const ms = Date.parse(at);
  if (ms > now + 5 * 60_000) throw bad(what, 'The time is in the future.');
  if (ms < now - 7 * 86_400_000) throw bad(what, 'A load can be back-dated by at most 7 days.');
  return ms;
}

/** Open a load by hand (operator); audited as `load.open` in the same transaction. */
export async function openLoadByHand(user: SessionUser, input: LoadOpen, address: string | null): Promise<LoadDetail> {
  const atMs = when(input.openedAt, 'openedAt');
  const r = await openLoad(
    sequelize(),
    { ovenAssetId: input.ovenAssetId, atMs, by: 'user', userId: user.id, note: input.note ?? null },
    { publish: publishLive, actor: actorOf(user, address) },
  );
  return (await getLoad(r.id))!;
}

/** Close a load by hand; computes the cure record (audited as `load.close` with the verdict). */
export async function closeLoadByHand(
  user: SessionUser,
  id: number,
  input: LoadClose,
  address: string | null,
): Promise<LoadDetail> {
  const atMs = when(input.closedAt, 'closedAt');
  await closeLoad(
    sequelize(),
    id,
    { atMs, by: 'user', userId: user.id, note: input.note ?? null },
    { publish: publishLive, actor: actorOf(user, address) },
  );
  return (await getLoad(id))!;
}

/** Recompute a closed load's record (e.g. after a window correction); audited with before/after verdicts. */
export async function recompute(user: SessionUser, id: number, address: string | null): Promise<RecomputeResult> {
  return recomputeLoad(sequelize(), id, { publish: publishLive, actor: actorOf(user, address) });
}

/** Scan jobs and racks into an open load (audited as `load.jobs.add` when a job was added). */
export async function addJobs(user: SessionUser, id: number, input: LoadAddJobs, address: string | null) {
  return addJobsToLoad(sequelize(), id, {
    jobNumbers: input.jobNumbers,
    rackCodes: input.rackCodes,
    userId: user.id,
    actor: actorOf(user, address),
  });
}

/** The site's name and time zone (for record headers). */
export async function siteInfo(): Promise<{ name: string; timeZone: string }> {
  const rows = await rawRows<{ name: string; time_zone: string }>('select name, time_zone from sites order by id limit 1');
  return { name: rows[0]?.name ?? 'Coatrail', timeZone: rows[0]?.time_zone ?? 'UTC' };
}
