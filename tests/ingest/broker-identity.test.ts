/**
 * MQTT identity at the broker (ingest/broker.ts), with real mqtt.js clients against the real
 * broker on loopback (started in-process on a free port, over the test stack's database):
 * client ids bound to the credential, the packet-size cap, retain only on a device's status
 * topic, per-account service secrets, CONNECT throttling, cutting off a device that is disabled
 * or rotated while connected, and the optional TLS listener.
 */
import { execFileSync } from 'node:child_process';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import mqtt, { type MqttClient } from 'mqtt';
import pg from 'pg';
import { afterAll, beforeAll, describe, expect, inject, it } from 'vitest';
import { startBroker, type RunningBroker } from '../../ingest/broker.ts';
import { hashPassword } from '../../src/lib/server/passwords.ts';
import { connectDevice, createTestDevice, waitFor, type TestDevice } from '../support/ingest-harness.ts';

const SHARED = 'identity-test-shared-secret';
const WEB_SECRET = 'identity-test-web-secret';
const CAP = 64 * 1024;
let pool: pg.Pool;
let broker: RunningBroker;
let port: number;
let dev: TestDevice;
let worker: MqttClient;
const workerHeard: { topic: string; size: number; retain: boolean }[] = [];
const logLines: string[] = [];
const tmp = fs.mkdtempSync(path.join(os.tmpdir(), 'coatrail-mqtt-tls-'));

const service = (username: string, password: string, clientId: string, extra: mqtt.IClientOptions = {}) =>
  mqtt.connectAsync(`mqtt://127.0.0.1:${port}`, {
    username,
    password,
    clientId,
    protocolVersion: 4,
    reconnectPeriod: 0,
    connectTimeout: 5000,
    ...extra,
  });

const closedWithin = (c: MqttClient) =>
  waitFor(async () => !c.connected && c.disconnecting === false, 10_000, 'the broker to close the connection');

beforeAll(async () => {
  pool = new pg.Pool({ connectionString: inject('stack').databaseUrl, max: 3 });
  // A self-signed certificate for the TLS listener (generated now; nothing is kept).
  execFileSync(
    'openssl',
    [
      'req',
      '-x509',
      '-newkey',
      'rsa:2048',
      '-nodes',
      '-days',
      '1',
      '-subj',
      '/CN=localhost',
      '-keyout',
      path.join(tmp, 'key.pem'),
      '-out',
      path.join(tmp, 'cert.pem'),
    ],
    { stdio: 'ignore' },
  );
  broker = await startBroker({
    pool: pool as never,
    host: '127.0.0.1',
    port: 0,
    servicePassword: SHARED,
    servicePasswords: { 'svc-web': WEB_SECRET },
    maxPacketBytes: CAP,
    revokeCheckMs: 200,
    connectRate: { perUsername: { burst: 3, perSecond: 0.01 } },
    tls: { port: 0, cert: fs.readFileSync(path.join(tmp, 'cert.pem')), key: fs.readFileSync(path.join(tmp, 'key.pem')) },
    log: (l) => logLines.push(l),
  });
  port = broker.port;
  dev = await createTestDevice(pool, [{ key: 'temp', unit: '°C', min: 0, max: 100 }], 'ident');
  worker = await service('svc-ingest', SHARED, 'coatrail-ingest-identity-test', { clean: false });
  worker.on('message', (topic, buf, packet) => workerHeard.push({ topic, size: buf.length, retain: packet.retain }));
  await worker.subscribeAsync('coatrail/v1/#', { qos: 1 });
});

afterAll(async () => {
  await worker?.endAsync();
  await broker?.close();
  await pool?.end();
  fs.rmSync(tmp, { recursive: true, force: true });
});

