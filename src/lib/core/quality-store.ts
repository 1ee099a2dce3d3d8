/**
 * Quality tests and their files (seed- and web-safe: takes the Sequelize instance or a
 * transaction, imports no Astro env).
 * A test is judged when it is recorded, against the acceptance settings in force then (a copy
 * of them is stored with the test, so a later change of the settings does not rewrite history).
 */
import { createHash } from 'node:crypto';
import { Op, col, fn, literal } from 'sequelize';
import { Job, QualityTest, TestFile } from '../../../db/models/index.ts';
import { auditIn, type AuditActor } from '../../../db/transaction.ts';
import { findExtrema, type SpectrumPoint } from '../domain/quality/fringes.ts';
import { judgeTest, type TestMeasurement } from '../domain/quality/acceptance.ts';
import { CsvSyntaxError, normaliseHeader, parseCsv } from '../shared/csv-table.ts';
import { MAX_UPLOAD_BYTES, sniffUpload, safeFileName, type UploadMime } from '../shared/file-types.ts';
import { AcceptanceSchema, DEFAULT_ACCEPTANCE, type Acceptance, type TestCreate } from '../shared/quality.ts';
import { DomainError, fieldError, type DomainErrorKind } from './errors.ts';
import { inTransaction, selectRows, transactionOf, type Db } from './record-db.ts';
import { readSetting } from './settings-store.ts';

/** The lab's acceptance settings (site_settings 'acceptance'), defaults when unset. */
export function acceptanceSettings(db: Db): Promise<Acceptance> {
  return readSetting(db, 'acceptance', AcceptanceSchema, DEFAULT_ACCEPTANCE);
}

const bad = (path: string, message: string, kind: DomainErrorKind = 'invalid', title = 'Invalid input') =>
  fieldError(path, message, kind, title);

/**
 * Reads a reflectance spectrum CSV: a header naming a wavelength column (wavelength_nm,
 * wavelength, lambda_nm, nm) and a reflectance column (reflectance, reflectance_pct, r, r_pct);
 * without such names, the first two columns. Bad rows are reported with their line numbers.
 */
export function parseSpectrumCsv(text: string): SpectrumPoint[] {
  let records;
  try {
    records = parseCsv(text);
  } catch (e) {
    if (e instanceof CsvSyntaxError) throw bad('spectrumCsv', `Malformed CSV at ${e.message}`);
    throw e;
  }
  const header = records[0];
  if (!header) throw bad('spectrumCsv', 'The spectrum file is empty.');
  const names = header.cells.map(normaliseHeader);
  const numeric = (s: string) => /^[-+]?\d+(\.\d+)?([eE][-+]?\d+)?$/.test(s);
  const hasHeader = !header.cells.every(numeric);
  let wi = names.findIndex((n) => ['wavelength_nm', 'wavelength', 'lambda_nm', 'lambda', 'nm'].includes(n));
  let ri = names.findIndex((n) => ['reflectance', 'reflectance_pct', 'r', 'r_pct', 'reflectance_%'].includes(n));
  if (wi < 0 || ri < 0) [wi, ri] = [0, 1];
  const rows = hasHeader ? records.slice(1) : records;
  const errors: string[] = [];
  const out: SpectrumPoint[] = [];
  for (const r of rows) {
    const w = r.cells[wi] ?? '';
    const v = r.cells[ri] ?? '';
    if (!numeric(w) || !numeric(v)) {
      if (errors.length < 10) errors.push(`line ${r.line}: "${w}", "${v}" are not a wavelength (nm) and a reflectance`);
      continue;
    }
    out.push({ wavelengthNm: Number(w), reflectance: Number(v) });
  }
  if (errors.length) throw bad('spectrumCsv', `Malformed spectrum: ${errors.join('; ')}`);
  if (out.length < 5) throw bad('spectrumCsv', 'A spectrum needs at least 5 readings.');
  return out;
}

export interface RecordTestInput {
  test: TestCreate;
  testedAtMs: number;
  userId: number | null;
  userLabel: string;
}

export interface RecordedTest {
  id: number;
  jobId: number;
  jobNumber: string;
  kind: string;
  result: 'pass' | 'fail';
  computed: Record<string, unknown>;
  reasons: string[];
  summary: string;
  fileIds: number[];
}

/**
 * Judges and stores one test, with its audit row (`test.record`, when an actor is given) in the
 * same transaction. A thickness test from a spectrum finds the fringes itself
 * (Macleod's fringe method, lib/domain/quality/fringes.ts) and keeps the spectrum as a file.
 * @throws DomainError 400 for an unknown job or a malformed spectrum, 422 when the spectrum
 *   shows no measurable fringes.
 */
