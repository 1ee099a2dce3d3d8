/**
 * Fixtures for the loads, quality and trace tests: a throwaway oven (two zones, setpoint and door
 * channels) with its own effective process window, a throwaway dip line with a hard-coat tank,
 * bath charge and bath check, and bulk reading inserts. Every name carries a random tag so tests
 * never depend on each other's data or on the demo story.
 */
import { randomBytes } from 'node:crypto';
import type pg from 'pg';
import { deviceTopicPrefix } from '../../src/lib/shared/topics.ts';
import { hashPassword } from '../../src/lib/server/passwords.ts';
import type { ProcessWindowLimits } from '../../src/lib/shared/windows.ts';

export const tag = () => randomBytes(4).toString('hex');

/** Cure window used by the constructed profiles (hand-chosen values). */
export const TEST_CURE_LIMITS: ProcessWindowLimits = {
  withdrawalSpeedMmS: { min: 1.8, max: 2.2, target: 2.0 },
  viscosityMm2S: { min: 7, max: 12.5 },
  minCureTempC: 100,
  minEquivalentMinutes: 150,
  referenceC: 110,
  activationEnergyKJMol: 75,
  maxPartTempC: 125,
  maxRampCPerMin: 10,
  maxGapSeconds: 120,
};

async function siteId(pool: pg.Pool): Promise<number> {
  return (await pool.query<{ id: number }>('select id from sites order by id limit 1')).rows[0]!.id;
}

/** A device (gateway) of the site; with a password it can publish over MQTT under its own prefix. */
async function device(pool: pg.Pool, t: string, password?: string): Promise<{ id: number; username: string; prefix: string }> {
  const site = await pool.query<{ id: number; code: string }>('select id, code from sites order by id limit 1');
  const username = `t9-gw-${t}`;
  const prefix = deviceTopicPrefix(site.rows[0]!.code, username);
  const { rows } = await pool.query<{ id: number }>(
    `insert into devices (site_id, name, username, password_hash, topic_prefix) values ($1, $2, $3, $4, $5) returning id`,
    [site.rows[0]!.id, `Test gateway ${t}`, username, password ? await hashPassword(password) : 'x', prefix],
  );
  return { id: rows[0]!.id, username, prefix };
}

async function asset(
  pool: pg.Pool,
  parentId: number | null,
  kind: string,
  code: string,
  name: string,
  details: Record<string, unknown> = {},
): Promise<number> {
  const site = await siteId(pool);
  const { rows } = await pool.query<{ id: number }>(
    `insert into assets (site_id, parent_id, kind, code, name, details) values ($1, $2, $3, $4, $5, $6::jsonb) returning id`,
    [site, parentId, kind, code, name, JSON.stringify(details)],
  );
  return rows[0]!.id;
}

async function channel(
  pool: pg.Pool,
  assetId: number,
  deviceId: number,
  key: string,
  kind: string,
  unit: string,
  min: number,
  max: number,
): Promise<number> {
  const { rows } = await pool.query<{ id: number }>(
    `insert into channels (asset_id, device_id, key, name, kind, unit, min, max) values ($1, $2, $3, $4, $5, $6, $7, $8) returning id`,
    [assetId, deviceId, key, `${key} ${assetId}`, kind, unit, min, max],
  );
  return rows[0]!.id;
}

/** An effective window (own lacquer, CR-39 material) assigned to `assetIds` from 30 days ago. */
export async function testWindow(
  pool: pg.Pool,
  t: string,
  assetIds: number[],
  limits: ProcessWindowLimits = TEST_CURE_LIMITS,
): Promise<number> {
  const lac = await pool.query<{ id: number }>(
    `insert into lacquers (name, maker, solids_pct, density_g_cm3, activation_energy_kj_mol) values ($1, 'test', 30, 0.95, $2) returning id`,
    [`T9 lacquer ${t}`, limits.activationEnergyKJMol],
  );
  const mat = await pool.query<{ id: number }>(`select id from materials where code = 'cr39-1.50'`);
  const sig = { userId: 0, username: 'test', displayName: 'Test', meaning: 'approved', signedAt: new Date().toISOString() };
  const w = await pool.query<{ id: number }>(
    `insert into process_windows (lacquer_id, material_id, version, name, status, limits, approved_signature, effective_from)
     values ($1, $2, 1, $3, 'effective', $4::jsonb, $5::jsonb, now() - interval '30 days') returning id`,
    [lac.rows[0]!.id, mat.rows[0]!.id, `T9 window ${t}`, JSON.stringify(limits), JSON.stringify(sig)],
  );
  for (const a of assetIds) {
    await pool.query(
      `insert into window_assignments (asset_id, window_id, valid_from) values ($1, $2, now() - interval '30 days')`,
      [a, w.rows[0]!.id],
    );
  }
  return w.rows[0]!.id;
}

