/**
 * GET /api/v1/floor (the Floor's snapshot) and GET /api/v1/channels/{id}/annotations (window
 * stretches and plant events for a channel's trend).
 *
 * The annotations are checked on a constructed morning far in the past (3 March 2003, 10:00–
 * 12:00 UTC), where nothing else in the test database lives: a test recipe assigned to dip line
 * 2 from 11:00 to 11:30, a solvent addition and a filter change on its hard-coat bath, door
 * readings, an oven load and an alarm on oven C. Every expected event is hand-derived from
 * those rows.
 */
import pg from 'pg';
import { afterAll, beforeAll, describe, expect, inject, it } from 'vitest';
import { createPool } from '../../db/connection.ts';
import { windowInForce } from '../../src/lib/core/window-store.ts';
import type { FloorSnapshot } from '../../src/lib/shared/floor.ts';
import type { AnnotationsResponse } from '../../src/lib/shared/trend.ts';
import { api, signIn, type Session } from '../support/http.ts';

const T0 = Date.UTC(2003, 2, 3, 10, 0, 0);
const MIN = 60_000;
const at = (minutes: number, seconds = 0) => new Date(T0 + minutes * MIN + seconds * 1000);
let pool: pg.Pool;
let viewer: Session;
const ids: Record<string, number> = {};
const made: { table: string; id: number }[] = [];
const DEMO_TILES = ['dip-1', 'dip-2', 'oven-a', 'oven-b', 'oven-c', 'uv-1'];

async function one<T>(sql: string, params: unknown[]): Promise<T> {
  const { rows } = await pool.query(sql, params);
  return rows[0] as T;
}

beforeAll(async () => {
  pool = createPool({ url: inject('stack').databaseUrl, max: 2 });
  viewer = await signIn('viewer');
  for (const code of ['dip-2', 'dip-2-hc', 'oven-c'])
    ids[code] = (await one<{ id: number }>('select id from assets where code = $1', [code])).id;
  const ch = async (asset: string, key: string) =>
    (
      await one<{ id: number }>(
        'select c.id from channels c join assets a on a.id = c.asset_id where a.code = $1 and c.key = $2',
        [asset, key],
      )
    ).id;
  ids['visc'] = await ch('dip-2-hc', 'viscosity');
  ids['door'] = await ch('oven-c', 'door');
  ids['air'] = await ch('oven-c-z1', 'air-temp');

  // A test recipe (its own lacquer, so no other window is touched), effective since 2003-01-01.
  const suffix = `${process.pid}-${Date.now()}`;
  const lac = await one<{ id: number }>(
    `insert into lacquers (name, maker, solids_pct, density_g_cm3, activation_energy_kj_mol) values ($1, 'Test maker', 25, 0.95, 75) returning id`,
    [`Floor test lacquer ${suffix}`],
  );
  made.push({ table: 'lacquers', id: lac.id });
  const mat = await one<{ id: number }>(`select id from materials order by id limit 1`, []);
  const limits = {
    viscosityMm2S: { min: 8, max: 11, target: 9.5 },
    minCureTempC: 100,
    minEquivalentMinutes: 120,
    referenceC: 110,
    activationEnergyKJMol: 75,
    maxPartTempC: 125,
  };
  const w = await one<{ id: number }>(
    `insert into process_windows (lacquer_id, material_id, version, name, status, limits, approved_signature, effective_from)
     values ($1, $2, 1, 'Floor test window', 'effective', $3::jsonb, '{"meaning":"test"}'::jsonb, '2003-01-01T00:00:00Z') returning id`,
    [lac.id, mat.id, JSON.stringify(limits)],
  );
  ids['window'] = w.id;
  made.push({ table: 'process_windows', id: w.id });
  made.push({
    table: 'window_assignments',
    id: (
      await one<{ id: number }>(
        `insert into window_assignments (asset_id, window_id, valid_from, valid_to, note) values ($1, $2, $3, $4, 'floor test') returning id`,
        [ids['dip-2'], w.id, at(60), at(90)],
      )
    ).id,
  });

  made.push({
    table: 'bath_additions',
    id: (
      await one<{ id: number }>(
        `insert into bath_additions (tank_asset_id, at, by_label, kind, mass_kg) values ($1, $2, 'Test Person', 'solvent', 1.25) returning id`,
        [ids['dip-2-hc'], at(15)],
      )
    ).id,
  });
  made.push({
    table: 'filter_changes',
    id: (
      await one<{ id: number }>(
        `insert into filter_changes (tank_asset_id, at, by_label, filter_type, rating_um) values ($1, $2, 'Test Person', 'Bag filter', 5) returning id`,
        [ids['dip-2-hc'], at(45)],
      )
    ).id,
  });
  const load = await one<{ id: number }>(
    `insert into oven_loads (oven_asset_id, opened_at, closed_at, opened_by, closed_by, status, verdict) values ($1, $2, $3, 'auto', 'auto', 'closed', 'complete') returning id`,
    [ids['oven-c'], at(30), at(90)],
  );
  ids['load'] = load.id;
  made.push({ table: 'oven_loads', id: load.id });
  made.push({
    table: 'alarms',
    id: (
      await one<{ id: number }>(
        `insert into alarms (source_kind, source_key, source_label, asset_id, channel_id, priority, message, state, active, raised_at, last_activated_at, cleared_at)
         values ('limit', $1, 'Oven C zone 1 air', null, $2, 'high', 'Floor test: zone 1 above 125 °C', 'normal', false, $3, $3, $4) returning id`,
        [`floor-test:${suffix}`, ids['air'], at(40), at(41)],
      )
    ).id,
  });
  await pool.query('select ensure_reading_partitions($1, $2)', [at(-60), at(180)]);
  // Door: closed 10:10, open 10:20:00, closed 10:22:00 (2 min), open again 11:00 and still open at 12:00.
  await pool.query(
    `insert into readings (channel_id, ts, value) values ($1, $2, 0), ($1, $3, 1), ($1, $4, 0), ($1, $5, 1) on conflict do nothing`,
    [ids['door'], at(10), at(20), at(22), at(60)],
  );
});

