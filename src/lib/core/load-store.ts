/**
 * Oven loads and their cure records (worker-, seed- and web-safe: takes a pg.Pool, imports no
 * Astro env). The ingest worker opens and closes loads from the oven's setpoint; operators open,
 * close and fill them by hand; both end in {@link recomputeLoad}, which computes the cure record
 * from the stored readings, stores it with the verdict, and raises (or clears) the cure alarm.
 *
 * How the readings become a cure record:
 * - channels: every zone air-temperature channel of the oven (assets of kind 'zone' under it,
 *   channel kind 'air-temperature') and the oven's door channel; readings of bad quality
 *   (quality 2) are left out;
 * - the zones are aligned by sample-and-hold: at each reading time, each zone contributes its
 *   latest reading if that is not older than 1.5 × its usual spacing (at least 2 s, at most the
 *   window's maximum gap), so one thermocouple that drops out leaves the others standing for the
 *   part, while a stretch with no zone at all is a data gap;
 * - the domain's `cureRecord` (lib/domain/cure/cure-record.ts) then gives time at or above the
 *   minimum, peak, ramp rates, Arrhenius equivalent minutes (ASTM C1074 equivalent-age form),
 *   gaps, door openings and the verdict against the window in force at the load's start.
 */
import type pg from 'pg';
import { cureRecord, type CureWindow, type DoorEvent, type OvenReading } from '../domain/cure/cure-record.ts';
import { VERDICT_LABELS, type CureVerdictName, type StoredCureRecord } from '../shared/jobs.ts';
import type { ProcessWindowInForce } from '../shared/windows.ts';
import { DomainError } from './errors.ts';
import { clearAlarmReturning, getAlarm, liveAlarmPayload, raiseAlarm } from './alarm-store.ts';
import { upsertJobs } from './job-store.ts';
import { windowInForce } from './window-store.ts';

type Queryable = pg.Pool | pg.PoolClient;
export type Publish = (kind: string, payload: unknown) => void;

/** Longest spacing of oven readings that is not a gap when the window names none: 120 s (common practice). */
export const DEFAULT_MAX_GAP_SECONDS = 120;
/** Ramp limit when the window names none: 5 °C/min (common practice for lens cure ovens; the lacquer maker's data governs). */
export const DEFAULT_MAX_RAMP_C_PER_MIN = 5;
/** Span over which ramp rates are taken, minutes. */
export const RAMP_SPAN_MINUTES = 2;
/** Longest load the record is computed over, hours (a load left open longer is cut here). */
export const MAX_LOAD_HOURS = 48;

export interface OvenChannels {
  ovenId: number;
  code: string;
  name: string;
  setpointId: number | null;
  doorId: number | null;
  zones: { id: number; name: string }[];
}

/** The oven's setpoint, door and zone air-temperature channels; null when the asset is not an oven. */
export async function ovenChannels(q: Queryable, ovenAssetId: number): Promise<OvenChannels | null> {
  const { rows } = await q.query<{ id: number; code: string; name: string; kind: string }>(
    'select id, code, name, kind from assets where id = $1',
    [ovenAssetId],
  );
  const oven = rows[0];
  if (!oven || oven.kind !== 'oven') return null;
  const ch = await q.query<{ id: number; name: string; kind: string; on_oven: boolean }>(
    `select c.id, c.name, c.kind, c.asset_id = $1 as on_oven
       from channels c join assets a on a.id = c.asset_id
      where c.asset_id = $1 or (a.parent_id = $1 and a.kind = 'zone')
      order by a.code, c.id`,
    [ovenAssetId],
  );
  const first = (kind: string) => ch.rows.find((c) => c.on_oven && c.kind === kind)?.id ?? null;
  return {
    ovenId: oven.id,
    code: oven.code,
    name: oven.name,
    setpointId: first('setpoint'),
    doorId: first('door'),
    zones: ch.rows.filter((c) => !c.on_oven && c.kind === 'air-temperature').map((c) => ({ id: c.id, name: c.name })),
  };
}

