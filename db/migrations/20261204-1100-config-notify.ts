import { sql, type Migration } from './types.ts';

/**
 * Configuration changes are announced on the PostgreSQL channel `coatrail_config`, so the ingest
 * worker (which LISTENs on it) refreshes its caches at once instead of on a timer. One row-level
 * trigger per configuration table sends `{"table", "op", "id", "key"}` (JSON; `key` for
 * site_settings rows, `id` otherwise). A notification is delivered when the transaction commits,
 * and never for a transaction that rolls back. Changes the pipeline itself makes often are left
 * out: a device's online state and last-seen time, and the retention job's own bookkeeping key.
 */
const TABLES = [
  'sites',
  'assets',
  'devices',
  'channels',
  'characteristics',
  'limit_sets',
  'alarm_configs',
  'process_windows',
  'window_assignments',
  'site_settings',
] as const;

/** Update triggers that fire only when something other than these columns changed. */
const UPDATE_WHEN: Partial<Record<(typeof TABLES)[number], string>> = {
  devices: `(old.site_id, old.name, old.username, old.password_hash, old.topic_prefix, old.enabled)
      is distinct from (new.site_id, new.name, new.username, new.password_hash, new.topic_prefix, new.enabled)`,
  site_settings: `new.key <> 'retentionLastRun' and old.value is distinct from new.value`,
};
const INSERT_DELETE_WHEN: Partial<Record<(typeof TABLES)[number], { insert: string; delete: string }>> = {
  site_settings: { insert: `new.key <> 'retentionLastRun'`, delete: `old.key <> 'retentionLastRun'` },
};

export const migration: Migration = {
  name: '20261204-1100-config-notify',
  async up(ctx) {
    const triggers = TABLES.map((t) => {
      const upd = UPDATE_WHEN[t] ? ` when (${UPDATE_WHEN[t]})` : '';
      const ins = INSERT_DELETE_WHEN[t]?.insert ? ` when (${INSERT_DELETE_WHEN[t].insert})` : '';
      const del = INSERT_DELETE_WHEN[t]?.delete ? ` when (${INSERT_DELETE_WHEN[t].delete})` : '';
      return `
      create trigger ${t}_config_notify_ins after insert on ${t} for each row${ins} execute function coatrail_config_notify();
      create trigger ${t}_config_notify_upd after update on ${t} for each row${upd} execute function coatrail_config_notify();
      create trigger ${t}_config_notify_del after delete on ${t} for each row${del} execute function coatrail_config_notify();`;
    }).join('\n');
    await sql(
      ctx,
      `
      create function coatrail_config_notify() returns trigger language plpgsql as $$
      declare
        r jsonb := to_jsonb(case when tg_op = 'DELETE' then old else new end);
      begin
        perform pg_notify('coatrail_config', json_build_object(
          'table', tg_table_name, 'op', lower(tg_op), 'id', r->'id', 'key', r->'key')::text);
        return null;
      end $$;
      ${triggers}
    `,
    );
  },
  async down(ctx) {
    const drops = TABLES.map(
      (t) => `
      drop trigger ${t}_config_notify_ins on ${t};
      drop trigger ${t}_config_notify_upd on ${t};
      drop trigger ${t}_config_notify_del on ${t};`,
    ).join('\n');
    await sql(ctx, `${drops}\n      drop function coatrail_config_notify();`);
  },
};
