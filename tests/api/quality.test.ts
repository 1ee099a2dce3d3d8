/**
 * Quality tests through the API: cross-cut classification at every band edge (ISO 2409 classes
 * 0–5 and ASTM D3359 method B classes 5B–0B share the bands 0 %, ≤ 5 %, 5–15 %, 15–35 %,
 * 35–65 %, > 65 % of the lattice removed; ISO 2409 Table 1 wording "not significantly greater
 * than" read as ≤ at each edge), pass/fail against the acceptance settings (default class 0 / 5B
 * only — common practice), the other test kinds, the job CSV import in two steps, and upload
 * rejections (oversized, wrong type by content, malformed CSV).
 */
import type pg from 'pg';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { DEFAULT_ACCEPTANCE } from '../../src/lib/shared/quality.ts';
import { closeTestPool, testPool } from '../support/accounts.ts';
import { api, base, signIn, type Session } from '../support/http.ts';
import { createTestLine, tag, type TestLine } from '../support/trace-fixtures.ts';

let pool: pg.Pool;
let line: TestLine;
let operator: Session;
let quality: Session;
let viewer: Session;
const jobs: string[] = [];

/** A minimal PNG: the 8-byte signature (ISO/IEC 15948 §5.2) and an IHDR chunk header, padded. */
function pngBytes(size = 64): Uint8Array<ArrayBuffer> {
  const b = new Uint8Array(size);
  b.set([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a, 0, 0, 0, 13, 0x49, 0x48, 0x44, 0x52]);
  return b;
}

async function upload(testId: number, name: string, bytes: Uint8Array<ArrayBuffer> | string, session: Session | null = quality) {
  const form = new FormData();
  form.append('file', new Blob([bytes]), name);
  // A browser sends its origin with a form upload; Astro refuses cross-site form posts without it.
  return api(`/api/v1/quality/tests/${testId}/files`, { method: 'POST', session, body: form, headers: { origin: base() } });
}

async function record(body: Record<string, unknown>) {
  return api('/api/v1/quality/tests', { method: 'POST', session: quality, json: body });
}

beforeAll(async () => {
  pool = testPool();
  line = await createTestLine(pool);
  operator = await signIn('operator');
  quality = await signIn('quality');
  viewer = await signIn('viewer');
  const t = tag();
  for (let i = 0; i < 6; i++) jobs.push(`QT-${t}-${i}`);
  const dip = await api('/api/v1/dip-runs', {
    method: 'POST',
    session: operator,
    json: { lineAssetId: line.id, rackCode: `RQ-${t}`, jobNumbers: jobs },
  });
  expect(dip.status, JSON.stringify(dip.body)).toBe(201);
});

afterAll(async () => {
  await api('/api/v1/quality/acceptance', { method: 'PUT', session: quality, json: DEFAULT_ACCEPTANCE });
  await closeTestPool();
});