/** The cure window from a process window's limits, with Coatrail's defaults for what it leaves out. */
export function cureWindowOf(w: ProcessWindowInForce): { window: CureWindow; defaulted: string[] } {
  const l = w.limits;
  const defaulted: string[] = [];
  if (l.maxRampCPerMin === undefined) defaulted.push('maxRampCPerMin');
  if (l.maxGapSeconds === undefined) defaulted.push('maxGapSeconds');
  return {
    window: {
      minTempC: l.minCureTempC,
      minEquivalentMinutes: l.minEquivalentMinutes,
      referenceC: l.referenceC,
      activationEnergyKJMol: l.activationEnergyKJMol,
      maxPartTempC: l.maxPartTempC,
      maxRampCPerMin: l.maxRampCPerMin ?? DEFAULT_MAX_RAMP_C_PER_MIN,
      maxGapSeconds: l.maxGapSeconds ?? DEFAULT_MAX_GAP_SECONDS,
    },
    defaulted,
  };
}

interface RawReading {
  ch: number;
  t: number;
  v: number;
}

/**
 * Aligns several zone channels into instants by sample-and-hold (see the module comment).
 * `rows` must be sorted by time. Exported for tests of the alignment rule.
 */
export function alignZones(rows: readonly RawReading[], maxHoldMs: number): OvenReading[] {
  const byCh = new Map<number, number[]>();
  for (const r of rows) {
    const list = byCh.get(r.ch);
    if (list) list.push(r.t);
    else byCh.set(r.ch, [r.t]);
  }
  const hold = new Map<number, number>();
  for (const [ch, ts] of byCh) {
    const d = ts
      .slice(1)
      .map((t, i) => t - (ts[i] as number))
      .sort((a, b) => a - b);
    const median = d.length ? (d[Math.floor(d.length / 2)] as number) : 0;
    hold.set(ch, Math.min(maxHoldMs, Math.max(2000, 1.5 * median)));
  }
  const latest = new Map<number, { t: number; v: number }>();
  const out: OvenReading[] = [];
  let i = 0;
  while (i < rows.length) {
    const t = (rows[i] as RawReading).t;
    while (i < rows.length && (rows[i] as RawReading).t === t) {
      const r = rows[i] as RawReading;
      latest.set(r.ch, { t: r.t, v: r.v });
      i++;
    }
    const temps: number[] = [];
    for (const [ch, l] of latest) if (t - l.t <= (hold.get(ch) ?? 2000)) temps.push(l.v);
    if (temps.length) out.push({ tMs: t, tempC: temps });
  }
  return out;
}

/** Door transitions (value ≥ 0.5 = open) from door readings, starting from the state before the load. */
export function doorEvents(
  rows: readonly { t: number; v: number }[],
  before: { t: number; v: number } | null,
  openedAtMs: number,
): DoorEvent[] {
  const out: DoorEvent[] = [];
  let open = before ? before.v >= 0.5 : false;
  if (open) out.push({ tMs: openedAtMs, open: true });
  for (const r of rows) {
    const o = r.v >= 0.5;
    if (o !== open) {
      out.push({ tMs: r.t, open: o });
      open = o;
    }
  }
  return out;
}

/**
 * The cure record of a load from the stored readings, judged against the window in force for
 * the oven at the load's start (see the module comment). Without a window the record keeps the
 * measurements that need none (peak, ramps, gaps, door) and the verdict is 'unverifiable'.
 */
