/**
 * The worker's channel map and the flush's cache-miss rule (ingest/channel-map.ts,
 * ingest/flusher.ts) on the test stack's PostgreSQL: a device and channel created after the
 * map was loaded are missed by the cache, counted as unsettled for a message that arrived
 * after the load, found by one look-up and then resolved; a topic that is truly unknown is
 * refused only for messages that arrived before a look-up began.
 */
import { afterAll, beforeAll, describe, expect, inject, it } from 'vitest';
import type { Sequelize } from 'sequelize';
import { createSequelize } from '../../db/connection.ts';
import { initModels } from '../../db/models/index.ts';
import { EntryMaker } from '../../ingest/arrivals.ts';
import { ChannelMap } from '../../ingest/channel-map.ts';
import { Flusher, unsettledTopics } from '../../ingest/flusher.ts';
import { closeTestPool, testPool } from '../support/accounts.ts';
import { createTestDevice } from '../support/ingest-harness.ts';

let sequelize: Sequelize;

beforeAll(() => {
  sequelize = createSequelize({ url: inject('stack').databaseUrl, max: 2 });
  initModels(sequelize);
});

afterAll(async () => {
  await sequelize?.close();
  await closeTestPool();
});

describe('ChannelMap and the cache-miss rule', () => {
  it('holds a message of a device created after the load for one look-up, then stores it', async () => {
    const map = new ChannelMap(sequelize);
    await map.refresh();
    expect(map.loaded).toBe(true);
    const visc = map.channel('coatrail/v1/fernhollow/gw-dip-1/dip-1-hc/viscosity');
    expect(visc).toMatchObject({ unit: 'mm²/s', min: 0, max: 60 });

    const dev = await createTestDevice(testPool(), [{ key: 'temp', unit: '°C', min: 0, max: 100 }], 'cm');
    const maker = new EntryMaker();
    const rx = Date.now() + 1; // arrived after the load began
    const entry = maker.make(dev.topic('temp'), JSON.stringify({ t: rx - 1000, v: 20 }), rx, -1, 0);
    const status = maker.make(`${dev.prefix}/status`, 'online', rx, -1, 0);
    expect(map.channel(dev.topic('temp'))).toBeUndefined();
    expect(unsettledTopics(map, [entry, status, entry]).sort()).toEqual([dev.topic('temp'), `${dev.prefix}/status`].sort());

    await map.lookUp(unsettledTopics(map, [entry, status]));
    expect(map.channel(dev.topic('temp'))).toMatchObject({ id: dev.channels['temp']!.id, unit: '°C' });
    expect(map.device(dev.prefix)).toMatchObject({ id: dev.id, username: dev.username, enabled: true });
    expect(unsettledTopics(map, [entry, status])).toEqual([]);
    const batch = new Flusher({ sequelize, map, futureToleranceMs: 120_000 }).build([entry, status]);
    expect(batch.rows).toBe(1);
    expect(batch.rejections).toEqual([]);
    expect(batch.status).toEqual([{ deviceId: dev.id, online: true, rxMs: rx, topic: `${dev.prefix}/status` }]);
  });

  it('refuses a truly unknown device only for messages that arrived before its look-up began', async () => {
    const map = new ChannelMap(sequelize);
    await map.refresh();
    const maker = new EntryMaker();
    const topic = `coatrail/v1/fernhollow/gw-nobody-${Date.now()}/tank/temp`;
    const early = maker.make(topic, JSON.stringify({ t: Date.now(), v: 1 }), Date.now(), -1, 0);
    await new Promise((r) => setImmediate(r));
    expect(unsettledTopics(map, [early])).toEqual([topic]);
    // Wait for the clock to move past the arrival, so the look-up begins after it.
    while (Date.now() <= early.rxMs) await new Promise((r) => setImmediate(r));
    await map.lookUp([topic]);
    expect(unsettledTopics(map, [early])).toEqual([]);
    const batch = new Flusher({ sequelize, map, futureToleranceMs: 120_000 }).build([early]);
    expect(batch.rejections.map((r) => r.reason)).toEqual(['unknown-device']);
    // A message that arrives after that look-up is not settled by it.
    while (Date.now() <= early.rxMs + 1) await new Promise((r) => setImmediate(r));
    const later = maker.make(topic, JSON.stringify({ t: Date.now(), v: 1 }), Date.now() + 1000, -1, 0);
    expect(unsettledTopics(map, [later])).toEqual([topic]);
  });
});
