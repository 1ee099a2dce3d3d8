/**
 * Live SPC in the worker: readings published over MQTT by a demo gateway form subgroups of a
 * characteristic created here; after its limits are approved, a value beyond the UCL is stored
 * as a point with the violation and raises an SPC alarm (medium priority, source `char:{id}`);
 * the next in-control point returns the alarm to normal (it stays to be acknowledged).
 */
import mqtt, { type MqttClient } from 'mqtt';
import pg from 'pg';
import { afterAll, beforeAll, describe, expect, inject, it } from 'vitest';
import { demoDevicePassword } from '../../seeds/demo-plant.ts';
import { recordLoadSubgroup } from '../../src/lib/core/spc-store.ts';
import { closeTestSequelize, testSequelize } from '../support/sequelize.ts';
import { waitFor } from '../support/ingest-harness.ts';
import { api, signIn, type Session } from '../support/http.ts';
import { TEST_DEVICE_SECRET, TEST_PASSWORD } from '../support/test-stack.ts';

let pool: pg.Pool;
let client: MqttClient;
let engineer: Session;
const tag = `${Date.now().toString(36)}${Math.floor(Math.random() * 1e4)}`;
const key = `spc-w-${tag}`.slice(0, 32);
let topic = '';
let charId = 0;

beforeAll(async () => {
  const stack = inject('stack');
  pool = new pg.Pool({ connectionString: stack.databaseUrl, max: 2 });
  engineer = await signIn('engineer');
  const { rows } = await pool.query<{ asset: number; device: number; prefix: string }>(
    `select a.id as asset, d.id as device, d.topic_prefix as prefix from assets a, devices d where a.code = 'dip-1-hc' and d.username = 'gw-dip-1'`,
  );
  const r = rows[0]!;
  await pool.query(
    `insert into channels (asset_id, device_id, key, name, kind, unit, min, max) values ($1, $2, $3, $4, 'other', 'u', 0, 100)`,
    [r.asset, r.device, key, `SPC worker test ${tag}`],
  );
  topic = `${r.prefix}/dip-1-hc/${key}`;
  client = await mqtt.connectAsync(`mqtt://127.0.0.1:${stack.mqttPort}`, {
    username: 'gw-dip-1',
    password: demoDevicePassword(TEST_DEVICE_SECRET, 'gw-dip-1'),
    protocolVersion: 4,
    clientId: `gw-dip-1-spc-test-${tag}`,
    reconnectPeriod: 0,
  });
});

afterAll(async () => {
  await client?.endAsync();
  await pool?.end();
  await closeTestSequelize();
});

const publish = (tMs: number, v: number) => client.publishAsync(topic, JSON.stringify({ t: tMs, v }), { qos: 1 });

interface PointRow {
  idx: number;
  value: number;
  violations: string[];
  limit_set_id: number | null;
}
const points = async () =>
  (
    await pool.query<PointRow>(
      `select idx, value, violations, limit_set_id from spc_points where characteristic_id = $1 order by idx`,
      [charId],
    )
  ).rows;