export async function computeCureRecord(
  pool: pg.Pool,
  load: { ovenAssetId: number; openedAtMs: number; closedAtMs: number },
): Promise<{ record: StoredCureRecord; windowId: number | null }> {
  const oven = await ovenChannels(pool, load.ovenAssetId);
  if (!oven) throw new Error(`asset ${load.ovenAssetId} is not an oven`);
  const endMs = Math.min(load.closedAtMs, load.openedAtMs + MAX_LOAD_HOURS * 3_600_000);
  const inForce = await windowInForce(pool, load.ovenAssetId, load.openedAtMs);
  const cw = inForce ? cureWindowOf(inForce) : null;
  const window: CureWindow = cw?.window ?? {
    // No window: only window-free measurements are kept; these values just let the domain run.
    minTempC: Number.MAX_VALUE,
    minEquivalentMinutes: 0,
    referenceC: 100,
    activationEnergyKJMol: 80,
    maxPartTempC: Number.MAX_VALUE,
    maxRampCPerMin: DEFAULT_MAX_RAMP_C_PER_MIN,
    maxGapSeconds: DEFAULT_MAX_GAP_SECONDS,
  };
  const zoneIds = oven.zones.map((z) => z.id);
  const { rows } = await pool.query<{ ch: number; t: number; v: number; q: number }>(
    `select channel_id as ch, (extract(epoch from ts) * 1000)::float8 as t, value as v, quality as q
       from readings
      where channel_id = any($1::int[]) and ts >= to_timestamp($2 / 1000.0) and ts <= to_timestamp($3 / 1000.0)
      order by ts, channel_id`,
    [zoneIds, load.openedAtMs, endMs],
  );
  const good = rows.filter((r) => r.q < 2);
  const instants = alignZones(good, window.maxGapSeconds * 1000);
  let events: DoorEvent[] = [];
  if (oven.doorId) {
    const door = await pool.query<{ t: number; v: number }>(
      `select (extract(epoch from ts) * 1000)::float8 as t, value as v from readings
        where channel_id = $1 and ts > to_timestamp($2 / 1000.0) and ts <= to_timestamp($3 / 1000.0) and quality < 2 order by ts`,
      [oven.doorId, load.openedAtMs, endMs],
    );
    const before = await pool.query<{ t: number; v: number }>(
      `select (extract(epoch from ts) * 1000)::float8 as t, value as v from readings
        where channel_id = $1 and ts <= to_timestamp($2 / 1000.0) and ts > to_timestamp($2 / 1000.0) - interval '1 day' and quality < 2
        order by ts desc limit 1`,
      [oven.doorId, load.openedAtMs],
    );
    events = doorEvents(door.rows, before.rows[0] ?? null, load.openedAtMs);
  }
  const rec = cureRecord({
    readings: instants,
    doorEvents: events,
    window,
    loadStartMs: load.openedAtMs,
    loadEndMs: endMs,
    rampSpanMinutes: RAMP_SPAN_MINUTES,
  });
  const reasons = [...rec.reasons];
  let verdict: CureVerdictName = rec.verdict;
  if (!inForce) {
    verdict = 'unverifiable';
    const keep = reasons.filter((r) => /^Ramp rate|^The door was opened|data gap|No oven data|Fewer than two/.test(r));
    reasons.length = 0;
    reasons.push(`No process window was in force for ${oven.name} when the load started: the cure cannot be judged.`, ...keep);
  }
  if (endMs < load.closedAtMs)
    reasons.push(`The load was open longer than ${MAX_LOAD_HOURS} h; the record covers its first ${MAX_LOAD_HOURS} h.`);
  if (zoneIds.length === 0) reasons.push(`${oven.name} has no zone air-temperature channel set up.`);
  const record: StoredCureRecord = {
    window:
      inForce && cw
        ? {
            id: inForce.id,
            version: inForce.version,
            name: inForce.name,
            lacquer: inForce.lacquer,
            substrate: inForce.substrate,
            ...cw.window,
            defaulted: cw.defaulted,
          }
        : null,
    source: {
      zoneChannels: oven.zones,
      doorChannelId: oven.doorId,
      readings: good.length,
      instants: instants.length,
      badQualityExcluded: rows.length - good.length,
    },
    openedAtMs: load.openedAtMs,
    closedAtMs: load.closedAtMs,
    durationMinutes: (load.closedAtMs - load.openedAtMs) / 60_000,
    minutesAtOrAboveMin: inForce ? rec.minutesAtOrAboveMin : null,
    peakC: rec.peakC,
    peakAtMs: rec.peakAtMs,
    maxHeatUpCPerMin: rec.maxHeatUpCPerMin,
    maxCoolDownCPerMin: rec.maxCoolDownCPerMin,
    rampExceeded: rec.rampExceeded,
    equivalentMinutes: inForce ? rec.equivalentMinutes : null,
    gaps: rec.gaps,
    soak: inForce ? rec.soak : null,
    door: rec.door,
    verdict,
    reasons,
    computedAtMs: Date.now(),
  };
  return { record, windowId: inForce?.id ?? null };
}

