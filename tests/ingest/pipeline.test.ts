/**
 * The telemetry pipeline end to end on the test stack's own broker and worker: a device of
 * this test's own publishes over MQTT with its credentials; readings are stored once, the
 * rollups follow, and the API returns them; every class of bad message lands in
 * ingest_rejections with its reason while the good messages around it are stored; the broker
 * keeps devices inside their own topics and refuses connections without valid credentials.
 */
import type { MqttClient } from 'mqtt';
import pg from 'pg';
import { afterAll, beforeAll, describe, expect, inject, it } from 'vitest';
import { createPool } from '../../db/connection.ts';
import { api, signIn } from '../support/http.ts';
import { connectDevice, countReadings, createTestDevice, waitFor, within, type TestDevice } from '../support/ingest-harness.ts';

let pool: pg.Pool;
let port: number;
let dev: TestDevice;
let client: MqttClient;

beforeAll(async () => {
  const stack = inject('stack');
  pool = createPool({ url: stack.databaseUrl, max: 3 });
  port = stack.mqttPort;
  dev = await createTestDevice(
    pool,
    [
      { key: 'visc', kind: 'viscosity', unit: 'mm²/s', min: 0, max: 60 },
      { key: 'temp', kind: 'bath-temperature', unit: '°C', min: -5, max: 40 },
      { key: 'bad', kind: 'other', unit: 'rpm', min: 0, max: 6000 },
    ],
    'pipe',
  );
  client = await connectDevice(port, dev.username, dev.password);
});

afterAll(async () => {
  await client?.endAsync();
  await pool?.end();
});

async function rejectionsFor(topic: string): Promise<{ reason: string; detail: string | null; payload: string }[]> {
  const { rows } = await pool.query('select reason, detail, payload from ingest_rejections where topic = $1 order by id', [
    topic,
  ]);
  return rows;
}

