/**
 * Demo and production are separate: the start plan (pure), the refusal of `npm start` when the
 * published demo password would be reachable beyond loopback, re-keying of demo users, the
 * production set-up on an empty database, and the must-change-password confinement.
 */
import { spawn } from 'node:child_process';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { afterAll, describe, expect, inject, it } from 'vitest';
import { createSequelize } from '../../db/connection.ts';
import { migrateUp } from '../../db/migrate.ts';
import { PUBLISHED_DEMO_PASSWORD, planStart, secureDemoUsers, setUpProduction, siteCodeFrom } from '../../ingest/start-mode.ts';
import { closeTestPool, createThrowawayUser, freshSignIn, testPool } from '../support/accounts.ts';
import { api, base, signIn } from '../support/http.ts';

afterAll(async () => {
  await closeTestPool();
});

describe('planStart', () => {
  it('npm start on loopback is the demo with its simulator, published password or not', () => {
    const p = planStart({});
    expect(p).toMatchObject({ mode: 'demo', demo: true, simulate: true, refusal: null, exposed: false });
    expect(planStart({ HOST: 'localhost' }).refusal).toBeNull();
  });

  it('refuses the published password on a non-loopback HOST or with PUBLIC_ORIGIN set, in one line naming the fix', () => {
    for (const env of [{ HOST: '0.0.0.0' }, { HOST: '192.168.1.20' }, { PUBLIC_ORIGIN: 'https://coatrail.lab.example' }]) {
      const p = planStart(env);
      expect(p.refusal).toMatch(/DEMO_PASSWORD/);
      expect(p.refusal).toMatch(/start:production/);
      expect(p.refusal).not.toContain('\n');
    }
    // explicitly setting the published value is the same as not setting it
    expect(planStart({ HOST: '0.0.0.0', DEMO_PASSWORD: PUBLISHED_DEMO_PASSWORD }).refusal).not.toBeNull();
    expect(planStart({ HOST: '0.0.0.0', DEMO_PASSWORD: 'our-own-demo-pw' }).refusal).toBeNull();
  });

  it('a production start seeds no demo data and runs no simulator', () => {
    for (const p of [planStart({}, ['--production']), planStart({ COATRAIL_MODE: 'production', HOST: '0.0.0.0' })]) {
      expect(p).toMatchObject({ mode: 'production', demo: false, simulate: false, refusal: null });
    }
  });
});

describe('ingest/stack.ts', () => {
  it('exits at once with the refusal when the demo would listen on 0.0.0.0 with the published password', async () => {
    const varDir = fs.mkdtempSync(path.join(os.tmpdir(), 'coatrail-refuse-'));
    const env = { ...process.env, HOST: '0.0.0.0', COATRAIL_VAR_DIR: varDir } as NodeJS.ProcessEnv;
    delete env['DEMO_PASSWORD'];
    delete env['PUBLIC_ORIGIN'];
    delete env['DATABASE_URL'];
    const child = spawn(process.execPath, ['--import', 'tsx', 'ingest/stack.ts'], { env, stdio: ['ignore', 'pipe', 'pipe'] });
    let out = '';
    child.stdout.on('data', (d: Buffer) => (out += d.toString()));
    child.stderr.on('data', (d: Buffer) => (out += d.toString()));
    const code = await new Promise<number | null>((resolve) => child.on('exit', resolve));
    expect(code).toBe(1);
    expect(out).toMatch(/Cannot start: Refusing to start the demo .*HOST=0\.0\.0\.0.*DEMO_PASSWORD/);
    // nothing was started: no database cluster in the state folder
    expect(fs.existsSync(path.join(varDir, 'pg'))).toBe(false);
    fs.rmSync(varDir, { recursive: true, force: true });
  });
});

describe('secureDemoUsers', () => {
  it('re-keys a demo user that still has the published password to DEMO_PASSWORD, audited; others untouched', async () => {
    const stale = await createThrowawayUser('viewer', 'demo-stale');
    const kept = await createThrowawayUser('viewer', 'demo-kept');
    // give one the published password behind the API's back (as an old demo database has it)
    const { hashPassword } = await import('../../src/lib/server/passwords.ts');
    await testPool().query('update users set password_hash = $1 where id = $2', [
      await hashPassword(PUBLISHED_DEMO_PASSWORD),
      stale.id,
    ]);
    const sequelize = createSequelize({ url: inject('stack').databaseUrl, max: 1 });
    try {
      const changed = await secureDemoUsers(sequelize, 'a-demo-pw-of-our-own', [stale.username, kept.username]);
      expect(changed).toEqual([stale.username]);
    } finally {
      await sequelize.close();
    }
    expect(
      (await api('/api/auth/login', { method: 'POST', json: { username: stale.username, password: PUBLISHED_DEMO_PASSWORD } }))
        .status,
    ).toBe(401);
    await freshSignIn(stale.username, 'a-demo-pw-of-our-own');
    await freshSignIn(kept.username, kept.password);
    const { rows } = await testPool().query(
      `select actor_label, action from audit_log where entity = 'user' and entity_id = $1 and action = 'user.password-set'`,
      [String(stale.id)],
    );
    expect(rows).toEqual([{ actor_label: 'system:start-up', action: 'user.password-set' }]);
  });
});

