/**
 * Quality tests for the web app: recording (judged by the quality store against the lab's
 * acceptance settings), lists with filters and CSV (failed first), attached files (checked by
 * content, served only to signed-in users), the acceptance settings, and the pattern views: the
 * weekly adhesion failure rate as a p chart (SPC library) and failures by oven and by bath charge.
 */
import { evaluateSpc } from '../../domain/spc/evaluate.ts';
import { toCsv } from '../../shared/csv-table.ts';
import { isoWeekKey } from '../../shared/site-time.ts';
import {
  ADHESION_KINDS,
  TEST_KIND_LABELS,
  type Acceptance,
  type TestCreate,
  type TestKind,
  type TestListItem,
  type TestListQuery,
} from '../../shared/quality.ts';
import { SpcEvaluateInputSchema } from '../../shared/spc.ts';
import type { SessionUser } from '../auth.ts';
import { TestFile, User } from '../../../../db/models/index.ts';
import { sequelize } from '../db.ts';
import { selectRows } from '../../core/record-db.ts';

/** A raw SELECT through the web process's Sequelize instance (bind parameters). */
const rawRows = <T extends object>(sql: string, bind: unknown[] = []) => selectRows<T>(sequelize(), sql, bind);
import { actorOf } from '../guard.ts';
import { HttpProblem } from '../http.ts';
import {
  acceptanceSettings,
  attachTestFile,
  putAcceptanceSettings,
  recordTest,
  type RecordedTest,
} from '../../core/quality-store.ts';
import { siteTimeZone } from '../../core/settings-store.ts';
import type { TestDetail, AdhesionWeek, AdhesionChart, FailureGroup } from '../../shared/trace-views.ts';

interface TestRow {
  id: number;
  job_number: string;
  job_status: string;
  kind: TestKind;
  result: 'pass' | 'fail';
  tested_at: Date;
  tested_by_label: string;
  computed: Record<string, unknown>;
  inputs: Record<string, unknown>;
  boil_cycles: number | null;
  reasons: string[];
  files: number;
  load_id: number | null;
  oven_code: string | null;
  note: string | null;
  acceptance: Acceptance;
}

const TEST_SELECT = `
  select t.id, j.job_number, j.status as job_status, t.kind, t.result, t.tested_at, t.tested_by_label, t.computed, t.inputs,
         t.boil_cycles, t.reasons, t.note, t.acceptance,
         (select count(*)::int from test_files f where f.test_id = t.id) as files,
         ld.id as load_id, ld.oven_code
    from quality_tests t
    join jobs j on j.id = t.job_id
    left join lateral (
      select l.id, o.code as oven_code from load_jobs lj join oven_loads l on l.id = lj.load_id join assets o on o.id = l.oven_asset_id
       where lj.job_id = j.id order by l.opened_at desc limit 1) ld on true`;

const toItem = (r: TestRow): TestListItem => ({
  id: r.id,
  jobNumber: r.job_number,
  kind: r.kind,
  result: r.result,
  testedAt: r.tested_at.toISOString(),
  testedBy: r.tested_by_label,
  summary: String(r.computed['summary'] ?? ''),
  computed: r.computed,
  boilCycles: r.boil_cycles,
  reasons: r.reasons,
  files: r.files,
  loadId: r.load_id,
  ovenCode: r.oven_code,
  jobStatus: r.job_status,
});

/** Tests, failed first, then newest first (product.md §6: `GET /api/v1/quality/tests?result=fail`). */
export async function listTests(q: TestListQuery): Promise<TestListItem[]> {
  const where: string[] = [];
  const args: unknown[] = [];
  const arg = (v: unknown) => `$${args.push(v)}`;
  if (q.result) where.push(`t.result = ${arg(q.result)}`);
  if (q.kind) where.push(`t.kind = ${arg(q.kind)}`);
  if (q.job) where.push(`j.job_number = ${arg(q.job)}`);
  if (q.from) where.push(`t.tested_at >= ${arg(q.from)}`);
  if (q.to) where.push(`t.tested_at < ${arg(q.to)}`);
  const rows = await rawRows<TestRow>(
    `${TEST_SELECT} ${where.length ? 'where ' + where.join(' and ') : ''}
      order by (t.result = 'fail') desc, t.tested_at desc, t.id desc limit ${arg(q.limit)}`,
    args,
  );
  return rows.map(toItem);
}