/** Alarm priority of a failing verdict: high for under-cured and unverifiable, medium for over-temperature. */
export function verdictPriority(v: CureVerdictName): 'high' | 'medium' | null {
  return v === 'complete' ? null : v === 'over-temperature' ? 'medium' : 'high';
}

export interface RecomputeResult {
  loadId: number;
  verdict: CureVerdictName;
  record: StoredCureRecord;
  alarmId: number | null;
}

/**
 * Computes and stores a closed load's cure record and verdict; a failing verdict raises the
 * cure alarm (source `load:{id}`; high for under-cured/unverifiable, medium for
 * over-temperature), a complete one clears it. Publishes `alarms` and `loads` when `publish`
 * is given.
 */
export async function recomputeLoad(pool: pg.Pool, loadId: number, publish?: Publish): Promise<RecomputeResult> {
  const { rows } = await pool.query<{
    oven_asset_id: number;
    opened_at: Date;
    closed_at: Date | null;
    status: string;
    oven_name: string;
  }>(
    `select l.oven_asset_id, l.opened_at, l.closed_at, l.status, a.name as oven_name
       from oven_loads l join assets a on a.id = l.oven_asset_id where l.id = $1`,
    [loadId],
  );
  const load = rows[0];
  if (!load) throw new DomainError('not-found', 'Not found', 'No such oven load.');
  if (load.status !== 'closed' || !load.closed_at)
    throw new DomainError('conflict', 'Load still open', 'The cure record is computed when the load is closed.');
  const { record, windowId } = await computeCureRecord(pool, {
    ovenAssetId: load.oven_asset_id,
    openedAtMs: load.opened_at.getTime(),
    closedAtMs: load.closed_at.getTime(),
  });
  const key = `load:${loadId}`;
  const priority = verdictPriority(record.verdict);
  let alarmId: number | null = null;
  if (priority) {
    const w = record.window;
    const [value, limit] =
      record.verdict === 'under-cured' && w
        ? [record.equivalentMinutes, w.minEquivalentMinutes]
        : record.verdict === 'over-temperature' && w
          ? [record.peakC, w.maxPartTempC]
          : [null, null];
    const raised = await raiseAlarm(pool, {
      sourceKind: 'cure',
      sourceKey: key,
      sourceLabel: `${load.oven_name} load ${loadId} cure`,
      assetId: load.oven_asset_id,
      loadId,
      priority,
      message: `${VERDICT_LABELS[record.verdict]}: ${record.reasons[0] ?? ''}`.trim(),
      value,
      limit,
      atMs: load.closed_at.getTime(),
    });
    alarmId = raised.id;
    if (publish) {
      const view = await getAlarm(pool, raised.id);
      if (view) publish('alarms', liveAlarmPayload(view));
    }
  } else {
    const cleared = await clearAlarmReturning(pool, key, Date.now());
    if (cleared && publish) publish('alarms', liveAlarmPayload(cleared));
  }
  await pool.query(
    `update oven_loads set record = $2::jsonb, verdict = $3, computed_at = now(), window_id = $4, alarm_id = coalesce($5, alarm_id) where id = $1`,
    [loadId, JSON.stringify(record), record.verdict, windowId, alarmId],
  );
  publish?.('loads', { loadId, ovenAssetId: load.oven_asset_id, phase: 'closed', status: 'closed', verdict: record.verdict });
  return { loadId, verdict: record.verdict, record, alarmId };
}

