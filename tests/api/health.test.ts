import { describe, expect, it } from 'vitest';
import { api, signIn } from '../support/http.ts';

describe('GET /api/health', () => {
  it('answers a signed-in user ok with database, broker and ingest details', async () => {
    const r = await api('/api/health', { session: await signIn('viewer') });
    expect(r.status).toBe(200);
    expect(r.body.status).toBe('ok');
    expect(r.body.db.ok).toBe(true);
    expect(typeof r.body.db.latencyMs).toBe('number');
    expect(r.body.broker.ok).toBe(true);
    expect(r.body.ingest.workers).toBeGreaterThanOrEqual(1);
    expect(typeof r.body.ingest.lagMs).toBe('number');
    expect(r.headers.get('content-type')).toContain('application/json');
  });

  it('answers anonymous callers with the status only: no latencies, counts or internal messages', async () => {
    const r = await api('/api/health');
    expect(r.status).toBe(200);
    expect(r.body).toEqual({
      status: 'ok',
      time: expect.any(String),
      db: { ok: true },
      broker: { ok: true },
      ingest: { ok: true },
      failing: [],
    });
  });
});