describe('setUpProduction on an empty database', () => {
  it('creates the site from SITE_NAME/SITE_TIME_ZONE and one administrator with a one-time password that must be changed', async () => {
    const dbName = `coatrail_prod_${process.pid}`;
    await testPool().query(`drop database if exists ${dbName}`);
    await testPool().query(`create database ${dbName}`);
    const url = new URL(inject('stack').databaseUrl);
    url.pathname = `/${dbName}`;
    const sequelize = createSequelize({ url: url.toString(), max: 2 });
    try {
      await migrateUp(sequelize);
      const first = await setUpProduction(sequelize, { siteName: 'Riverside Lens Lab', siteTimeZone: 'Europe/Berlin' });
      expect(first.siteCreated).toBe(true);
      expect(first.admin?.username).toBe('admin');
      expect(first.admin!.password.length).toBeGreaterThanOrEqual(20);
      const [sites] = await sequelize.query('select code, name, time_zone from sites');
      expect(sites).toEqual([{ code: 'riverside-lens-lab', name: 'Riverside Lens Lab', time_zone: 'Europe/Berlin' }]);
      const [users] = await sequelize.query('select username, role, must_change_password, password_hash from users');
      expect(users).toHaveLength(1);
      expect(users[0]).toMatchObject({ username: 'admin', role: 'admin', must_change_password: true });
      // only the hash is stored, never the password
      expect(JSON.stringify(users)).not.toContain(first.admin!.password);
      const [channels] = await sequelize.query('select count(*)::int as n from channels');
      expect(channels).toEqual([{ n: 0 }]);
      // a second start creates nothing and prints no password
      expect(await setUpProduction(sequelize, { siteName: 'Other' })).toEqual({ siteCreated: false, admin: null });
      await expect(setUpProduction(sequelize, { siteTimeZone: 'Mars/Olympus' })).rejects.toThrow(/SITE_TIME_ZONE/);
    } finally {
      await sequelize.close();
      await testPool().query(`drop database if exists ${dbName}`);
    }
    // the code follows the topic contract's alphabet
    expect(siteCodeFrom('  Ünïcode & Co. Lab ')).toBe('unicode-co-lab');
  });
});

describe('must change password', () => {
  it('an account whose password an admin set reaches only the change-password page and API until it changes it', async () => {
    const admin = await signIn('admin');
    const username = `mcp-${Date.now().toString(36)}`;
    const created = await api('/api/v1/admin/users', {
      method: 'POST',
      session: admin,
      json: {
        username,
        displayName: 'Must Change',
        email: `${username}@example.test`,
        role: 'engineer',
        password: 'chosen-by-admin-1',
      },
    });
    expect(created.status).toBe(201);
    const s = await freshSignIn(username, 'chosen-by-admin-1');
    const blocked = await api('/api/v1/alarms', { session: s });
    expect(blocked.status).toBe(403);
    expect(blocked.headers.get('content-type')).toContain('application/problem+json');
    expect(blocked.body.title).toMatch(/Change your password/);
    const page = await api('/alarms', { session: s });
    expect(page.status).toBe(303);
    expect(page.headers.get('location')).toBe('/change-password?next=%2Falarms');
    const form = await api('/change-password', { session: s });
    expect(form.status).toBe(200);
    expect(form.body).toContain('Change your password');
    // the app shell without its navigation
    expect(form.body).not.toContain('href="/alarms"');
    const wrong = await api('/api/auth/change-password', {
      method: 'POST',
      session: s,
      headers: { origin: base() },
      json: { currentPassword: 'not-it-at-all', newPassword: 'my-very-own-pw-1' },
    });
    expect(wrong.status).toBe(403);
    const ok = await api('/api/auth/change-password', {
      method: 'POST',
      session: s,
      headers: { origin: base() },
      json: { currentPassword: 'chosen-by-admin-1', newPassword: 'my-very-own-pw-1' },
    });
    expect(ok.status).toBe(204);
    expect((await api('/api/v1/alarms', { session: s })).status).toBe(200);
    expect((await api('/alarms', { session: s })).status).toBe(200);
    const { rows } = await testPool().query(`select must_change_password from users where username = $1`, [username]);
    expect(rows).toEqual([{ must_change_password: false }]);
  });
});
