/**
 * Typed site settings (table `site_settings`, one JSON value per key, model `SiteSetting`) with
 * documented defaults: an absent or no-longer-valid value reads as the default. Worker-safe:
 * takes the Sequelize instance or a transaction (a raw pg pool or client is still accepted
 * from callers outside this area that have not moved yet).
 */
import type { z } from 'zod';
import { Site, SiteSetting } from '../../../db/models/index.ts';
import { inTransaction, isDb, select, txOpt, type AnyDb, type Db } from './db.ts';
import type { Transaction } from 'sequelize';

async function rawValue(q: AnyDb, key: string): Promise<{ value: unknown } | null> {
  if (isDb(q)) {
    const row = await SiteSetting.findByPk(key, { ...txOpt(q) });
    return row ? { value: row.value } : null;
  }
  const rows = await select<{ value: unknown }>(q, 'select value from site_settings where key = $1', [key]);
  return rows[0] ?? null;
}

/** The setting under `key`, validated by `schema`; `fallback` when absent or invalid. */
export async function readSetting<S extends z.ZodType>(
  q: AnyDb,
  key: string,
  schema: S,
  fallback: z.infer<S>,
): Promise<z.infer<S>> {
  const row = await rawValue(q, key);
  if (!row) return fallback;
  const parsed = schema.safeParse(row.value);
  return parsed.success ? parsed.data : fallback;
}

/** The stored values of several keys (absent keys are absent from the map). */
export async function readSettings(db: Db, keys: readonly string[]): Promise<Map<string, unknown>> {
  const rows = await SiteSetting.findAll({ where: { key: [...keys] }, ...txOpt(db) });
  return new Map(rows.map((r) => [r.key, r.value]));
}

/**
 * Store a setting inside `t` (insert or replace, the row locked first so two saves serialise);
 * returns the previous value (null when none).
 */
export async function writeSettingIn(t: Transaction, key: string, value: unknown): Promise<unknown> {
  const row = await SiteSetting.findByPk(key, { transaction: t, lock: t.LOCK.UPDATE });
  if (row) {
    const before = row.value;
    await row.update({ value, updatedAt: new Date() }, { transaction: t });
    return before;
  }
  await SiteSetting.upsert({ key, value, updatedAt: new Date() }, { transaction: t });
  return null;
}

/** Store a setting (insert or replace); returns the previous value (null when none). */
export async function writeSetting(q: AnyDb, key: string, value: unknown): Promise<unknown> {
  if (isDb(q)) {
    return inTransaction(q, (t) => writeSettingIn(t, key, value));
  }
  const rows = await select<{ value: unknown }>(q, 'select value from site_settings where key = $1', [key]);
  await select(
    q,
    `insert into site_settings (key, value, updated_at) values ($1, $2::jsonb, now())
     on conflict (key) do update set value = excluded.value, updated_at = now() returning key`,
    [key, JSON.stringify(value)],
  );
  return rows[0]?.value ?? null;
}

/** The site's time zone (the demo site's is Europe/London); UTC when no site exists yet. */
export async function siteTimeZone(q: AnyDb): Promise<string> {
  if (isDb(q)) {
    const site = await Site.findOne({ attributes: ['timeZone'], order: [['id', 'ASC']], ...txOpt(q) });
    return site?.timeZone ?? 'UTC';
  }
  const rows = await select<{ time_zone: string }>(q, 'select time_zone from sites order by id limit 1');
  return rows[0]?.time_zone ?? 'UTC';
}
