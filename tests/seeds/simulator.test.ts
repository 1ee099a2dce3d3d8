/**
 * The demo-plant simulator as `npm start` runs it: a child process publishing with the
 * gateways' own credentials to the test stack's broker; its readings arrive in the database
 * through the ingest worker, the gateways show online, and a clean stop marks them offline.
 */
import { spawn, type ChildProcess } from 'node:child_process';
import pg from 'pg';
import { afterAll, beforeAll, describe, expect, it, inject } from 'vitest';
import { DEMO_DEVICES } from '../../seeds/demo-plant.ts';
import { waitFor } from '../support/ingest-harness.ts';
import { TEST_DEVICE_SECRET, root } from '../support/test-stack.ts';

let pool: pg.Pool;
let sim: ChildProcess | null = null;
let output = '';
const startedMs = Date.now();

beforeAll(async () => {
  pool = new pg.Pool({ connectionString: inject('stack').databaseUrl, max: 2 });
  const env: NodeJS.ProcessEnv = {
    ...process.env,
    MQTT_PORT: String(inject('stack').mqttPort),
    SIM_DEVICE_SECRET: TEST_DEVICE_SECRET,
  };
  delete env['MQTT_URL'];
  sim = spawn(process.execPath, ['--import', 'tsx', 'seeds/simulator.ts'], {
    cwd: root,
    env,
    stdio: ['ignore', 'pipe', 'pipe'],
  });
  sim.stdout!.on('data', (b: Buffer) => (output += b.toString()));
  sim.stderr!.on('data', (b: Buffer) => (output += b.toString()));
  sim.on('error', (e) => (output += `spawn error: ${e.message}`));
  sim.on('exit', (code, signal) => (output += `[exited ${code ?? signal}]`));
});

afterAll(async () => {
  if (sim && sim.exitCode === null && sim.signalCode === null) sim.kill('SIGKILL');
  await pool.end();
});

async function newRows(asset: string, key: string): Promise<{ n: number; last: number | null }> {
  const { rows } = await pool.query<{ n: number; last: number | null }>(
    `select count(*)::int as n, max(value) as last from readings r join channels c on c.id = r.channel_id join assets a on a.id = c.asset_id
      where a.code = $1 and c.key = $2 and r.ts >= to_timestamp($3::float8 / 1000)`,
    [asset, key, startedMs],
  );
  return rows[0]!;
}

describe('demo-plant simulator', () => {
  it('publishes every device’s channels with its own credentials, and the readings are stored', async () => {
    const channels: [string, string][] = [
      ['oven-a', 'setpoint'],
      ['oven-a', 'door'],
      ['oven-b-z1', 'air-temp'],
      ['oven-c-z2', 'air-temp'],
      ['dip-1-hc', 'viscosity'],
      ['dip-1-hc', 'bath-temp'],
      ['dip-2', 'room-rh'],
      ['dip-2-hc', 'withdrawal-speed'],
      ['uv-1', 'irradiance'],
      ['uv-1', 'spin-speed'],
    ];
    for (const [asset, key] of channels) {
      await waitFor(
        async () => (await newRows(asset, key)).n > 0,
        40_000,
        `live readings of ${asset}/${key} (simulator output: ${output.slice(-500)})`,
        500,
      );
    }
    // Ovens publish every 2 s: it keeps publishing (three more zone readings arrive).
    const before = (await newRows('oven-a-z1', 'air-temp')).n;
    await waitFor(
      async () => (await newRows('oven-a-z1', 'air-temp')).n >= before + 3,
      30_000,
      'three more oven zone readings',
      500,
    );
    // Nothing it sent was refused.
    const { rows: refused } = await pool.query(
      `select topic, reason from ingest_rejections where received_at >= to_timestamp($1::float8 / 1000) and device_username = any($2) limit 5`,
      [startedMs, DEMO_DEVICES.map((d) => d.username)],
    );
    expect(refused).toEqual([]);
    const { rows: online } = await pool.query<{ username: string; online: boolean }>(
      `select username, online from devices where username = any($1)`,
      [DEMO_DEVICES.map((d) => d.username)],
    );
    expect(
      online
        .filter((d) => d.online)
        .map((d) => d.username)
        .sort(),
    ).toEqual(DEMO_DEVICES.map((d) => d.username).sort());
  }, 90_000);

  it('stops cleanly on SIGTERM by its PID and its gateways go offline', async () => {
    const proc = sim!;
    proc.kill('SIGTERM');
    await waitFor(async () => proc.exitCode !== null || proc.signalCode !== null, 10_000, 'the simulator to exit');
    expect(proc.exitCode).toBe(0);
    await waitFor(
      async () => {
        const { rows } = await pool.query<{ n: number }>(
          `select count(*)::int as n from devices where username = any($1) and online`,
          [DEMO_DEVICES.map((d) => d.username)],
        );
        return rows[0]!.n === 0;
      },
      10_000,
      'the gateways to be recorded offline',
      250,
    );
  }, 30_000);
});
