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
import { Op, UniqueConstraintError, fn, literal } from 'sequelize';
import { Asset, DipRun, Job, LoadJob, OvenLoad, Rack } from '../../../db/models/index.ts';
import { auditIn, type AuditActor } from '../../../db/transaction.ts';
import { cureRecord, type CureWindow, type DoorEvent, type OvenReading } from '../domain/cure/cure-record.ts';
import { VERDICT_LABELS, type CureVerdictName, type StoredCureRecord } from '../shared/jobs.ts';
import type { ProcessWindowInForce } from '../shared/windows.ts';
import { DomainError } from './errors.ts';
import { clearAlarmReturning, getAlarm, liveAlarmPayload, raiseAlarm } from './alarm-store.ts';
import { upsertJobs } from './job-store.ts';
import { inTransaction, selectRows, sequelizeOf, transactionOf, type Db } from './record-db.ts';
import { windowInForce } from './window-store.ts';

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
export async function ovenChannels(db: Db, ovenAssetId: number): Promise<OvenChannels | null> {
  const oven = await Asset.findByPk(ovenAssetId, {
    attributes: ['id', 'code', 'name', 'kind'],
    transaction: transactionOf(db) ?? null,
  });
  if (!oven || oven.kind !== 'oven') return null;
  // Channels of the oven and of its zones (other areas' tables, one join: raw through the same instance).
  const ch = await selectRows<{ id: number; name: string; kind: string; on_oven: boolean }>(
    db,
    `select c.id, c.name, c.kind, c.asset_id = $1 as on_oven
       from channels c join assets a on a.id = c.asset_id
      where c.asset_id = $1 or (a.parent_id = $1 and a.kind = 'zone')
      order by a.code, c.id`,
    [ovenAssetId],
  );
  const first = (kind: string) => ch.find((c) => c.on_oven && c.kind === kind)?.id ?? null;
  return {
    ovenId: oven.id,
    code: oven.code,
    name: oven.name,
    setpointId: first('setpoint'),
    doorId: first('door'),
    zones: ch.filter((c) => !c.on_oven && c.kind === 'air-temperature').map((c) => ({ id: c.id, name: c.name })),
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
  db: Db,
  load: { ovenAssetId: number; openedAtMs: number; closedAtMs: number },
): Promise<{ record: StoredCureRecord; windowId: number | null }> {
  const oven = await ovenChannels(db, load.ovenAssetId);
  if (!oven) throw new Error(`asset ${load.ovenAssetId} is not an oven`);
  const endMs = Math.min(load.closedAtMs, load.openedAtMs + MAX_LOAD_HOURS * 3_600_000);
  const inForce = await windowInForce(db, load.ovenAssetId, load.openedAtMs);
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
  // The telemetry read path stays raw (thousands of rows; epoch milliseconds instead of Dates).
  const rows = await selectRows<{ ch: number; t: number; v: number; q: number }>(
    db,
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
    const door = await selectRows<{ t: number; v: number }>(
      db,
      `select (extract(epoch from ts) * 1000)::float8 as t, value as v from readings
        where channel_id = $1 and ts > to_timestamp($2 / 1000.0) and ts <= to_timestamp($3 / 1000.0) and quality < 2 order by ts`,
      [oven.doorId, load.openedAtMs, endMs],
    );
    const before = await selectRows<{ t: number; v: number }>(
      db,
      `select (extract(epoch from ts) * 1000)::float8 as t, value as v from readings
        where channel_id = $1 and ts <= to_timestamp($2 / 1000.0) and ts > to_timestamp($2 / 1000.0) - interval '1 day' and quality < 2
        order by ts desc limit 1`,
      [oven.doorId, load.openedAtMs],
    );
    events = doorEvents(door, before[0] ?? null, load.openedAtMs);
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

/** Who made a change from outside the worker (audited) and where live events go. */
export interface ChangeOptions {
  publish?: Publish | undefined;
  /** When given, the change writes its audit row in its own transaction. */
  actor?: AuditActor | undefined;
}

const notFound = () => new DomainError('not-found', 'Not found', 'No such oven load.');

/**
 * Raises the load's cure alarm for a failing verdict (source `load:{id}`; high for
 * under-cured/unverifiable, medium for over-temperature) or clears it for a complete one, once
 * the record is committed, and links the alarm to the load. The alarm keeps its own event log.
 */
async function applyCureAlarm(
  db: Db,
  load: { id: number; ovenAssetId: number; ovenName: string; closedAtMs: number },
  record: StoredCureRecord,
  publish?: Publish,
): Promise<number | null> {
  const pool = db;
  const key = `load:${load.id}`;
  const priority = verdictPriority(record.verdict);
  if (!priority) {
    const cleared = await clearAlarmReturning(pool, key, Date.now());
    if (cleared && publish) publish('alarms', liveAlarmPayload(cleared));
    return null;
  }
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
    sourceLabel: `${load.ovenName} load ${load.id} cure`,
    assetId: load.ovenAssetId,
    loadId: load.id,
    priority,
    message: `${VERDICT_LABELS[record.verdict]}: ${record.reasons[0] ?? ''}`.trim(),
    value,
    limit,
    atMs: load.closedAtMs,
  });
  await OvenLoad.update({ alarmId: raised.id }, { where: { id: load.id }, transaction: transactionOf(db) ?? null });
  if (publish) {
    const view = await getAlarm(pool, raised.id);
    if (view) publish('alarms', liveAlarmPayload(view));
  }
  return raised.id;
}

async function loadWithOven(db: Db, loadId: number): Promise<(OvenLoad & { oven?: Asset }) | null> {
  return OvenLoad.findByPk(loadId, {
    include: [{ model: Asset, as: 'oven', attributes: ['name'] }],
    transaction: transactionOf(db) ?? null,
  }) as Promise<(OvenLoad & { oven?: Asset }) | null>;
}

/**
 * Computes and stores a closed load's cure record and verdict (audited as `load.recompute`
 * with the verdicts before and after when an actor is given); then the cure alarm follows the
 * verdict (see `applyCureAlarm`). Publishes `alarms` and `loads` when `publish` is given.
 */
export async function recomputeLoad(db: Db, loadId: number, opts: ChangeOptions = {}): Promise<RecomputeResult> {
  const load = await loadWithOven(db, loadId);
  if (!load) throw notFound();
  if (load.status !== 'closed' || !load.closedAt)
    throw new DomainError('conflict', 'Load still open', 'The cure record is computed when the load is closed.');
  const closedAtMs = load.closedAt.getTime();
  const { record, windowId } = await computeCureRecord(db, {
    ovenAssetId: load.ovenAssetId,
    openedAtMs: load.openedAt.getTime(),
    closedAtMs,
  });
  await inTransaction(db, async (t) => {
    const row = await OvenLoad.findByPk(loadId, { attributes: ['id', 'verdict'], transaction: t, lock: t.LOCK.UPDATE });
    if (!row) throw notFound();
    const before = row.verdict;
    await OvenLoad.update(
      { record, verdict: record.verdict, computedAt: fn('now'), windowId },
      { where: { id: loadId }, transaction: t },
    );
    if (opts.actor)
      await auditIn(t, opts.actor, {
        action: 'load.recompute',
        entity: 'oven_load',
        entityId: loadId,
        before: { verdict: before },
        after: { verdict: record.verdict },
      });
  });
  const alarmId = await applyCureAlarm(
    db,
    { id: loadId, ovenAssetId: load.ovenAssetId, ovenName: load.oven?.name ?? `oven ${load.ovenAssetId}`, closedAtMs },
    record,
    opts.publish,
  );
  opts.publish?.('loads', { loadId, ovenAssetId: load.ovenAssetId, phase: 'closed', status: 'closed', verdict: record.verdict });
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
 * Opens a load on an oven (audited as `load.open` when an actor is given). At most one load is
 * open per oven.
 * @throws DomainError invalid when the asset is not an oven, conflict (with `extra.openLoadId`)
 *   when a load is already open there.
 */
export async function openLoad(
  db: Db,
  input: OpenLoadInput,
  opts: ChangeOptions = {},
): Promise<{ id: number; windowId: number | null }> {
  const oven = await ovenChannels(db, input.ovenAssetId);
  if (!oven)
    throw new DomainError('invalid', 'Invalid input', 'ovenAssetId: not an oven', {
      errors: [{ path: 'ovenAssetId', message: 'Choose an oven.' }],
    });
  const w = await windowInForce(db, input.ovenAssetId, input.atMs);
  let id: number;
  try {
    id = await inTransaction(db, async (t) => {
      const load = await OvenLoad.create(
        {
          ovenAssetId: input.ovenAssetId,
          openedAt: new Date(input.atMs),
          openedBy: input.by,
          openedByUser: input.userId ?? null,
          windowId: w?.id ?? null,
          note: input.note ?? null,
        },
        { transaction: t },
      );
      if (opts.actor)
        await auditIn(t, opts.actor, {
          action: 'load.open',
          entity: 'oven_load',
          entityId: load.id,
          after: { ovenAssetId: input.ovenAssetId, openedAt: new Date(input.atMs).toISOString(), windowId: w?.id ?? null },
        });
      return load.id;
    });
  } catch (e) {
    if (e instanceof UniqueConstraintError) {
      const open = await OvenLoad.findOne({
        attributes: ['id'],
        where: { ovenAssetId: input.ovenAssetId, status: 'open' },
        transaction: transactionOf(db) ?? null,
      });
      throw new DomainError(
        'conflict',
        'A load is already open',
        `${oven.name} already has load ${open?.id ?? '?'} open; close it first.`,
        { openLoadId: open?.id ?? null },
      );
    }
    throw e;
  }
  opts.publish?.('loads', { loadId: id, ovenAssetId: input.ovenAssetId, phase: 'ramp', status: 'open' });
  return { id, windowId: w?.id ?? null };
}

export interface CloseLoadInput {
  atMs: number;
  by: 'auto' | 'user';
  userId?: number | null;
  note?: string | null;
}

/**
 * Closes an open load and stores its cure record in the same transaction (audited as
 * `load.close` with the verdict when an actor is given); then the cure alarm follows the verdict.
 * @throws DomainError not-found, conflict when already closed, invalid when the closing time is
 *   not after the opening.
 */
export async function closeLoad(
  db: Db,
  loadId: number,
  input: CloseLoadInput,
  opts: ChangeOptions = {},
): Promise<RecomputeResult> {
  const load = await loadWithOven(db, loadId);
  if (!load) throw notFound();
  const closed = () => new DomainError('conflict', 'Load already closed', `Load ${loadId} is already closed.`);
  if (load.status !== 'open') throw closed();
  if (input.atMs <= load.openedAt.getTime()) {
    throw new DomainError('invalid', 'Invalid input', 'closedAt: must be after the load was opened', {
      errors: [{ path: 'closedAt', message: 'The closing time must be after the opening time.' }],
    });
  }
  const { record, windowId } = await computeCureRecord(db, {
    ovenAssetId: load.ovenAssetId,
    openedAtMs: load.openedAt.getTime(),
    closedAtMs: input.atMs,
  });
  await inTransaction(db, async (t) => {
    const [changed] = await OvenLoad.update(
      {
        status: 'closed',
        closedAt: new Date(input.atMs),
        closedBy: input.by,
        closedByUser: input.userId ?? null,
        // The closing note is appended to the opening one, one per line.
        note: literal(`coalesce(note || E'\\n', '') || ${sequelizeOf(db).escape(input.note ?? '')}`),
        record,
        verdict: record.verdict,
        computedAt: fn('now'),
        windowId,
      },
      { where: { id: loadId, status: 'open' }, transaction: t },
    );
    if (changed === 0) throw closed();
    if (opts.actor)
      await auditIn(t, opts.actor, {
        action: 'load.close',
        entity: 'oven_load',
        entityId: loadId,
        after: { closedAt: new Date(input.atMs).toISOString(), verdict: record.verdict },
      });
  });
  const alarmId = await applyCureAlarm(
    db,
    {
      id: loadId,
      ovenAssetId: load.ovenAssetId,
      ovenName: load.oven?.name ?? `oven ${load.ovenAssetId}`,
      closedAtMs: input.atMs,
    },
    record,
    opts.publish,
  );
  opts.publish?.('loads', { loadId, ovenAssetId: load.ovenAssetId, phase: 'closed', status: 'closed', verdict: record.verdict });
  return { loadId, verdict: record.verdict, record, alarmId };
}

export interface AddJobsResult {
  added: string[];
  alreadyInLoad: string[];
  unknownRacks: string[];
  /** Jobs taken from each scanned rack (its latest dip run). */
  fromRacks: Record<string, string[]>;
}

/**
 * Puts jobs (and the jobs of scanned racks: those of the rack's latest dip run) into a load, in
 * one transaction with its audit row (`load.jobs.add`, when an actor is given and a job was
 * added). Unknown job numbers are created.
 * @throws DomainError not-found unknown load, conflict closed load (unless `allowClosed`, for seeds).
 */
export async function addJobsToLoad(
  db: Db,
  loadId: number,
  input: {
    jobNumbers: readonly string[];
    rackCodes: readonly string[];
    userId?: number | null;
    allowClosed?: boolean;
    actor?: AuditActor | undefined;
  },
): Promise<AddJobsResult> {
  return inTransaction(db, async (t) => {
    const load = await OvenLoad.findByPk(loadId, { attributes: ['id', 'status'], transaction: t });
    if (!load) throw notFound();
    if (load.status !== 'open' && !input.allowClosed)
      throw new DomainError('conflict', 'Load closed', `Load ${loadId} is closed; jobs go into an open load.`);
    const fromRacks: Record<string, string[]> = {};
    const unknownRacks: string[] = [];
    const rackOf = new Map<string, number>();
    for (const code of new Set(input.rackCodes)) {
      const rack = await Rack.findOne({ attributes: ['id'], where: { code }, transaction: t });
      const run = rack
        ? await DipRun.findOne({
            attributes: ['id', 'dippedAt'],
            where: { rackId: rack.id },
            order: [['dippedAt', 'DESC']],
            include: [{ model: Job, attributes: ['jobNumber'], through: { attributes: [] } }],
            transaction: t,
          })
        : null;
      const jobs = ((run as (DipRun & { Jobs?: Job[] }) | null)?.Jobs ?? []).map((j) => j.jobNumber).sort();
      if (!rack || jobs.length === 0) unknownRacks.push(code);
      else {
        fromRacks[code] = jobs;
        for (const j of jobs) rackOf.set(j, rack.id);
      }
    }
    const all = [...new Set([...input.jobNumbers, ...Object.values(fromRacks).flat()])];
    const ids = await upsertJobs(t, all);
    const present = new Set(
      (
        await LoadJob.findAll({
          attributes: ['jobId'],
          where: { loadId, jobId: { [Op.in]: [...ids.values()] } },
          transaction: t,
        })
      ).map((r) => r.jobId),
    );
    const fresh = all.filter((n) => !present.has(ids.get(n)!));
    await LoadJob.bulkCreate(
      fresh.map((n) => ({ loadId, jobId: ids.get(n)!, rackId: rackOf.get(n) ?? null, addedBy: input.userId ?? null })),
      { transaction: t, ignoreDuplicates: true },
    );
    const result: AddJobsResult = {
      added: fresh,
      alreadyInLoad: all.filter((n) => present.has(ids.get(n)!)),
      unknownRacks,
      fromRacks,
    };
    if (input.actor && result.added.length)
      await auditIn(t, input.actor, {
        action: 'load.jobs.add',
        entity: 'oven_load',
        entityId: loadId,
        after: { added: result.added, racks: Object.keys(fromRacks) },
      });
    return result;
  });
}

/**
 * Records a load that already ran (seeds, imports): inserts it closed and computes its record.
 * Idempotent per oven and opening time: an existing load there is recomputed instead.
 */
export async function recordPastLoad(
  db: Db,
  input: {
    ovenAssetId: number;
    openedAtMs: number;
    closedAtMs: number;
    by: 'auto' | 'user';
    userId?: number | null;
    note?: string | null;
  },
): Promise<RecomputeResult> {
  const transaction = transactionOf(db) ?? null;
  const found = await OvenLoad.findOne({
    attributes: ['id'],
    where: { ovenAssetId: input.ovenAssetId, openedAt: new Date(input.openedAtMs) },
    transaction,
  });
  const id =
    found?.id ??
    (
      await OvenLoad.create(
        {
          ovenAssetId: input.ovenAssetId,
          openedAt: new Date(input.openedAtMs),
          closedAt: new Date(input.closedAtMs),
          openedBy: input.by,
          openedByUser: input.userId ?? null,
          closedBy: input.by,
          closedByUser: input.userId ?? null,
          status: 'closed',
          note: input.note ?? null,
        },
        { transaction },
      )
    ).id;
  return recomputeLoad(db, id);
}