export interface OpenLoadInput {
  ovenAssetId: number;
  atMs: number;
  by: 'auto' | 'user';
  userId?: number | null;
  note?: string | null;
}

/**
 * Opens a load on an oven. At most one load is open per oven.
 * @throws DomainError 400 when the asset is not an oven, 409 when a load is already open there.
 */
export async function openLoad(
  pool: pg.Pool,
  input: OpenLoadInput,
  publish?: Publish,
): Promise<{ id: number; windowId: number | null }> {
  const oven = await ovenChannels(pool, input.ovenAssetId);
  if (!oven)
    throw new DomainError('invalid', 'Invalid input', 'ovenAssetId: not an oven', {
      errors: [{ path: 'ovenAssetId', message: 'Choose an oven.' }],
    });
  const w = await windowInForce(pool, input.ovenAssetId, input.atMs);
  try {
    const { rows } = await pool.query<{ id: number }>(
      `insert into oven_loads (oven_asset_id, opened_at, opened_by, opened_by_user, window_id, note)
       values ($1, to_timestamp($2 / 1000.0), $3, $4, $5, $6) returning id`,
      [input.ovenAssetId, input.atMs, input.by, input.userId ?? null, w?.id ?? null, input.note ?? null],
    );
    const id = rows[0]!.id;
    publish?.('loads', { loadId: id, ovenAssetId: input.ovenAssetId, phase: 'ramp', status: 'open' });
    return { id, windowId: w?.id ?? null };
  } catch (e) {
    if ((e as { code?: string }).code === '23505') {
      const open = await pool.query<{ id: number }>(`select id from oven_loads where oven_asset_id = $1 and status = 'open'`, [
        input.ovenAssetId,
      ]);
      throw new DomainError('conflict',
        'A load is already open',
        `${oven.name} already has load ${open.rows[0]?.id ?? '?'} open; close it first.`,
        {
          openLoadId: open.rows[0]?.id ?? null,
        },
      );
    }
    throw e;
  }
}

export interface CloseLoadInput {
  atMs: number;
  by: 'auto' | 'user';
  userId?: number | null;
  note?: string | null;
}

/**
 * Closes an open load and computes its cure record.
 * @throws DomainError 404 unknown, 409 already closed, 400 when the closing time is not after the opening.
 */
export async function closeLoad(
  pool: pg.Pool,
  loadId: number,
  input: CloseLoadInput,
  publish?: Publish,
): Promise<RecomputeResult> {
  const { rows } = await pool.query<{ status: string; opened_at: Date }>(
    'select status, opened_at from oven_loads where id = $1',
    [loadId],
  );
  const load = rows[0];
  if (!load) throw new DomainError('not-found', 'Not found', 'No such oven load.');
  if (load.status !== 'open') throw new DomainError('conflict', 'Load already closed', `Load ${loadId} is already closed.`);
  if (input.atMs <= load.opened_at.getTime()) {
    throw new DomainError('invalid', 'Invalid input', 'closedAt: must be after the load was opened', {
      errors: [{ path: 'closedAt', message: 'The closing time must be after the opening time.' }],
    });
  }
  const upd = await pool.query(
    `update oven_loads set status = 'closed', closed_at = to_timestamp($2 / 1000.0), closed_by = $3, closed_by_user = $4,
            note = coalesce(note || E'\\n', '') || coalesce($5, '')
      where id = $1 and status = 'open'`,
    [loadId, input.atMs, input.by, input.userId ?? null, input.note ?? null],
  );
  if (upd.rowCount === 0) throw new DomainError('conflict', 'Load already closed', `Load ${loadId} is already closed.`);
  return recomputeLoad(pool, loadId, publish);
}

export interface AddJobsResult {
  added: string[];
  alreadyInLoad: string[];
  unknownRacks: string[];
  /** Jobs taken from each scanned rack (its latest dip run). */
  fromRacks: Record<string, string[]>;
}

