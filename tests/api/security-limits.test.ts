/**
 * Input limits at the edge: the spectrum parser refuses hostile input in linear time, and
 * request bodies are capped while they stream (413 problem+json before the cap is exceeded,
 * chunked bodies included).
 */
import http from 'node:http';
import { describe, expect, it } from 'vitest';
import { BODY_LIMITS } from '../../src/lib/server/http.ts';
import { MAX_SPECTRUM_LINE, parseSpectrumCsv, splitCells } from '../../src/lib/shared/spectrum.ts';
import { base, signIn } from '../support/http.ts';

describe('spectrum parser (linear time)', () => {
  it('a 1 MiB line of spaces between two numbers is refused as too long (the backtracking split took minutes)', () => {
    const hostile = '1' + ' '.repeat(1024 * 1024) + '2,3';
    const parsed = parseSpectrumCsv(hostile);
    expect(parsed.ok).toBe(false);
    if (!parsed.ok) expect(parsed.errors[0]!.message).toContain(`longer than ${MAX_SPECTRUM_LINE}`);
  });

  it('many short hostile lines finish too (every line is tokenised in one pass)', () => {
    const line = '1' + ' '.repeat(200) + '2,3';
    const parsed = parseSpectrumCsv(Array.from({ length: 5000 }, () => line).join('\n'));
    expect(parsed.ok).toBe(false);
  });

  it('cells split as the documented format says: comma, semicolon or tab with white space around, or spaces', () => {
    // Expected values written by hand from the format in src/lib/shared/spectrum.ts's header.
    expect(splitCells('550 , 0.04')).toEqual(['550', '0.04']);
    expect(splitCells('550;0.04')).toEqual(['550', '0.04']);
    expect(splitCells('550\t\t0.04')).toEqual(['550', '0.04']);
    expect(splitCells('550   0.04')).toEqual(['550', '0.04']);
    expect(splitCells('550,,0.04')).toEqual(['550', '', '0.04']);
    expect(splitCells('5 50,0.04')).toEqual(['5 50', '0.04']);
  });
});

describe('POST /api/v1/calc/fringe-thickness/spectrum with the review’s hostile upload', () => {
  it('answers 400 (malformed) for 1 MiB of spaces inside one row, inside the default test timeout', async () => {
    const operator = await signIn('operator');
    const body = '1' + ' '.repeat(1024 * 1024 - 8) + '2,3\n';
    const r = await fetch(`${base()}/api/v1/calc/fringe-thickness/spectrum?refractiveIndex=1.5`, {
      method: 'POST',
      headers: { cookie: operator.cookie, origin: base(), 'content-type': 'text/csv' },
      body,
    });
    expect(r.status).toBe(400);
    expect(r.headers.get('content-type')).toContain('application/problem+json');
    expect(((await r.json()) as { detail: string }).detail).toContain('longer than');
  });
});

/**
 * Send `total` bytes as a chunked body (no Content-Length) in 64 KiB pieces, stopping as soon as
 * the server answers; resolves with the status, the content type and how much had been sent.
 */
function chunkedPost(path: string, contentType: string, total: number, headers: Record<string, string> = {}) {
  return new Promise<{ status: number; type: string; body: string; sentBeforeAnswer: number }>((resolve, reject) => {
    const url = new URL(path, base());
    let sent = 0;
    let answered = false;
    const req = http.request(url, {
      method: 'POST',
      headers: { 'content-type': contentType, 'transfer-encoding': 'chunked', ...headers },
    });
    req.on('response', (res) => {
      answered = true;
      const at = sent;
      let body = '';
      res.setEncoding('utf8');
      res.on('data', (d: string) => (body += d));
      res.on('end', () =>
        resolve({ status: res.statusCode ?? 0, type: String(res.headers['content-type']), body, sentBeforeAnswer: at }),
      );
      res.on('error', reject);
    });
    req.on('error', (e) => {
      if (!answered) reject(e);
    });
    const piece = Buffer.alloc(64 * 1024, 0x20);
    const pump = () => {
      while (!answered && sent < total) {
        sent += piece.length;
        if (!req.write(piece)) {
          req.once('drain', pump);
          return;
        }
      }
      if (!answered) req.end();
    };
    pump();
  });
}

describe('request-body caps (one streaming reader, 413 before buffering past the cap)', () => {
  it('a chunked 10 MiB body to /api/auth/login is cut off with 413 problem+json long before its end', async () => {
    const r = await chunkedPost('/api/auth/login', 'application/json', 10 * 1024 * 1024);
    expect(r.status).toBe(413);
    expect(r.type).toContain('application/problem+json');
    expect(JSON.parse(r.body).maxBytes).toBe(BODY_LIMITS.json);
    expect(r.sentBeforeAnswer).toBeLessThan(10 * 1024 * 1024);
  });

  it('a declared Content-Length over the cap is refused before reading', async () => {
    const r = await fetch(`${base()}/api/auth/forgot-password`, {
      method: 'POST',
      headers: { 'content-type': 'application/json' },
      body: JSON.stringify({ login: 'x'.repeat(BODY_LIMITS.json + 10) }),
    });
    expect(r.status).toBe(413);
    expect(r.headers.get('content-type')).toContain('application/problem+json');
  });

  it('an ordinary JSON route refuses a body one byte over 64 KiB, and a bulk route takes it', async () => {
    const admin = await signIn('admin');
    const pad = JSON.stringify({ name: 'x'.repeat(BODY_LIMITS.json) });
    const small = await fetch(`${base()}/api/v1/admin/tokens`, {
      method: 'POST',
      headers: { cookie: admin.cookie, origin: base(), 'content-type': 'application/json' },
      body: pad,
    });
    expect(small.status).toBe(413);
    // the SPC evaluate route documents the bulk cap: the same size reaches its validator (400, not 413)
    const bulk = await fetch(`${base()}/api/v1/spc/evaluate`, {
      method: 'POST',
      headers: { cookie: admin.cookie, origin: base(), 'content-type': 'application/json' },
      body: pad,
    });
    expect(bulk.status).toBe(400);
  });

  it('a chunked multipart upload past the attachment cap is refused with 413 while it streams', async () => {
    const quality = await signIn('quality');
    const r = await chunkedPost('/api/v1/quality/tests/1/files', 'multipart/form-data; boundary=x', 20 * 1024 * 1024, {
      cookie: quality.cookie,
      origin: base(),
    });
    expect(r.status).toBe(413);
    expect(r.sentBeforeAnswer).toBeLessThan(20 * 1024 * 1024);
  });

  it('the sign-in page’s form is capped too', async () => {
    const r = await chunkedPost('/login', 'application/x-www-form-urlencoded', 4 * 1024 * 1024, { origin: base() });
    expect(r.status).toBe(413);
  });
});
