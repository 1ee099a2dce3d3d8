/**
 * Configuration changes by LISTEN/NOTIFY (migration 20261204-1100, ingest/config-listener.ts)
 * on the test stack's PostgreSQL: a committed change arrives with its table, operation and
 * row; a rolled-back one never does (PostgreSQL documents NOTIFY as delivered at commit, not
 * at all on rollback); the pipeline's own frequent writes (a device's online state) are left
 * out; and after its connection is killed the listener comes back and asks for a full reload.
 */
import { afterAll, beforeAll, describe, expect, inject, it } from 'vitest';
import { ConfigListener, parseConfigChange } from '../../ingest/config-listener.ts';
import type { ConfigChange } from '../../ingest/handlers/types.ts';
import { closeTestPool, testPool } from '../support/accounts.ts';
import { waitFor } from '../support/ingest-harness.ts';

const changes: ConfigChange[] = [];
const states: boolean[] = [];
let listener: ConfigListener;

beforeAll(async () => {
  listener = new ConfigListener({
    url: inject('stack').databaseUrl,
    onChange: (c) => changes.push(c),
    onListening: (on) => states.push(on),
  });
  await listener.start();
  expect(listener.isListening).toBe(true);
});

afterAll(async () => {
  await listener?.close();
  await closeTestPool();
});

/** The changes of `table` that arrived since index `from`. */
const since = (from: number, table: string) => changes.slice(from).filter((c) => c.table === table);

describe('the coatrail_config channel', () => {
  it('announces committed inserts, updates and deletes with the row id, and nothing for a rollback', async () => {
    const pool = testPool();
    const site = (await pool.query<{ id: number }>('select id from sites order by id limit 1')).rows[0]!.id;
    const from = changes.length;
    const client = await pool.connect();
    try {
      await client.query('begin');
      await client.query(`insert into assets(site_id, kind, code, name) values ($1, 'tank', $2, 'never')`, [
        site,
        `rb-${Date.now()}`,
      ]);
      await client.query('rollback');
    } finally {
      client.release();
    }
    const code = `nt-${Date.now()}`;
    const id = (
      await pool.query<{ id: number }>(
        `insert into assets(site_id, kind, code, name) values ($1, 'tank', $2, 'Notify tank') returning id`,
        [site, code],
      )
    ).rows[0]!.id;
    await pool.query(`update assets set name = 'Notify tank 2' where id = $1`, [id]);
    await pool.query(`delete from assets where id = $1`, [id]);
    const got = await waitFor(
      async () => (since(from, 'assets').length >= 3 ? since(from, 'assets') : null),
      5000,
      'three asset changes',
    );
    // Notifications arrive in commit order; the rolled-back insert would have been the first.
    expect(got).toEqual([
      { table: 'assets', op: 'insert', id, key: null },
      { table: 'assets', op: 'update', id, key: null },
      { table: 'assets', op: 'delete', id, key: null },
    ]);
  });

  it("leaves out a device's online state but announces a change of its settings; site settings carry their key", async () => {
    const pool = testPool();
    const dev = (await pool.query<{ id: number; enabled: boolean }>('select id, enabled from devices order by id limit 1'))
      .rows[0]!;
    const from = changes.length;
    await pool.query('update devices set online = not online, last_seen_at = now() where id = $1', [dev.id]);
    await pool.query('update devices set name = name || $2 where id = $1', [dev.id, '']); // same value: not announced either
    await pool.query(`update devices set enabled = $2 where id = $1`, [dev.id, dev.enabled]); // unchanged
    await pool.query(`update devices set name = name || ' (renamed)' where id = $1`, [dev.id]);
    await pool.query(`update devices set name = regexp_replace(name, ' \\(renamed\\)$', '') where id = $1`, [dev.id]);
    await pool.query(
      `insert into site_settings(key, value) values ('notifyTest', '{"a": 1}') on conflict (key) do update set value = excluded.value`,
    );
    await pool.query(`delete from site_settings where key = 'notifyTest'`);
    const got = await waitFor(
      async () => (since(from, 'site_settings').length >= 2 ? changes.slice(from) : null),
      5000,
      'the site settings changes',
    );
    expect(got.filter((c) => c.table === 'devices')).toEqual([
      { table: 'devices', op: 'update', id: dev.id, key: null },
      { table: 'devices', op: 'update', id: dev.id, key: null },
    ]);
    expect(got.filter((c) => c.table === 'site_settings').map((c) => [c.op, c.key])).toEqual([
      ['insert', 'notifyTest'],
      ['delete', 'notifyTest'],
    ]);
  });

  it('comes back after its connection is killed and asks for a full reload', async () => {
    const pool = testPool();
    const from = changes.length;
    const killed = await pool.query<{ ok: boolean }>(
      `select pg_terminate_backend(pid) as ok from pg_stat_activity where query = 'listen coatrail_config' and pid <> pg_backend_pid()`,
    );
    expect(killed.rows.some((r) => r.ok)).toBe(true);
    await waitFor(async () => since(from, '*').length > 0, 10_000, 'the reload request after re-connecting');
    expect(states).toContain(false);
    expect(listener.isListening).toBe(true);
    const site = (await pool.query<{ id: number }>('select id from sites order by id limit 1')).rows[0]!.id;
    await pool.query('update sites set name = name where id = $1', [site]);
    await waitFor(async () => since(from, 'sites').length > 0, 5000, 'a change heard on the new connection');
  });

  it('reads only its own payloads', () => {
    expect(parseConfigChange('{"table":"channels","op":"insert","id":3,"key":null}')).toEqual({
      table: 'channels',
      op: 'insert',
      id: 3,
      key: null,
    });
    expect(parseConfigChange('{"table":"readings","op":"insert","id":3}')).toBeNull();
    expect(parseConfigChange('{"table":"channels","op":"truncate"}')).toBeNull();
    expect(parseConfigChange('not json')).toBeNull();
    expect(parseConfigChange(undefined)).toBeNull();
  });
});
