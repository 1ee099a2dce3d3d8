/**
 * The alarm API end to end on the running test stack: a reading published over
 * MQTT with a demo device's credentials raises an alarm that shows on the API and on the live
 * SSE stream; acknowledgement, shelving (with expiry by the worker), out of service, bulk
 * acknowledgement, role refusals, validation with field paths, refusals by the state model
 * (409), escalation e-mail caught by the fake SMTP relay, settings and health figures.
 *
 * Expected states come from the ANSI/ISA-18.2 / IEC 62682 state model as implemented in
 * `src/lib/domain/alarms/state.ts` (e.g. an acknowledged alarm returns to `unacked` when its
 * shelf expires while the condition is still active). Limits and readings are hand-chosen.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { clearAlarm, raiseAlarm } from '../../src/lib/core/alarm-store.ts';
import { api, signIn, type Session } from '../support/http.ts';
import { closeTestSequelize, testSequelize } from '../support/sequelize.ts';
import {
  channelIdOf,
  closeAlarmHelpers,
  configureChannel,
  connectDevice,
  eventually,
  openStream,
  testDb,
  type DeviceLink,
  type LiveStream,
} from '../support/alarm-helpers.ts';

let dev: DeviceLink;
let stream: LiveStream;
let operator: Session;
let engineer: Session;
let viewer: Session;
let spin: number;
let uv: number;
let alarmId: number;
const run = Math.random().toString(36).slice(2, 8);

/** Next reading time for the coater's channels: strictly increasing. */
let lastT = Date.now() - 100_000;
const tNext = () => (lastT = Math.max(lastT + 10, Date.now()));

beforeAll(async () => {
  [operator, engineer, viewer] = await Promise.all([signIn('operator'), signIn('engineer'), signIn('viewer')]);
  spin = await channelIdOf('uv-1', 'spin-speed');
  uv = await channelIdOf('uv-1', 'irradiance');
  // Hand-chosen limits: spin speed above 2000 rpm alarms at once (no on-delay), deadband 20 rpm.
  await configureChannel(spin, { high: 2000, deadband: 20, onDelayMs: 0, priority: 'low', note: `api test ${run}` });
  await configureChannel(uv, { high: 300, deadband: 5, onDelayMs: 0, priority: 'low', note: `api test ${run}` });
  dev = await connectDevice('gw-uv-1');
  stream = await openStream(operator, ['alarms']);
});

afterAll(async () => {
  stream?.close();
  await dev?.close();
  await api('/api/v1/alarm-configs/escalation', {
    method: 'PUT',
    session: engineer,
    json: {
      rules: [{ priority: 'high', steps: [{ afterMinutes: 10, notify: 'on-shift-engineer' }] }],
      onShiftEngineerEmail: 'engineer@fernhollow.example',
    },
  });
  await closeAlarmHelpers();
  await closeTestSequelize();
});

describe('raise over MQTT, see it on the API and live', () => {
  it('an out-of-limit reading raises an alarm seen on the SSE stream and in GET /api/v1/alarms', async () => {
    stream.mark();
    await dev.publish('uv-1', 'spin-speed', 1500, tNext());
    await dev.publish('uv-1', 'spin-speed', 2600, tNext());
    const live = await stream.next(
      (e) => e.event === 'alarms' && e.data.sourceKey === `channel:${spin}:high` && e.data.state === 'unacked',
      5_000,
    );
    alarmId = live.data.id;
    expect(live.data).toMatchObject({
      sourceKind: 'limit',
      priority: 'low',
      channelId: spin,
      active: true,
      value: 2600,
      limit: 2000,
    });
    expect(live.data.message).toBe('Spin speed 2600 rpm above the alarm high 2000 rpm');

    const list = await api('/api/v1/alarms?state=open&priority=low', { session: viewer });
    expect(list.status).toBe(200);
    expect(list.body.find((a: { id: number }) => a.id === alarmId)).toMatchObject({
      state: 'unacked',
      sourceLabel: 'UV spin coater 1: Spin speed',
    });

    const one = await api(`/api/v1/alarms/${alarmId}`, { session: viewer });
    expect(one.status).toBe(200);
    expect(one.body.events.map((e: { event: string }) => e.event)).toEqual(['activate']);
  });

  it('filters by ISA state name and refuses an unknown state with its path', async () => {
    const unacked = await api('/api/v1/alarms?state=unacked', { session: viewer });
    expect(unacked.body.some((a: { id: number }) => a.id === alarmId)).toBe(true);
    const shelved = await api('/api/v1/alarms?state=shelved', { session: viewer });
    expect(shelved.body.some((a: { id: number }) => a.id === alarmId)).toBe(false);
    const bad = await api('/api/v1/alarms?state=angry', { session: viewer });
    expect(bad.status).toBe(400);
    expect(bad.body.errors[0].path).toBe('state');
    expect((await api('/api/v1/alarms')).status).toBe(401);
  });
});

