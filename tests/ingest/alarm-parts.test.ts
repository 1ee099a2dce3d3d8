/**
 * The alarm worker's parts on their own (ingest/handlers/alarms/): each is called directly with
 * a runtime of its own and a worker context on the test database, on a throwaway line, oven,
 * device and channels that the running worker never receives readings for. Live events are
 * collected from the context's `publishLive`.
 *
 * Expected behaviour: the ANSI/ISA-18.2 / IEC 62682 design remedies as the domain's detector
 * states them (on-delay: the condition must hold on every sample for the delay; deadband: an
 * active high alarm clears only below high − deadband), the state model's transitions
 * (`lib/domain/alarms/state.ts`: an unacknowledged alarm whose condition clears is
 * `rtn-unacked`; suppression by design holds the condition while the oven idles), and the
 * product rules in the handler's module comments (stale data while the asset runs, a device
 * offline for more than 60 s).
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { Asset, Channel, Device } from '../../db/models/index.ts';
import type { ChannelAlarmConfig } from '../../src/lib/core/alarm-config-store.ts';
import { getAlarm, transitionAlarm } from '../../src/lib/core/alarm-store.ts';
import { select } from '../../src/lib/core/db.ts';
import type { AlarmView } from '../../src/lib/shared/alarm-views.ts';
import { checkDevices } from '../../ingest/handlers/alarms/devices.ts';
import { evaluateReadings } from '../../ingest/handlers/alarms/limits.ts';
import { createRuntime, type AlarmsRuntime, type ChannelInfo } from '../../ingest/handlers/alarms/runtime.ts';
import { checkStale } from '../../ingest/handlers/alarms/stale.ts';
import type { StoredReading, WorkerContext } from '../../ingest/handlers/index.ts';
import { closeAlarmHelpers, testDb } from '../support/alarm-helpers.ts';
import { closeTestSequelize, testSequelize } from '../support/sequelize.ts';

const run = Math.random().toString(36).slice(2, 8);
const published: AlarmView[] = [];
let ctx: WorkerContext;
let lineId = 0;
let ovenId = 0;
let deviceId = 0;
let spin: ChannelInfo;
let door: ChannelInfo;

function config(channelId: number, over: Partial<ChannelAlarmConfig>): ChannelAlarmConfig {
  return {
    id: 0,
    channelId,
    enabled: true,
    limitsMode: 'absolute',
    high: null,
    low: null,
    deadband: 0,
    onDelayMs: 0,
    offDelayMs: 0,
    priority: 'low',
    onlyWhileRunning: false,
    label: null,
    staleSeconds: null,
    stalePriority: 'low',
    note: null,
    updatedAtMs: 0,
    updatedBy: null,
    ...over,
  };
}

/** A runtime that knows only the throwaway channels and has fresh configs (no reload). */
function runtimeWith(configs: ChannelAlarmConfig[]): AlarmsRuntime {
  const rt = createRuntime();
  rt.channels.set(spin.id, spin);
  rt.channels.set(door.id, door);
  for (const c of configs) rt.configs.set(c.channelId, c);
  rt.configsAt = Number.MAX_SAFE_INTEGER;
  return rt;
}

const reading = (channelId: number, tMs: number, value: number): StoredReading => ({ channelId, tMs, value, quality: 0 });

async function openAlarm(sourceKey: string): Promise<AlarmView | null> {
  const [row] = await select<{ id: number }>(
    ctx.sequelize,
    `select id from alarms where source_key = $1 order by id desc limit 1`,
    [sourceKey],
  );
  return row ? getAlarm(ctx.sequelize, row.id) : null;
}