/** The test list as CSV. */
export async function testsCsv(items: TestListItem[]): Promise<string> {
  const tz = await siteTimeZone(sequelize());
  return toCsv(
    [
      'test',
      'job',
      'kind',
      `tested (${tz})`,
      'result',
      'summary',
      'boil cycles',
      'tested by',
      'load',
      'oven',
      'job status',
      'reasons',
    ],
    items.map((t) => [
      t.id,
      t.jobNumber,
      TEST_KIND_LABELS[t.kind],
      new Date(t.testedAt).toLocaleString('sv-SE', { timeZone: tz }),
      t.result,
      t.summary,
      t.boilCycles ?? '',
      t.testedBy,
      t.loadId ?? '',
      t.ovenCode ?? '',
      t.jobStatus,
      t.reasons.join(' '),
    ]),
  );
}

export async function getTest(id: number): Promise<TestDetail | null> {
  const rows = await rawRows<TestRow>(`${TEST_SELECT} where t.id = $1`, [id]);
  const r = rows[0];
  if (!r) return null;
  const files = (await TestFile.findAll({
    where: { testId: id },
    attributes: ['id', 'filename', 'mime', 'sizeBytes', 'sha256', 'uploadedAt'],
    include: [{ model: User, as: 'uploader', attributes: ['displayName'] }],
    order: [['id', 'ASC']],
  })) as (TestFile & { uploader: User | null })[];
  return {
    ...toItem(r),
    inputs: r.inputs,
    note: r.note,
    acceptance: r.acceptance,
    fileList: files.map((f) => ({
      id: f.id,
      filename: f.filename,
      mime: f.mime,
      sizeBytes: f.sizeBytes,
      sha256: f.sha256,
      uploadedAt: f.uploadedAt.toISOString(),
      uploadedBy: f.uploader?.displayName ?? null,
    })),
  };
}

/** Record a test (quality). */
export async function createTest(user: SessionUser, test: TestCreate, address: string | null): Promise<RecordedTest> {
  const now = Date.now();
  const atMs = test.testedAt ? Date.parse(test.testedAt) : now;
  if (atMs > now + 5 * 60_000)
    throw new HttpProblem(400, 'Invalid input', 'testedAt: in the future', {
      errors: [{ path: 'testedAt', message: 'The test time is in the future.' }],
    });
  return recordTest(
    sequelize(),
    { test, testedAtMs: atMs, userId: user.id, userLabel: user.displayName },
    actorOf(user, address),
  );
}

/** Attach a file (photo, spectrum, report) to a test (quality); the type is read from the content. */
export async function uploadTestFile(user: SessionUser, testId: number, name: string, bytes: Uint8Array, address: string | null) {
  return attachTestFile(sequelize(), { testId, name, bytes, userId: user.id }, actorOf(user, address));
}

/** A stored file's bytes and metadata (null when unknown). */
export async function getFile(id: number): Promise<{ filename: string; mime: string; content: Buffer; sha256: string } | null> {
  sequelize();
  const f = await TestFile.findByPk(id, { attributes: ['filename', 'mime', 'content', 'sha256'] });
  return f ? { filename: f.filename, mime: f.mime, content: f.content, sha256: f.sha256 } : null;
}

/** The acceptance settings in force. */
export function getAcceptance(): Promise<Acceptance> {
  return acceptanceSettings(sequelize());
}

/** Change the acceptance settings (quality); audited with before and after. Tests already recorded keep their judgement. */
export async function putAcceptance(user: SessionUser, value: Acceptance, address: string | null): Promise<Acceptance> {
  return putAcceptanceSettings(sequelize(), value, actorOf(user, address));
}

/**
 * Adhesion (cross-cut and boil) failure rate per ISO week in the site's time zone, over the last
 * `weeks` weeks, as a p chart (fraction failing; limits p̄ ± 3√(p̄(1 − p̄)/n_i), per week;
 * Montgomery ch. 7) from the SPC library. Weeks without tests are left out.
 */