describe('readings arrive and are queryable', () => {
  it('stores single samples and a batch once each, keeps rollups, and the API returns them as raw points', async () => {
    const ch = dev.channels['visc']!;
    const t0 = Math.floor(Date.now() / 60_000) * 60_000 - 10 * 60_000; // ten whole minutes ago
    // 20 single samples, one per second, values 10.0, 10.1, … 11.9 (hand-computed mean 10.95).
    for (let i = 0; i < 20; i++)
      await client.publishAsync(ch.topic, JSON.stringify({ t: t0 + i * 1000, v: 10 + i / 10 }), { qos: 1 });
    // A batch with ISO times, a quality flag and the unit spelt in ASCII.
    const batch = {
      u: 'mm2/s',
      samples: [0, 1, 2].map((k) => ({ t: new Date(t0 + 30_000 + k * 1000).toISOString(), v: 20 + k, q: k === 2 ? 1 : 0 })),
    };
    await client.publishAsync(ch.topic, JSON.stringify(batch), { qos: 1 });
    // A bare array.
    await client.publishAsync(ch.topic, JSON.stringify([{ t: t0 + 40_000, v: 30 }]), { qos: 1 });
    await waitFor(async () => (await countReadings(pool, ch.id)) === 24, 15_000, '24 readings');

    const { rows: m } = await pool.query<{ vmin: number; vmax: number; vsum: number; n: number }>(
      'select vmin, vmax, vsum, n from readings_1m where channel_id = $1 order by bucket',
      [ch.id],
    );
    // One minute bucket holds all 24: n 24; min 10.0; max 30; sum = Σ(10 + i/10, i = 0..19) + 20 + 21 + 22 + 30 (hand-computed: 219 + 93 = 312).
    expect(m).toHaveLength(1);
    expect(m[0]!.n).toBe(24);
    expect(m[0]!.vmin).toBe(10);
    expect(m[0]!.vmax).toBe(30);
    expect(m[0]!.vsum).toBeCloseTo(312, 9);
    const { rows: h } = await pool.query<{ n: number }>('select sum(n)::int as n from readings_1h where channel_id = $1', [
      ch.id,
    ]);
    expect(h[0]!.n).toBe(24);

    const viewer = await signIn('viewer');
    const r = await api(`/api/v1/channels/${ch.id}/readings?from=${t0}&to=${t0 + 60_000}`, { session: viewer });
    expect(r.status).toBe(200);
    expect(r.body.mode).toBe('raw');
    expect(r.body.unit).toBe('mm²/s');
    expect(r.body.points).toHaveLength(24);
    expect(r.body.points[0]).toEqual({ t: t0, v: 10 });
    expect(r.body.points[22]).toEqual({ t: t0 + 32_000, v: 22, q: 1 });
    expect(typeof r.body.points[0].t).toBe('number');
  });

  it('reports the worker in /api/health with a lag under a second and publishes live readings', async () => {
    const ch = dev.channels['temp']!;
    const mqtt = await import('mqtt');
    const { TEST_SERVICE_PASSWORD } = await import('../support/test-stack.ts');
    const web = await mqtt.default.connectAsync(`mqtt://127.0.0.1:${port}`, {
      username: 'svc-web',
      password: TEST_SERVICE_PASSWORD,
      clientId: `coatrail-web-pipeline-test-${process.pid}`,
      protocolVersion: 4,
    });
    const live: { channelId: number; tMs: number; value: number }[] = [];
    web.on('message', (_t, buf) => live.push(...(JSON.parse(buf.toString()) as typeof live)));
    await web.subscribeAsync('coatrail/v1/_live/readings', { qos: 0 });
    const t = Date.now() - 500;
    await client.publishAsync(ch.topic, JSON.stringify({ t, v: 12.5 }), { qos: 1 });
    await waitFor(async () => live.find((l) => l.channelId === ch.id), 10_000, 'the live reading');
    expect(live.find((l) => l.channelId === ch.id)).toEqual({ channelId: ch.id, tMs: t, value: 12.5 });
    await web.endAsync();
    // Details (lag) are for signed-in callers; anonymous callers see the status only.
    const viewer = await signIn('viewer');
    // A heartbeat written after the live reading reports the worker healthy, with its lag.
    const seenAt = Date.now();
    const health = await waitFor(
      async () => {
        const h = await api('/api/health', { session: viewer });
        return h.body.ingest.heartbeatAgeMs !== null && Date.now() - h.body.ingest.heartbeatAgeMs > seenAt ? h : null;
      },
      10_000,
      'a heartbeat after the live reading',
    );
    expect(health.body.ingest.ok).toBe(true);
    expect(health.body.ingest.lagMs).toBeGreaterThanOrEqual(0);
  });
});