describe('live SPC evaluation in the ingest worker', () => {
  it('forms one point per published check', async () => {
    const channelId = (await pool.query<{ id: number }>(`select id from channels where key = $1`, [key])).rows[0]!.id;
    const created = await api('/api/v1/characteristics', {
      method: 'POST',
      session: engineer,
      json: {
        name: `SPC worker test ${tag}`,
        channelIds: [channelId],
        subgroupRule: { kind: 'per-manual-check', minSpacingMinutes: 0 },
        subgroupSize: 1,
        chart: 'imr',
        rules: ['we1'],
        unit: 'u',
        backfillDays: 0,
      },
    });
    expect(created.status, JSON.stringify(created.body)).toBe(201);
    charId = created.body.id;
    await new Promise((r) => setTimeout(r, 5_500)); // the worker re-reads its characteristics every 5 s
    const start = Date.now() - 30_000;
    // A steady process around 10 u (hand-made values).
    for (let i = 0; i < 25; i++) await publish(start + i * 1000, 10 + 0.1 * Math.sin(i * 1.3));
    const rows = await waitFor(
      async () => {
        const p = await points();
        return p.length === 25 ? p : null;
      },
      15_000,
      '25 points',
    );
    expect(rows.every((p) => p.limit_set_id === null && p.violations.length === 0)).toBe(true);
  });

  it('after approval, a value beyond the UCL is stored with its violation and raises an SPC alarm', async () => {
    const baseline = { baselineFrom: new Date(Date.now() - 120_000).toISOString(), baselineTo: new Date().toISOString() };
    const draft = await api(`/api/v1/characteristics/${charId}/limit-sets`, {
      method: 'POST',
      session: engineer,
      json: baseline,
    });
    expect(draft.status, JSON.stringify(draft.body)).toBe(201);
    const ok = await api(`/api/v1/characteristics/${charId}/limit-sets/${draft.body.id}/approve`, {
      method: 'POST',
      session: engineer,
      json: { password: TEST_PASSWORD, meaning: 'approved' },
    });
    expect(ok.status, JSON.stringify(ok.body)).toBe(200);
    const ucl = ok.body.ucl as number;
    expect(ucl).toBeGreaterThan(10);
    expect(ucl).toBeLessThan(11);
    await new Promise((r) => setTimeout(r, 50));
    const sentAt = Date.now();
    await publish(sentAt, 14);
    const hit = await waitFor(
      async () => {
        const p = await points();
        const last = p[p.length - 1];
        return last && last.idx === 26 ? last : null;
      },
      10_000,
      'the 26th point',
    );
    // Figure, not a test: publish → point stored (includes the 100 ms polling of this test).
    console.log(`[spc] publish → stored point with its violation: ${Date.now() - sentAt} ms`);
    expect(hit.value).toBe(14);
    expect(hit.violations).toContain('we1');
    expect(hit.limit_set_id).toBe(draft.body.id);
    const alarm = await waitFor(
      async () => {
        const { rows } = await pool.query(`select * from alarms where source_key = $1 and state <> 'normal'`, [`char:${charId}`]);
        return rows[0];
      },
      5_000,
      'the SPC alarm',
    );
    expect(alarm).toMatchObject({
      source_kind: 'spc',
      priority: 'medium',
      characteristic_id: charId,
      active: true,
      state: 'unacked',
    });
    expect(alarm.message).toContain('we1');
    expect(alarm.message).toContain('14');
    expect(alarm.limit_value).toBeCloseTo(ucl, 9);
  });

  it('the moving range after the wild value signals too; the next in-control point returns the alarm to normal, still to be acknowledged', async () => {
    await publish(Date.now(), 10);
    const mr = await waitFor(
      async () => {
        const p = await points();
        const last = p[p.length - 1];
        return last && last.idx === 27 ? last : null;
      },
      10_000,
      'the 27th point',
    );
    // |10 − 14| = 4 is far beyond the MR chart's UCL (D4·MR̄): Western Electric rule 1 on the MR chart.
    expect(mr.violations).toEqual(['dispersion-ucl']);
    await publish(Date.now() + 1, 10.02);
    const alarm = await waitFor(
      async () => {
        const { rows } = await pool.query(`select * from alarms where source_key = $1 order by id desc limit 1`, [
          `char:${charId}`,
        ]);
        return rows[0] && rows[0].active === false ? rows[0] : null;
      },
      10_000,
      'the alarm to return to normal',
    );
    expect(alarm.state).toBe('rtn-unacked');
    const p = await points();
    expect(p[p.length - 1]).toMatchObject({ idx: 28, violations: [] });
  });
});

