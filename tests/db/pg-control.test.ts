import fs from 'node:fs';
import net from 'node:net';
import path from 'node:path';
import pg from 'pg';
import { afterAll, describe, expect, it } from 'vitest';
import { freePort, isLocalPostgresRunning, PgControlError, startLocalPostgres, stopLocalPostgres } from '../../db/pg-control.ts';
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
