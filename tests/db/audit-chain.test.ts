/**
 * The audit trail's hash chain (migration 20261204-1900, src/lib/core/audit-chain.ts), on a
 * scratch database of its own (the tampering must not touch the shared test database). The
 * tampering is done as the cluster owner behind the append-only triggers' back
 * (`session_replication_role = replica`, `alter table … disable trigger`), which is exactly what
 * the triggers cannot stop; the chain must still name the first broken row.
 */
import { createHash } from 'node:crypto';
import { spawnSync } from 'node:child_process';
import pg from 'pg';
import type { Sequelize } from 'sequelize';
import { afterAll, beforeAll, describe, expect, inject, it } from 'vitest';
import { createSequelize } from '../../db/connection.ts';
import { migrateUp } from '../../db/migrate.ts';
import { initModels } from '../../db/models/index.ts';
import { auditIn, withTransaction } from '../../db/transaction.ts';
import { runAuditVerification, verifyAuditChain } from '../../src/lib/core/audit-chain.ts';
import { root } from '../support/test-stack.ts';

const url = new URL(inject('stack').databaseUrl);
const scratch = new URL(url);
scratch.pathname = '/coatrail_audit_chain_test';
const admin = new pg.Client({ connectionString: url.toString() });
const owner = new pg.Client({ connectionString: scratch.toString() });
let seq: Sequelize;
const ids: string[] = [];

const write = (n: number) =>
  withTransaction(seq, (t) =>
    auditIn(
      t,
      { id: null, label: 'chain-test', address: '127.0.0.1' },
      { action: 'test.write', entity: 'thing', entityId: n, before: { n: n - 1 }, after: { n, note: 'é ✓' } },
    ),
  );

/** Run SQL as the owner with the user triggers off for this session only. */
const behindTriggers = async (text: string, params: unknown[] = []) => {
  await owner.query('set session_replication_role = replica');
  try {
    await owner.query(text, params);
  } finally {
    await owner.query('set session_replication_role = origin');
  }
};

beforeAll(async () => {
  await admin.connect();
  await admin.query('drop database if exists coatrail_audit_chain_test');
  await admin.query('create database coatrail_audit_chain_test');
  seq = createSequelize({ url: scratch.toString(), max: 4 });
  await migrateUp(seq);
  initModels(seq);
  await owner.connect();
  for (let n = 1; n <= 7; n++) await write(n);
  const { rows } = await owner.query<{ id: string }>('select a.id::text as id from audit_log a order by a.id');
  ids.push(...rows.map((r) => r.id));
});

afterAll(async () => {
  await owner.end();
  await seq.close();
  await admin.query('drop database if exists coatrail_audit_chain_test');
  await admin.end();
});