describe('acknowledge', () => {
  it('a viewer is refused with 403', async () => {
    const r = await api(`/api/v1/alarms/${alarmId}/ack`, { method: 'POST', session: viewer, json: { comment: 'seen' } });
    expect(r.status).toBe(403);
  });

  it('no comment → 400 with the field path', async () => {
    const r = await api(`/api/v1/alarms/${alarmId}/ack`, { method: 'POST', session: operator, json: {} });
    expect(r.status).toBe(400);
    expect(r.headers.get('content-type')).toContain('application/problem+json');
    expect(r.body.errors).toEqual([expect.objectContaining({ path: 'comment' })]);
    const blank = await api(`/api/v1/alarms/${alarmId}/ack`, { method: 'POST', session: operator, json: { comment: '   ' } });
    expect(blank.status).toBe(400);
    expect(blank.body.errors[0].path).toBe('comment');
  });

  it('the operator acknowledges with a comment; it is audited and published; a second ack is 409', async () => {
    stream.mark();
    const r = await api(`/api/v1/alarms/${alarmId}/ack`, {
      method: 'POST',
      session: operator,
      json: { comment: 'Spin motor checked' },
    });
    expect(r.status).toBe(200);
    expect(r.body).toMatchObject({ id: alarmId, state: 'acked', active: true, ackedBy: 'Olu Operator' });
    await stream.next((e) => e.data.id === alarmId && e.data.state === 'acked', 5_000);
    const audit = await testDb().query(`select actor_label, after from audit_log where action = 'alarm.ack' and entity_id = $1`, [
      String(alarmId),
    ]);
    expect(audit.rows).toHaveLength(1);
    expect(audit.rows[0].after).toMatchObject({ state: 'acked', comment: 'Spin motor checked' });

    const again = await api(`/api/v1/alarms/${alarmId}/ack`, { method: 'POST', session: operator, json: { comment: 'again' } });
    expect(again.status).toBe(409);
    expect(again.body.detail).toBe('already acknowledged');
    const missing = await api(`/api/v1/alarms/99999999/ack`, { method: 'POST', session: operator, json: { comment: 'x' } });
    expect(missing.status).toBe(404);
  });
});

