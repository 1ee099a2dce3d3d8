/**
 * Jobs, racks and dip runs (worker- and seed-safe: takes the Sequelize instance or a
 * transaction, imports no Astro env).
 *
 * A dip run records one rack withdrawn from a line's hard-coat bath: when, which jobs it
 * carried, the bath charge in the tank at that moment and the last bath check before it, the
 * process window in force, and the mean withdrawal speed measured during the stroke (from the
 * stored readings of the tank's withdrawal-speed channel).
 */
import { Op } from 'sequelize';
import { DipRun, DipRunJob, Job, Rack } from '../../../db/models/index.ts';
import { auditIn, type AuditActor } from '../../../db/transaction.ts';
import type { JobCsvRow } from '../shared/jobs.ts';
import { DomainError, fieldError } from './errors.ts';
import { inTransaction, selectRows, transactionOf, type Db } from './record-db.ts';
import { windowInForce } from './window-store.ts';

/** A withdrawal speed below this counts as stopped, mm/s (common practice: the lift is parked). */
export const STROKE_MOVING_MM_S = 0.05;
/** A pause longer than this between readings ends a stroke, s. */
export const STROKE_MAX_SPACING_S = 30;
/** How far around the dip time a stroke is looked for, minutes (before, after). */
export const STROKE_SEARCH_MIN = { before: 5, after: 15 } as const;

export interface JobExtra {
  customerRef?: string | null;
  lensMaterial?: string | null;
}

/**
 * Creates the jobs that do not exist yet (status active) and returns every job's id by number.
 * Extra fields fill in blanks of existing jobs and never overwrite what is there.
 */
export async function upsertJobs(
  db: Db,
  jobNumbers: readonly string[],
  extra: ReadonlyMap<string, JobExtra> = new Map(),
): Promise<Map<string, number>> {
  const out = new Map<string, number>();
  if (jobNumbers.length === 0) return out;
  const nums = [...new Set(jobNumbers)];
  // One statement for the whole batch (imports and seeds bring thousands): a model upsert cannot
  // fill only the blanks of existing rows.
  const rows = await selectRows<{ id: number; job_number: string; created: boolean }>(
    db,
    `insert into jobs (job_number, customer_ref, lens_material)
       select * from unnest($1::text[], $2::text[], $3::text[])
     on conflict (job_number) do update
       set customer_ref = coalesce(jobs.customer_ref, excluded.customer_ref),
           lens_material = coalesce(jobs.lens_material, excluded.lens_material),
           updated_at = case when (jobs.customer_ref is null and excluded.customer_ref is not null)
                               or (jobs.lens_material is null and excluded.lens_material is not null)
                             then now() else jobs.updated_at end
     returning id, job_number, (xmax = 0) as created`,
    [nums, nums.map((n) => extra.get(n)?.customerRef ?? null), nums.map((n) => extra.get(n)?.lensMaterial ?? null)],
  );
  for (const r of rows) out.set(r.job_number, r.id);
  return out;
}

/** The rack (or tray) with this code, created when new. */
export async function upsertRack(db: Db, code: string): Promise<number> {
  const transaction = transactionOf(db) ?? null;
  await Rack.bulkCreate([{ code }], { ignoreDuplicates: true, transaction });
  return (await Rack.findOne({ attributes: ['id'], where: { code }, transaction, rejectOnEmpty: true })).id;
}

export interface LineInfo {
  id: number;
  code: string;
  name: string;
  tankId: number | null;
  speedChannelId: number | null;
}

/** A dip line with its hard-coat tank and that tank's withdrawal-speed channel. */
export async function lineInfo(db: Db, lineAssetId: number): Promise<LineInfo | null> {
  // Plant tables of another area, one lateral join: raw through the same instance.
  const rows = await selectRows<{
    id: number;
    code: string;
    name: string;
    kind: string;
    tank_id: number | null;
    speed_id: number | null;
  }>(
    db,
    `select a.id, a.code, a.name, a.kind, t.id as tank_id,
            (select c.id from channels c where c.asset_id = t.id and c.kind = 'withdrawal-speed' order by c.id limit 1) as speed_id
       from assets a
       left join lateral (
         select id from assets t where t.parent_id = a.id and t.kind = 'tank'
          order by (t.details->>'role' = 'hard-coat') desc nulls last, t.code desc limit 1) t on true
      where a.id = $1`,
    [lineAssetId],
  );
  const r = rows[0];
  if (!r || r.kind !== 'line') return null;
  return { id: r.id, code: r.code, name: r.name, tankId: r.tank_id, speedChannelId: r.speed_id };
}

