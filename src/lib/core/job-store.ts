/**
 * Jobs, racks and dip runs (worker- and seed-safe: takes a pg.Pool, imports no Astro env).
 *
 * A dip run records one rack withdrawn from a line's hard-coat bath: when, which jobs it
 * carried, the bath charge in the tank at that moment and the last bath check before it, the
 * process window in force, and the mean withdrawal speed measured during the stroke (from the
 * stored readings of the tank's withdrawal-speed channel).
 */
import type pg from 'pg';
import { DomainError } from './errors.ts';
import { windowInForce } from './window-store.ts';

type Queryable = pg.Pool | pg.PoolClient;

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
  q: Queryable,
  jobNumbers: readonly string[],
  extra: ReadonlyMap<string, JobExtra> = new Map(),
): Promise<Map<string, number>> {
  const out = new Map<string, number>();
  if (jobNumbers.length === 0) return out;
  const nums = [...new Set(jobNumbers)];
  const { rows } = await q.query<{ id: number; job_number: string; created: boolean }>(
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
export async function upsertRack(q: Queryable, code: string): Promise<number> {
  const { rows } = await q.query<{ id: number }>(
    `insert into racks (code) values ($1) on conflict (code) do update set code = excluded.code returning id`,
    [code],
  );
  return rows[0]!.id;
}

export interface LineInfo {
  id: number;
  code: string;
  name: string;
  tankId: number | null;
  speedChannelId: number | null;
}

/** A dip line with its hard-coat tank and that tank's withdrawal-speed channel. */
export async function lineInfo(q: Queryable, lineAssetId: number): Promise<LineInfo | null> {
  const { rows } = await q.query<{
    id: number;
    code: string;
    name: string;
    kind: string;
    tank_id: number | null;
    speed_id: number | null;
  }>(
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
export async function strokeNear(q: Queryable, speedChannelId: number, dippedAtMs: number): Promise<Stroke | null> {
  const { rows } = await q.query<{ t: number; v: number }>(
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
 * mean withdrawal speed of the stroke; creates unknown jobs and the rack.
 * @throws DomainError 400 when the asset is not a dip line.
 */
export async function createDipRun(pool: pg.Pool, input: DipRunInput): Promise<DipRunCreated> {
  const line = await lineInfo(pool, input.lineAssetId);
  if (!line) {
    throw new DomainError('invalid', 'Invalid input', 'lineAssetId: not a dip line', {
      errors: [{ path: 'lineAssetId', message: 'Choose a dip line.' }],
    });
  }
  const t = input.dippedAtMs;
  const window = await windowInForce(pool, line.id, t);
  const stroke = line.speedChannelId ? await strokeNear(pool, line.speedChannelId, t) : null;
  const c = await pool.connect();
  try {
    await c.query('begin');
    const charge = line.tankId
      ? (
          await c.query<{ id: number }>(
            `select id from bath_charges where tank_asset_id = $1 and charged_at <= to_timestamp($2 / 1000.0) order by charged_at desc limit 1`,
            [line.tankId, t],
          )
        ).rows[0]
      : undefined;
    const check = line.tankId
      ? (
          await c.query<{ id: number }>(
            `select id from bath_checks where tank_asset_id = $1 and at <= to_timestamp($2 / 1000.0) order by at desc limit 1`,
            [line.tankId, t],
          )
        ).rows[0]
      : undefined;
    const rackId = input.rackCode ? await upsertRack(c, input.rackCode) : null;
    const { rows } = await c.query<{ id: number; dipped_at: Date }>(
      `insert into dip_runs (line_asset_id, tank_asset_id, rack_id, dipped_at, bath_charge_id, last_check_id, window_id,
          withdrawal_speed_mm_s, stroke_started_at, stroke_ended_at, stroke_samples, source, note, recorded_by)
       values ($1, $2, $3, to_timestamp($4 / 1000.0), $5, $6, $7, $8, to_timestamp($9 / 1000.0), to_timestamp($10 / 1000.0), $11, $12, $13, $14)
       returning id, dipped_at`,
      [
        line.id,
        line.tankId,
        rackId,
        t,
        charge?.id ?? null,
        check?.id ?? null,
        window?.id ?? null,
        stroke?.meanMmS ?? null,
        stroke?.startMs ?? null,
        stroke?.endMs ?? null,
        stroke?.samples ?? null,
        input.source,
        input.note ?? null,
        input.userId ?? null,
      ],
    );
    const run = rows[0]!;
    const ids = await upsertJobs(c, input.jobNumbers);
    await c.query(`insert into dip_run_jobs (dip_run_id, job_id) select $1, unnest($2::int[]) on conflict do nothing`, [
      run.id,
      [...ids.values()],
    ]);
    await c.query('commit');
    return {
      id: run.id,
      lineAssetId: line.id,
      tankAssetId: line.tankId,
      dippedAt: run.dipped_at.toISOString(),
      bathChargeId: charge?.id ?? null,
      lastCheckId: check?.id ?? null,
      windowId: window?.id ?? null,
      withdrawalSpeedMmS: stroke?.meanMmS ?? null,
      strokeSamples: stroke?.samples ?? null,
      jobs: [...ids.entries()].map(([jobNumber, id]) => ({ id, jobNumber })),
      rackId,
    };
  } catch (e) {
    await c.query('rollback').catch(() => {});
    throw e;
  } finally {
    c.release();
  }
}

/** Attach existing jobs to a dip run (the CSV import's second step). */
export async function attachJobsToDipRun(q: Queryable, dipRunId: number, jobIds: readonly number[]): Promise<number> {
  const r = await q.query(`insert into dip_run_jobs (dip_run_id, job_id) select $1, unnest($2::int[]) on conflict do nothing`, [
    dipRunId,
    jobIds,
  ]);
  return r.rowCount ?? 0;
}