describe('shelve, shelf expiry, out of service', () => {
  it('only an engineer may shelve; minutes are validated with their path', async () => {
    const op = await api(`/api/v1/alarms/${alarmId}/shelve`, {
      method: 'POST',
      session: operator,
      json: { minutes: 30, reason: 'lamp change' },
    });
    expect(op.status).toBe(403);
    const zero = await api(`/api/v1/alarms/${alarmId}/shelve`, {
      method: 'POST',
      session: engineer,
      json: { minutes: 0, reason: 'lamp change' },
    });
    expect(zero.status).toBe(400);
    expect(zero.body.errors[0].path).toBe('minutes');
  });

  it('shelved for 30 min, then the worker ends an expired shelf (shelf-expired) and the active alarm needs acknowledgement again', async () => {
    const before = Date.now();
    const r = await api(`/api/v1/alarms/${alarmId}/shelve`, {
      method: 'POST',
      session: engineer,
      json: { minutes: 30, reason: 'lamp change' },
    });
    expect(r.status).toBe(200);
    expect(r.body.state).toBe('shelved');
    expect(r.body.shelvedUntilMs).toBeGreaterThanOrEqual(before + 30 * 60_000);
    expect(r.body.shelvedUntilMs).toBeLessThanOrEqual(Date.now() + 30 * 60_000);
    const twice = await api(`/api/v1/alarms/${alarmId}/shelve`, {
      method: 'POST',
      session: engineer,
      json: { minutes: 5, reason: 'again' },
    });
    expect(twice.status).toBe(409);
    expect(twice.body.detail).toBe('already shelved; unshelve it first');
    const open = await api('/api/v1/alarms?state=open', { session: viewer });
    expect(open.body.some((a: { id: number }) => a.id === alarmId)).toBe(false);

    // Whole minutes only, so end the shelf in the past by SQL and wait for the worker's tick.
    stream.mark();
    await testDb().query(`update alarms set shelved_until = now() - interval '1 second' where id = $1`, [alarmId]);
    const live = await stream.next((e) => e.data.id === alarmId && e.data.state === 'unacked', 10_000);
    expect(live.data.shelvedUntilMs).toBeNull();
    const detail = await api(`/api/v1/alarms/${alarmId}`, { session: viewer });
    expect(detail.body.events.map((e: { event: string }) => e.event)).toEqual(['activate', 'ack', 'shelve', 'shelf-expired']);
    expect(detail.body.events[2].comment).toBe('30 min: lamp change');
  });

  it('unshelve of an alarm that is not shelved is refused with the reason', async () => {
    const r = await api(`/api/v1/alarms/${alarmId}/unshelve`, { method: 'POST', session: engineer, json: {} });
    expect(r.status).toBe(409);
    expect(r.body.detail).toBe('the alarm is not shelved');
  });

  it('out of service and back (engineer, with reasons); an out-of-service alarm cannot be acknowledged', async () => {
    const oos = await api(`/api/v1/alarms/${alarmId}/out-of-service`, {
      method: 'POST',
      session: engineer,
      json: { reason: 'encoder swap' },
    });
    expect(oos.status).toBe(200);
    expect(oos.body.state).toBe('out-of-service');
    const ack = await api(`/api/v1/alarms/${alarmId}/ack`, { method: 'POST', session: operator, json: { comment: 'x' } });
    expect(ack.status).toBe(409);
    expect(ack.body.detail).toBe('cannot acknowledge: the alarm is out of service');
    const noReason = await api(`/api/v1/alarms/${alarmId}/return-to-service`, {
      method: 'POST',
      session: engineer,
      json: { reason: 'x' },
    });
    expect(noReason.status).toBe(400);
    expect(noReason.body.errors[0].path).toBe('reason');
    const back = await api(`/api/v1/alarms/${alarmId}/return-to-service`, {
      method: 'POST',
      session: engineer,
      json: { reason: 'encoder fitted' },
    });
    expect(back.body.state).toBe('unacked');
  });

  it('the condition returns inside the deadband: an acknowledged alarm goes to normal', async () => {
    const from = stream.mark();
    await api(`/api/v1/alarms/${alarmId}/ack`, { method: 'POST', session: operator, json: { comment: 'back in service' } });
    const acked = await stream.next((e) => e.data.id === alarmId && e.data.state === 'acked', 5_000);
    await dev.publish('uv-1', 'spin-speed', 1990, tNext()); // inside the limit but not by more than the 20 rpm deadband
    const back = tNext();
    await dev.publish('uv-1', 'spin-speed', 1900, back);
    const live = await stream.next((e) => e.data.id === alarmId && e.data.state === 'normal', 5_000);
    expect(live.data.active).toBe(false);
    // The worker judges a channel's readings in order: 1990 was judged before 1900. Had it changed
    // the alarm, its event would stand between the acknowledgement and this one; it is 1900's clear.
    const seen = stream.since(from);
    const between = seen.slice(seen.indexOf(acked) + 1, seen.indexOf(live)).filter((e) => e.data.id === alarmId);
    expect(between).toEqual([]);
    expect(live.data.clearedAtMs).toBe(back);
  });
});