beforeAll(async () => {
  const sequelize = testSequelize();
  ctx = { sequelize, pool: testDb(), publishLive: (_kind, a) => void published.push(a as AlarmView), log: () => {} };
  const site = (await Asset.findOne({ order: [['id', 'ASC']] }))!;
  lineId = (
    await Asset.create({
      siteId: site.siteId,
      parentId: null,
      kind: 'coater',
      code: `ap-${run}`,
      name: `Parts test coater ${run}`,
    })
  ).id;
  ovenId = (
    await Asset.create({ siteId: site.siteId, parentId: null, kind: 'oven', code: `ao-${run}`, name: `Parts test oven ${run}` })
  ).id;
  deviceId = (
    await Device.create({
      siteId: site.siteId,
      name: `Parts test gateway ${run}`,
      username: `gw-parts-${run}`,
      passwordHash: 'not-a-usable-hash',
      topicPrefix: `parts-${run}`,
      lastSeenAt: null,
    })
  ).id;
  const mk = async (assetId: number, key: string, kind: string, unit: string) =>
    (await Channel.create({ assetId, deviceId, key, name: `Parts ${key}`, kind, unit, min: 0, max: 5000 })).id;
  spin = {
    id: await mk(lineId, 'spin-speed', 'spin-speed', 'rpm'),
    name: 'Parts spin-speed',
    kind: 'spin-speed',
    unit: 'rpm',
    assetId: lineId,
    assetName: `Parts test coater ${run}`,
    deviceId,
    ovenAssetId: null,
  };
  door = {
    id: await mk(ovenId, 'door', 'door', ''),
    name: 'Parts door',
    kind: 'door',
    unit: '',
    assetId: ovenId,
    assetName: `Parts test oven ${run}`,
    deviceId,
    ovenAssetId: ovenId,
  };
});

afterAll(async () => {
  await select(ctx.sequelize, `delete from alarms where asset_id = any($1::int[]) or source_key = $2 returning id`, [
    [lineId, ovenId],
    `device:${deviceId}`,
  ]);
  await Channel.destroy({ where: { deviceId } });
  await select(ctx.sequelize, `delete from device_events where device_id = $1 returning id`, [deviceId]);
  await Device.destroy({ where: { id: deviceId } });
  await Asset.destroy({ where: { id: [lineId, ovenId] } });
  await closeTestSequelize();
  await closeAlarmHelpers();
});

describe('limits.ts: limit evaluation with on-delay and deadband', () => {
  it('activates only after the on-delay held on every sample, clears only past the deadband', async () => {
    // Hand-chosen: high 100 rpm, deadband 5 rpm (clears below 95), on-delay 1 s.
    const rt = runtimeWith([config(spin.id, { high: 100, deadband: 5, onDelayMs: 1000 })]);
    const key = `channel:${spin.id}:high`;
    const t0 = Date.now() - 60_000;
    await evaluateReadings(rt, ctx, [reading(spin.id, t0, 120), reading(spin.id, t0 + 500, 120)], t0 + 500);
    expect(await openAlarm(key)).toBeNull(); // 0.5 s < 1 s on-delay
    await evaluateReadings(rt, ctx, [reading(spin.id, t0 + 600, 99), reading(spin.id, t0 + 1700, 120)], t0 + 1700);
    expect(await openAlarm(key)).toBeNull(); // the sample back inside restarted the delay at t0 + 1700
    await evaluateReadings(rt, ctx, [reading(spin.id, t0 + 2700, 121)], t0 + 2700);
    const raised = await openAlarm(key);
    expect(raised).toMatchObject({ state: 'unacked', active: true, value: 121, limit: 100, priority: 'low' });
    expect(published.some((a) => a.id === raised!.id && a.active)).toBe(true);
    await evaluateReadings(rt, ctx, [reading(spin.id, t0 + 3000, 96)], t0 + 3000);
    expect((await openAlarm(key))?.active).toBe(true); // 96 ≥ 100 − 5: inside the deadband, held
    await evaluateReadings(rt, ctx, [reading(spin.id, t0 + 3500, 94)], t0 + 3500);
    expect(await openAlarm(key)).toMatchObject({ state: 'rtn-unacked', active: false });
  });
});