/**
 * Puts jobs (and the jobs of scanned racks: those of the rack's latest dip run before now) into
 * a load. Unknown job numbers are created.
 * @throws DomainError 404 unknown load, 409 closed load (unless `allowClosed`, for seeds).
 */
export async function addJobsToLoad(
  pool: pg.Pool,
  loadId: number,
  input: { jobNumbers: readonly string[]; rackCodes: readonly string[]; userId?: number | null; allowClosed?: boolean },
): Promise<AddJobsResult> {
  const { rows } = await pool.query<{ status: string }>('select status from oven_loads where id = $1', [loadId]);
  if (!rows[0]) throw new DomainError('not-found', 'Not found', 'No such oven load.');
  if (rows[0].status !== 'open' && !input.allowClosed)
    throw new DomainError('conflict', 'Load closed', `Load ${loadId} is closed; jobs go into an open load.`);
  const fromRacks: Record<string, string[]> = {};
  const unknownRacks: string[] = [];
  const racks = new Map<string, number>();
  for (const code of new Set(input.rackCodes)) {
    const r = await pool.query<{ rack_id: number; job_number: string }>(
      `select k.id as rack_id, j.job_number from racks k
         join lateral (select d.id from dip_runs d where d.rack_id = k.id order by d.dipped_at desc limit 1) d on true
         join dip_run_jobs dj on dj.dip_run_id = d.id join jobs j on j.id = dj.job_id
        where k.code = $1 order by j.job_number`,
      [code],
    );
    if (r.rows.length === 0) unknownRacks.push(code);
    else {
      fromRacks[code] = r.rows.map((x) => x.job_number);
      racks.set(code, r.rows[0]!.rack_id);
    }
  }
  const rackOf = new Map<string, number>();
  for (const [code, list] of Object.entries(fromRacks)) for (const j of list) rackOf.set(j, racks.get(code)!);
  const all = [...new Set([...input.jobNumbers, ...Object.values(fromRacks).flat()])];
  const ids = await upsertJobs(pool, all);
  const ins = await pool.query<{ job_id: number }>(
    `insert into load_jobs (load_id, job_id, rack_id, added_by)
       select $1, j, r, $4 from unnest($2::int[], $3::int[]) as u(j, r)
     on conflict do nothing returning job_id`,
    [loadId, all.map((n) => ids.get(n)!), all.map((n) => rackOf.get(n) ?? null), input.userId ?? null],
  );
  const addedIds = new Set(ins.rows.map((r) => r.job_id));
  return {
    added: all.filter((n) => addedIds.has(ids.get(n)!)),
    alreadyInLoad: all.filter((n) => !addedIds.has(ids.get(n)!)),
    unknownRacks,
    fromRacks,
  };
}

/**
 * Records a load that already ran (seeds, imports): inserts it closed and computes its record.
 * Idempotent per oven and opening time: an existing load there is recomputed instead.
 */
export async function recordPastLoad(
  pool: pg.Pool,
  input: {
    ovenAssetId: number;
    openedAtMs: number;
    closedAtMs: number;
    by: 'auto' | 'user';
    userId?: number | null;
    note?: string | null;
  },
): Promise<RecomputeResult> {
  const found = await pool.query<{ id: number }>(
    `select id from oven_loads where oven_asset_id = $1 and opened_at = to_timestamp($2 / 1000.0)`,
    [input.ovenAssetId, input.openedAtMs],
  );
  let id = found.rows[0]?.id;
  if (!id) {
    const { rows } = await pool.query<{ id: number }>(
      `insert into oven_loads (oven_asset_id, opened_at, closed_at, opened_by, opened_by_user, closed_by, closed_by_user, status, note)
       values ($1, to_timestamp($2 / 1000.0), to_timestamp($3 / 1000.0), $4, $5, $4, $5, 'closed', $6) returning id`,
      [input.ovenAssetId, input.openedAtMs, input.closedAtMs, input.by, input.userId ?? null, input.note ?? null],
    );
    id = rows[0]!.id;
  }
  return recomputeLoad(pool, id);
}