describe('client ids are bound to the credential', () => {
  it('refuses a device taking over the worker’s client id, and the worker stays connected with its session', async () => {
    await expect(connectDevice(port, dev.username, dev.password, { clientId: 'coatrail-ingest-identity-test' })).rejects.toThrow(
      /identifier rejected/i,
    );
    await expect(
      connectDevice(port, dev.username, dev.password, { clientId: 'coatrail-ingest-identity-test', clean: true }),
    ).rejects.toThrow(/identifier rejected/i);
    expect(worker.connected).toBe(true);
    // The worker's subscription still works: a reading from the device reaches it.
    const d = await connectDevice(port, dev.username, dev.password);
    await d.publishAsync(dev.topic('temp'), JSON.stringify({ t: Date.now(), v: 20 }), { qos: 1 });
    await waitFor(async () => workerHeard.some((h) => h.topic === dev.topic('temp')), 10_000, 'the reading at the worker');
    expect(worker.connected).toBe(true);
    await d.endAsync();
    expect(logLines.some((l) => /client id not bound/.test(l))).toBe(true);
  });

  it('refuses a device using another device’s client id, also one that shares its prefix', async () => {
    const other = await createTestDevice(pool, [{ key: 'x', unit: '°C', min: 0, max: 100 }], 'ident2');
    await expect(connectDevice(port, dev.username, dev.password, { clientId: other.username })).rejects.toThrow(
      /identifier rejected/i,
    );
    // A second device whose username extends the first one's: its ids are not the first one's suffixes.
    const longer = `${dev.username}-b`;
    await pool.query(
      `insert into devices(site_id, name, username, password_hash, topic_prefix) select site_id, $1, $1, $2, topic_prefix || '-b' from devices where id = $3`,
      [longer, await hashPassword('longer-password'), dev.id],
    );
    await expect(connectDevice(port, dev.username, dev.password, { clientId: `${longer}-1` })).rejects.toThrow(
      /identifier rejected/i,
    );
    const own = await connectDevice(port, dev.username, dev.password, { clientId: `${dev.username}-a-1` });
    await own.endAsync();
    const longerClient = await connectDevice(port, longer, 'longer-password', { clientId: `${longer}-1` });
    await longerClient.endAsync();
  });

  it('gives each service account its own prefix and secret, compared in constant time', async () => {
    await expect(service('svc-web', WEB_SECRET, 'coatrail-ingest-x')).rejects.toThrow(/identifier rejected/i);
    await expect(service('svc-ingest', SHARED, 'coatrail-web-x')).rejects.toThrow(/identifier rejected/i);
    await expect(service('svc-web', SHARED, 'coatrail-web-x')).rejects.toThrow(/bad username or password|not authorized/i);
    const web = await service('svc-web', WEB_SECRET, 'coatrail-web-x');
    // svc-web reads the live fan-out only, not the plant's raw topics.
    const live = await web.subscribeAsync('coatrail/v1/_live/#', { qos: 0 });
    expect(live.map((g) => g.qos)).toEqual([0]);
    const plant = await web.subscribeAsync('coatrail/v1/#', { qos: 0 }).catch((e: Error) => e);
    expect(plant instanceof Error || plant.every((g) => g.qos === 128)).toBe(true);
    await web.endAsync().catch(() => {});
  });
});

describe('resource limits', () => {
  it('refuses a publish over the packet-size cap (nothing reaches the worker)', async () => {
    const d = await connectDevice(port, dev.username, dev.password);
    const before = workerHeard.length;
    d.publish(dev.topic('temp'), Buffer.alloc(CAP + 1024, 0x20), { qos: 0 });
    await closedWithin(d);
    expect(workerHeard.slice(before).some((h) => h.size > CAP)).toBe(false);
    expect(logLines.some((l) => /packet from .* \(cap 65536 bytes\)/.test(l))).toBe(true);
    d.end(true);
  });

  it('refuses retain outside the device’s own status topic, and keeps it there', async () => {
    const d = await connectDevice(port, dev.username, dev.password);
    await d.publishAsync(`${dev.prefix}/status`, 'online', { qos: 1, retain: true });
    d.publish(dev.topic('temp'), JSON.stringify({ t: Date.now(), v: 21 }), { qos: 1, retain: true });
    await closedWithin(d);
    d.end(true);
    expect(logLines.some((l) => /retain is allowed only on/.test(l))).toBe(true);
    // A fresh subscriber gets the retained status but no retained reading.
    const late = await service('svc-ingest', SHARED, 'coatrail-ingest-identity-late');
    const retained: string[] = [];
    late.on('message', (topic, _b, packet) => packet.retain && retained.push(topic));
    await late.subscribeAsync(`${dev.prefix}/#`, { qos: 1 });
    await waitFor(async () => retained.includes(`${dev.prefix}/status`), 10_000, 'the retained status');
    expect(retained).toEqual([`${dev.prefix}/status`]);
    await late.endAsync();
  });

  it('throttles failed CONNECTs per username, before any password work', async () => {
    const t = await createTestDevice(pool, [{ key: 'x', unit: '°C', min: 0, max: 100 }], 'thr');
    for (let i = 0; i < 3; i++)
      await expect(connectDevice(port, t.username, 'wrong-password')).rejects.toThrow(/bad username|not authorized/i);
    // The bucket is empty: even the right password is refused (server unavailable) for now.
    await expect(connectDevice(port, t.username, t.password)).rejects.toThrow(/server unavailable/i);
    expect(logLines.some((l) => l.includes(`as ${t.username}`) && /username throttled/.test(l))).toBe(true);
    // Unknown usernames are throttled the same way.
    for (let i = 0; i < 3; i++)
      await expect(connectDevice(port, 'gw-nobody-here', 'whatever')).rejects.toThrow(/bad username|not authorized/i);
    await expect(connectDevice(port, 'gw-nobody-here', 'whatever')).rejects.toThrow(/server unavailable/i);
  });
});