describe('bulk acknowledgement', () => {
  it('acknowledges each listed alarm on its own and reports the ones refused', async () => {
    stream.mark();
    await dev.publish('uv-1', 'spin-speed', 2500, tNext());
    await dev.publish('uv-1', 'irradiance', 350, tNext());
    const a = await stream.next(
      (e) => e.data.sourceKey === `channel:${spin}:high` && e.data.state === 'unacked' && e.data.id !== alarmId,
      5_000,
    );
    const b = await stream.next((e) => e.data.sourceKey === `channel:${uv}:high` && e.data.state === 'unacked', 5_000);
    expect(a.data.id).not.toBe(alarmId); // the earlier alarm went to normal: a new occurrence is a new alarm

    const viewerTry = await api('/api/v1/alarms/ack', {
      method: 'POST',
      session: viewer,
      json: { ids: [a.data.id], comment: 'x' },
    });
    expect(viewerTry.status).toBe(403);
    const noComment = await api('/api/v1/alarms/ack', { method: 'POST', session: operator, json: { ids: [a.data.id] } });
    expect(noComment.status).toBe(400);
    expect(noComment.body.errors[0].path).toBe('comment');
    const dupes = await api('/api/v1/alarms/ack', {
      method: 'POST',
      session: operator,
      json: { ids: [a.data.id, a.data.id], comment: 'x' },
    });
    expect(dupes.status).toBe(400);
    expect(dupes.body.errors[0].path).toBe('ids');

    const r = await api('/api/v1/alarms/ack', {
      method: 'POST',
      session: operator,
      json: { ids: [a.data.id, b.data.id, 99999999], comment: 'Coater stopped for inspection' },
    });
    expect(r.status).toBe(200);
    expect(r.body.acknowledged.map((x: { id: number }) => x.id).sort()).toEqual([a.data.id, b.data.id].sort());
    expect(r.body.acknowledged.every((x: { state: string }) => x.state === 'acked')).toBe(true);
    expect(r.body.refused).toEqual([{ id: 99999999, status: 404, reason: 'alarm 99999999 does not exist' }]);
    const audits = await testDb().query(
      `select count(*)::int as n from audit_log where action = 'alarm.ack' and entity_id = any($1)`,
      [[String(a.data.id), String(b.data.id)]],
    );
    expect(audits.rows[0].n).toBe(2);
    alarmId = a.data.id;
  });
});

