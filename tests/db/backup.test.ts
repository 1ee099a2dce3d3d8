/**
 * Backups round-trip: the test stack's live database (seeded plant, history, story) is dumped
 * and restored into a new database A; A is dumped and restored into B. A holds every table the
 * source has and the records and readings the seeds made; A and B are identical row for row.
 * The CLI writes named archives and keeps the newest BACKUP_KEEP.
 */
import { execFile } from 'node:child_process';
import fs from 'node:fs';
import path from 'node:path';
import { promisify } from 'node:util';
import pg from 'pg';
import { afterAll, describe, expect, it, inject } from 'vitest';
import { backupDatabase, backupName, pruneBackups, restoreDatabase } from '../../db/backup.ts';
import { root } from '../support/test-stack.ts';

const run = promisify(execFile);
const dir = path.join(root, 'var', `backup-test-${process.pid}`);
const dbs = [`bk_a_${process.pid}`, `bk_b_${process.pid}`];

function urlOf(database: string): string {
  const u = new URL(inject('stack').databaseUrl);
  u.pathname = `/${database}`;
  return u.toString();
}

async function sql<T extends pg.QueryResultRow>(url: string, text: string, params: unknown[] = []): Promise<T[]> {
  const c = new pg.Client({ connectionString: url });
  await c.connect();
  try {
    return (await c.query<T>(text, params)).rows;
  } finally {
    await c.end();
  }
}

/** Row count and an order-independent digest of every row, per table (partitions included). */
async function fingerprint(url: string): Promise<Record<string, string>> {
  const tables = await sql<{ t: string }>(
    url,
    `select c.relname as t from pg_class c join pg_namespace n on n.oid = c.relnamespace
      where n.nspname = 'public' and c.relkind = 'r' order by 1`,
  );
  const out: Record<string, string> = {};
  for (const { t } of tables) {
    const [r] = await sql<{ n: number; h: string | null }>(
      url,
      `select count(*)::int as n, md5(string_agg(md5(x::text), '' order by md5(x::text))) as h from "${t}" x`,
    );
    out[t] = `${r!.n}:${r!.h ?? ''}`;
  }
  return out;
}

afterAll(async () => {
  for (const d of dbs) await sql(inject('stack').databaseUrl, `drop database if exists "${d}"`).catch(() => {});
  fs.rmSync(dir, { recursive: true, force: true });
});

describe('db:backup and db:restore', () => {
  it('round-trips a database: every table, record and reading comes back', async () => {
    const live = inject('stack').databaseUrl;
    const before = await sql<{ readings: number; loads: number; audit: number; users: number }>(
      live,
      `select (select count(*) from readings)::int as readings, (select count(*) from oven_loads)::int as loads,
              (select count(*) from audit_log)::int as audit, (select count(*) from users)::int as users`,
    );
    for (const d of dbs) await sql(live, `create database "${d}"`);
    const first = await backupDatabase(live, path.join(dir, 'live.dump'));
    expect(first.bytes).toBeGreaterThan(0);
    await restoreDatabase(urlOf(dbs[0]!), first.file);

    const a = await fingerprint(urlOf(dbs[0]!));
    const liveTables = Object.keys(await fingerprint(live));
    expect(Object.keys(a)).toEqual(liveTables);
    const [counts] = await sql<{ readings: number; loads: number; audit: number; users: number }>(
      urlOf(dbs[0]!),
      `select (select count(*) from readings)::int as readings, (select count(*) from oven_loads)::int as loads,
              (select count(*) from audit_log)::int as audit, (select count(*) from users)::int as users`,
    );
    // The live stack keeps recording while the test runs: the copy has at least what was there before.
    expect(counts!.readings).toBeGreaterThanOrEqual(before[0]!.readings);
    expect(counts!.readings).toBeGreaterThan(0);
    expect(counts!.loads).toBeGreaterThanOrEqual(before[0]!.loads);
    expect(counts!.audit).toBeGreaterThanOrEqual(before[0]!.audit);
    expect(counts!.users).toBe(before[0]!.users);

    const second = await backupDatabase(urlOf(dbs[0]!), path.join(dir, 'a.dump'));
    await restoreDatabase(urlOf(dbs[1]!), second.file);
    expect(await fingerprint(urlOf(dbs[1]!))).toEqual(a);
  }, 180_000);

  it('names archives by time and keeps the newest BACKUP_KEEP', async () => {
    expect(backupName(new Date('2026-12-04T20:30:05.123Z'))).toBe('coatrail-20261204T203005Z.dump');
    const keepDir = path.join(dir, 'keep');
    fs.mkdirSync(keepDir, { recursive: true });
    for (let d = 1; d <= 5; d++) fs.writeFileSync(path.join(keepDir, backupName(new Date(Date.UTC(2026, 11, d)))), 'x');
    fs.writeFileSync(path.join(keepDir, 'notes.txt'), 'kept');
    expect(pruneBackups(keepDir, 3)).toEqual(['coatrail-20261201T000000Z.dump', 'coatrail-20261202T000000Z.dump']);
    expect(fs.readdirSync(keepDir).sort()).toEqual([
      'coatrail-20261203T000000Z.dump',
      'coatrail-20261204T000000Z.dump',
      'coatrail-20261205T000000Z.dump',
      'notes.txt',
    ]);
  });

  it('the CLI backs up the database in DATABASE_URL into BACKUP_DIR', async () => {
    const out = path.join(dir, 'cli');
    const { stdout } = await run(process.execPath, ['--import', 'tsx', 'db/backup.ts', 'backup'], {
      cwd: root,
      env: { ...process.env, DATABASE_URL: urlOf(dbs[1]!), BACKUP_DIR: out, BACKUP_KEEP: '2' },
    });
    expect(stdout).toMatch(/Backup written: .*coatrail-\d{8}T\d{6}Z\.dump/);
    expect(fs.readdirSync(out).filter((f) => f.endsWith('.dump'))).toHaveLength(1);
  }, 60_000);
});