afterAll(async () => {
  if (pool) {
    await pool.query('delete from readings where channel_id = $1 and ts >= $2 and ts < $3', [ids['door'], at(-60), at(180)]);
    for (const m of [...made].reverse()) await pool.query(`delete from ${m.table} where id = $1`, [m.id]);
    await pool.end();
  }
});

describe('GET /api/v1/floor', () => {
  it('answers every role with every line, oven and coater, their channels and the window in force', async () => {
    for (const role of ['viewer', 'operator', 'engineer', 'quality', 'admin']) {
      const r = await api('/api/v1/floor', { session: await signIn(role) });
      expect(r.status, role).toBe(200);
      const snap = r.body as FloorSnapshot;
      expect(snap.timeZone).toBe('Europe/London'); // sites.time_zone of the demo plant
      // Lines, then ovens, then coaters (other tests may add assets of their own).
      expect(snap.tiles.map((t) => t.code).filter((c) => DEMO_TILES.includes(c))).toEqual(DEMO_TILES);
    }
    const snap = (await api('/api/v1/floor', { session: viewer })).body as FloorSnapshot;
    const dip1 = snap.tiles.find((t) => t.code === 'dip-1')!;
    const visc = dip1.channels.find((c) => c.kind === 'viscosity')!;
    expect(visc.shortName).toBe('Bath viscosity');
    // The band is the viscosity field of the window in force for the bath now (window store).
    const w = await windowInForce(pool, visc.assetId, Date.now());
    expect(visc.window).toMatchObject({
      min: w!.limits.viscosityMm2S!.min,
      max: w!.limits.viscosityMm2S!.max,
      lowApplies: 'always',
    });
    expect(visc.windowName).toBe(`${w!.name} v${w!.version}`);
    // Door channels have no window; the oven's air has the cure band with the low limit in soak only.
    const ovenC = snap.tiles.find((t) => t.code === 'oven-c')!;
    expect(ovenC.channels.find((c) => c.kind === 'door')!.window).toBeNull();
    expect(ovenC.channels.find((c) => c.kind === 'air-temperature')!.window?.lowApplies).toBe('soak');
    expect(snap.devices.map((d) => d.username)).toEqual(expect.arrayContaining(['gw-dip-1', 'gw-oven-a', 'gw-uv-1']));
  });

  it('shows the latest stored reading of a channel', async () => {
    const snap0 = (await api('/api/v1/floor', { session: viewer })).body as FloorSnapshot;
    const spin = snap0.tiles.find((t) => t.code === 'uv-1')!.channels.find((c) => c.kind === 'spin-speed')!;
    const t = Date.now() + 5_000; // newer than anything the other tests store
    await pool.query('select ensure_reading_partitions($1, $2)', [new Date(t - 86_400_000), new Date(t + 86_400_000)]);
    await pool.query('insert into readings (channel_id, ts, value) values ($1, $2, 1234.5)', [spin.id, new Date(t)]);
    const snap = (await api('/api/v1/floor', { session: viewer })).body as FloorSnapshot;
    const latest = snap.tiles.find((t) => t.code === 'uv-1')!.channels.find((c) => c.id === spin.id)!.latest;
    expect(latest).toEqual({ tMs: t, value: 1234.5 });
    await pool.query('delete from readings where channel_id = $1 and ts = $2', [spin.id, new Date(t)]);
  });

  it('refuses anonymous callers with a problem', async () => {
    const r = await api('/api/v1/floor');
    expect(r.status).toBe(401);
    expect(r.headers.get('content-type')).toContain('application/problem+json');
  });
});