describe('per oven load', () => {
  let ovenId = 0;
  let zoneChannels: number[] = [];
  let loadChar = 0;
  beforeAll(async () => {
    const { rows } = await pool.query<{ site: number; device: number }>(
      `select s.id as site, d.id as device from sites s, devices d where d.username = 'gw-oven-c' limit 1`,
    );
    const r = rows[0]!;
    const oven = await pool.query<{ id: number }>(
      `insert into assets (site_id, kind, code, name) values ($1, 'oven', $2, $3) returning id`,
      [r.site, `ov-${tag}`.slice(0, 32), `Test oven ${tag}`],
    );
    ovenId = oven.rows[0]!.id;
    zoneChannels = [];
    for (const z of [1, 2]) {
      const zone = await pool.query<{ id: number }>(
        `insert into assets (site_id, parent_id, kind, code, name) values ($1, $2, 'zone', $3, $4) returning id`,
        [r.site, ovenId, `ov-${tag}-z${z}`.slice(0, 32), `Test oven zone ${z}`],
      );
      const ch = await pool.query<{ id: number }>(
        `insert into channels (asset_id, device_id, key, name, kind, unit, min, max) values ($1, $2, 'air-temp', $3, 'air-temperature', '°C', -20, 300) returning id`,
        [zone.rows[0]!.id, r.device, `Test oven zone ${z} air ${tag}`],
      );
      zoneChannels.push(ch.rows[0]!.id);
    }
  });

  it('a closed load with a computed cure record becomes one point: the mean of both zones over its soak', async () => {
    const created = await api('/api/v1/characteristics', {
      method: 'POST',
      session: engineer,
      json: {
        name: `Soak test ${tag}`,
        channelIds: zoneChannels,
        subgroupRule: { kind: 'per-oven-load' },
        subgroupSize: 1,
        chart: 'imr',
        rules: ['we1'],
        unit: '°C',
        backfillDays: 0,
      },
    });
    expect(created.status, JSON.stringify(created.body)).toBe(201);
    loadChar = created.body.id;
    expect(created.body.assetId).toBe(ovenId);
    // Readings before, during and after a soak (hand-made): only the soak's four count, mean (110 + 112 + 108 + 110)/4 = 110.
    const t0 = Date.now() + 1000;
    const rows: [number, number, number][] = [
      [zoneChannels[0]!, t0, 60],
      [zoneChannels[0]!, t0 + 10_000, 110],
      [zoneChannels[1]!, t0 + 10_000, 108],
      [zoneChannels[0]!, t0 + 20_000, 112],
      [zoneChannels[1]!, t0 + 20_000, 110],
      [zoneChannels[0]!, t0 + 40_000, 70],
    ];
    await pool.query(
      `insert into readings (channel_id, ts, value, quality) select c, to_timestamp(t / 1000.0), v, 0 from unnest($1::int[], $2::float8[], $3::float8[]) as x(c, t, v)`,
      [rows.map((x) => x[0]), rows.map((x) => x[1]), rows.map((x) => x[2])],
    );
    const load = await pool.query<{ id: number }>(
      `insert into oven_loads (oven_asset_id, opened_at, closed_at, opened_by, closed_by, status, record, computed_at)
       values ($1, to_timestamp($2 / 1000.0), to_timestamp($3 / 1000.0), 'user', 'user', 'closed', $4, now()) returning id`,
      [ovenId, t0 - 1000, t0 + 45_000, JSON.stringify({ soak: { startMs: t0 + 5_000, endMs: t0 + 30_000 } })],
    );
    const loadId = load.rows[0]!.id;
    const point = await waitFor(
      async () => {
        const { rows: p } = await pool.query(
          `select value, oven_load_id, subgroup_key, n from spc_points where characteristic_id = $1`,
          [loadChar],
        );
        return p[0];
      },
      20_000,
      'the oven-load point',
    );
    expect(point.value).toBeCloseTo(110, 9);
    expect(point.oven_load_id).toBe(loadId);
    expect(point.subgroup_key).toBe(`load:${loadId}`);
  }, 30_000);

  it('recordLoadSubgroup (for the loads service) stores one point per load, once', async () => {
    const load = await pool.query<{ id: number }>(
      `insert into oven_loads (oven_asset_id, opened_at, closed_at, opened_by, closed_by, status) values ($1, now() + interval '2 minutes', now() + interval '3 minutes', 'user', 'user', 'closed') returning id`,
      [ovenId],
    );
    const loadId = load.rows[0]!.id;
    const tMs = Date.now() + 180_000;
    const p = await recordLoadSubgroup(testSequelize(), loadChar, loadId, [109, 110, 111], { tMs });
    expect(p?.value).toBeCloseTo(110, 9); // (109 + 110 + 111)/3
    expect(p?.ovenLoadId).toBe(loadId);
    expect(await recordLoadSubgroup(testSequelize(), loadChar, loadId, [109, 110, 111], { tMs: tMs + 1 })).toBeNull();
  });
});
