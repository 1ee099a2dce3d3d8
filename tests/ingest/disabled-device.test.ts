/**
 * The worker refuses readings of a disabled device (ingest/handlers/readings.ts): a message that
 * reaches it anyway (queued at the broker before the device was disabled, or from an external
 * broker that does not cut the device off) is kept as a refusal, not stored as a reading.
 * Real ChannelMap over the test stack's database; the handler is the worker's own.
 */
import pg from 'pg';
import { afterAll, beforeAll, describe, expect, inject, it } from 'vitest';
import { ChannelMap } from '../../ingest/channel-map.ts';
import { Batch } from '../../ingest/batch.ts';
import { parseTelemetry, processReadings } from '../../ingest/handlers/readings.ts';
import { parseTopic } from '../../src/lib/shared/topics.ts';
import { createTestDevice, type TestDevice } from '../support/ingest-harness.ts';
import { closeTestSequelize, testSequelize } from '../support/sequelize.ts';

let pool: pg.Pool;
let dev: TestDevice;

beforeAll(async () => {
  pool = new pg.Pool({ connectionString: inject('stack').databaseUrl, max: 2 });
  dev = await createTestDevice(pool, [{ key: 'temp', unit: '°C', min: 0, max: 100 }], 'disabled');
});

afterAll(async () => {
  await pool?.end();
  await closeTestSequelize();
});

const offer = async (map: ChannelMap) => {
  const batch = new Batch();
  const topic = dev.topic('temp');
  const payload = JSON.stringify({ t: Date.now() - 1000, v: 20 });
  const parsed = parseTopic(topic);
  if (parsed.kind !== 'sample') throw new Error(`not a sample topic: ${topic}`);
  processReadings(map, batch, { topic, payload, rxMs: Date.now() }, parsed, parseTelemetry(payload), {
    futureToleranceMs: 120_000,
  });
  return batch;
};

describe('readings of a disabled device', () => {
  it('are taken while the device is enabled and refused once it is disabled', async () => {
    const map = new ChannelMap(testSequelize());
    await map.refresh();
    const taken = await offer(map);
    expect(taken.v).toEqual([20]);
    expect(taken.rejections).toEqual([]);
    await pool.query('update devices set enabled = false where id = $1', [dev.id]);
    await map.refresh();
    const refused = await offer(map);
    expect(refused.v).toEqual([]);
    expect(refused.rejections).toHaveLength(1);
    expect(refused.rejections[0]).toMatchObject({ deviceUsername: dev.username, detail: `device ${dev.username} is disabled` });
  });
});
