import fs from 'node:fs';
import os from 'node:os';
import net from 'node:net';
import path from 'node:path';
import pg from 'pg';
import { afterAll, describe, expect, it } from 'vitest';
import {
  clusterDir,
  freePort,
  isLocalPostgresRunning,
  PgControlError,
  startLocalPostgres,
  stopLocalPostgres,
} from '../../db/pg-control.ts';
import { root } from '../support/test-stack.ts';

const base = path.join(root, 'var', `pgctl-test-${process.pid}`);
const saved = process.env['DATABASE_URL'];

describe('db/pg-control.ts (local PostgreSQL control)', () => {
  afterAll(async () => {
    await stopLocalPostgres(base);
    fs.rmSync(base, { recursive: true, force: true });
    if (saved) process.env['DATABASE_URL'] = saved;
  });

  it('starts a cluster on loopback, stops it by pg_ctl, and a restart keeps the data', async () => {
    delete process.env['DATABASE_URL'];
    const first = await startLocalPostgres({ baseDir: base, database: 'ctl' });
    expect(first.owned).toBe(true);
    expect(first.url).toContain('127.0.0.1');
    let c = new pg.Client({ connectionString: first.url });
    await c.connect();
    await c.query('create table kept (v int); insert into kept values (42)');
    await c.end();
    await first.stop();
    expect(isLocalPostgresRunning(base)).toBe(false);
    const again = await startLocalPostgres({ baseDir: base, database: 'ctl' });
    c = new pg.Client({ connectionString: again.url });
    await c.connect();
    const { rows } = await c.query('select v from kept');
    await c.end();
    expect(rows).toEqual([{ v: 42 }]);
    // The server only listens on loopback and wants a password over TCP.
    const noPw = new pg.Client({ connectionString: again.url.replace(/:[^:@/]+@/, '@') });
    await expect(noPw.connect()).rejects.toThrow();
    await again.stop();
  });

  it('a project in a 0700 home folder gets a working cluster on its first start (root: kept where postgres can reach it)', async () => {
    delete process.env['DATABASE_URL'];
    const home = fs.mkdtempSync(path.join(os.tmpdir(), 'ct-home-'));
    fs.chmodSync(home, 0o700); // as root's home is on Debian
    const relocRoot = fs.mkdtempSync(path.join(os.tmpdir(), 'ct-reloc-'));
    fs.chmodSync(relocRoot, 0o755);
    const savedRoot = process.env['COATRAIL_PG_ROOT'];
    process.env['COATRAIL_PG_ROOT'] = relocRoot;
    const projectPg = path.join(home, 'coatrail', 'var', 'pg');
    try {
      const h = await startLocalPostgres({ baseDir: projectPg, database: 'home' });
      const c = new pg.Client({ connectionString: h.url });
      await c.connect();
      expect((await c.query('select 1 as one')).rows).toEqual([{ one: 1 }]);
      await c.end();
      const isRoot = process.getuid?.() === 0;
      expect(clusterDir(projectPg) !== path.resolve(projectPg)).toBe(isRoot);
      if (isRoot) {
        expect(clusterDir(projectPg).startsWith(relocRoot)).toBe(true);
        expect(fs.readFileSync(path.join(projectPg, 'CLUSTER-IS-ELSEWHERE.txt'), 'utf8')).toContain(clusterDir(projectPg));
      }
      expect(isLocalPostgresRunning(projectPg)).toBe(true);
      await h.stop();
      expect(isLocalPostgresRunning(projectPg)).toBe(false);
    } finally {
      await stopLocalPostgres(projectPg).catch(() => {});
      if (savedRoot === undefined) delete process.env['COATRAIL_PG_ROOT'];
      else process.env['COATRAIL_PG_ROOT'] = savedRoot;
      fs.rmSync(home, { recursive: true, force: true });
      fs.rmSync(relocRoot, { recursive: true, force: true });
    }
  });

  it('reports a taken port with a plain message', async () => {
    delete process.env['DATABASE_URL'];
    const port = await freePort();
    const blocker = net.createServer().listen(port, '127.0.0.1');
    await new Promise((r) => blocker.once('listening', r));
    try {
      await expect(startLocalPostgres({ baseDir: base, database: 'ctl', port })).rejects.toThrow(PgControlError);
      await expect(startLocalPostgres({ baseDir: base, database: 'ctl', port })).rejects.toThrow(/already taken/);
    } finally {
      blocker.close();
    }
  });

  it('starts nothing when DATABASE_URL is set', async () => {
    process.env['DATABASE_URL'] = 'postgres://someone@db.example:5433/x';
    const h = await startLocalPostgres({ baseDir: path.join(base, 'unused'), database: 'x' });
    expect(h.owned).toBe(false);
    expect(h.port).toBe(5433);
    expect(fs.existsSync(path.join(base, 'unused'))).toBe(false);
    delete process.env['DATABASE_URL'];
  });
});
