/**
 * Typed site settings (table `site_settings`, one JSON value per key) with documented defaults:
 * an absent or no-longer-valid value reads as the default. Worker-safe (pg.Pool or client).
 */
import type pg from 'pg';
import type { z } from 'zod';

type Queryable = pg.Pool | pg.PoolClient;

/** The setting under `key`, validated by `schema`; `fallback` when absent or invalid. */
export async function readSetting<S extends z.ZodType>(
  q: Queryable,
  key: string,
  schema: S,
  fallback: z.infer<S>,
): Promise<z.infer<S>> {
  const { rows } = await q.query<{ value: unknown }>('select value from site_settings where key = $1', [key]);
  if (!rows[0]) return fallback;
  const parsed = schema.safeParse(rows[0].value);
  return parsed.success ? parsed.data : fallback;
}

/** Store a setting (insert or replace); returns the previous value (null when none). */
export async function writeSetting(q: Queryable, key: string, value: unknown): Promise<unknown> {
  const { rows } = await q.query<{ value: unknown }>('select value from site_settings where key = $1', [key]);
  await q.query(
    `insert into site_settings (key, value, updated_at) values ($1, $2::jsonb, now())
     on conflict (key) do update set value = excluded.value, updated_at = now()`,
    [key, JSON.stringify(value)],
  );
  return rows[0]?.value ?? null;
}

/** The site's time zone (the demo site's is Europe/London); UTC when no site exists yet. */
export async function siteTimeZone(q: Queryable): Promise<string> {
  const { rows } = await q.query<{ time_zone: string }>('select time_zone from sites order by id limit 1');
  return rows[0]?.time_zone ?? 'UTC';
}