export interface TestOven {
  id: number;
  code: string;
  name: string;
  /** The oven's gateway (MQTT username and topic prefix). */
  device: { username: string; prefix: string };
  setpointId: number;
  doorId: number;
  zoneIds: [number, number];
  windowId: number;
}

/** A throwaway oven with two zones and its own window (TEST_CURE_LIMITS unless given); a device password lets a test publish for it. */
export async function createTestOven(
  pool: pg.Pool,
  limits: ProcessWindowLimits = TEST_CURE_LIMITS,
  devicePassword?: string,
): Promise<TestOven> {
  const t = tag();
  const d = await device(pool, t, devicePassword);
  const dev = d.id;
  const code = `t9-oven-${t}`;
  const name = `Test oven ${t}`;
  const id = await asset(pool, null, 'oven', code, name);
  const z1 = await asset(pool, id, 'zone', `${code}-z1`, `${name} zone 1`);
  const z2 = await asset(pool, id, 'zone', `${code}-z2`, `${name} zone 2`);
  const setpointId = await channel(pool, id, dev, 'setpoint', 'setpoint', '°C', 0, 250);
  const doorId = await channel(pool, id, dev, 'door', 'door', 'open=1', 0, 1);
  const a1 = await channel(pool, z1, dev, 'air-temp', 'air-temperature', '°C', -20, 300);
  const a2 = await channel(pool, z2, dev, 'air-temp', 'air-temperature', '°C', -20, 300);
  const windowId = await testWindow(pool, t, [id], limits);
  return { id, code, name, device: { username: d.username, prefix: d.prefix }, setpointId, doorId, zoneIds: [a1, a2], windowId };
}

export interface TestLine {
  id: number;
  code: string;
  tankId: number;
  speedId: number;
  viscosityId: number;
  chargeId: number;
  windowId: number;
}

/** A throwaway dip line with a hard-coat tank, a bath charge (charged `chargedDaysAgo`) and its own window. */
export async function createTestLine(pool: pg.Pool, chargedDaysAgo = 10): Promise<TestLine> {
  const t = tag();
  const dev = (await device(pool, t)).id;
  const code = `t9-line-${t}`;
  const id = await asset(pool, null, 'line', code, `Test line ${t}`);
  const tankId = await asset(pool, id, 'tank', `${code}-hc`, `Test line ${t} hard-coat bath`, { role: 'hard-coat' });
  const speedId = await channel(pool, tankId, dev, 'withdrawal-speed', 'withdrawal-speed', 'mm/s', 0, 10);
  const viscosityId = await channel(pool, tankId, dev, 'viscosity', 'viscosity', 'mm²/s', 0, 60);
  const windowId = await testWindow(pool, t, [id]);
  const lac = await pool.query<{ lacquer_id: number }>('select lacquer_id from process_windows where id = $1', [windowId]);
  const lot = await pool.query<{ id: number }>(
    `insert into lacquer_lots (lacquer_id, lot_code, received_on, expires_on, solids_pct) values ($1, $2, current_date - 60, current_date + 120, 30) returning id`,
    [lac.rows[0]!.lacquer_id, `LOT-${t}`],
  );
  const ch = await pool.query<{ id: number }>(
    `insert into bath_charges (tank_asset_id, lot_id, charged_at, mass_kg, pot_life_days) values ($1, $2, now() - make_interval(days => $3), 38, 30) returning id`,
    [tankId, lot.rows[0]!.id, chargedDaysAgo],
  );
  return { id, code, tankId, speedId, viscosityId, chargeId: ch.rows[0]!.id, windowId };
}

/** Insert readings (channel, epoch ms, value, quality 0). */
export async function insertReadings(pool: pg.Pool, rows: readonly { ch: number; t: number; v: number }[]): Promise<void> {
  if (rows.length === 0) return;
  await pool.query(
    `insert into readings (channel_id, ts, value, quality)
       select c, to_timestamp(t / 1000.0), v, 0 from unnest($1::int[], $2::float8[], $3::float8[]) as u(c, t, v)
     on conflict do nothing`,
    [rows.map((r) => r.ch), rows.map((r) => r.t), rows.map((r) => r.v)],
  );
}

/** A whole minute some days back (readings partitions reach 8 weeks back). */
export function minuteDaysAgo(days: number): number {
  return Math.floor((Date.now() - days * 86_400_000) / 60_000) * 60_000;
}