export async function recordTest(db: Db, input: RecordTestInput, actor?: AuditActor): Promise<RecordedTest> {
  const t = input.test;
  const job = await Job.findOne({
    attributes: ['id', 'jobNumber'],
    where: { jobNumber: t.jobNumber },
    transaction: transactionOf(db) ?? null,
  });
  if (!job) {
    throw bad(
      'jobNumber',
      `No job ${t.jobNumber} is known: jobs are recorded when their rack is dipped or their CSV is imported.`,
    );
  }
  const acceptance = await acceptanceSettings(db);
  let measurement: TestMeasurement;
  const inputs: Record<string, unknown> = {};
  let spectrumFile: { name: string; bytes: Uint8Array } | null = null;
  const extra: Record<string, unknown> = {};
  switch (t.kind) {
    case 'crosscut':
      measurement = { kind: 'crosscut', percentRemoved: t.percentRemoved };
      Object.assign(inputs, { percentRemoved: t.percentRemoved });
      break;
    case 'boil':
      measurement = { kind: 'boil', percentRemoved: t.percentRemoved, boilCycles: t.boilCycles };
      Object.assign(inputs, { percentRemoved: t.percentRemoved, boilCycles: t.boilCycles });
      break;
    case 'abrasion':
      measurement = { kind: 'abrasion', referenceHazeGainPct: t.referenceHazeGainPct, testHazeGainPct: t.testHazeGainPct };
      Object.assign(inputs, { referenceHazeGainPct: t.referenceHazeGainPct, testHazeGainPct: t.testHazeGainPct });
      break;
    case 'thickness': {
      if (t.method === 'measured') {
        measurement = { kind: 'thickness', thicknessUm: t.thicknessUm as number };
        Object.assign(inputs, { method: 'measured', thicknessUm: t.thicknessUm });
      } else {
        const spectrum = parseSpectrumCsv(t.spectrumCsv as string);
        const a = findExtrema(spectrum, { refractiveIndex: t.refractiveIndex as number });
        if (!a.measurable)
          throw bad(
            'spectrumCsv',
            `The spectrum gives no thickness: ${a.reason}. Measure the coat another way.`,
            'unprocessable',
            'No thickness from this spectrum',
          );
        measurement = { kind: 'thickness', thicknessUm: a.thicknessNm / 1000 };
        Object.assign(inputs, { method: 'spectrum', refractiveIndex: t.refractiveIndex, spectrumPoints: spectrum.length });
        Object.assign(extra, { fringeEstimates: a.count, fringeSdNm: a.sdNm, fringeContrast: a.contrast });
        spectrumFile = { name: `spectrum-${t.jobNumber}.csv`, bytes: new TextEncoder().encode(t.spectrumCsv as string) };
      }
      break;
    }
    case 'cosmetic':
      measurement = { kind: 'cosmetic', defects: t.defects.filter((d) => d.count > 0) };
      Object.assign(inputs, { defects: t.defects });
      break;
  }
  const j = judgeTest(measurement, acceptance);
  return inTransaction(db, async (tx) => {
    const row = await QualityTest.create(
      {
        jobId: job.id,
        kind: t.kind,
        testedAt: new Date(input.testedAtMs),
        testedBy: input.userId,
        testedByLabel: input.userLabel,
        inputs,
        computed: { ...j.computed, ...extra, summary: j.summary },
        result: j.result,
        reasons: j.reasons,
        boilCycles: t.kind === 'boil' ? t.boilCycles : t.kind === 'crosscut' ? 0 : null,
        acceptance,
        note: t.note ?? null,
      },
      { transaction: tx },
    );
    const fileIds: number[] = [];
    if (spectrumFile)
      fileIds.push(
        (
          await insertFile(tx, {
            testId: row.id,
            name: spectrumFile.name,
            bytes: spectrumFile.bytes,
            mime: 'text/csv',
            userId: input.userId,
          })
        ).id,
      );
    const recorded: RecordedTest = {
      id: row.id,
      jobId: job.id,
      jobNumber: job.jobNumber,
      kind: t.kind,
      result: j.result,
      computed: { ...j.computed, ...extra },
      reasons: j.reasons,
      summary: j.summary,
      fileIds,
    };
    if (actor) {
      // The spectrum itself is kept as the test's file, not copied into the audit row.
      const { spectrumCsv: _omit, ...logged } = t as TestCreate & { spectrumCsv?: string };
      await auditIn(tx, actor, {
        action: 'test.record',
        entity: 'quality_test',
        entityId: row.id,
        after: { ...logged, result: recorded.result, computed: recorded.computed },
      });
    }
    return recorded;
  });
}

async function insertFile(
  db: Db,
  f: {
    testId?: number | null;
    surveyId?: number | null;
    name: string;
    bytes: Uint8Array;
    mime: UploadMime;
    userId: number | null;
  },
): Promise<{ id: number; sha256: string }> {
  const sha256 = createHash('sha256').update(f.bytes).digest('hex');
  const row = await TestFile.create(
    {
      testId: f.testId ?? null,
      surveyId: f.surveyId ?? null,
      filename: safeFileName(f.name),
      mime: f.mime,
      sizeBytes: f.bytes.length,
      sha256,
      content: Buffer.from(f.bytes),
      uploadedBy: f.userId,
    },
    { transaction: transactionOf(db) ?? null },
  );
  return { id: row.id, sha256 };
}

