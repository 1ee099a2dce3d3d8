/**
 * Dip runs and jobs for the web app: recording a rack dipped on a line (jobs scanned or typed),
 * the two-step job CSV import (preview, then commit of the good rows only), lists and search.
 * The dip-run record itself (bath charge, last check, stroke speed) is built by the job store.
 */
import { createHash } from 'node:crypto';
import { Op } from 'sequelize';
import { CsvSyntaxError } from '../../shared/csv-table.ts';
import { validateJobCsv, type DipRunCreate, type JobCsvPreview } from '../../shared/jobs.ts';
import type { SessionUser } from '../auth.ts';
import { Asset, Job } from '../../../../db/models/index.ts';
import { sequelize } from '../db.ts';
import { selectRows } from '../../core/record-db.ts';

/** A raw SELECT through the web process's Sequelize instance (bind parameters). */
const rawRows = <T extends object>(sql: string, bind: unknown[] = []) => selectRows<T>(sequelize(), sql, bind);
import { actorOf } from '../guard.ts';
import { HttpProblem } from '../http.ts';
import { createDipRun, importJobs, type DipRunCreated } from '../../core/job-store.ts';
import type { LineRow, DipRunItem, JobSearchItem } from '../../shared/trace-views.ts';

const bad = (path: string, message: string) =>
  new HttpProblem(400, 'Invalid input', `${path}: ${message}`, { errors: [{ path, message }] });

/** Every dip line. */
export async function listLines(): Promise<LineRow[]> {
  sequelize();
  return Asset.findAll({ attributes: ['id', 'code', 'name'], where: { kind: 'line' }, order: [['code', 'ASC']], raw: true });
}

const DIP_SELECT = `
  select d.id, a.code as line_code, a.name as line_name, d.dipped_at, k.code as rack_code,
         array(select j.job_number from dip_run_jobs dj join jobs j on j.id = dj.job_id where dj.dip_run_id = d.id order by j.job_number) as jobs,
         d.withdrawal_speed_mm_s, d.stroke_samples, d.bath_charge_id, lo.lot_code, bc.at as check_at, bc.kinematic_mm2s,
         pw.name as window_name, pw.version as window_version, pw.limits, d.source, u.display_name as recorded_by
    from dip_runs d
    join assets a on a.id = d.line_asset_id
    left join racks k on k.id = d.rack_id
    left join bath_charges ch on ch.id = d.bath_charge_id
    left join lacquer_lots lo on lo.id = ch.lot_id
    left join bath_checks bc on bc.id = d.last_check_id
    left join process_windows pw on pw.id = d.window_id
    left join users u on u.id = d.recorded_by`;

interface DipRow {
  id: number;
  line_code: string;
  line_name: string;
  dipped_at: Date;
  rack_code: string | null;
  jobs: string[];
  withdrawal_speed_mm_s: number | null;
  stroke_samples: number | null;
  bath_charge_id: number | null;
  lot_code: string | null;
  check_at: Date | null;
  kinematic_mm2s: number | null;
  window_name: string | null;
  window_version: number | null;
  limits: { withdrawalSpeedMmS?: DipRunItem['speedWindow']; viscosityMm2S?: DipRunItem['viscosityWindow'] } | null;
  source: string;
  recorded_by: string | null;
}

const toItem = (r: DipRow): DipRunItem => ({
  id: r.id,
  lineCode: r.line_code,
  lineName: r.line_name,
  dippedAt: r.dipped_at.toISOString(),
  rackCode: r.rack_code,
  jobs: r.jobs,
  withdrawalSpeedMmS: r.withdrawal_speed_mm_s,
  strokeSamples: r.stroke_samples,
  speedWindow: r.limits?.withdrawalSpeedMmS ?? null,
  bathChargeId: r.bath_charge_id,
  lotCode: r.lot_code,
  lastCheckAt: r.check_at?.toISOString() ?? null,
  lastCheckMm2S: r.kinematic_mm2s,
  viscosityWindow: r.limits?.viscosityMm2S ?? null,
  windowName: r.window_name,
  windowVersion: r.window_version,
  source: r.source,
  recordedBy: r.recorded_by,
});

