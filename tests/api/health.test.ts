import { describe, expect, it } from 'vitest';
import { api } from '../support/http.ts';

describe('GET /api/health', () => {
  it('answers ok with database, broker and ingest details', async () => {
    const r = await api('/api/health');
    expect(r.status).toBe(200);
    expect(r.body.status).toBe('ok');
    expect(r.body.db.ok).toBe(true);
    expect(r.body.broker.ok).toBe(true);
    expect(r.body.ingest.workers).toBeGreaterThanOrEqual(1);
    expect(typeof r.body.ingest.lagMs).toBe('number');
    expect(r.headers.get('content-type')).toContain('application/json');
  });
});
