import pg from 'pg';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { inject } from 'vitest';
import { createSequelize } from '../../db/connection.ts';
import { migrateDownAll, migrateUp } from '../../db/migrate.ts';
import { migrations } from '../../db/migrations/index.ts';

const url = new URL(inject('stack').databaseUrl);
const scratch = new URL(url);
scratch.pathname = '/coatrail_migrations_test';

async function tables(client: pg.Client): Promise<string[]> {
  const { rows } = await client.query<{ t: string }>(
    `select tablename as t from pg_tables where schemaname = 'public' and tablename not like 'readings\\_2%' order by 1`,
  );
  return rows.map((r) => r.t);
}

describe('migrations on an empty database', () => {
  const admin = new pg.Client({ connectionString: url.toString() });
  let client: pg.Client;
  beforeAll(async () => {
    await admin.connect();
    await admin.query('drop database if exists coatrail_migrations_test');
    await admin.query('create database coatrail_migrations_test');
    client = new pg.Client({ connectionString: scratch.toString() });
    await client.connect();
  });
  afterAll(async () => {
    await client.end();
    await admin.query('drop database if exists coatrail_migrations_test');
    await admin.end();
  });

  it('go up, all the way down, and up again', async () => {
    const seq = createSequelize({ url: scratch.toString(), max: 1 });
    const up = await migrateUp(seq);
    expect(up).toEqual(migrations.map((m) => m.name));
    expect(await tables(client)).toEqual(
      expect.arrayContaining([
        'sites',
        'assets',
        'channels',
        'devices',
        'users',
        'user_sessions',
        'audit_log',
        'readings',
        'readings_1m',
        'readings_1h',
      ]),
    );
    const down = await migrateDownAll(seq);
    expect(down).toEqual(migrations.map((m) => m.name).reverse());
    expect(await tables(client)).toEqual(['schema_migrations']);
    expect(await migrateUp(seq)).toHaveLength(migrations.length);
    await seq.close();
  });

  it('readings are partitioned by time with partitions made ahead', async () => {
    const { rows } = await client.query<{ n: number }>(
      `select count(*)::int as n from pg_inherits i join pg_class p on p.oid = i.inhparent where p.relname = 'readings'`,
    );
    expect(rows[0]!.n).toBeGreaterThanOrEqual(12); // 8 weeks back + 4 ahead
    const made = await client.query<{ n: number }>(`select ensure_reading_partitions(now(), now() + interval '10 weeks') as n`);
    expect(made.rows[0]!.n).toBeGreaterThan(0);
  });

  it('one channel over a time range is served by the primary-key index', async () => {
    const { rows } = await client.query<{ 'QUERY PLAN': string }>(
      `explain select ts, value from readings where channel_id = 1 and ts between now() - interval '1 day' and now()`,
    );
    expect(rows.map((r) => r['QUERY PLAN']).join('\n')).toMatch(/Index (Only )?Scan/);
  });
});

describe('audit trail is append-only in the database', () => {
  it('refuses UPDATE, DELETE and TRUNCATE from the application connection', async () => {
    const client = new pg.Client({ connectionString: url.toString() });
    await client.connect();
    try {
      await client.query(`insert into audit_log(actor_label, action, entity) values ('test', 'test.append', 'test')`);
      await expect(client.query(`update audit_log set action = 'tampered'`)).rejects.toThrow(/append-only/);
      await expect(client.query(`delete from audit_log`)).rejects.toThrow(/append-only/);
      await expect(client.query(`truncate audit_log`)).rejects.toThrow(/append-only/);
      const { rows } = await client.query(`select count(*)::int as n from audit_log where action = 'tampered'`);
      expect(rows[0].n).toBe(0);
    } finally {
      await client.end();
    }
  });
});