describe('GET /api/v1/channels/{id}/annotations', () => {
  const q = `from=${T0}&to=${T0 + 120 * MIN}`;

  it('gives the window stretches (none, the test window 11:00–11:30, none) for the dip-line 2 bath', async () => {
    const r = await api(`/api/v1/channels/${ids['visc']}/annotations?${q}`, { session: viewer });
    expect(r.status).toBe(200);
    const a = r.body as AnnotationsResponse;
    expect(a.windows.map((s) => [s.fromMs, s.toMs, s.window?.id ?? null])).toEqual([
      [T0, T0 + 60 * MIN, null],
      [T0 + 60 * MIN, T0 + 90 * MIN, ids['window']],
      [T0 + 90 * MIN, T0 + 120 * MIN, null],
    ]);
    expect(a.windows[1]!.window?.limits.viscosityMm2S).toEqual({ min: 8, max: 11, target: 9.5 });
  });

  it('lists the bath events of the line for a bath channel (and no oven events)', async () => {
    const a = (await api(`/api/v1/channels/${ids['visc']}/annotations?${q}`, { session: viewer })).body as AnnotationsResponse;
    expect(a.events).toEqual([
      {
        tMs: T0 + 15 * MIN,
        kind: 'solvent-addition',
        label: 'Solvent 1.25 kg added to Line 2 hard-coat bath',
        detail: 'by Test Person',
      },
      {
        tMs: T0 + 45 * MIN,
        kind: 'filter-change',
        label: 'Filter changed on Line 2 hard-coat bath: Bag filter 5 µm',
        detail: 'by Test Person',
      },
    ]);
    expect(a.truncated).toBe(false);
  });

  it('lists door openings, load start/end and the channel alarm for an oven zone', async () => {
    const a = (await api(`/api/v1/channels/${ids['air']}/annotations?${q}`, { session: viewer })).body as AnnotationsResponse;
    expect(a.events.map((e) => [e.tMs, e.kind, e.label, e.priority ?? null])).toEqual([
      [T0 + 20 * MIN, 'door-open', 'Door opened for 2 min', null],
      [T0 + 30 * MIN, 'load-start', `Load ${ids['load']} opened (detected from the setpoint)`, null],
      [T0 + 40 * MIN, 'alarm', 'Floor test: zone 1 above 125 °C', 'high'],
      [T0 + 60 * MIN, 'door-open', 'Door opened (still open at the end of the view)', null],
      [T0 + 90 * MIN, 'load-end', `Load ${ids['load']} closed — cure complete`, null],
    ]);
  });

  it('over more than two days reads door openings from the minute rollup (runs of open minutes)', async () => {
    // Minute buckets of the door: open (vmax 1) at 10:20 and 10:21, closed at 10:22, open at 11:00.
    await pool.query(
      `insert into readings_1m (channel_id, bucket, vmin, vmax, vsum, n) values ($1, $2, 0, 1, 30, 60), ($1, $3, 1, 1, 60, 60), ($1, $4, 0, 0, 0, 60), ($1, $5, 0, 1, 12, 60)
       on conflict do nothing`,
      [ids['door'], at(20), at(21), at(22), at(60)],
    );
    try {
      const from = T0 - 2 * 86_400_000;
      const a = (
        await api(`/api/v1/channels/${ids['air']}/annotations?from=${from}&to=${T0 + 2 * 86_400_000}`, { session: viewer })
      ).body as AnnotationsResponse;
      expect(a.events.filter((e) => e.kind === 'door-open').map((e) => [e.tMs, e.label])).toEqual([
        [T0 + 20 * MIN, 'Door open in 2 consecutive minutes (minute resolution)'],
        [T0 + 60 * MIN, 'Door open within one minute (minute resolution)'],
      ]);
    } finally {
      await pool.query('delete from readings_1m where channel_id = $1 and bucket >= $2 and bucket < $3', [
        ids['door'],
        at(0),
        at(120),
      ]);
    }
  });

  it('answers 400 with a field path for a reversed range, 404 for an unknown channel', async () => {
    const bad = await api(`/api/v1/channels/${ids['air']}/annotations?from=${T0 + MIN}&to=${T0}`, { session: viewer });
    expect(bad.status).toBe(400);
    expect(bad.body.errors[0].path).toBe('from');
    const none = await api(`/api/v1/channels/99999999/annotations?${q}`, { session: viewer });
    expect(none.status).toBe(404);
  });
});