export interface Stroke {
  meanMmS: number;
  startMs: number;
  endMs: number;
  samples: number;
}

/**
 * The withdrawal stroke nearest a dip time: the run of consecutive readings ≥ 0.05 mm/s
 * (no pause > 30 s) within 5 min before to 15 min after the dip time whose start is closest to
 * it; its mean speed is the plain mean of the stroke's readings (readings of bad quality left
 * out). Null when the channel shows no movement there.
 */
export async function strokeNear(db: Db, speedChannelId: number, dippedAtMs: number): Promise<Stroke | null> {
  // The telemetry read path stays raw (epoch milliseconds, no Date per reading).
  const rows = await selectRows<{ t: number; v: number }>(
    db,
    `select (extract(epoch from ts) * 1000)::float8 as t, value as v from readings
      where channel_id = $1 and ts >= to_timestamp($2 / 1000.0) and ts <= to_timestamp($3 / 1000.0) and quality < 2
      order by ts`,
    [speedChannelId, dippedAtMs - STROKE_SEARCH_MIN.before * 60_000, dippedAtMs + STROKE_SEARCH_MIN.after * 60_000],
  );
  const runs: { start: number; end: number; sum: number; n: number }[] = [];
  let cur: (typeof runs)[number] | null = null;
  let lastT = -Infinity;
  for (const r of rows) {
    const moving = r.v >= STROKE_MOVING_MM_S;
    if (cur && (!moving || r.t - lastT > STROKE_MAX_SPACING_S * 1000)) {
      runs.push(cur);
      cur = null;
    }
    if (moving) {
      if (!cur) cur = { start: r.t, end: r.t, sum: 0, n: 0 };
      cur.end = r.t;
      cur.sum += r.v;
      cur.n++;
    }
    lastT = r.t;
  }
  if (cur) runs.push(cur);
  if (runs.length === 0) return null;
  const best = runs.reduce((a, b) => (Math.abs(b.start - dippedAtMs) < Math.abs(a.start - dippedAtMs) ? b : a));
  return { meanMmS: best.sum / best.n, startMs: best.start, endMs: best.end, samples: best.n };
}

export interface DipRunInput {
  lineAssetId: number;
  dippedAtMs: number;
  rackCode?: string | null | undefined;
  jobNumbers: readonly string[];
  note?: string | null | undefined;
  source: 'scan' | 'csv' | 'seed' | 'api';
  userId?: number | null;
}

export interface DipRunCreated {
  id: number;
  lineAssetId: number;
  tankAssetId: number | null;
  dippedAt: string;
  bathChargeId: number | null;
  lastCheckId: number | null;
  windowId: number | null;
  withdrawalSpeedMmS: number | null;
  strokeSamples: number | null;
  jobs: { id: number; jobNumber: string }[];
  rackId: number | null;
}

/**
 * Records a dip run: links the bath charge in the tank at the dip time (latest charged at or
 * before it), the last bath check at or before it, the window in force for the line, and the
 * mean withdrawal speed of the stroke; creates unknown jobs and the rack. One transaction with
 * its audit row (`dip.record`) when an actor is given.
 * @throws DomainError invalid when the asset is not a dip line.
 */