describe('bad messages are refused with their reason; the good ones around them are stored', () => {
  it('records each class of bad message in ingest_rejections and never stops the stream', async () => {
    const ch = dev.channels['temp']!;
    const base = Date.now() - 120_000;
    const good = (k: number) => JSON.stringify({ t: base + k * 1000, v: 10 + k });
    const cases: { payload: string; topic?: string; reason: string }[] = [
      { payload: '{"t": 1, "v": ', reason: 'malformed-json' },
      { payload: JSON.stringify({ t: base + 50_000, value: 3 }), reason: 'schema' },
      { payload: JSON.stringify({ t: '2026-12-02 10:00:00', v: 3 }), reason: 'schema' }, // no zone
      { payload: JSON.stringify({ t: Math.floor(base / 1000), v: 3 }), reason: 'schema' }, // epoch seconds
      { payload: JSON.stringify({ t: base + 51_000, v: 3, q: 7 }), reason: 'schema' },
      { payload: JSON.stringify({ t: base + 52_000, v: 41 }), reason: 'out-of-range' }, // max 40 °C
      { payload: JSON.stringify({ t: base + 53_000, v: -5.5 }), reason: 'out-of-range' }, // min −5 °C
      { payload: JSON.stringify({ t: base + 54_000, v: 3, u: '°F' }), reason: 'wrong-unit' },
      { payload: JSON.stringify({ t: Date.now() + 3_600_000, v: 3 }), reason: 'future-timestamp' },
      { payload: JSON.stringify({ t: base + 55_000, v: 3 }), topic: dev.topic('nope'), reason: 'unknown-channel' },
      { payload: JSON.stringify({ t: base + 56_000, v: 3 }), topic: `${dev.prefix}/no-such-asset/x`, reason: 'unknown-asset' },
      { payload: JSON.stringify({ t: base + 57_000, v: 3 }), topic: `${dev.prefix}/BAD_CODE/x`, reason: 'topic' },
      { payload: good(0), reason: 'duplicate' }, // the same channel and time as the first good one
    ];
    await client.publishAsync(ch.topic, good(0), { qos: 1 });
    await waitFor(async () => (await countReadings(pool, ch.id)) >= 2, 10_000, 'the first good reading');
    for (const [k, c] of cases.entries()) {
      await client.publishAsync(c.topic ?? ch.topic, c.payload, { qos: 1 });
      await client.publishAsync(ch.topic, good(k + 1), { qos: 1 });
    }
    // 1 live reading from the previous test + 1 + one good message after each bad one.
    await waitFor(async () => (await countReadings(pool, ch.id)) === 2 + cases.length, 15_000, 'every good reading');
    const all = [
      ...(await rejectionsFor(ch.topic)),
      ...(await rejectionsFor(dev.topic('nope'))),
      ...(await rejectionsFor(`${dev.prefix}/no-such-asset/x`)),
      ...(await rejectionsFor(`${dev.prefix}/BAD_CODE/x`)),
    ];
    const reasons = all.map((r) => r.reason).sort();
    expect(reasons).toEqual(cases.map((c) => c.reason).sort());
    for (const c of cases) expect(all.some((r) => r.reason === c.reason && r.payload === c.payload)).toBe(true);
    expect(all.filter((r) => r.reason === 'out-of-range').map((r) => r.detail!.replace(/ at .*/, ''))).toEqual([
      'outside -5–40 °C: 41',
      'outside -5–40 °C: -5.5',
    ]);

    // The unknown channel of a known device is listed for an engineer.
    const engineer = await signIn('engineer');
    const unknown = await api('/api/v1/ingest/unknown-channels', { session: engineer });
    expect(unknown.status).toBe(200);
    const u = unknown.body.items.find((x: { topic: string }) => x.topic === dev.topic('nope'));
    expect(u).toMatchObject({ deviceUsername: dev.username, assetCode: dev.assetCode, channelKey: 'nope', messages: 1 });
    expect((unknown.body.items as { topic: string }[]).some((x) => x.topic === `${dev.prefix}/no-such-asset/x`)).toBe(true);

    // And the refused messages through the API, filtered by reason.
    const rj = await api('/api/v1/ingest/rejections?reason=wrong-unit&limit=50', { session: engineer });
    expect(rj.status).toBe(200);
    expect(rj.body.items.every((x: { reason: string }) => x.reason === 'wrong-unit')).toBe(true);
    expect(rj.body.items.some((x: { topic: string }) => x.topic === ch.topic)).toBe(true);
    expect((await api('/api/v1/ingest/rejections?reason=nonsense', { session: engineer })).status).toBe(400);
    expect((await api('/api/v1/ingest/rejections', { session: await signIn('operator') })).status).toBe(403);

    // The Ingest screen (engineers): the unknown topic is listed, the refused-messages island is mounted.
    const page = await api('/ingest', { session: engineer });
    expect(page.status).toBe(200);
    expect(page.body).toContain('Topics waiting for a channel');
    expect(page.body).toContain(dev.topic('nope'));
    expect(page.body).toContain('RefusedMessages');
    expect((await api('/ingest', { session: await signIn('operator') })).status).toBe(403);
    expect((await api('/ingest')).status).toBe(302);
  });

  it('stores the good samples of a batch and refuses only the bad ones, saying which', async () => {
    const ch = dev.channels['bad']!;
    const t0 = Date.now() - 60_000;
    const samples = [
      { t: t0, v: 100 },
      { t: t0 + 1000, v: 7000 }, // above 6000 rpm
      { t: t0 + 2000, v: 200 },
      { t: t0 + 2000, v: 201 }, // same time twice in one batch
      { t: t0 + 3000, v: 300 },
    ];
    await client.publishAsync(ch.topic, JSON.stringify({ samples }), { qos: 1 });
    await waitFor(async () => (await countReadings(pool, ch.id)) === 3, 10_000, 'three good samples');
    const rj = await waitFor(
      async () => {
        const r = await rejectionsFor(ch.topic);
        return r.length === 2 ? r : null;
      },
      5000,
      'two rejections',
    );
    expect(rj.map((r) => r.reason).sort()).toEqual(['duplicate', 'out-of-range']);
    expect(rj.find((r) => r.reason === 'out-of-range')!.detail).toMatch(/^1 of 5 samples outside 0–6000 rpm: 7000 at /);
  });

  it('records a device status message as online/offline with an event', async () => {
    await client.publishAsync(`${dev.prefix}/status`, 'offline', { qos: 1 });
    await waitFor(
      async () => {
        const { rows } = await pool.query<{ online: boolean }>('select online from devices where id = $1', [dev.id]);
        return rows[0]!.online === false;
      },
      10_000,
      'the device to show offline',
    );
    const { rows } = await pool.query<{ kind: string; reason: string }>(
      'select kind, reason from device_events where device_id = $1 order by id desc limit 1',
      [dev.id],
    );
    expect(rows[0]).toEqual({ kind: 'offline', reason: `status message on ${dev.prefix}/status` });
    await client.publishAsync(`${dev.prefix}/status`, JSON.stringify({ status: 'online' }), { qos: 1 });
    await waitFor(
      async () => (await pool.query('select online from devices where id = $1', [dev.id])).rows[0].online === true,
      10_000,
      'online again',
    );
  });
});