describe('disabling or rotating a device', () => {
  it('disconnects a device disabled while connected, and refuses it afterwards', async () => {
    const d2 = await createTestDevice(pool, [{ key: 'x', unit: '°C', min: 0, max: 100 }], 'dis');
    const c = await connectDevice(port, d2.username, d2.password);
    expect(c.connected).toBe(true);
    await pool.query('update devices set enabled = false where id = $1', [d2.id]);
    await closedWithin(c);
    c.end(true);
    await expect(connectDevice(port, d2.username, d2.password)).rejects.toThrow(/bad username|not authorized/i);
  });

  it('disconnects a device whose password was rotated while connected', async () => {
    const d3 = await createTestDevice(pool, [{ key: 'x', unit: '°C', min: 0, max: 100 }], 'rot');
    const c = await connectDevice(port, d3.username, d3.password);
    await pool.query('update devices set password_hash = $2 where id = $1', [d3.id, await hashPassword('the-new-password')]);
    await closedWithin(c);
    c.end(true);
    const fresh = await connectDevice(port, d3.username, 'the-new-password');
    await fresh.endAsync();
  });
});

describe('TLS listener', () => {
  it('accepts a device over TLS with the broker’s certificate', async () => {
    const c = await mqtt.connectAsync(`mqtts://127.0.0.1:${broker.tlsPort}`, {
      username: dev.username,
      password: dev.password,
      clientId: `${dev.username}-tls`,
      protocolVersion: 4,
      reconnectPeriod: 0,
      ca: fs.readFileSync(path.join(tmp, 'cert.pem')),
      servername: 'localhost',
    });
    expect(c.connected).toBe(true);
    await c.endAsync();
  });
});

describe('the worker’s preset session', () => {
  it('queues what a device publishes before the worker has ever connected, and hands it over on connect', async () => {
    const fresh = await startBroker({
      pool: pool as never,
      host: '127.0.0.1',
      port: 0,
      servicePassword: SHARED,
      presetSessions: [{ clientId: 'coatrail-ingest-preset-test', topics: ['coatrail/v1/+/+/+/+'] }],
    });
    try {
      // The device publishes first: with no session for the worker these would have no subscriber.
      const d = await connectDevice(fresh.port, dev.username, dev.password);
      for (let i = 0; i < 5; i++) await d.publishAsync(dev.topic('temp'), JSON.stringify({ t: Date.now(), v: i }), { qos: 1 });
      await d.endAsync();
      const heard: number[] = [];
      const w = await mqtt.connectAsync(
        `mqtt://127.0.0.1:${fresh.port}`,
        {
          username: 'svc-ingest',
          password: SHARED,
          clientId: 'coatrail-ingest-preset-test',
          protocolVersion: 4,
          clean: false,
          reconnectPeriod: 0,
        },
        false,
      );
      w.on('message', (_t, buf) => heard.push((JSON.parse(buf.toString()) as { v: number }).v));
      await waitFor(async () => heard.length === 5, 10_000, 'the five queued readings at the worker');
      expect(heard).toEqual([0, 1, 2, 3, 4]);
      await w.endAsync();
    } finally {
      await fresh.close();
    }
  });
});