export async function adhesionPChart(weeks = 12): Promise<AdhesionChart> {
  const tz = await siteTimeZone(sequelize());
  const rows = await rawRows<{ t: number; fail: boolean }>(
    `select (extract(epoch from tested_at) * 1000)::float8 as t, result = 'fail' as fail from quality_tests
      where kind = any($1::text[]) and tested_at >= now() - make_interval(days => $2) order by tested_at`,
    [ADHESION_KINDS, weeks * 7 + 7],
  );
  const byWeek = new Map<string, AdhesionWeek>();
  for (const r of rows) {
    const key = isoWeekKey(r.t, tz);
    const w = byWeek.get(key) ?? { week: key, startMs: r.t, tests: 0, failed: 0 };
    w.tests++;
    if (r.fail) w.failed++;
    byWeek.set(key, w);
  }
  const list = [...byWeek.values()].sort((a, b) => a.startMs - b.startMs).slice(-weeks);
  if (list.length < 2) return { weeks: list, evaluation: null, message: 'A p chart needs adhesion tests in at least two weeks.' };
  const parsed = SpcEvaluateInputSchema.safeParse({
    chart: 'p',
    counts: list.map((w) => w.failed),
    sizes: list.map((w) => w.tests),
    rules: ['we1'],
  });
  if (!parsed.success) return { weeks: list, evaluation: null, message: parsed.error.issues.map((i) => i.message).join('; ') };
  try {
    return { weeks: list, evaluation: evaluateSpc(parsed.data), message: null };
  } catch (e) {
    return { weeks: list, evaluation: null, message: (e as Error).message };
  }
}

/** Adhesion tests and failures of the last `days` days grouped by the oven that cured the job. */
export async function failuresByOven(days = 90): Promise<FailureGroup[]> {
  const rows = await rawRows<{ code: string | null; name: string | null; tests: number; failed: number }>(
    `select o.code, o.name, count(*)::int as tests, count(*) filter (where t.result = 'fail')::int as failed
       from quality_tests t
       left join lateral (select l.oven_asset_id from load_jobs lj join oven_loads l on l.id = lj.load_id where lj.job_id = t.job_id order by l.opened_at desc limit 1) ld on true
       left join assets o on o.id = ld.oven_asset_id
      where t.kind = any($1::text[]) and t.tested_at >= now() - make_interval(days => $2)
      group by o.code, o.name order by failed desc, o.code nulls last`,
    [ADHESION_KINDS, days],
  );
  return rows.map((r) => ({
    key: r.code ?? '—',
    label: r.name ?? 'No oven load recorded',
    tests: r.tests,
    failed: r.failed,
    href: r.code ? `/loads?oven=${encodeURIComponent(r.code)}` : null,
  }));
}

/** Adhesion tests and failures of the last `days` days grouped by the bath charge the job was dipped from. */
export async function failuresByBathCharge(days = 90): Promise<FailureGroup[]> {
  const rows = await rawRows<{
    charge_id: number | null;
    tank: string | null;
    lot_code: string | null;
    charged_at: Date | null;
    tests: number;
    failed: number;
  }>(
    `select ch.id as charge_id, a.code as tank, lo.lot_code, ch.charged_at, count(*)::int as tests, count(*) filter (where t.result = 'fail')::int as failed
       from quality_tests t
       left join lateral (select d.bath_charge_id from dip_run_jobs dj join dip_runs d on d.id = dj.dip_run_id where dj.job_id = t.job_id order by d.dipped_at desc limit 1) dr on true
       left join bath_charges ch on ch.id = dr.bath_charge_id
       left join assets a on a.id = ch.tank_asset_id
       left join lacquer_lots lo on lo.id = ch.lot_id
      where t.kind = any($1::text[]) and t.tested_at >= now() - make_interval(days => $2)
      group by ch.id, a.code, lo.lot_code, ch.charged_at order by failed desc, ch.id nulls last`,
    [ADHESION_KINDS, days],
  );
  const tz = await siteTimeZone(sequelize());
  return rows.map((r) => ({
    key: r.charge_id ? `charge ${r.charge_id}` : '—',
    label: r.charge_id
      ? `${r.tank} · lot ${r.lot_code} · charged ${r.charged_at?.toLocaleDateString('en-GB', { timeZone: tz })}`
      : 'No bath charge recorded',
    tests: r.tests,
    failed: r.failed,
    href: r.tank ? `/baths?tank=${encodeURIComponent(r.tank)}` : null,
  }));
}