describe('escalation e-mail', () => {
  it('a 0-minute step is refused by the shared rule schema (steps are whole minutes ≥ 1), with its path', async () => {
    const r = await api('/api/v1/alarm-configs/escalation', {
      method: 'PUT',
      session: engineer,
      json: {
        rules: [{ priority: 'low', steps: [{ afterMinutes: 0, notify: 'on-shift-engineer' }] }],
        onShiftEngineerEmail: 'x@fernhollow.example',
      },
    });
    expect(r.status).toBe(400);
    expect(r.body.errors[0].path).toBe('rules.0.steps.0.afterMinutes');
    expect((await api('/api/v1/alarm-configs/escalation', { session: operator })).status).toBe(403);
  });

  it('an unacknowledged alarm past its step e-mails the on-shift engineer once, with a link to it', async () => {
    const address = `shift-${run}@fernhollow.example`;
    const put = await api('/api/v1/alarm-configs/escalation', {
      method: 'PUT',
      session: engineer,
      json: {
        rules: [{ priority: 'low', steps: [{ afterMinutes: 1, notify: 'on-shift-engineer' }] }],
        onShiftEngineerEmail: address,
      },
    });
    expect(put.status).toBe(200);
    expect(put.body.onShiftEngineerEmail).toBe(address);

    stream.mark();
    await dev.publish('uv-1', 'spin-speed', 1800, tNext()); // clears the acknowledged alarm → normal
    await dev.publish('uv-1', 'spin-speed', 2700, tNext());
    const live = await stream.next(
      (e) => e.data.sourceKey === `channel:${spin}:high` && e.data.state === 'unacked' && e.data.value === 2700,
      5_000,
    );
    const id = live.data.id as number;
    // One minute is the shortest step: make the alarm two minutes old instead of waiting.
    await testDb().query(
      `update alarms set raised_at = raised_at - interval '2 minutes', last_activated_at = last_activated_at - interval '2 minutes' where id = $1`,
      [id],
    );
    const mail = await eventually(
      async () => {
        const r = await testDb().query<{ mail_to: string; subject: string; body: string }>(
          `select mail_to, subject, body from outbox_mail where mail_to = $1 and body like $2`,
          [address, `%/alarms?focus=${id}%`],
        );
        return r.rows[0];
      },
      15_000,
      'the escalation e-mail',
    );
    expect(mail.subject).toContain('low-priority alarm unacknowledged 1 min');
    expect(mail.body).toContain('Spin speed 2700 rpm above the alarm high 2000 rpm');
    expect(mail.body).toContain('They are not a safety-instrumented function');
    const detail = await api(`/api/v1/alarms/${id}`, { session: viewer });
    expect(detail.body.escalationStepsSent).toEqual([0]);
    expect(detail.body.events.filter((e: { event: string }) => e.event === 'escalate')).toHaveLength(1);
    // Later escalation passes must not send this step again. A second alarm past the same step
    // proves a later pass ran: each pass walks the waiting alarms by id, this one first.
    await dev.publish('uv-1', 'irradiance', 280, tNext()); // clears the acknowledged irradiance alarm → normal
    await dev.publish('uv-1', 'irradiance', 400, tNext());
    const second = await stream.next(
      (e) => e.data.sourceKey === `channel:${uv}:high` && e.data.state === 'unacked' && e.data.value === 400,
      5_000,
    );
    const laterId = second.data.id as number;
    expect(laterId).toBeGreaterThan(id);
    await testDb().query(
      `update alarms set raised_at = raised_at - interval '2 minutes', last_activated_at = last_activated_at - interval '2 minutes' where id = $1`,
      [laterId],
    );
    await eventually(
      async () =>
        (
          await testDb().query(`select 1 from outbox_mail where mail_to = $1 and body like $2`, [
            address,
            `%/alarms?focus=${laterId}%`,
          ])
        ).rows[0],
      15_000,
      "the second alarm's escalation e-mail (a later pass)",
    );
    const count = await testDb().query(`select count(*)::int as n from outbox_mail where mail_to = $1 and body like $2`, [
      address,
      `%/alarms?focus=${id}%`,
    ]);
    expect(count.rows[0].n).toBe(1);
    await api(`/api/v1/alarms/ack`, {
      method: 'POST',
      session: operator,
      json: { ids: [id, laterId], comment: 'seen after escalation' },
    });
  });
});

