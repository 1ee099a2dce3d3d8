/**
 * Every audited change to alarms, alarm settings, SPC characteristics and limit sets, process
 * windows and site settings writes its audit row in the change's own transaction: with a failure
 * injected after the work and before the commit (`setBeforeCommitHookForTests` throwing), neither
 * the change nor an audit row is left (rows counted before and after); without it, both are there.
 *
 * The property checked is all-or-nothing atomicity (ACID's "A", as PostgreSQL guarantees it for
 * one transaction) of the pair {change, audit row}, as 21 CFR 11.10(e) asks of an audit trail.
 * Runs the worker-safe core in this process against the test stack's database.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Sequelize } from 'sequelize';
import {
  AlarmConfig,
  AuditEntry,
  Asset,
  Characteristic,
  LimitSet,
  ProcessWindow,
  SiteSetting,
  WindowAssignment,
  type SignatureRecord,
} from '../../db/models/index.ts';
import { setBeforeCommitHookForTests } from '../../db/transaction.ts';
import { raiseAlarm, getAlarm, clearAlarm } from '../../src/lib/core/alarm-store.ts';
import {
  applyAlarmEventAudited,
  bulkAckAudited,
  removeChannelAlarmConfig,
  saveChannelAlarmConfig,
  saveCharacteristicAlarmConfig,
  saveEscalationAudited,
  type AlarmPerson,
} from '../../src/lib/core/alarm-commands.ts';
import { escalationSettings } from '../../src/lib/core/alarm-config-store.ts';
import { select } from '../../src/lib/core/db.ts';
import {
  approveLimitSetAudited,
  createCharacteristicAudited,
  discardDraftAudited,
  draftLimitSetAudited,
  updateCharacteristicAudited,
} from '../../src/lib/core/spc-commands.ts';
import { getCharacteristicRecord, getLimitSet, type NewLimitSet } from '../../src/lib/core/spc-store.ts';
import {
  approveWindowDraft,
  assignWindowToAsset,
  createWindowDraft,
  updateWindowDraft,
  type WindowEditor,
} from '../../src/lib/core/window-commands.ts';
import type { AlarmConfigInput } from '../../src/lib/shared/alarm-views.ts';
import type { CharacteristicFields } from '../../src/lib/shared/characteristics.ts';
import type { ProcessWindowLimits } from '../../src/lib/shared/windows.ts';
import { closeTestSequelize, testSequelize } from '../support/sequelize.ts';

const run = Math.random().toString(36).slice(2, 8);
let seq: Sequelize;
const engineer: AlarmPerson = { id: null, label: `atomic-test-${run}`, role: 'engineer', userId: null };
const editor: WindowEditor = { id: null, label: `atomic-test-${run}`, username: `atomic-test-${run}` };
const signature: SignatureRecord = {
  userId: 0,
  username: `atomic-test-${run}`,
  displayName: 'Atomic test',
  meaning: 'approved',
  signedAt: new Date().toISOString(),
};

/** Audit rows of this run (its actor label is its own) for one action. */
const audits = (action: string) => AuditEntry.count({ where: { action, actorLabel: `atomic-test-${run}` } });

/**
 * Run `change` once with the pre-commit failure injected (nothing of it may remain: `probe`
 * unchanged, no audit row), then once for real (`probe` changed, audit rows added).
 */
async function atomic<T>(action: string, probe: () => Promise<unknown>, change: () => Promise<T>): Promise<T> {
  const before = await probe();
  const auditsBefore = await audits(action);
  setBeforeCommitHookForTests(() => {
    throw new Error('injected before commit');
  });
  try {
    await expect(change()).rejects.toThrow('injected before commit');
  } finally {
    setBeforeCommitHookForTests(null);
  }
  expect(await probe()).toEqual(before);
  expect(await audits(action)).toBe(auditsBefore);
  const out = await change();
  expect(await probe()).not.toEqual(before);
  expect(await audits(action)).toBe(auditsBefore + 1);
  return out;
}

beforeAll(() => {
  seq = testSequelize();
});

afterAll(async () => {
  setBeforeCommitHookForTests(null);
  await closeTestSequelize();
});