describe('cross-cut classification through the API (ISO 2409 / ASTM D3359)', () => {
  // percent removed → [ISO 2409 class, ASTM D3359 class]; bands from ISO 2409 Table 1 and
  // ASTM D3359 method B (references.md), the edges belong to the lower class.
  const edges: [number, number, string][] = [
    [0, 0, '5B'],
    [0.1, 1, '4B'],
    [5, 1, '4B'],
    [5.1, 2, '3B'],
    [15, 2, '3B'],
    [15.1, 3, '2B'],
    [35, 3, '2B'],
    [35.1, 4, '1B'],
    [65, 4, '1B'],
    [65.1, 5, '0B'],
    [100, 5, '0B'],
  ];
  for (const [pct, iso, astm] of edges) {
    it(`${pct} % removed → ISO 2409 class ${iso} / ASTM D3359 ${astm}, ${iso === 0 ? 'pass' : 'fail'} against class 0 / 5B`, async () => {
      const r = await record({ kind: 'crosscut', jobNumber: jobs[0], percentRemoved: pct });
      expect(r.status, JSON.stringify(r.body)).toBe(201);
      expect(r.body.computed.iso2409).toBe(iso);
      expect(r.body.computed.astmD3359).toBe(astm);
      expect(r.body.result).toBe(iso === 0 ? 'pass' : 'fail');
    });
  }

  it('a boil test judges the class after the cycles', async () => {
    const r = await record({ kind: 'boil', jobNumber: jobs[1], percentRemoved: 0, boilCycles: 2 });
    expect(r.status).toBe(201);
    expect(r.body).toMatchObject({ kind: 'boil', result: 'pass', computed: { iso2409: 0, astmD3359: '5B' } });
    expect(r.body.summary).toContain('after 2 boil cycles');
  });

  it('bad input is a 400 with field paths, never a 500', async () => {
    const over = await record({ kind: 'crosscut', jobNumber: jobs[0], percentRemoved: 100.5 });
    expect(over.status).toBe(400);
    expect(over.headers.get('content-type')).toContain('application/problem+json');
    expect(over.body.errors.map((e: { path: string }) => e.path)).toContain('percentRemoved');
    const noCycles = await record({ kind: 'boil', jobNumber: jobs[0], percentRemoved: 0, boilCycles: 0 });
    expect(noCycles.status).toBe(400);
    expect(noCycles.body.errors[0].path).toBe('boilCycles');
    const unknownJob = await record({ kind: 'crosscut', jobNumber: `NOPE-${tag()}`, percentRemoved: 0 });
    expect(unknownJob.status).toBe(400);
    expect(unknownJob.body.errors[0].path).toBe('jobNumber');
    const kind = await record({ kind: 'pencil', jobNumber: jobs[0] });
    expect(kind.status).toBe(400);
    const viewerTry = await api('/api/v1/quality/tests', {
      method: 'POST',
      session: viewer,
      json: { kind: 'crosscut', jobNumber: jobs[0], percentRemoved: 0 },
    });
    expect(viewerTry.status).toBe(403);
  });

  it('GET /api/v1/quality/tests?result=fail lists failed tests as {id, jobNumber, kind, result, …}', async () => {
    const r = await api(`/api/v1/quality/tests?result=fail&job=${jobs[0]}`, { session: viewer });
    expect(r.status).toBe(200);
    expect(r.body.length).toBe(10); // the ten edges above class 0
    for (const t of r.body) {
      expect(t).toMatchObject({ jobNumber: jobs[0], kind: 'crosscut', result: 'fail' });
      expect(typeof t.id).toBe('number');
    }
  });

  it('the acceptance settings decide pass/fail; tests already recorded keep their judgement', async () => {
    const put = await api('/api/v1/quality/acceptance', {
      method: 'PUT',
      session: quality,
      json: { ...DEFAULT_ACCEPTANCE, crosscutMaxIso: 1 },
    });
    expect(put.status).toBe(200);
    const r = await record({ kind: 'crosscut', jobNumber: jobs[2], percentRemoved: 3 });
    expect(r.body).toMatchObject({ result: 'pass', computed: { iso2409: 1, astmD3359: '4B' } });
    const earlier = await api(`/api/v1/quality/tests?result=fail&job=${jobs[0]}`, { session: viewer });
    expect(earlier.body.length).toBe(10);
    const notAllowed = await api('/api/v1/quality/acceptance', { method: 'PUT', session: operator, json: DEFAULT_ACCEPTANCE });
    expect(notAllowed.status).toBe(403);
    const invalid = await api('/api/v1/quality/acceptance', {
      method: 'PUT',
      session: quality,
      json: { ...DEFAULT_ACCEPTANCE, thicknessUm: { min: 4, max: 2 } },
    });
    expect(invalid.status).toBe(400);
    expect(invalid.body.errors[0].path).toBe('thicknessUm.max');
    await api('/api/v1/quality/acceptance', { method: 'PUT', session: quality, json: DEFAULT_ACCEPTANCE });
  });
});

