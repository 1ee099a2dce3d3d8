/**
 * Quality tests and their files (seed- and web-safe: takes a pg.Pool, imports no Astro env).
 * A test is judged when it is recorded, against the acceptance settings in force then (a copy
 * of them is stored with the test, so a later change of the settings does not rewrite history).
 */
import { createHash } from 'node:crypto';
import type pg from 'pg';
import { findExtrema, type SpectrumPoint } from '../domain/quality/fringes.ts';
import { judgeTest, type TestMeasurement } from '../domain/quality/acceptance.ts';
import { CsvSyntaxError, normaliseHeader, parseCsv } from '../shared/csv-table.ts';
import { MAX_UPLOAD_BYTES, sniffUpload, safeFileName, type UploadMime } from '../shared/file-types.ts';
import { AcceptanceSchema, DEFAULT_ACCEPTANCE, type Acceptance, type TestCreate } from '../shared/quality.ts';
import { DomainError, fieldError, type DomainErrorKind } from './errors.ts';
import { readSetting } from './settings-store.ts';

type Queryable = pg.Pool | pg.PoolClient;

/** The lab's acceptance settings (site_settings 'acceptance'), defaults when unset. */
export function acceptanceSettings(q: Queryable): Promise<Acceptance> {
  return readSetting(q, 'acceptance', AcceptanceSchema, DEFAULT_ACCEPTANCE);
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
 * Judges and stores one test. A thickness test from a spectrum finds the fringes itself
 * (Macleod's fringe method, lib/domain/quality/fringes.ts) and keeps the spectrum as a file.
 * @throws DomainError 400 for an unknown job or a malformed spectrum, 422 when the spectrum
 *   shows no measurable fringes.
 */
export async function recordTest(pool: pg.Pool, input: RecordTestInput): Promise<RecordedTest> {
  const t = input.test;
  const job = await pool.query<{ id: number; job_number: string }>('select id, job_number from jobs where job_number = $1', [
    t.jobNumber,
  ]);
  if (!job.rows[0]) {
    throw bad(
      'jobNumber',
      `No job ${t.jobNumber} is known: jobs are recorded when their rack is dipped or their CSV is imported.`,
    );
  }
  const acceptance = await acceptanceSettings(pool);
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
  const c = await pool.connect();
  try {
    await c.query('begin');
    const { rows } = await c.query<{ id: number }>(
      `insert into quality_tests (job_id, kind, tested_at, tested_by, tested_by_label, inputs, computed, result, reasons, boil_cycles, acceptance, note)
       values ($1, $2, to_timestamp($3 / 1000.0), $4, $5, $6::jsonb, $7::jsonb, $8, $9, $10, $11::jsonb, $12) returning id`,
      [
        job.rows[0].id,
        t.kind,
        input.testedAtMs,
        input.userId,
        input.userLabel,
        JSON.stringify(inputs),
        JSON.stringify({ ...j.computed, ...extra, summary: j.summary }),
        j.result,
        j.reasons,
        t.kind === 'boil' ? t.boilCycles : t.kind === 'crosscut' ? 0 : null,
        JSON.stringify(acceptance),
        t.note ?? null,
      ],
    );
    const id = rows[0]!.id;
    const fileIds: number[] = [];
    if (spectrumFile)
      fileIds.push(
        (
          await insertFile(c, {
            testId: id,
            name: spectrumFile.name,
            bytes: spectrumFile.bytes,
            mime: 'text/csv',
            userId: input.userId,
          })
        ).id,
      );
    await c.query('commit');
    return {
      id,
      jobId: job.rows[0].id,
      jobNumber: job.rows[0].job_number,
      kind: t.kind,
      result: j.result,
      computed: { ...j.computed, ...extra },
      reasons: j.reasons,
      summary: j.summary,
      fileIds,
    };
  } catch (e) {
    await c.query('rollback').catch(() => {});
    throw e;
  } finally {
    c.release();
  }
}

async function insertFile(
  q: Queryable,
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
  const { rows } = await q.query<{ id: number }>(
    `insert into test_files (test_id, survey_id, filename, mime, size_bytes, sha256, content, uploaded_by)
     values ($1, $2, $3, $4, $5, $6, $7, $8) returning id`,
    [f.testId ?? null, f.surveyId ?? null, safeFileName(f.name), f.mime, f.bytes.length, sha256, Buffer.from(f.bytes), f.userId],
  );
  return { id: rows[0]!.id, sha256 };
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

/** Attaches a checked file to a test or a survey; returns its id, type and fingerprint. */
export async function attachFile(
  pool: pg.Pool,
  f: { testId?: number | null; surveyId?: number | null; name: string; bytes: Uint8Array; userId: number | null },
): Promise<{ id: number; mime: UploadMime; sha256: string; sizeBytes: number; filename: string }> {
  const mime = checkUpload(f.name, f.bytes);
  const r = await insertFile(pool, { ...f, mime });
  return { id: r.id, mime, sha256: r.sha256, sizeBytes: f.bytes.length, filename: safeFileName(f.name) };
}