describe('alarm state changes', () => {
  let id = 0;
  const key = `test:atomic:${run}`;
  const state = async () => {
    const a = await getAlarm(seq, id);
    const events = (await select<{ n: number }>(seq, `select count(*)::int as n from alarm_events where alarm_id = $1`, [id]))[0]!
      .n;
    return { state: a?.state, active: a?.active, shelvedUntilMs: a?.shelvedUntilMs, events };
  };

  beforeAll(async () => {
    ({ id } = await raiseAlarm(seq, {
      sourceKind: 'system',
      sourceKey: key,
      sourceLabel: `Atomic test ${run}`,
      priority: 'low',
      message: 'raised by the audit atomicity test',
      atMs: Date.now(),
    }));
  });

  afterAll(async () => {
    await clearAlarm(seq, key, Date.now());
  });

  it('acknowledge', async () => {
    await atomic('alarm.ack', state, () =>
      applyAlarmEventAudited(seq, engineer, id, { type: 'ack', comment: 'seen' }, Date.now()),
    );
    expect((await getAlarm(seq, id))?.state).toBe('acked');
  });

  it('shelve and unshelve', async () => {
    await atomic('alarm.shelve', state, () =>
      applyAlarmEventAudited(seq, engineer, id, { type: 'shelve', minutes: 30, reason: 'sensor swap' }, Date.now()),
    );
    expect((await getAlarm(seq, id))?.state).toBe('shelved');
    await atomic('alarm.unshelve', state, () => applyAlarmEventAudited(seq, engineer, id, { type: 'unshelve' }, Date.now()));
  });

  it('out of service and back', async () => {
    await atomic('alarm.remove-from-service', state, () =>
      applyAlarmEventAudited(seq, engineer, id, { type: 'remove-from-service', reason: 'maintenance' }, Date.now()),
    );
    expect((await getAlarm(seq, id))?.state).toBe('out-of-service');
    await atomic('alarm.return-to-service', state, () =>
      applyAlarmEventAudited(seq, engineer, id, { type: 'return-to-service', reason: 'done' }, Date.now()),
    );
  });

  it('bulk acknowledgement', async () => {
    // Re-annunciate: clear, then raise again (a new activation into unacked).
    await raiseAlarm(seq, {
      sourceKind: 'system',
      sourceKey: key,
      sourceLabel: `Atomic test ${run}`,
      priority: 'low',
      message: 'again',
      atMs: Date.now(),
    });
    expect((await getAlarm(seq, id))?.state).toBe('unacked');
    const r = await atomic('alarm.ack', state, () => bulkAckAudited(seq, engineer, [id], 'bulk', Date.now()));
    expect(r.acknowledged.map((a) => a.alarm.id)).toEqual([id]);
  });
});

describe('alarm settings', () => {
  let channelId = 0;
  let characteristicId = 0;
  const input: AlarmConfigInput = {
    enabled: true,
    limitsMode: 'absolute',
    high: 1e6,
    low: null,
    deadband: 0,
    onDelayMs: 0,
    offDelayMs: 0,
    priority: 'low',
    onlyWhileRunning: false,
    label: null,
    staleSeconds: null,
    stalePriority: 'low',
    note: `atomic ${run}`,
  };
  const channelConfig = async () => (await AlarmConfig.findOne({ where: { channelId }, raw: true })) ?? null;

  beforeAll(async () => {
    const [free] = await select<{ id: number }>(
      seq,
      `select c.id from channels c where c.kind = 'room-temperature'
          and not exists (select 1 from alarm_configs a where a.channel_id = c.id) order by c.id limit 1`,
    );
    channelId = free!.id;
    const [ch] = await select<{ id: number }>(
      seq,
      `select ch.id from characteristics ch where not exists (select 1 from alarm_configs a where a.characteristic_id = ch.id) order by ch.id limit 1`,
    );
    characteristicId = ch!.id;
  });

  afterAll(async () => {
    await AlarmConfig.destroy({ where: { characteristicId } });
    await AlarmConfig.destroy({ where: { channelId } });
  });

  it("a channel's settings saved, then removed", async () => {
    await atomic('alarm.configure', channelConfig, () => saveChannelAlarmConfig(seq, engineer, channelId, input));
    await atomic('alarm.configure', channelConfig, () =>
      saveChannelAlarmConfig(seq, engineer, channelId, { ...input, high: 2e6 }),
    );
    await atomic('alarm.configure', channelConfig, () => removeChannelAlarmConfig(seq, engineer, channelId));
  });

  it("a characteristic's alarm settings", async () => {
    const probe = async () => (await AlarmConfig.findOne({ where: { characteristicId }, raw: true })) ?? null;
    await atomic('alarm.configure', probe, () =>
      saveCharacteristicAlarmConfig(seq, engineer, characteristicId, { enabled: true, priority: 'low', note: `atomic ${run}` }),
    );
  });

  it('escalation rules and the on-shift address (site settings)', async () => {
    const original = await escalationSettings(seq);
    const probe = async () =>
      (await SiteSetting.findAll({ where: { key: ['alarmEscalation', 'onShiftEngineerEmail'] }, raw: true })).map((r) => [
        r.key,
        r.value,
      ]);
    try {
      await atomic('alarm.escalation', probe, () =>
        saveEscalationAudited(seq, engineer, { ...original, onShiftEngineerEmail: `atomic-${run}@fernhollow.example` }),
      );
    } finally {
      await saveEscalationAudited(seq, engineer, original);
    }
  });
});