describe('alarm settings and health', () => {
  it('engineers read and write channel settings; bad limits and unknown channels are refused', async () => {
    const list = await api('/api/v1/alarm-configs', { session: engineer });
    expect(list.status).toBe(200);
    expect(list.body.find((c: { channelId: number }) => c.channelId === spin).config).toMatchObject({ high: 2000, deadband: 20 });
    expect((await api('/api/v1/alarm-configs', { session: operator })).status).toBe(403);
    const bad = await api(`/api/v1/alarm-configs/${uv}`, {
      method: 'PUT',
      session: engineer,
      json: { enabled: true, high: 10, low: 20 },
    });
    expect(bad.status).toBe(400);
    expect(bad.body.errors[0].path).toBe('low');
    const none = await api('/api/v1/alarm-configs/99999999', {
      method: 'PUT',
      session: engineer,
      json: { enabled: true, high: 10 },
    });
    expect(none.status).toBe(404);
    const audit = await testDb().query(
      `select count(*)::int as n from audit_log where action = 'alarm.configure' and entity_id = $1`,
      [String(spin)],
    );
    expect(audit.rows[0].n).toBeGreaterThanOrEqual(1);
  });

  it('a characteristic’s control-chart alarms can be switched off or given another priority; the store follows it', async () => {
    const list = await api('/api/v1/alarm-configs/characteristics', { session: engineer });
    expect(list.status).toBe(200);
    expect(list.body.length, 'the demo seed defines control-chart characteristics').toBeGreaterThan(0);
    const charId = list.body[0].characteristicId as number;
    const input = {
      sourceKind: 'spc' as const,
      sourceKey: `char-test:${run}`,
      sourceLabel: `API test characteristic ${run}`,
      characteristicId: charId,
      priority: 'medium' as const,
      message: 'test violation',
      atMs: Date.now(),
    };
    expect(
      (
        await api(`/api/v1/alarm-configs/characteristics/${charId}`, {
          method: 'PUT',
          session: operator,
          json: { enabled: false, priority: 'low' },
        })
      ).status,
    ).toBe(403);
    const bad = await api(`/api/v1/alarm-configs/characteristics/${charId}`, {
      method: 'PUT',
      session: engineer,
      json: { enabled: false, priority: 'urgent' },
    });
    expect(bad.status).toBe(400);
    expect(bad.body.errors[0].path).toBe('priority');
    expect(
      (
        await api(`/api/v1/alarm-configs/characteristics/99999999`, {
          method: 'PUT',
          session: engineer,
          json: { enabled: true, priority: 'low' },
        })
      ).status,
    ).toBe(404);

    const off = await api(`/api/v1/alarm-configs/characteristics/${charId}`, {
      method: 'PUT',
      session: engineer,
      json: { enabled: false, priority: 'low' },
    });
    expect(off.status).toBe(200);
    expect(await raiseAlarm(testSequelize(), input)).toEqual({ id: 0, created: false });

    await api(`/api/v1/alarm-configs/characteristics/${charId}`, {
      method: 'PUT',
      session: engineer,
      json: { enabled: true, priority: 'high' },
    });
    const raised = await raiseAlarm(testSequelize(), { ...input, atMs: Date.now() });
    expect(raised.created).toBe(true);
    expect((await api(`/api/v1/alarms/${raised.id}`, { session: viewer })).body.priority).toBe('high');

    await clearAlarm(testSequelize(), input.sourceKey, Date.now());
    await api(`/api/v1/alarms/${raised.id}/ack`, { method: 'POST', session: operator, json: { comment: 'test alarm' } });
    await api(`/api/v1/alarm-configs/characteristics/${charId}`, {
      method: 'PUT',
      session: engineer,
      json: { enabled: true, priority: 'medium' },
    });
  });

  it('health figures for the last hour count the alarms raised here; CSV export; viewer yes, operator no', async () => {
    const to = Date.now() + 1000;
    const from = to - 3_600_000;
    const r = await api(`/api/v1/alarms/kpi?from=${from}&to=${to}`, { session: viewer });
    expect(r.status).toBe(200);
    // This file raised at least four annunciated activations in the hour (spin ×3, irradiance ×1).
    expect(r.body.totalAlarms).toBeGreaterThanOrEqual(4);
    expect(r.body.per10Min.reduce((s: number, b: { count: number }) => s + b.count, 0)).toBe(r.body.totalAlarms);
    expect(r.body.topSources.some((s: { source: string }) => s.source === 'UV spin coater 1: Spin speed (high)')).toBe(true);
    const csv = await api(`/api/v1/alarms/kpi?from=${from}&to=${to}&format=csv`, { session: viewer });
    expect(csv.headers.get('content-type')).toContain('text/csv');
    expect(String(csv.body).split('\n')[0]).toBe('section,key,value');
    expect((await api(`/api/v1/alarms/kpi`, { session: operator })).status).toBe(403);
    const backwards = await api(`/api/v1/alarms/kpi?from=${to}&to=${from}`, { session: viewer });
    expect(backwards.status).toBe(400);
    expect(backwards.body.errors[0].path).toBe('from');
  });
});
