/**
 * The audit trail: append-only in the database itself (the application's own
 * connection cannot alter or delete a row), filters, paging, and the CSV export.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { parseCsv } from '../../src/lib/shared/csv-table.ts';
import { closeTestPool, createThrowawayUser, testPool, type Throwaway } from '../support/accounts.ts';
import { api, base, signIn } from '../support/http.ts';
import { waitFor } from '../support/ingest-harness.ts';

let person: Throwaway;

beforeAll(async () => {
  person = await createThrowawayUser('viewer', 'aud');
  // A second audited change to the same user, so filters have two rows to find.
  const r = await api(`/api/v1/admin/users/${person.id}`, {
    method: 'PATCH',
    session: await signIn('admin'),
    json: { role: 'quality' },
  });
  expect(r.status).toBe(200);
});

afterAll(async () => {
  await closeTestPool();
});

/** Today's date in the site's time zone (Europe/London), as the filter expects. */
const londonToday = () => new Intl.DateTimeFormat('en-CA', { timeZone: 'Europe/London' }).format(new Date());
const londonYesterday = () =>
  new Intl.DateTimeFormat('en-CA', { timeZone: 'Europe/London' }).format(new Date(Date.now() - 86_400_000));

describe('append-only', () => {
  it('refuses UPDATE, DELETE and TRUNCATE of audit rows from the application’s own database connection', async () => {
    const pool = testPool(); // the same DATABASE_URL (role and database) the web server and worker use
    const { rows } = await pool.query<{ id: string; action: string }>(
      `select id, action from audit_log where entity = 'user' and entity_id = $1 order by id limit 1`,
      [String(person.id)],
    );
    const id = rows[0]!.id;
    await expect(pool.query(`update audit_log set action = 'tampered' where id = $1`, [id])).rejects.toThrow(/append-only/);
    await expect(pool.query(`delete from audit_log where id = $1`, [id])).rejects.toThrow(/append-only/);
    await expect(pool.query(`truncate audit_log`)).rejects.toThrow(/append-only/);
    const still = await pool.query<{ action: string }>('select action from audit_log where id = $1', [id]);
    expect(still.rows[0]!.action).toBe(rows[0]!.action);
  });
});

describe('GET /api/v1/audit', () => {
  it('filters by record, actor, action and date, newest first', async () => {
    const viewer = await signIn('viewer');
    const mine = await api(`/api/v1/audit?entity=user&entityId=${person.id}`, { session: viewer });
    expect(mine.status).toBe(200);
    // Created by the admin, signed in once and replaced the admin-set password (createThrowawayUser), then re-roled.
    expect(mine.body.total).toBe(4);
    expect(mine.body.rows.map((r: { action: string }) => r.action)).toEqual([
      'user.role-changed',
      'user.password-changed',
      'auth.signed-in',
      'user.created',
    ]);
    expect(mine.body.rows[0]).toMatchObject({
      actor: 'admin',
      entity: 'user',
      entityId: String(person.id),
      before: { role: 'viewer' },
      after: { role: 'quality' },
    });
    const byAction = await api(`/api/v1/audit?entity=user&entityId=${person.id}&action=role`, { session: viewer });
    expect(byAction.body.total).toBe(1);
    const byActor = await api(`/api/v1/audit?entity=user&entityId=${person.id}&actor=nobody-at-all`, { session: viewer });
    expect(byActor.body.total).toBe(0);
    const today = await api(`/api/v1/audit?entity=user&entityId=${person.id}&from=${londonToday()}&to=${londonToday()}`, {
      session: viewer,
    });
    expect(today.body.total).toBe(4);
    const yesterday = await api(`/api/v1/audit?entity=user&entityId=${person.id}&to=${londonYesterday()}`, { session: viewer });
    expect(yesterday.body.total).toBe(0);
    const future = await api(
      `/api/v1/audit?entity=user&entityId=${person.id}&from=${new Date(Date.now() + 60_000).toISOString()}`,
      { session: viewer },
    );
    expect(future.body.total).toBe(0);
  });

  it('pages through the trail', async () => {
    const viewer = await signIn('viewer');
    const p1 = await api(`/api/v1/audit?entity=user&entityId=${person.id}&pageSize=1&page=1`, { session: viewer });
    const p2 = await api(`/api/v1/audit?entity=user&entityId=${person.id}&pageSize=1&page=2`, { session: viewer });
    expect(p1.body).toMatchObject({ total: 4, page: 1, pageSize: 1 });
    expect(p1.body.rows).toHaveLength(1);
    expect(p2.body.rows).toHaveLength(1);
    expect(p1.body.rows[0].id).toBeGreaterThan(p2.body.rows[0].id);
  });

  it('refuses bad filters with 400 and the field', async () => {
    const viewer = await signIn('viewer');
    const bad = await api('/api/v1/audit?from=last-tuesday', { session: viewer });
    expect(bad.status).toBe(400);
    expect(bad.body.errors[0].path).toBe('from');
    const big = await api('/api/v1/audit?pageSize=100000', { session: viewer });
    expect(big.status).toBe(400);
    expect(big.body.errors[0].path).toBe('pageSize');
  });

  it('exports every matching row as CSV, with formula-looking text neutralised', async () => {
    const viewer = await signIn('viewer');
    const r = await fetch(`${base()}/api/v1/audit?entity=user&entityId=${person.id}&format=csv`, {
      headers: { cookie: viewer.cookie },
    });
    expect(r.status).toBe(200);
    expect(r.headers.get('content-type')).toContain('text/csv');
    expect(r.headers.get('content-disposition')).toMatch(/attachment; filename="coatrail-audit-[0-9-]+\.csv"/);
    const records = parseCsv(await r.text());
    expect(records[0]!.cells.slice(0, 5)).toEqual(['id', 'at_utc', 'actor', 'actor_id', 'action']);
    expect(records).toHaveLength(5);
    expect(records[1]!.cells[4]).toBe('user.role-changed');
    expect(JSON.parse(records[1]!.cells[8]!)).toMatchObject({ role: 'quality' });
    // A sign-in attempt under a formula-like name lands in the trail; the export defuses it.
    const evil = `=hyperlink("x${Date.now()}")`;
    await api('/api/auth/forgot-password', { method: 'POST', json: { login: evil } });
    // (the forgot-password answer does not wait for its bookkeeping, so that timing tells nothing)
    await waitFor(
      async () =>
        (await testPool().query(`select 1 from audit_log where action = 'auth.reset-requested' and actor_label = $1`, [evil]))
          .rows[0],
      5000,
      'the request to be audited',
    );
    const csv = await fetch(`${base()}/api/v1/audit?action=reset-requested&actor=${encodeURIComponent(evil)}&format=csv`, {
      headers: { cookie: viewer.cookie },
    });
    const rows = parseCsv(await csv.text());
    expect(rows).toHaveLength(2);
    expect(rows[1]!.cells[2]).toBe(`'${evil}`);
  });
});
