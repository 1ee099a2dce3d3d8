/**
 * Oven loads through the API: an operator opens and closes loads on a throwaway oven whose
 * readings are constructed here and inserted into the test database; the cure record computed
 * on close is checked against hand-computed values, the Arrhenius sum against the ASTM C1074
 * equivalent-age form written out independently below, and each failing verdict raises the cure
 * alarm (source `load:{id}`) with the right priority.
 *
 * Window of the constructed profiles (TEST_CURE_LIMITS, hand-chosen): minimum 100 °C, 150
 * equivalent minutes at 110 °C, Ea 75 kJ/mol, parts ≤ 125 °C, ramps ≤ 10 °C/min, gap > 120 s.
 */
import mqtt from 'mqtt';
import type pg from 'pg';
import { afterAll, beforeAll, describe, expect, inject, it } from 'vitest';
import { channelTopic } from '../../src/lib/shared/topics.ts';
import type { StoredCureRecord } from '../../src/lib/shared/jobs.ts';
import { closeTestPool, testPool } from '../support/accounts.ts';
import { api, signIn, type Session } from '../support/http.ts';
import {
  createTestOven,
  insertReadings,
  minuteDaysAgo,
  tag,
  TEST_CURE_LIMITS,
  type TestOven,
} from '../support/trace-fixtures.ts';
import { waitFor } from '../support/ingest-harness.ts';

const MIN = 60_000;
let pool: pg.Pool;
let oven: TestOven;
let operator: Session;
let quality: Session;

/**
 * ASTM C1074 (maturity method) equivalent age, written out here independently of the product:
 * t_e = Σ exp(−Q·(1/T_a − 1/T_s))·Δt, Q = E/R (K), T_a the average temperature of the interval
 * and T_s the specified (reference) temperature, both in kelvin. R = 8.314462618 J/(mol·K) (CODATA).
 */
function c1074EquivalentAge(
  profile: { minutes: number; tempC: number }[],
  activationEnergyJMol: number,
  referenceC: number,
  datumC = -273.15,
): number {
  const Q = activationEnergyJMol / 8.314462618;
  const Ts = referenceC + 273.15;
  let te = 0;
  for (let i = 1; i < profile.length; i++) {
    const a = profile[i - 1]!;
    const b = profile[i]!;
    // Datum temperature (the window's minimum cure temperature): only the part of an interval at
    // or above it counts, at the mean of its temperatures there (crossing interpolated linearly).
    const hi = Math.max(a.tempC, b.tempC);
    const lo = Math.min(a.tempC, b.tempC);
    if (hi <= datumC && !(lo >= datumC)) continue;
    const from = Math.max(lo, datumC);
    const share = hi === lo ? 1 : (hi - from) / (hi - lo);
    const Ta = (from + hi) / 2 + 273.15;
    te += Math.exp(-Q * (1 / Ta - 1 / Ts)) * (b.minutes - a.minutes) * share;
  }
  return te;
}

/** The coldest zone of the constructed loads: 90 → 110 °C in 10 min, `plateau` min at 110 °C, back to 90 °C in 10 min. */
function coldAt(minute: number, plateau: number): number {
  if (minute <= 10) return 90 + 2 * minute;
  if (minute <= 10 + plateau) return 110;
  return 110 - 2 * (minute - 10 - plateau);
}

interface Built {
  openedAt: number;
  closedAt: number;
  profile: { minutes: number; tempC: number }[];
}

/**
 * Readings every minute for both zones (zone 1 = coldest + 2 °C), the setpoint at 110 °C during
 * the load and 25 °C after it, the door closed at the start.
 */
async function build(
  startMs: number,
  plateau: number,
  opts: { skip?: [number, number]; spikeAt?: [number, number]; door?: [number, number] } = {},
): Promise<Built> {
  const total = 20 + plateau;
  const rows: { ch: number; t: number; v: number }[] = [];
  const profile: Built['profile'] = [];
  for (let m = 0; m <= total; m++) {
    if (opts.skip && m > opts.skip[0] && m < opts.skip[1]) continue;
    const t = startMs + m * MIN;
    const cold = coldAt(m, plateau);
    const hot = opts.spikeAt && opts.spikeAt[0] === m ? opts.spikeAt[1] : cold + 2;
    rows.push({ ch: oven.zoneIds[1], t, v: cold }, { ch: oven.zoneIds[0], t, v: hot });
    profile.push({ minutes: m, tempC: cold });
  }
  rows.push(
    { ch: oven.setpointId, t: startMs - MIN, v: 25 },
    { ch: oven.setpointId, t: startMs, v: 110 },
    { ch: oven.setpointId, t: startMs + (total - 10) * MIN, v: 25 },
  );
  rows.push({ ch: oven.doorId, t: startMs - MIN, v: 0 });
  if (opts.door)
    rows.push(
      { ch: oven.doorId, t: startMs + opts.door[0] * MIN, v: 1 },
      { ch: oven.doorId, t: startMs + opts.door[1] * MIN, v: 0 },
    );
  await insertReadings(pool, rows);
  return { openedAt: startMs, closedAt: startMs + total * MIN, profile };
}