describe('audit hash chain', () => {
  it('chains each row to the one before with SHA-256 (checked with node:crypto, not the database)', async () => {
    const { rows } = await owner.query<{ id: string; prev_hash: Buffer | null; hash: Buffer; canonical: string }>(
      `select id::text as id, prev_hash, hash, audit_log_canonical(a, a.prev_hash) as canonical from audit_log a order by a.id`,
    );
    expect(rows).toHaveLength(7);
    expect(rows[0]!.prev_hash).toBeNull();
    for (let i = 0; i < rows.length; i++) {
      const r = rows[i]!;
      // FIPS 180-4 SHA-256 as implemented by OpenSSL (node:crypto) over the canonical UTF-8 text.
      expect(r.hash.equals(createHash('sha256').update(r.canonical, 'utf8').digest())).toBe(true);
      if (i > 0) expect(r.prev_hash!.equals(rows[i - 1]!.hash)).toBe(true);
      const c = JSON.parse(r.canonical) as Record<string, unknown>;
      // The canonical text covers every field of the row and the previous hash.
      expect(Object.keys(c).sort()).toEqual(
        [
          'action',
          'actor',
          'actorId',
          'address',
          'after',
          'at',
          'before',
          'entity',
          'entityId',
          'id',
          'prev',
          'signature',
        ].sort(),
      );
      expect(c['prev']).toBe(i === 0 ? null : rows[i - 1]!.hash.toString('hex'));
    }
    const report = await verifyAuditChain(seq, 3); // pages of 3: the walk crosses page borders
    expect(report).toMatchObject({ ok: true, rowsChecked: 7, lastId: ids[6], broken: null });
  });

  it('has no forks when many transactions write at once', async () => {
    await Promise.all(Array.from({ length: 16 }, (_, i) => write(100 + i)));
    const report = await verifyAuditChain(seq, 5);
    expect(report.ok).toBe(true);
    expect(report.rowsChecked).toBe(23);
    const more = await owner.query<{ id: string }>('select a.id::text as id from audit_log a where a.id > $1 order by a.id', [
      ids[6],
    ]);
    ids.push(...more.rows.map((r) => r.id));
  });

  it('names the first row altered behind the triggers', async () => {
    const target = ids[4]!;
    const { rows } = await owner.query<{ action: string }>('select action from audit_log where id = $1', [target]);
    const later = (await owner.query<{ after: unknown }>('select after from audit_log where id = $1', [ids[9]])).rows[0]!.after;
    await behindTriggers(`update audit_log set action = 'test.harmless' where id = $1`, [target]);
    await behindTriggers(`update audit_log set after = '{"n": 99}' where id = $1`, [ids[9]]);
    const report = await verifyAuditChain(seq, 3);
    expect(report.ok).toBe(false);
    expect(report.broken).toMatchObject({ id: target, kind: 'content' });
    expect(report.rowsChecked).toBe(4);
    await behindTriggers(`update audit_log set action = $2 where id = $1`, [target, rows[0]!.action]);
    const next = await verifyAuditChain(seq, 3);
    expect(next.broken).toMatchObject({ id: ids[9], kind: 'content' });
    await behindTriggers(`update audit_log set after = $2::jsonb where id = $1`, [ids[9], JSON.stringify(later)]);
  });

  it('names the row after one deleted behind the triggers, and the CLI exits 1 naming it', async () => {
    expect((await verifyAuditChain(seq)).ok).toBe(true);
    const saved = (await owner.query('select * from audit_log where id = $1', [ids[2]])).rows[0] as Record<string, unknown>;
    await owner.query('alter table audit_log disable trigger audit_log_no_update');
    await owner.query('delete from audit_log where id = $1', [ids[2]]);
    await owner.query('alter table audit_log enable trigger audit_log_no_update');
    const report = await verifyAuditChain(seq);
    expect(report.broken).toMatchObject({ id: ids[3], kind: 'link' });
    const cli = spawnSync(process.execPath, ['--import', 'tsx', 'db/audit-verify.ts'], {
      cwd: root,
      env: { ...process.env, DATABASE_URL: scratch.toString() },
      encoding: 'utf8',
    });
    expect(cli.status).toBe(1);
    expect(cli.stderr).toContain(`BROKEN at row ${ids[3]}`);
    // Put the row back exactly as it was: the chain holds again.
    const cols = Object.keys(saved);
    const json = new Set(['before', 'after', 'signature']);
    await behindTriggers(
      `insert into audit_log (${cols.join(', ')}) values (${cols.map((_c, i) => `$${i + 1}`).join(', ')})`,
      cols.map((c) => (json.has(c) && saved[c] !== null ? JSON.stringify(saved[c]) : saved[c])),
    );
    expect((await verifyAuditChain(seq)).ok).toBe(true);
  });

  it('names a row inserted with the triggers off', async () => {
    await behindTriggers(
      `insert into audit_log (id, actor_label, action, entity) values (nextval('audit_log_id_seq'), 'x', 'forged', 'thing')`,
    );
    const { rows } = await owner.query<{ id: string }>(`select id::text as id from audit_log where action = 'forged'`);
    const report = await verifyAuditChain(seq);
    // No prev_hash and no hash: the link is the first thing that fails, at the forged row.
    expect(report.broken).toMatchObject({ id: rows[0]!.id, kind: 'link' });
    await behindTriggers(`delete from audit_log where action = 'forged'`);
    expect((await verifyAuditChain(seq)).ok).toBe(true);
  });

  it('notices rows deleted from the end (against the last verification and the chain head), and keeps the outcome', async () => {
    const ok = await runAuditVerification(seq, 'test');
    expect(ok.record).toMatchObject({ ok: true, rowsChecked: ids.length, lastId: ids[ids.length - 1] });
    const last = ids[ids.length - 1]!;
    await behindTriggers('delete from audit_log where id = $1', [last]);
    const tail = await verifyAuditChain(seq);
    expect(tail.broken).toMatchObject({ id: last, kind: 'anchor' });
    const kept = await runAuditVerification(seq, 'test');
    expect(kept.record).toMatchObject({ ok: false, brokenId: last });
    // Without an earlier verification to compare with, the chain head still names the row.
    await owner.query('delete from audit_verifications');
    expect((await verifyAuditChain(seq)).broken).toMatchObject({ id: last, kind: 'head' });
  });
});