describe('characteristics and limit sets', () => {
  let id = 0;
  let fields: Omit<CharacteristicFields, 'backfillDays'>;
  let assetId = 0;

  beforeAll(async () => {
    const demo = (await Characteristic.findOne({ order: [['id', 'ASC']] }))!;
    const rec = (await getCharacteristicRecord(seq, demo.id))!;
    assetId = rec.assetId;
    fields = {
      name: `Atomic test ${run}`,
      description: 'made by the audit atomicity test',
      channelIds: rec.channelIds,
      subgroupRule: rec.subgroupRule,
      subgroupSize: rec.subgroupSize,
      chart: rec.chart,
      chartParams: rec.chartParams,
      rules: rec.rules,
      spec: rec.spec,
      unit: rec.unit,
      active: false,
    };
  });

  afterAll(async () => {
    if (id) await Characteristic.destroy({ where: { id } });
  });

  const named = () => Characteristic.count({ where: { name: fields.name } });

  it('create and edit a characteristic', async () => {
    id = await atomic('characteristic.create', named, () => createCharacteristicAudited(seq, engineer, fields, assetId));
    const description = async () => (await Characteristic.findByPk(id))?.description;
    await atomic('characteristic.update', description, () =>
      updateCharacteristicAudited(seq, engineer, id, { ...fields, description: 'edited' }, assetId, fields),
    );
  });

  const draftOf = (): NewLimitSet => ({
    characteristicId: id,
    chart: fields.chart,
    limitSet: { chart: fields.chart, center: 10, ucl: 13, lcl: 7, sigma: 1, subgroupSize: fields.subgroupSize, dispersion: null },
    params: fields.chartParams,
    baselineFromMs: Date.now() - 86_400_000,
    baselineToMs: Date.now() - 3_600_000,
    baselineFirstIndex: null,
    baselineLastIndex: null,
    baselinePoints: 25,
    excluded: [],
    suggested: [],
    capability: null,
    note: `atomic ${run}`,
    createdBy: null,
  });
  const sets = async () =>
    (await LimitSet.findAll({ where: { characteristicId: id }, order: [['id', 'ASC']], raw: true })).map((s) => [s.id, s.status]);

  it('draft, approve and discard limit sets', async () => {
    const draft = await atomic('limits.draft', sets, () => draftLimitSetAudited(seq, engineer, draftOf()));
    expect(draft.status).toBe('draft');
    await atomic('limits.approve', sets, () => approveLimitSetAudited(seq, engineer, draft.id, signature, Date.now(), null));
    expect((await getLimitSet(seq, draft.id))?.status).toBe('approved');
    const second = await draftLimitSetAudited(seq, engineer, draftOf());
    await atomic('limits.discard-draft', sets, () => discardDraftAudited(seq, engineer, id, second.id));
  });
});

describe('process windows', () => {
  let lacquerId = 0;
  let materialId = 0;
  let lineId = 0;
  let limits = {} as ProcessWindowLimits;

  beforeAll(async () => {
    const [lq] = await select<{ id: number }>(seq, `select id from lacquers order by id limit 1`);
    lacquerId = lq!.id;
    const [m] = await select<{ id: number }>(
      seq,
      `insert into materials (code, name, refractive_index) values ($1, $2, 1.5) returning id`,
      [`at-${run}`, `Atomic test substrate ${run}`],
    );
    materialId = m!.id;
    limits = (await ProcessWindow.findOne({ order: [['id', 'ASC']] }))!.limits as ProcessWindowLimits;
    const site = (await Asset.findOne({ order: [['id', 'ASC']] }))!;
    lineId = (
      await Asset.create({
        siteId: site.siteId,
        parentId: null,
        kind: 'line',
        code: `at-${run}`,
        name: `Atomic test line ${run}`,
      })
    ).id;
  });

  afterAll(async () => {
    await WindowAssignment.destroy({ where: { assetId: lineId } });
    await ProcessWindow.destroy({ where: { materialId } });
    await Asset.destroy({ where: { id: lineId } });
    await select(seq, `delete from materials where id = $1 returning id`, [materialId]);
  });

  const versions = async () =>
    (await ProcessWindow.findAll({ where: { materialId }, order: [['id', 'ASC']], raw: true })).map((w) => [
      w.id,
      w.status,
      w.name,
    ]);

  it('draft, edit, approve (signed) and assign a window', async () => {
    const w = await atomic('window.draft', versions, () =>
      createWindowDraft(seq, editor, { lacquerId, materialId, name: `Atomic ${run}`, limits }),
    );
    await atomic('window.edit', versions, () => updateWindowDraft(seq, editor, w.id, { name: `Atomic ${run} (edited)` }));
    await atomic('window.approve', versions, () => approveWindowDraft(seq, editor, w.id, signature));
    const assignments = () => WindowAssignment.count({ where: { assetId: lineId } });
    const a = await atomic('window.assign', assignments, () =>
      assignWindowToAsset(seq, editor, { assetId: lineId, windowId: w.id }),
    );
    expect(a.windowId).toBe(w.id);
  });
});