describe('other test kinds', () => {
  it('Bayer abrasion ratio = reference haze gain ÷ test haze gain (ASTM F735)', async () => {
    // Hand-computed: 30 % / 10 % = 3.0, at least 1 (default), below 4 (not premium).
    const r = await record({ kind: 'abrasion', jobNumber: jobs[3], referenceHazeGainPct: 30, testHazeGainPct: 10 });
    expect(r.status).toBe(201);
    expect(r.body.computed.bayerRatio).toBeCloseTo(3, 12);
    expect(r.body.computed.premium).toBe(false);
    expect(r.body.result).toBe('pass');
  });

  it('thickness: measured inside / outside 1.5–4 µm', async () => {
    expect((await record({ kind: 'thickness', jobNumber: jobs[3], method: 'measured', thicknessUm: 2.1 })).body.result).toBe(
      'pass',
    );
    expect((await record({ kind: 'thickness', jobNumber: jobs[3], method: 'measured', thicknessUm: 4.2 })).body.result).toBe(
      'fail',
    );
    const missing = await record({ kind: 'thickness', jobNumber: jobs[3], method: 'measured' });
    expect(missing.status).toBe(400);
    expect(missing.body.errors[0].path).toBe('thicknessUm');
  });

  it('thickness from a reflectance spectrum (fringe method) keeps the spectrum as a file', async () => {
    // Constructed: R(λ) = 0.04 + 0.02·cos(4πnd/λ) with n = 1.5, d = 2000 nm has maxima where
    // 2nd/λ is whole; adjacent maxima λ1 > λ2 give d = λ1·λ2/(2n(λ1 − λ2)) (Macleod) = 2000 nm.
    const lines = ['wavelength_nm,reflectance'];
    for (let w = 420; w <= 720; w += 0.5)
      lines.push(`${w},${(0.04 + 0.02 * Math.cos((4 * Math.PI * 1.5 * 2000) / w)).toFixed(6)}`);
    const r = await record({
      kind: 'thickness',
      jobNumber: jobs[4],
      method: 'spectrum',
      refractiveIndex: 1.5,
      spectrumCsv: lines.join('\n'),
    });
    expect(r.status, JSON.stringify(r.body)).toBe(201);
    expect(r.body.computed.thicknessUm).toBeCloseTo(2.0, 2);
    expect(r.body.result).toBe('pass');
    expect(r.body.fileIds).toHaveLength(1);
    // An index-matched coat: no fringes → 422 with the reason, nothing stored.
    const flat = ['wavelength_nm,reflectance', ...Array.from({ length: 50 }, (_, i) => `${450 + i * 5},0.0400`)].join('\n');
    const none = await record({
      kind: 'thickness',
      jobNumber: jobs[4],
      method: 'spectrum',
      refractiveIndex: 1.5,
      spectrumCsv: flat,
    });
    expect(none.status).toBe(422);
    expect(none.body.detail).toContain('index-matched');
    const broken = await record({
      kind: 'thickness',
      jobNumber: jobs[4],
      method: 'spectrum',
      refractiveIndex: 1.5,
      spectrumCsv: 'wavelength_nm,reflectance\n500,0.04\n"510,0.05',
    });
    expect(broken.status).toBe(400);
    expect(broken.body.errors[0].path).toBe('spectrumCsv');
  });

  it('cosmetic inspection fails on a defect the acceptance does not allow', async () => {
    const r = await record({ kind: 'cosmetic', jobNumber: jobs[5], defects: [{ type: 'dust-inclusions', count: 1 }] });
    expect(r.body.result).toBe('fail');
    const ok = await record({ kind: 'cosmetic', jobNumber: jobs[5], defects: [] });
    expect(ok.body.result).toBe('pass');
  });
});

describe('attachments', () => {
  let testId: number;
  beforeAll(async () => {
    testId = (await record({ kind: 'crosscut', jobNumber: jobs[1], percentRemoved: 0 })).body.id;
  });

  it('a PNG is stored in PostgreSQL and served to signed-in users only, with its type and disposition', async () => {
    const r = await upload(testId, 'lattice.png', pngBytes());
    expect(r.status, JSON.stringify(r.body)).toBe(201);
    expect(r.body).toMatchObject({ mime: 'image/png', sizeBytes: 64, filename: 'lattice.png' });
    expect(r.body.sha256).toMatch(/^[0-9a-f]{64}$/);
    const f = await fetch(`${base()}/api/v1/quality/files/${r.body.id}`, { headers: { cookie: viewer.cookie } });
    expect(f.status).toBe(200);
    expect(f.headers.get('content-type')).toBe('image/png');
    expect(f.headers.get('content-disposition')).toBe('inline; filename="lattice.png"');
    expect(f.headers.get('x-content-type-options')).toBe('nosniff');
    expect(new Uint8Array(await f.arrayBuffer())).toEqual(pngBytes());
    const anon = await fetch(`${base()}/api/v1/quality/files/${r.body.id}`);
    expect(anon.status).toBe(401);
    const detail = await api(`/api/v1/quality/tests/${testId}`, { session: viewer });
    expect(detail.body.fileList.map((x: { id: number }) => x.id)).toContain(r.body.id);
  });

  it('a CSV is served as a download with text/csv', async () => {
    const r = await upload(testId, 'readings.csv', 'a,b\n1,2\n3,4\n');
    expect(r.status).toBe(201);
    expect(r.body.mime).toBe('text/csv');
    const f = await fetch(`${base()}/api/v1/quality/files/${r.body.id}`, { headers: { cookie: quality.cookie } });
    expect(f.headers.get('content-type')).toBe('text/csv; charset=utf-8');
    expect(f.headers.get('content-disposition')).toBe('attachment; filename="readings.csv"');
  });

  it('over 5 MB → 413', async () => {
    const big = new Uint8Array(5 * 1024 * 1024 + 1);
    big.set(pngBytes());
    const r = await upload(testId, 'huge.png', big);
    expect(r.status).toBe(413);
    expect(r.headers.get('content-type')).toContain('application/problem+json');
    expect(r.body.detail).toContain('5 MB');
  });

  it('a file that is not what it claims → 415 (the type is read from the content)', async () => {
    // "GIF89a" — a real image format, but not one Coatrail accepts — named .png.
    const gif = new Uint8Array([0x47, 0x49, 0x46, 0x38, 0x39, 0x61, 1, 0, 1, 0, 0x80, 0, 0]);
    const r = await upload(testId, 'photo.png', gif);
    expect(r.status).toBe(415);
    expect(r.body.detail).toContain('read from the file itself');
    // A Windows executable header ("MZ") named .pdf.
    const exe = await upload(testId, 'report.pdf', new Uint8Array([0x4d, 0x5a, 0x90, 0x00, 0x03, 0x00, 0x00, 0x00, 0x04, 0x00]));
    expect(exe.status).toBe(415);
    const json = await api(`/api/v1/quality/tests/${testId}/files`, { method: 'POST', session: quality, json: { file: 'x' } });
    expect(json.status).toBe(415);
  });

  it('a malformed CSV → 400 naming the line', async () => {
    const r = await upload(testId, 'bad.csv', 'a,b\n1,2\n3,4,5\n');
    expect(r.status).toBe(400);
    expect(r.body.title).toBe('Malformed CSV');
    expect(r.body.detail).toContain('line 3');
    const quote = await upload(testId, 'quote.csv', 'a,b\n"unclosed,1\n');
    expect(quote.status).toBe(400);
    expect(quote.body.detail).toContain('line 2');
    const { rows } = await pool.query<{ n: number }>(
      `select count(*)::int as n from test_files where test_id = $1 and filename in ('bad.csv', 'quote.csv', 'huge.png', 'photo.png', 'report.pdf')`,
      [testId],
    );
    expect(rows[0]!.n).toBe(0);
  });

  it('only quality attaches files', async () => {
    const r = await upload(testId, 'lattice.png', pngBytes(), operator);
    expect(r.status).toBe(403);
  });
});