async function runLoad(b: Built): Promise<{ id: number; record: StoredCureRecord; verdict: string }> {
  const open = await api('/api/v1/loads', {
    method: 'POST',
    session: operator,
    json: { ovenAssetId: oven.id, openedAt: new Date(b.openedAt).toISOString() },
  });
  expect(open.status, JSON.stringify(open.body)).toBe(201);
  const close = await api(`/api/v1/loads/${open.body.id}/close`, {
    method: 'POST',
    session: operator,
    json: { closedAt: new Date(b.closedAt).toISOString() },
  });
  expect(close.status, JSON.stringify(close.body)).toBe(200);
  return { id: open.body.id, record: close.body.record, verdict: close.body.verdict };
}

async function cureAlarm(loadId: number) {
  const { rows } = await pool.query<{
    id: number;
    source_kind: string;
    priority: string;
    state: string;
    load_id: number;
    message: string;
  }>(`select id, source_kind, priority, state, load_id, message from alarms where source_key = $1`, [`load:${loadId}`]);
  return rows;
}

beforeAll(async () => {
  pool = testPool();
  oven = await createTestOven(pool);
  operator = await signIn('operator');
  quality = await signIn('quality');
});

afterAll(async () => {
  await closeTestPool();
});

describe('cure record from stored readings', () => {
  it('a complete load: hand-computed time at temperature, peak, door, and the C1074 equivalent age', async () => {
    const b = await build(minuteDaysAgo(4), 150, { spikeAt: [80, 115], door: [50, 52] });
    const { id, record, verdict } = await runLoad(b);
    expect(verdict).toBe('complete');
    // Hand-computed: the coldest zone crosses 100 °C at minute 5 on the way up and minute 165 on
    // the way down (linear between readings) → 160.0 min at or above 100 °C.
    expect(record.minutesAtOrAboveMin).toBeCloseTo(160, 6);
    // Hand-computed: zone 1 reads 115 °C at minute 80, the highest reading of the load.
    expect(record.peakC).toBe(115);
    expect(record.peakAtMs).toBe(b.openedAt + 80 * MIN);
    // Door opened at minute 50 for 2 minutes (hand-computed: 120 s), during the soak.
    expect(record.door.openings).toBe(1);
    expect(record.door.openSeconds).toBe(120);
    expect(record.door.openingsDuringSoak).toBe(1);
    expect(record.gaps).toEqual([]);
    // ASTM C1074 equivalent-age form over the coldest zone, Ea 75 kJ/mol, T_s = 110 °C.
    const te = c1074EquivalentAge(b.profile, 75_000, 110, 100);
    expect(record.equivalentMinutes).toBeCloseTo(te, 9);
    // Hand-computed value of the same sum: 150 min at exactly 110 °C count 150, plus the five
    // 1-minute ramp intervals up at or above the 100 °C minimum (interval means 101, 103 … 109 °C;
    // the ramp below 100 °C counts nothing) and five down, each side
    // Σ exp(−(75000/8.314462618)(1/T̄ − 1/383.15)) = 3.716065 → 157.43213 min.
    expect(record.equivalentMinutes).toBeCloseTo(157.43212941, 6);
    // One such factor by hand: the interval at 100 °C counts exp(−9020.4302·(1/373.15 − 1/383.15)) = 0.532102 of a minute.
    expect(
      c1074EquivalentAge(
        [
          { minutes: 0, tempC: 100 },
          { minutes: 1, tempC: 100 },
        ],
        75_000,
        110,
      ),
    ).toBeCloseTo(0.5321016, 6);
    expect(record.window?.minEquivalentMinutes).toBe(150);
    expect(await cureAlarm(id)).toEqual([]);
    // The list shows it with its verdict and figures.
    const list = await api(`/api/v1/loads?oven=${oven.code}`, { session: quality });
    expect(list.status).toBe(200);
    const item = list.body.find((x: { id: number }) => x.id === id);
    expect(item).toMatchObject({ verdict: 'complete', status: 'closed', ovenCode: oven.code, doorOpenings: 1, gaps: 0 });
  });

  it('a short soak is under-cured and raises a high-priority cure alarm', async () => {
    const b = await build(minuteDaysAgo(3.5), 60);
    const { id, record, verdict } = await runLoad(b);
    expect(verdict).toBe('under-cured');
    // Hand-computed: 60 min at 110 °C + 2 × 3.716065 for the ramps above 100 °C = 67.43213 < 150.
    expect(record.equivalentMinutes).toBeCloseTo(67.43212941, 6);
    expect(record.equivalentMinutes).toBeCloseTo(c1074EquivalentAge(b.profile, 75_000, 110, 100), 9);
    expect(record.reasons[0]).toContain('67.4 equivalent minutes');
    const alarms = await cureAlarm(id);
    expect(alarms).toHaveLength(1);
    expect(alarms[0]).toMatchObject({ source_kind: 'cure', priority: 'high', state: 'unacked', load_id: id });
    expect(alarms[0]!.message).toMatch(/^Under-cured/);
    const detail = await api(`/api/v1/loads/${id}`, { session: quality });
    expect(detail.body.alarms.map((a: { id: number }) => a.id)).toContain(alarms[0]!.id);
  });

  it('a 10-minute hole in the data during the soak makes the cure unverifiable (high alarm)', async () => {
    const b = await build(minuteDaysAgo(3), 150, { skip: [40, 50] });
    const { id, record, verdict } = await runLoad(b);
    expect(verdict).toBe('unverifiable');
    // Hand-computed: readings at minutes 40 and 50, nothing between → one gap of 600 s.
    expect(record.gaps).toEqual([{ startMs: b.openedAt + 40 * MIN, endMs: b.openedAt + 50 * MIN, durationS: 600 }]);
    expect(record.reasons[0]).toContain('No oven data for 10.0 min');
    const alarms = await cureAlarm(id);
    expect(alarms[0]).toMatchObject({ source_kind: 'cure', priority: 'high' });
  });

  it('a reading above the highest part temperature is over-temperature (medium alarm)', async () => {
    const b = await build(minuteDaysAgo(2.5), 150, { spikeAt: [90, 131.5] });
    const { id, record, verdict } = await runLoad(b);
    expect(verdict).toBe('over-temperature');
    expect(record.peakC).toBe(131.5);
    const alarms = await cureAlarm(id);
    expect(alarms[0]).toMatchObject({ source_kind: 'cure', priority: 'medium' });
  });

  it('one zone dropping out is not a gap: the other zone stands for the part', async () => {
    const start = minuteDaysAgo(2);
    const b = await build(start, 150);
    // Remove zone 2 (the colder) for 20 minutes of the soak: zone 1 (coldest + 2 °C) stands in.
    await pool.query(
      `delete from readings where channel_id = $1 and ts > to_timestamp($2 / 1000.0) and ts < to_timestamp($3 / 1000.0)`,
      [oven.zoneIds[1], start + 60 * MIN, start + 80 * MIN],
    );
    const { record, verdict } = await runLoad(b);
    expect(verdict).toBe('complete');
    expect(record.gaps).toEqual([]);
    // Hand-computed: zone 2's last reading (minute 60) is held for 1.5 × its 60 s spacing = 90 s,
    // so it still stands at minute 61; from minute 62 to 79 only zone 1 (112 °C) reports. The 17
    // intervals 62…79 then run at 112 °C instead of 110 °C, and the two at the edges (61–62 and
    // 79–80) at a mean of 111 °C.
    const f = (c: number) => Math.exp(-(75_000 / 8.314462618) * (1 / (c + 273.15) - 1 / 383.15));
    expect(record.equivalentMinutes).toBeCloseTo(157.43212941 + 17 * (f(112) - 1) + 2 * (f(111) - 1), 6);
  });

  it('a load cannot be closed before it opened, nor twice; a second open load on the same oven is refused', async () => {
    const t = minuteDaysAgo(1.5);
    const open = await api('/api/v1/loads', {
      method: 'POST',
      session: operator,
      json: { ovenAssetId: oven.id, openedAt: new Date(t).toISOString() },
    });
    expect(open.status).toBe(201);
    const again = await api('/api/v1/loads', { method: 'POST', session: operator, json: { ovenAssetId: oven.id } });
    expect(again.status).toBe(409);
    expect(again.headers.get('content-type')).toContain('application/problem+json');
    const early = await api(`/api/v1/loads/${open.body.id}/close`, {
      method: 'POST',
      session: operator,
      json: { closedAt: new Date(t - MIN).toISOString() },
    });
    expect(early.status).toBe(400);
    expect(early.body.errors[0].path).toBe('closedAt');
    const ok = await api(`/api/v1/loads/${open.body.id}/close`, {
      method: 'POST',
      session: operator,
      json: { closedAt: new Date(t + 30 * MIN).toISOString() },
    });
    expect(ok.status).toBe(200);
    const twice = await api(`/api/v1/loads/${open.body.id}/close`, { method: 'POST', session: operator, json: {} });
    expect(twice.status).toBe(409);
    const bad = await api('/api/v1/loads', { method: 'POST', session: operator, json: { ovenAssetId: 'oven-b' } });
    expect(bad.status).toBe(400);
    expect(bad.body.errors[0].path).toBe('ovenAssetId');
  });

  it('recomputing a record (quality) keeps the verdict and is audited', async () => {
    const b = await build(minuteDaysAgo(1), 60);
    const { id } = await runLoad(b);
    const r = await api(`/api/v1/loads/${id}/recompute`, { method: 'POST', session: quality, json: {} });
    expect(r.status).toBe(200);
    expect(r.body.verdict).toBe('under-cured');
    const { rows } = await pool.query(
      `select action, before, after from audit_log where entity = 'oven_load' and entity_id = $1 and action = 'load.recompute'`,
      [String(id)],
    );
    expect(rows).toHaveLength(1);
    // Still one open alarm for the source (the raise updates it, it does not duplicate it).
    expect(await cureAlarm(id)).toHaveLength(1);
  });
});

