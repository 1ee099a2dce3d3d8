/**
 * A broker restart (issue 4): the web server's live link and the demo-plant simulator reconnect
 * by themselves (the worker's reconnect is in resilience.test.ts). Everything here runs on its
 * own loopback broker; the simulator's messages are watched by a service-account subscriber, not
 * stored, so the test database's demo channels are not touched.
 */
import fs from 'node:fs';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, inject, it } from 'vitest';
import { freePort } from '../../db/pg-control.ts';
import { root, TEST_DEVICE_SECRET } from '../support/test-stack.ts';
import mqtt, { type MqttClient } from 'mqtt';
import { SERVICE_PASSWORD, startChild, startOwnBroker, waitFor, type Child, type OwnBroker } from '../support/ingest-harness.ts';

const dir = path.join(root, 'var', `test-reconnect-${process.pid}`);
let dbUrl: string;
let broker: OwnBroker;
let watcher: MqttClient;
const heard: number[] = [];
let web: Child;
let sim: Child;
let webUrl: string;

async function brokerOk(): Promise<boolean> {
  const r = await fetch(`${webUrl}/api/health`).catch(() => null);
  if (!r) return false;
  const body = (await r.json()) as { broker: { ok: boolean } };
  return body.broker.ok;
}

const heardSince = async (tMs: number) => heard.filter((t) => t > tMs).length;

beforeAll(async () => {
  dbUrl = inject('stack').databaseUrl;
  broker = await startOwnBroker(dbUrl, dir);
  const mqttUrl = `mqtt://127.0.0.1:${broker.port}`;
  watcher = mqtt.connect(mqttUrl, {
    username: 'svc-ingest',
    password: SERVICE_PASSWORD,
    clientId: `coatrail-ingest-watcher-${process.pid}`,
    protocolVersion: 4,
    reconnectPeriod: 300,
    clean: true,
  });
  watcher.on('connect', () => watcher.subscribe('coatrail/v1/+/gw-uv-1/uv-1/irradiance', { qos: 0 }));
  watcher.on('message', () => heard.push(Date.now()));
  const port = await freePort();
  webUrl = `http://127.0.0.1:${port}`;
  web = startChild(
    'web',
    'dist/server/entry.mjs',
    {
      ...process.env,
      DATABASE_URL: dbUrl,
      MQTT_URL: mqttUrl,
      MQTT_SERVICE_PASSWORD: SERVICE_PASSWORD,
      HOST: '127.0.0.1',
      PORT: String(port),
      PUBLIC_ORIGIN: webUrl,
    },
    dir,
  );
  sim = startChild(
    'simulator',
    'seeds/simulator.ts',
    { ...process.env, MQTT_URL: mqttUrl, SIM_DEVICE_SECRET: TEST_DEVICE_SECRET },
    dir,
  );
  await waitFor(brokerOk, 40_000, 'the web server to reach the broker');
}, 90_000);

afterAll(async () => {
  for (const c of [sim, web]) await c?.stop();
  await watcher?.endAsync(true);
  await broker?.stop();
  fs.rmSync(dir, { recursive: true, force: true });
});

describe('broker restart', () => {
  it('the web server and the simulator reconnect by themselves', async () => {
    const t0 = Date.now();
    await waitFor(async () => (await heardSince(t0)) > 0, 30_000, 'simulator messages before the restart');

    await broker.stop('SIGKILL');
    await waitFor(async () => !(await brokerOk()), 15_000, 'health to report the broker down');
    broker = await startOwnBroker(dbUrl, dir, broker.port);
    const restartedAt = Date.now();

    await waitFor(brokerOk, 30_000, 'the web server to reconnect');
    // The simulator publishes the UV lamp every 5 s: a message after the restart means it reconnected.
    await waitFor(async () => (await heardSince(restartedAt)) > 0, 40_000, 'simulator messages after the restart');
    expect(web.proc.exitCode).toBeNull();
    expect(sim.proc.exitCode).toBeNull();
  }, 120_000);
});