/**
 * Checks an upload by its content: ≤ 5 MB (413), PNG/JPEG/PDF/UTF-8 text or CSV by magic bytes
 * (415), and a CSV must parse with the same number of fields on every row (400).
 */
export function checkUpload(name: string, bytes: Uint8Array): UploadMime {
  if (bytes.length > MAX_UPLOAD_BYTES) {
    throw new DomainError(
      'too-large',
      'File too large',
      `${safeFileName(name)} is ${(bytes.length / 1048576).toFixed(1)} MB; the limit is 5 MB.`,
      {
        errors: [{ path: 'file', message: 'The limit is 5 MB.' }],
      },
    );
  }
  const s = sniffUpload(bytes, name);
  if (!s.ok)
    throw new DomainError('unsupported-media', 'Unsupported file type', s.reason, {
      errors: [{ path: 'file', message: s.reason }],
    });
  if (s.mime === 'text/csv') {
    const text = new TextDecoder().decode(bytes);
    try {
      const records = parseCsv(text);
      const width = records[0]?.cells.length ?? 0;
      const off = records.find((r) => r.cells.length !== width);
      if (off) throw new CsvSyntaxError(off.line, `has ${off.cells.length} fields; the first row has ${width}`);
    } catch (e) {
      if (e instanceof CsvSyntaxError) throw bad('file', `Malformed CSV: ${e.message}.`, 'invalid', 'Malformed CSV');
      throw e;
    }
  }
  return s.mime;
}

export interface AttachedFile {
  id: number;
  mime: UploadMime;
  sha256: string;
  sizeBytes: number;
  filename: string;
}

/** Attaches a checked file to a test or a survey (inside the caller's transaction when `db` is one). */
export async function attachFile(
  db: Db,
  f: { testId?: number | null; surveyId?: number | null; name: string; bytes: Uint8Array; userId: number | null },
): Promise<AttachedFile> {
  const mime = checkUpload(f.name, f.bytes);
  const r = await insertFile(db, { ...f, mime });
  return { id: r.id, mime, sha256: r.sha256, sizeBytes: f.bytes.length, filename: safeFileName(f.name) };
}

/**
 * Attaches a file to a quality test with its audit row (`test.file.attach`) in one transaction.
 * @throws DomainError not-found for an unknown test; too-large, unsupported-media or invalid for the file.
 */
export async function attachTestFile(
  db: Db,
  f: { testId: number; name: string; bytes: Uint8Array; userId: number | null },
  actor: AuditActor,
): Promise<AttachedFile> {
  return inTransaction(db, async (t) => {
    if (!(await QualityTest.findByPk(f.testId, { attributes: ['id'], transaction: t })))
      throw new DomainError('not-found', 'Not found', 'No such quality test.');
    const file = await attachFile(t, f);
    await auditIn(t, actor, { action: 'test.file.attach', entity: 'quality_test', entityId: f.testId, after: file });
    return file;
  });
}

/** How many tests each job has and how many of them failed (jobs without tests are absent). */
export async function testCountsOf(db: Db, jobIds: readonly number[]): Promise<Map<number, { tests: number; failed: number }>> {
  const out = new Map<number, { tests: number; failed: number }>();
  if (jobIds.length === 0) return out;
  const rows = (await QualityTest.findAll({
    attributes: ['jobId', [fn('count', col('id')), 'tests'], [literal(`count(*) filter (where result = 'fail')`), 'failed']],
    where: { jobId: { [Op.in]: [...new Set(jobIds)] } },
    group: ['jobId'],
    raw: true,
    transaction: transactionOf(db) ?? null,
  })) as unknown as { jobId: number; tests: number; failed: number }[];
  for (const r of rows) out.set(r.jobId, { tests: Number(r.tests), failed: Number(r.failed) });
  return out;
}

/**
 * Replaces the acceptance settings with their audit row (`settings.acceptance`, before → after)
 * in one transaction. Tests already recorded keep the copy they were judged against.
 */
export async function putAcceptanceSettings(db: Db, value: Acceptance, actor: AuditActor): Promise<Acceptance> {
  const parsed = AcceptanceSchema.parse(value);
  return inTransaction(db, async (t) => {
    // site_settings is one JSON value per key: the same statements as settings-store's writeSetting, inside `t`.
    const prev = await selectRows<{ value: unknown }>(t, `select value from site_settings where key = 'acceptance' for update`);
    await selectRows(
      t,
      `insert into site_settings (key, value, updated_at) values ('acceptance', $1::jsonb, now())
       on conflict (key) do update set value = excluded.value, updated_at = now() returning key`,
      [JSON.stringify(parsed)],
    );
    await auditIn(t, actor, {
      action: 'settings.acceptance',
      entity: 'site_settings',
      entityId: 'acceptance',
      before: prev[0]?.value ?? null,
      after: parsed,
    });
    return parsed;
  });
}