describe('the ingest worker opens and closes loads by itself', () => {
  it('a setpoint rise of ≥ 50 °C opens a load; the setpoint falling back and the oven cooling closes it', async () => {
    const password = `pw-${tag()}`;
    const o = await createTestOven(pool, TEST_CURE_LIMITS, password);
    const client = mqtt.connect(`mqtt://127.0.0.1:${inject('stack').mqttPort}`, {
      username: o.device.username,
      password,
      clientId: `${o.device.username}-loads-test`,
      protocolVersion: 4,
      reconnectPeriod: 0,
      connectTimeout: 5000,
    });
    await new Promise<void>((resolve, reject) => {
      client.once('connect', () => resolve());
      client.once('error', reject);
    });
    const asset = { setpoint: o.code, zone1: `${o.code}-z1`, zone2: `${o.code}-z2` };
    const send = (a: string, key: string, t: number, v: number) =>
      client.publishAsync(channelTopic(o.device.prefix, a, key), JSON.stringify({ t, v }), { qos: 1 });
    const start = minuteDaysAgo(0.5);
    // Constructed cycle (minutes from the setpoint step): standby 25 °C; at 0 the setpoint steps to
    // 110 °C; the coldest zone heats 30 → 110 °C at 4 °C/min, soaks to minute 180, the setpoint
    // steps back to 25 °C at 180 and the zones cool at 5 °C/min (zone 1 = coldest + 2 °C).
    const cold = (m: number) => (m < 0 ? 30 : m <= 20 ? 30 + 4 * m : m <= 180 ? 110 : 110 - 5 * (m - 180));
    try {
      for (let m = -5; m <= 195; m++) {
        const t = start + m * MIN;
        if (m === -5 || m === 0 || m === 180) await send(asset.setpoint, 'setpoint', t, m >= 0 && m < 180 ? 110 : 25);
        await send(asset.zone2, 'air-temp', t, cold(m));
        await send(asset.zone1, 'air-temp', t, cold(m) + 2);
      }
    } finally {
      await client.endAsync();
    }
    const load = await waitFor(
      async () => {
        const r = await pool.query<{
          id: number;
          opened_at: Date;
          closed_at: Date | null;
          opened_by: string;
          closed_by: string | null;
          verdict: string | null;
        }>(`select id, opened_at, closed_at, opened_by, closed_by, verdict from oven_loads where oven_asset_id = $1`, [o.id]);
        return r.rows[0]?.verdict ? r.rows[0] : null;
      },
      20_000,
      'the worker to close the load with a verdict',
    );
    // Opened at the setpoint step (minute 0); closed at the first reading after the fall with every
    // zone at or below 60 °C: zone 1 = 112 − 5k ≤ 60 → k = 11, minute 191 (hand-computed).
    expect(load.opened_by).toBe('auto');
    expect(load.opened_at.getTime()).toBe(start);
    expect(load.closed_by).toBe('auto');
    expect(load.closed_at!.getTime()).toBe(start + 191 * MIN);
    // 160 min at 110 °C plus the ramps: complete against 150 equivalent minutes.
    expect(load.verdict).toBe('complete');
  }, 60_000);
});