describe('suppression.ts: an idle oven suppresses its only-while-running alarms', () => {
  // Door switch: 1 = open; high 0.5 alarms on open (only while running), no delay. One runtime
  // for the whole story, as the worker keeps it.
  let rt: AlarmsRuntime;
  const key = () => `channel:${door.id}:high`;
  const t0 = Date.now() - 50_000;

  beforeAll(() => {
    rt = runtimeWith([config(door.id, { high: 0.5, onlyWhileRunning: true, label: 'Door open during cure' })]);
  });

  it('suppressed while the setpoint is below 50 °C, annunciated again when the oven runs with the door still open', async () => {
    rt.setpoints.set(ovenId, 120);
    await evaluateReadings(rt, ctx, [reading(door.id, t0, 1)], t0);
    expect(await openAlarm(key())).toMatchObject({
      state: 'unacked',
      active: true,
      message: 'Door open during cure: Parts door open',
    });
    rt.setpoints.set(ovenId, 20); // below OVEN_RUNNING_SETPOINT_C (50 °C)
    await evaluateReadings(rt, ctx, [reading(door.id, t0 + 1000, 1)], t0 + 1000);
    expect(await openAlarm(key())).toMatchObject({ state: 'suppressed', active: true });
    rt.setpoints.set(ovenId, 120);
    await evaluateReadings(rt, ctx, [reading(door.id, t0 + 2000, 1)], t0 + 2000);
    expect(await openAlarm(key())).toMatchObject({ state: 'unacked', active: true });
  });

  it('a door opened while the oven idles raises nothing', async () => {
    await evaluateReadings(rt, ctx, [reading(door.id, t0 + 3000, 0)], t0 + 3000); // closed while running: clears
    const cleared = await openAlarm(key());
    expect(cleared).toMatchObject({ state: 'rtn-unacked', active: false });
    // Acknowledged after it cleared: back to normal (ISA-18.2), so the source has no open alarm.
    const acked = await transitionAlarm(
      ctx.sequelize,
      cleared!.id,
      { type: 'ack', comment: 'closed' },
      { role: 'operator', userId: null, nowMs: Date.now() },
    );
    expect(acked.ok && acked.alarm.state).toBe('normal');
    rt.setpoints.set(ovenId, 20);
    await evaluateReadings(rt, ctx, [reading(door.id, t0 + 4000, 1), reading(door.id, t0 + 5000, 1)], t0 + 5000);
    const after = await openAlarm(key());
    expect(after?.id).toBe(cleared?.id); // no new alarm row
    expect(after).toMatchObject({ state: 'normal', active: false, activationCount: cleared!.activationCount });
  });
});

describe('stale.ts: stale-data watch', () => {
  it('raises when a running asset goes silent past staleSeconds and clears when data returns', async () => {
    const rt = runtimeWith([config(spin.id, { staleSeconds: 5 })]);
    const key = `stale:channel:${spin.id}`;
    const now = Date.now();
    rt.lastSeen.set(spin.id, now - 4_000);
    await checkStale(rt, ctx, now);
    expect(await openAlarm(key)).toBeNull(); // 4 s ≤ 5 s
    rt.lastSeen.set(spin.id, now - 10_000);
    await checkStale(rt, ctx, now);
    expect(await openAlarm(key)).toMatchObject({ state: 'unacked', active: true, limit: 5 });
    await evaluateReadings(rt, ctx, [reading(spin.id, now + 1, 50)], now + 1);
    expect(await openAlarm(key)).toMatchObject({ state: 'rtn-unacked', active: false });
  });

  it('a channel silent for more than an hour is taken as switched off and raises nothing', async () => {
    const rt = runtimeWith([config(spin.id, { staleSeconds: 5 })]);
    const key = `stale:channel:${spin.id}`;
    const before = await openAlarm(key);
    rt.lastSeen.set(spin.id, Date.now() - 2 * 3_600_000);
    await checkStale(rt, ctx, Date.now());
    expect((await openAlarm(key))?.id).toBe(before?.id);
    expect(rt.staleActive.has(spin.id)).toBe(false);
  });
});

describe('devices.ts: device-offline watch', () => {
  it('a commissioned device offline for more than 60 s raises; back online clears', async () => {
    const rt = runtimeWith([]);
    const key = `device:${deviceId}`;
    await checkDevices(rt, ctx, Date.now());
    expect(rt.deviceActive.has(deviceId)).toBe(false); // never seen: not commissioned
    await Device.update({ online: false, lastSeenAt: new Date(Date.now() - 120_000) }, { where: { id: deviceId } });
    await checkDevices(rt, ctx, Date.now());
    expect(rt.deviceActive.has(deviceId)).toBe(true);
    expect(await openAlarm(key)).toMatchObject({ active: true, sourceKind: 'device' });
    await Device.update({ online: true, lastSeenAt: new Date() }, { where: { id: deviceId } });
    await checkDevices(rt, ctx, Date.now());
    expect(rt.deviceActive.has(deviceId)).toBe(false);
    expect((await openAlarm(key))?.active).toBe(false);
  });
});