/** Dip runs, newest first. */
export async function listDipRuns(f: {
  line?: string | undefined;
  job?: string | undefined;
  from?: string | undefined;
  to?: string | undefined;
  limit: number;
}): Promise<DipRunItem[]> {
  const where: string[] = [];
  const args: unknown[] = [];
  const arg = (v: unknown) => `$${args.push(v)}`;
  if (f.line) where.push(`a.code = ${arg(f.line)}`);
  if (f.from) where.push(`d.dipped_at >= ${arg(f.from)}`);
  if (f.to) where.push(`d.dipped_at < ${arg(f.to)}`);
  if (f.job)
    where.push(
      `exists (select 1 from dip_run_jobs dj join jobs j on j.id = dj.job_id where dj.dip_run_id = d.id and j.job_number = ${arg(f.job)})`,
    );
  const rows = await rawRows<DipRow>(
    `${DIP_SELECT} ${where.length ? 'where ' + where.join(' and ') : ''} order by d.dipped_at desc, d.id desc limit ${arg(f.limit)}`,
    args,
  );
  return rows.map(toItem);
}

export async function getDipRun(id: number): Promise<DipRunItem | null> {
  const rows = await rawRows<DipRow>(`${DIP_SELECT} where d.id = $1`, [id]);
  return rows[0] ? toItem(rows[0]) : null;
}

/** Record a rack dipped on a line (operator, engineer). */
export async function recordDipRun(
  user: SessionUser,
  input: DipRunCreate,
  address: string | null,
): Promise<DipRunCreated & { item: DipRunItem }> {
  const now = Date.now();
  const atMs = input.dippedAt ? Date.parse(input.dippedAt) : now;
  if (atMs > now + 5 * 60_000) throw bad('dippedAt', 'The dip time is in the future.');
  if (atMs < now - 7 * 86_400_000) throw bad('dippedAt', 'A dip run can be back-dated by at most 7 days.');
  const r = await createDipRun(
    sequelize(),
    {
      lineAssetId: input.lineAssetId,
      dippedAtMs: atMs,
      rackCode: input.rackCode ?? null,
      jobNumbers: input.jobNumbers,
      note: input.note ?? null,
      source: user.via === 'token' ? 'api' : 'scan',
      userId: user.id,
    },
    actorOf(user, address),
  );
  return { ...r, item: (await getDipRun(r.id))! };
}

/** The fingerprint that ties a commit to the preview the user saw. */
export const csvFingerprint = (csv: string) => createHash('sha256').update(csv, 'utf8').digest('hex');

function validate(csv: string): JobCsvPreview {
  try {
    return validateJobCsv(csv);
  } catch (e) {
    if (e instanceof CsvSyntaxError)
      throw new HttpProblem(400, 'Malformed CSV', e.message, { errors: [{ path: 'csv', message: e.message }] });
    throw e;
  }
}

export interface JobImportPreview extends JobCsvPreview {
  sha256: string;
  /** Job numbers among the good rows that are already known. */
  existing: string[];
}

/** Step 1: check the CSV and say which rows are good, which are bad (with line numbers). Nothing is stored. */
export async function previewJobCsv(csv: string): Promise<JobImportPreview> {
  const p = validate(csv);
  sequelize();
  const known = await Job.findAll({
    attributes: ['jobNumber'],
    where: { jobNumber: { [Op.in]: p.good.map((g) => g.jobNumber) } },
  });
  return { ...p, sha256: csvFingerprint(csv), existing: known.map((r) => r.jobNumber) };
}

/** Step 2: store the good rows of the CSV the user confirmed (same fingerprint as its preview). */
export async function commitJobCsv(
  user: SessionUser,
  input: { csv: string; sha256: string; dipRunId?: number | undefined },
  address: string | null,
): Promise<{ imported: number; created: number; skippedLines: number[]; attachedTo: number | null; jobNumbers: string[] }> {
  if (csvFingerprint(input.csv) !== input.sha256) {
    throw new HttpProblem(409, 'The file changed since its preview', 'Preview the file again and confirm what it shows.', {
      errors: [{ path: 'sha256', message: 'Does not match the CSV sent.' }],
    });
  }
  const p = validate(input.csv);
  return importJobs(
    sequelize(),
    { good: p.good, skippedLines: p.bad.map((b) => b.line), sha256: input.sha256, dipRunId: input.dipRunId },
    actorOf(user, address),
  );
}

/** Jobs whose number starts with `q` (at most 20), for search boxes. */
export async function searchJobs(q: string): Promise<JobSearchItem[]> {
  sequelize();
  const rows = await Job.findAll({
    attributes: ['jobNumber', 'status', 'customerRef'],
    where: { jobNumber: { [Op.iLike]: `${q.replace(/[%_\\]/g, '\\$&')}%` } },
    order: [['jobNumber', 'DESC']],
    limit: 20,
  });
  return rows.map((r) => ({ jobNumber: r.jobNumber, status: r.status, customerRef: r.customerRef }));
}