describe('job CSV import (preview, then commit of the good rows only)', () => {
  it('reports bad rows by line number and keeps only the good ones when confirmed', async () => {
    const t = tag();
    const csv = [
      'job_number,customer_ref,lens_material,rack',
      `IMP-${t}-1,C-1,CR-39-type 1.50,R-${t}`,
      `bad job ${t},C-2,,`,
      `IMP-${t}-2,C-3,,R-${t}`,
      `IMP-${t}-1,C-4,,`,
      `,C-5,,`,
      `IMP-${t}-3,C-6`,
    ].join('\n');
    const pre = await api('/api/v1/jobs/import/preview', { method: 'POST', session: operator, json: { csv } });
    expect(pre.status).toBe(200);
    expect(pre.body.good.map((g: { jobNumber: string; line: number }) => [g.line, g.jobNumber])).toEqual([
      [2, `IMP-${t}-1`],
      [4, `IMP-${t}-2`],
    ]);
    expect(pre.body.bad.map((b: { line: number }) => b.line)).toEqual([3, 5, 6, 7]);
    expect(pre.body.bad[1].errors[0]).toContain('already on line 2');
    expect(pre.body.bad[3].errors[0]).toContain('has 2 fields');
    // Nothing stored by the preview.
    expect((await pool.query(`select 1 from jobs where job_number like $1`, [`IMP-${t}-%`])).rowCount).toBe(0);
    const wrong = await api('/api/v1/jobs/import/commit', {
      method: 'POST',
      session: operator,
      json: { csv: csv + '\n', sha256: pre.body.sha256 },
    });
    expect(wrong.status).toBe(409);
    const ok = await api('/api/v1/jobs/import/commit', {
      method: 'POST',
      session: operator,
      json: { csv, sha256: pre.body.sha256 },
    });
    expect(ok.status).toBe(201);
    expect(ok.body).toMatchObject({ imported: 2, created: 2, skippedLines: [3, 5, 6, 7] });
    const stored = await pool.query<{ job_number: string; customer_ref: string }>(
      `select job_number, customer_ref from jobs where job_number like $1 order by 1`,
      [`IMP-${t}-%`],
    );
    expect(stored.rows).toEqual([
      { job_number: `IMP-${t}-1`, customer_ref: 'C-1' },
      { job_number: `IMP-${t}-2`, customer_ref: 'C-3' },
    ]);
  });

  it('a file without a job-number column, or with a broken quote, is refused as a whole', async () => {
    const noCol = await api('/api/v1/jobs/import/preview', {
      method: 'POST',
      session: operator,
      json: { csv: 'customer,material\nA,B\n' },
    });
    expect(noCol.status).toBe(400);
    expect(noCol.body.errors[0]).toMatchObject({ path: 'csv' });
    expect(noCol.body.detail).toContain('job_number');
    const quote = await api('/api/v1/jobs/import/preview', {
      method: 'POST',
      session: operator,
      json: { csv: 'job_number\nA-1\n"B-2\n' },
    });
    expect(quote.status).toBe(400);
    expect(quote.body.detail).toContain('line 3');
  });
});
