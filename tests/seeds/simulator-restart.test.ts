/**
 * A restart of the software is not an oven restart: the simulator lays each oven's schedule
 * from the plant's epoch (SIM_EPOCH_MS, kept by `npm start`), so when it starts again two hours
 * into the plant's life, oven A is where the wall clock says it is — in the soak of its first
 * load at the cure setpoint — instead of starting cold (which the load detector took for an
 * aborted cure, one per oven and restart).
 */
import { spawn, type ChildProcess } from 'node:child_process';
import pg from 'pg';
import { afterAll, beforeAll, describe, expect, it, inject } from 'vitest';
import { CURE_SETPOINT_C, STANDBY_SETPOINT_C } from '../../seeds/plant-model.ts';
import { waitFor } from '../support/ingest-harness.ts';
import { TEST_DEVICE_SECRET, root } from '../support/test-stack.ts';

let pool: pg.Pool;
let sim: ChildProcess | null = null;
let output = '';
const startedMs = Date.now();

beforeAll(() => {
  pool = new pg.Pool({ connectionString: inject('stack').databaseUrl, max: 2 });
  const env: NodeJS.ProcessEnv = {
    ...process.env,
    MQTT_PORT: String(inject('stack').mqttPort),
    SIM_DEVICE_SECRET: TEST_DEVICE_SECRET,
    // The plant was first started two hours ago; this start is a restart.
    SIM_EPOCH_MS: String(startedMs - 2 * 60 * 60_000),
  };
  delete env['MQTT_URL'];
  sim = spawn(process.execPath, ['--import', 'tsx', 'seeds/simulator.ts'], { cwd: root, env, stdio: ['ignore', 'pipe', 'pipe'] });
  sim.stdout!.on('data', (b: Buffer) => (output += b.toString()));
  sim.stderr!.on('data', (b: Buffer) => (output += b.toString()));
});

afterAll(async () => {
  if (sim && sim.exitCode === null && sim.signalCode === null) sim.kill('SIGKILL');
  await pool.end();
});

async function firstReadings(asset: string, key: string): Promise<number[]> {
  const { rows } = await pool.query<{ value: number }>(
    `select r.value from readings r join channels c on c.id = r.channel_id join assets a on a.id = c.asset_id
      where a.code = $1 and c.key = $2 and r.ts >= to_timestamp($3::float8 / 1000) order by r.ts limit 3`,
    [asset, key, startedMs],
  );
  return rows.map((r) => r.value);
}

describe('simulator restart', () => {
  it('resumes oven A mid-soak on the wall clock instead of starting it cold', async () => {
    const setpoints = await waitFor(
      async () => {
        const v = await firstReadings('oven-a', 'setpoint');
        return v.length >= 3 ? v : null;
      },
      60_000,
      `oven A's first setpoints after the restart (simulator said: ${output.slice(-500)})`,
      250,
    );
    // The cure setpoint (plant-model.ts), not the standby setpoint of a cold start.
    expect(CURE_SETPOINT_C).not.toBe(STANDBY_SETPOINT_C);
    expect(setpoints).toEqual([CURE_SETPOINT_C, CURE_SETPOINT_C, CURE_SETPOINT_C]);
    const air = await waitFor(
      async () => {
        const v = await firstReadings('oven-a-z1', 'air-temp');
        return v.length >= 3 ? v : null;
      },
      30_000,
      "oven A zone 1's first air temperatures",
      250,
    );
    // Soaking: within the soak band of the setpoint, not at room temperature.
    for (const v of air) expect(Math.abs(v - CURE_SETPOINT_C)).toBeLessThan(10);
  }, 120_000);
});