describe('device identities at the broker', () => {
  it('refuses a connection without credentials or with a wrong password', async () => {
    await expect(connectDevice(port, '', '')).rejects.toThrow();
    await expect(connectDevice(port, dev.username, 'not-the-password')).rejects.toThrow(/Not authorized|Bad username|refused/i);
    await expect(connectDevice(port, 'gw-nobody', 'whatever-password')).rejects.toThrow();
  });

  it('does not let a device publish outside its own topics or read the plant topics', async () => {
    const other = await createTestDevice(pool, [{ key: 'x', unit: '°C', min: 0, max: 100 }], 'other');
    const intruder = await connectDevice(port, dev.username, dev.password, {
      clientId: `${dev.username}-intruder-${Date.now()}`,
    });
    const closed = new Promise<void>((r) => intruder.once('close', () => r()));
    intruder.publish(other.topic('x'), JSON.stringify({ t: Date.now() - 1000, v: 50 }), { qos: 1 });
    await within(closed, 5_000, 'the broker to drop the intruder');
    // The broker refused it: nothing stored and nothing even reached the worker's dead-letter table
    // (a reading of its own, published after it, is stored: the worker has seen everything before).
    const sentinel = await connectDevice(port, other.username, other.password);
    await sentinel.publishAsync(other.topic('x'), JSON.stringify({ t: Date.now() - 500, v: 51 }), { qos: 1 });
    const stored = async () =>
      (await pool.query('select value from readings where channel_id = $1', [other.channels['x']!.id])).rows.map((r) => r.value);
    await waitFor(async () => (await stored()).includes(51), 10_000, 'the sentinel reading');
    await sentinel.endAsync();
    expect(await stored()).toEqual([51]);
    expect(await countReadings(pool, other.channels['x']!.id)).toBe(1);
    expect(await rejectionsFor(other.topic('x'))).toEqual([]);
    intruder.end(true);

    const reader = await connectDevice(port, dev.username, dev.password, { clientId: `${dev.username}-reader-${Date.now()}` });
    const granted = await reader.subscribeAsync('coatrail/v1/#', { qos: 1 }).catch((e: Error) => e);
    const refused = granted instanceof Error || granted.every((g) => g.qos === 128);
    expect(refused).toBe(true);
    reader.end(true);
  });
});
