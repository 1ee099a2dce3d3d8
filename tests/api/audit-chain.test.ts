/**
 * The audit-chain verification on the admin screen (src/pages/api/v1/admin/audit-chain.ts,
 * Admin → Sign-in locks): admin only; "verify now" walks the real chain of the test database
 * (every audit row the suite has written so far, through every writer) and keeps the outcome.
 */
import { describe, expect, it } from 'vitest';
import { api, signIn } from '../support/http.ts';

describe('audit chain verification (admin)', () => {
  it('verifies the chain now, keeps the outcome and shows it on the admin screen', async () => {
    const admin = await signIn('admin');
    const run = await api('/api/v1/admin/audit-chain', { method: 'POST', session: admin, json: {} });
    expect(run.status).toBe(200);
    expect(run.body.last).toMatchObject({ ok: true, by: 'admin', brokenId: null, problem: null });
    expect(run.body.last.rowsChecked).toBeGreaterThan(0);
    const got = await api('/api/v1/admin/audit-chain', { session: admin });
    expect(got.status).toBe(200);
    expect(got.body.last).toEqual(run.body.last);
    const page = await api('/admin/security', { session: admin });
    expect(page.status).toBe(200);
    expect(page.body).toContain('Audit trail integrity');
    expect(page.body).toContain('Chain intact');
  });

  it('is refused to every other role', async () => {
    for (const role of ['viewer', 'operator', 'engineer', 'quality'] as const) {
      const s = await signIn(role);
      expect((await api('/api/v1/admin/audit-chain', { session: s })).status).toBe(403);
      expect((await api('/api/v1/admin/audit-chain', { method: 'POST', session: s, json: {} })).status).toBe(403);
    }
    expect((await api('/api/v1/admin/audit-chain')).status).toBe(401);
  });
});
