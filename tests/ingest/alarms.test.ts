/**
 * Alarm sources in the ingest worker, driven over MQTT with demo devices' credentials on the
 * test stack: the limit detector's on-delay and deadband (ANSI/ISA-18.2 / IEC 62682 alarm
 * design; rules as in `src/lib/domain/alarms/limit-detector.ts`), re-annunciation and the
 * activation count, the process-window fallback, the seeded example settings (viscosity,
 * door open during cure only while the oven runs), stale data while an oven runs, device
 * offline and ingest lag. Readings carry their own times (up to the worker's future
 * tolerance of 120 s), so delays are exercised without waiting for them. Limits and values
 * are hand-chosen; the window's limits are read from the database (seeded example window).
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { windowInForce } from '../../src/lib/core/window-store.ts';
import { api, signIn, type Session } from '../support/http.ts';
import {
  channelIdOf,
  closeAlarmHelpers,
  configureChannel,
  connectDevice,
  eventually,
  openAlarmId,
  openStream,
  testDb,
  type DeviceLink,
  type LiveStream,
} from '../support/alarm-helpers.ts';

let dip2: DeviceLink;
let ovenB: DeviceLink;
let ovenC: DeviceLink;
let ovenA: DeviceLink;
let viewer: Session;
let stream: LiveStream;

beforeAll(async () => {
  viewer = await signIn('viewer');
  stream = await openStream(viewer, ['alarms']);
  [dip2, ovenB, ovenC, ovenA] = await Promise.all([
    connectDevice('gw-dip-2'),
    connectDevice('gw-oven-b'),
    connectDevice('gw-oven-c'),
    connectDevice('gw-oven-a'),
  ]);
});

afterAll(async () => {
  stream?.close();
  await Promise.all([dip2?.close(), ovenB?.close(), ovenC?.close(), ovenA?.close()]);
  await testDb().query(`delete from ingest_status where worker_id = 'alarm-test-lagging'`);
  await closeAlarmHelpers();
});

async function alarm(id: number) {
  const r = await api(`/api/v1/alarms/${id}`, { session: viewer });
  expect(r.status).toBe(200);
  return r.body;
}

describe('limit alarm: on-delay, deadband, re-annunciation', () => {
  it('activates only after the on-delay, holds inside the deadband, clears beyond it and re-annunciates on the same alarm', async () => {
    const ch = await channelIdOf('dip-2', 'room-temp');
    const key = `channel:${ch}:high`;
    // Hand-chosen: high 30 °C, deadband 1 °C (clears below 29 °C), on-delay 20 s.
    await configureChannel(ch, { high: 30, deadband: 1, onDelayMs: 20_000, priority: 'medium' });
    const t = Date.now() - 60_000;
    expect(await openAlarmId(key)).toBeNull();
    const from = stream.mark();
    await dip2.publish('dip-2', 'room-temp', 31, t); // abnormal: on-delay starts at t
    await dip2.publish('dip-2', 'room-temp', 31.5, t + 10_000); // 10 s < 20 s: still waiting
    await dip2.publish('dip-2', 'room-temp', 32, t + 25_000); // 25 s ≥ 20 s: activates
    const raised = await stream.next((e) => e.data.sourceKey === key && e.data.state === 'unacked', 5_000);
    // Readings are judged in order: nothing was raised before the on-delay ran out.
    expect(stream.since(from).filter((e) => e.data.sourceKey === key && e !== raised)).toEqual([]);
    const id = raised.data.id as number;
    expect(raised.data.message).toBe('Room temperature 32.0 °C above the alarm high 30.0 °C');
    expect(raised.data.sourceLabel).toBe('Line 2 room temperature');
    expect(raised.data.raisedAtMs).toBe(t + 25_000);

    const held = stream.mark();
    await dip2.publish('dip-2', 'room-temp', 29.5, t + 30_000); // inside, but not by more than 1 °C
    await dip2.publish('dip-2', 'room-temp', 28.5, t + 35_000); // beyond the deadband: clears
    const cleared = await stream.next((e) => e.data.id === id && e.data.state === 'rtn-unacked', 5_000);
    // 29.5 held the alarm: the clear is 28.5's, and no change came between.
    expect(cleared.data.clearedAtMs).toBe(t + 35_000);
    expect(stream.since(held).filter((e) => e.data.id === id && e !== cleared && e.data.state !== 'unacked')).toEqual([]);

    stream.mark();
    await dip2.publish('dip-2', 'room-temp', 31, t + 40_000);
    await dip2.publish('dip-2', 'room-temp', 31, t + 61_000); // on-delay again: 21 s
    const again = await stream.next((e) => e.data.sourceKey === key && e.data.state === 'unacked', 5_000);
    expect(again.data.id).toBe(id); // unacknowledged return to normal re-annunciates the same alarm
    expect(again.data.activationCount).toBe(2);
    const detail = await alarm(id);
    expect(detail.events.map((e: { event: string }) => e.event)).toEqual(['activate', 'clear', 'activate']);
  });
});

describe('process-window fallback and the seeded example settings', () => {
  it('a channel without settings of its own is judged against the window in force (high = window max)', async () => {
    const ch = await channelIdOf('dip-2', 'room-rh');
    const asset = await testDb().query<{ asset_id: number }>('select asset_id from channels where id = $1', [ch]);
    const w = await windowInForce(testDb(), asset.rows[0]!.asset_id, Date.now());
    expect(w?.limits.roomRhPct, 'the demo seed assigns a window with a room humidity range to dip-2').toBeTruthy();
    const max = w!.limits.roomRhPct!.max;
    stream.mark();
    const t = Date.now() - 15_000;
    await dip2.publish('dip-2', 'room-rh', max + 10, t);
    await dip2.publish('dip-2', 'room-rh', max + 12, t + 11_000); // fallback on-delay 10 s
    const e = await stream.next((x) => x.data.sourceKey === `channel:${ch}:high`, 5_000);
    expect(e.data).toMatchObject({ priority: 'medium', limit: max, value: max + 12 });
    expect(e.data.message).toContain('above the process window high');
  });

  it('seeded bath viscosity (example: high 12.5 mm²/s, on-delay 30 s) raises on a drift', async () => {
    const ch = await channelIdOf('dip-2-hc', 'viscosity');
    stream.mark();
    const t = Date.now() - 40_000;
    await dip2.publish('dip-2-hc', 'viscosity', 12.9, t);
    await dip2.publish('dip-2-hc', 'viscosity', 13.1, t + 31_000);
    const e = await stream.next((x) => x.data.sourceKey === `channel:${ch}:high`, 5_000);
    expect(e.data.message).toBe('Viscosity 13.1 mm²/s above the alarm high 12.5 mm²/s');
    expect(e.data.limit).toBe(12.5);
  });

  it('door open during cure: raised while the oven runs (setpoint ≥ 50 °C), not while it is cold', async () => {
    const doorB = await channelIdOf('oven-b', 'door');
    const doorC = await channelIdOf('oven-c', 'door');
    const t = Date.now() - 30_000;
    await ovenB.publish('oven-b', 'setpoint', 110, t);
    await ovenC.publish('oven-c', 'setpoint', 25, t);
    stream.mark();
    for (const [dev, code] of [
      [ovenB, 'oven-b'],
      [ovenC, 'oven-c'],
    ] as const) {
      await dev.publish(code, 'door', 1, t + 5_000);
      await dev.publish(code, 'door', 1, t + 16_000); // seeded on-delay 10 s
    }
    const e = await stream.next((x) => x.data.sourceKey === `channel:${doorB}:high`, 5_000);
    expect(e.data).toMatchObject({ priority: 'medium', message: 'Oven door open during cure: Oven B door open' });
    expect(await openAlarmId(`channel:${doorC}:high`)).toBeNull();

    stream.mark();
    await ovenB.publish('oven-b', 'door', 0, t + 20_000);
    await stream.next((x) => x.data.id === e.data.id && x.data.state === 'rtn-unacked', 5_000);
  });
});

describe('suppression by design: an idle oven', () => {
  it('a door alarm is suppressed while the oven idles (condition still tracked) and comes back when it runs again', async () => {
    const door = await channelIdOf('oven-a', 'door');
    const key = `channel:${door}:high`;
    const t = Date.now() - 60_000;
    await ovenA.publish('oven-a', 'setpoint', 110, t);
    stream.mark();
    await ovenA.publish('oven-a', 'door', 1, t + 1_000);
    await ovenA.publish('oven-a', 'door', 1, t + 12_000); // seeded on-delay 10 s
    const raised = await stream.next((x) => x.data.sourceKey === key && x.data.state === 'unacked', 5_000);
    const id = raised.data.id as number;

    stream.mark();
    await ovenA.publish('oven-a', 'setpoint', 25, t + 15_000); // cycle over: the oven idles
    await ovenA.publish('oven-a', 'door', 1, t + 16_000);
    const suppressed = await stream.next((x) => x.data.id === id && x.data.state === 'suppressed', 5_000);
    expect(suppressed.data.active).toBe(true);
    const open = await api('/api/v1/alarms?state=open', { session: viewer });
    expect(open.body.some((a: { id: number }) => a.id === id)).toBe(false); // not annunciated

    await ovenA.publish('oven-a', 'door', 0, t + 20_000); // closed while idle: tracked on the suppressed alarm
    await eventually(async () => (await alarm(id)).active === false, 5_000, 'the suppressed alarm to record the door closing');
    expect((await alarm(id)).state).toBe('suppressed');

    stream.mark();
    await ovenA.publish('oven-a', 'setpoint', 110, t + 25_000); // next cycle
    await ovenA.publish('oven-a', 'door', 0, t + 26_000);
    await stream.next((x) => x.data.id === id && x.data.state === 'normal', 5_000); // condition gone: back to normal
    const events = (await alarm(id)).events.map((e: { event: string }) => e.event);
    expect(events).toEqual(['activate', 'suppress', 'clear', 'unsuppress']);
  });
});

describe('stale data, device offline, ingest lag', () => {
  it('a zone thermocouple silent longer than its stale seconds while the oven runs raises a high "no data" alarm; data clears it', async () => {
    const ch = await channelIdOf('oven-b-z1', 'air-temp');
    const key = `stale:channel:${ch}`;
    // Test-owned setting (the seeded example is 60 s): no reading for 5 s while the oven runs.
    await configureChannel(ch, { staleSeconds: 5, stalePriority: 'high', note: 'ingest test' });
    await ovenB.publish('oven-b', 'setpoint', 110);
    stream.mark();
    await ovenB.publish('oven-b-z1', 'air-temp', 109.5);
    const e = await stream.next((x) => x.data.sourceKey === key && x.data.state === 'unacked', 15_000);
    expect(e.data.priority).toBe('high');
    expect(e.data.message).toMatch(/^No reading from Oven B zone 1 air for \d+ s while the oven runs \(expected within 5 s\)$/);
    stream.mark();
    await ovenB.publish('oven-b-z1', 'air-temp', 110.2);
    await stream.next((x) => x.data.id === e.data.id && x.data.state === 'rtn-unacked', 5_000);
    await configureChannel(ch, {
      staleSeconds: 60,
      stalePriority: 'high',
      note: "Example default — replace with the lacquer maker's data.",
    });
  });

  it('a device offline for more than 60 s raises an alarm; reconnecting clears it', async () => {
    const dev = await testDb().query<{ id: number }>(`select id from devices where username = 'gw-oven-c'`);
    const id = dev.rows[0]!.id;
    await ovenC.close();
    await eventually(
      async () => (await testDb().query(`select online from devices where id = $1`, [id])).rows[0]?.online === false,
      10_000,
      'gw-oven-c offline',
    );
    // Instead of waiting a minute: the disconnection happened two minutes ago.
    await testDb().query(
      `update device_events set at = at - interval '2 minutes' where device_id = $1 and kind = 'offline' and at > now() - interval '1 minute'`,
      [id],
    );
    const e = await stream.next((x) => x.data.sourceKey === `device:${id}` && x.data.state === 'unacked', 12_000);
    expect(e.data.message).toMatch(/^Device gw-oven-c offline for \d+ s: its channels are not being recorded$/);
    stream.mark();
    ovenC = await connectDevice('gw-oven-c');
    await stream.next((x) => x.data.id === e.data.id && x.data.state === 'rtn-unacked', 12_000);
  });

  it('ingest lag above 10 s raises a system alarm; below 5 s it clears', async () => {
    const key = 'system:ingest-lag:alarm-test-lagging';
    await testDb().query(
      `insert into ingest_status (worker_id, heartbeat_at, lag_ms) values ('alarm-test-lagging', now(), 15000)
       on conflict (worker_id) do update set heartbeat_at = now(), lag_ms = 15000`,
    );
    const e = await stream.next((x) => x.data.sourceKey === key && x.data.state === 'unacked', 12_000);
    expect(e.data).toMatchObject({ sourceKind: 'system', value: 15, limit: 10 });
    stream.mark();
    await testDb().query(`update ingest_status set heartbeat_at = now(), lag_ms = 1000 where worker_id = 'alarm-test-lagging'`);
    await stream.next((x) => x.data.id === e.data.id && x.data.state === 'rtn-unacked', 12_000);
  });
});