export async function createDipRun(db: Db, input: DipRunInput, actor?: AuditActor): Promise<DipRunCreated> {
  const line = await lineInfo(db, input.lineAssetId);
  if (!line) {
    throw new DomainError('invalid', 'Invalid input', 'lineAssetId: not a dip line', {
      errors: [{ path: 'lineAssetId', message: 'Choose a dip line.' }],
    });
  }
  const at = input.dippedAtMs;
  const window = await windowInForce(db, line.id, at);
  const stroke = line.speedChannelId ? await strokeNear(db, line.speedChannelId, at) : null;
  return inTransaction(db, async (t) => {
    // Bath charges and checks belong to the bath log: raw look-ups through the same transaction.
    const charge = line.tankId
      ? (
          await selectRows<{ id: number }>(
            t,
            `select id from bath_charges where tank_asset_id = $1 and charged_at <= to_timestamp($2 / 1000.0) order by charged_at desc limit 1`,
            [line.tankId, at],
          )
        )[0]
      : undefined;
    const check = line.tankId
      ? (
          await selectRows<{ id: number }>(
            t,
            `select id from bath_checks where tank_asset_id = $1 and at <= to_timestamp($2 / 1000.0) order by at desc limit 1`,
            [line.tankId, at],
          )
        )[0]
      : undefined;
    const rackId = input.rackCode ? await upsertRack(t, input.rackCode) : null;
    const run = await DipRun.create(
      {
        lineAssetId: line.id,
        tankAssetId: line.tankId,
        rackId,
        dippedAt: new Date(at),
        bathChargeId: charge?.id ?? null,
        lastCheckId: check?.id ?? null,
        windowId: window?.id ?? null,
        withdrawalSpeedMmS: stroke?.meanMmS ?? null,
        strokeStartedAt: stroke ? new Date(stroke.startMs) : null,
        strokeEndedAt: stroke ? new Date(stroke.endMs) : null,
        strokeSamples: stroke?.samples ?? null,
        source: input.source,
        note: input.note ?? null,
        recordedBy: input.userId ?? null,
      },
      { transaction: t },
    );
    const ids = await upsertJobs(t, input.jobNumbers);
    await attachJobsToDipRun(t, run.id, [...ids.values()]);
    const created: DipRunCreated = {
      id: run.id,
      lineAssetId: line.id,
      tankAssetId: line.tankId,
      dippedAt: run.dippedAt.toISOString(),
      bathChargeId: charge?.id ?? null,
      lastCheckId: check?.id ?? null,
      windowId: window?.id ?? null,
      withdrawalSpeedMmS: stroke?.meanMmS ?? null,
      strokeSamples: stroke?.samples ?? null,
      jobs: [...ids.entries()].map(([jobNumber, id]) => ({ id, jobNumber })),
      rackId,
    };
    if (actor)
      await auditIn(t, actor, {
        action: 'dip.record',
        entity: 'dip_run',
        entityId: run.id,
        after: {
          lineAssetId: created.lineAssetId,
          dippedAt: created.dippedAt,
          rackCode: input.rackCode ?? null,
          jobs: input.jobNumbers,
          bathChargeId: created.bathChargeId,
          lastCheckId: created.lastCheckId,
          withdrawalSpeedMmS: created.withdrawalSpeedMmS,
        },
      });
    return created;
  });
}

/** Attach existing jobs to a dip run (the CSV import's second step); jobs already on it stay as they are. */
export async function attachJobsToDipRun(db: Db, dipRunId: number, jobIds: readonly number[]): Promise<void> {
  if (jobIds.length === 0) return;
  await DipRunJob.bulkCreate(
    jobIds.map((jobId) => ({ dipRunId, jobId })),
    { ignoreDuplicates: true, transaction: transactionOf(db) ?? null },
  );
}

export interface JobImportResult {
  imported: number;
  created: number;
  skippedLines: number[];
  attachedTo: number | null;
  jobNumbers: string[];
}

/**
 * Stores the good rows of a checked job CSV (jobs, their racks, optionally attached to a dip
 * run) in one transaction with its audit row (`jobs.import`, keyed by the file's fingerprint).
 * @throws DomainError invalid when there is no good row or the dip run is unknown.
 */
export async function importJobs(
  db: Db,
  input: { good: readonly JobCsvRow[]; skippedLines: readonly number[]; sha256: string; dipRunId?: number | undefined },
  actor: AuditActor,
): Promise<JobImportResult> {
  if (input.good.length === 0) throw fieldError('csv', 'No good rows to import.');
  const numbers = input.good.map((g) => g.jobNumber);
  return inTransaction(db, async (t) => {
    if (input.dipRunId !== undefined && !(await DipRun.findByPk(input.dipRunId, { attributes: ['id'], transaction: t })))
      throw fieldError('dipRunId', 'No such dip run.');
    const known = await Job.count({ where: { jobNumber: { [Op.in]: numbers } }, transaction: t });
    const ids = await upsertJobs(
      t,
      numbers,
      new Map(input.good.map((g) => [g.jobNumber, { customerRef: g.customerRef, lensMaterial: g.lensMaterial }])),
    );
    for (const code of new Set(input.good.map((g) => g.rackCode).filter((c): c is string => !!c))) await upsertRack(t, code);
    if (input.dipRunId !== undefined) await attachJobsToDipRun(t, input.dipRunId, [...ids.values()]);
    const result: JobImportResult = {
      imported: input.good.length,
      created: input.good.length - known,
      skippedLines: [...input.skippedLines],
      attachedTo: input.dipRunId ?? null,
      jobNumbers: numbers,
    };
    await auditIn(t, actor, {
      action: 'jobs.import',
      entity: 'jobs',
      entityId: input.sha256.slice(0, 16),
      after: { ...result, jobNumbers: undefined, count: input.good.length },
    });
    return result;
  });
}
