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
  await pool.query(`insert into channels (asset_id, device_id, key, name, kind, unit, min, max) values ($1, $2, $3, $4, 'other', 'u', 0, 100)`, [
    r.asset,
    r.device,
    key,
    `SPC worker test ${tag}`,
  ]);
  topic = `${r.prefix}/dip-1-hc/${key}`;
  client = await mqtt.connectAsync(`mqtt://127.0.0.1:${stack.mqttPort}`, {
    username: 'gw-dip-1',
    password: demoDevicePassword(TEST_DEVICE_SECRET, 'gw-dip-1'),
    protocolVersion: 4,
    clientId: `spc-test-${tag}`,
    reconnectPeriod: 0,
  });
});

afterAll(async () => {
  await client?.endAsync();
  await pool?.end();
});

const publish = (tMs: number, v: number) => client.publishAsync(topic, JSON.stringify({ t: tMs, v }), { qos: 1 });

interface PointRow {
  idx: number;
  value: number;
  violations: string[];
  limit_set_id: number | null;
}
const points = async () => (await pool.query<PointRow>(`select idx, value, violations, limit_set_id from spc_points where characteristic_id = $1 order by idx`, [charId])).rows;

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
    const rows = await waitFor(async () => {
      const p = await points();
      return p.length === 25 ? p : null;
    }, 15_000, '25 points');
    expect(rows.every((p) => p.limit_set_id === null && p.violations.length === 0)).toBe(true);
  });

  it('after approval, a value beyond the UCL is stored with its violation and raises an SPC alarm', async () => {
    const baseline = { baselineFrom: new Date(Date.now() - 120_000).toISOString(), baselineTo: new Date().toISOString() };
    const draft = await api(`/api/v1/characteristics/${charId}/limit-sets`, { method: 'POST', session: engineer, json: baseline });
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
    await publish(Date.now(), 14);
    const hit = await waitFor(async () => {
      const p = await points();
      const last = p[p.length - 1];
      return last && last.idx === 26 ? last : null;
    }, 10_000, 'the 26th point');
    expect(hit.value).toBe(14);
    expect(hit.violations).toContain('we1');
    expect(hit.limit_set_id).toBe(draft.body.id);
    const alarm = await waitFor(async () => {
      const { rows } = await pool.query(`select * from alarms where source_key = $1 and state <> 'normal'`, [`char:${charId}`]);
      return rows[0];
    }, 5_000, 'the SPC alarm');
    expect(alarm).toMatchObject({ source_kind: 'spc', priority: 'medium', characteristic_id: charId, active: true, state: 'unacked' });
    expect(alarm.message).toContain('we1');
    expect(alarm.message).toContain('14');
    expect(alarm.limit_value).toBeCloseTo(ucl, 9);
  });

  it('the moving range after the wild value signals too; the next in-control point returns the alarm to normal, still to be acknowledged', async () => {
    await publish(Date.now(), 10);
    const mr = await waitFor(async () => {
      const p = await points();
      const last = p[p.length - 1];
      return last && last.idx === 27 ? last : null;
    }, 10_000, 'the 27th point');
    // |10 − 14| = 4 is far beyond the MR chart's UCL (D4·MR̄): Western Electric rule 1 on the MR chart.
    expect(mr.violations).toEqual(['dispersion-ucl']);
    await publish(Date.now() + 1, 10.02);
    const alarm = await waitFor(async () => {
      const { rows } = await pool.query(`select * from alarms where source_key = $1 order by id desc limit 1`, [`char:${charId}`]);
      return rows[0] && rows[0].active === false ? rows[0] : null;
    }, 10_000, 'the alarm to return to normal');
    expect(alarm.state).toBe('rtn-unacked');
    const p = await points();
    expect(p[p.length - 1]).toMatchObject({ idx: 28, violations: [] });
  });
});
