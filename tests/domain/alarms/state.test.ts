// Alarm state model: ANSI/ISA-18.2-2016 / IEC 62682:2014 alarm states and transitions.
// The expected outcomes below are written out by hand from the standard's state diagram and
// Coatrail's role decisions (documented in src/lib/domain/alarms/state.ts); they are not
// derived from the code under test.
import { describe, it, expect } from 'vitest';
import {
  ALARM_EVENTS,
  ALARM_STATES,
  STATE_LABELS,
  isAnnunciated,
  needsAcknowledgement,
  stateLabel,
  transition,
  type AlarmActor,
  type AlarmEvent,
  type AlarmEventType,
  type AlarmRecord,
  type AlarmState,
} from '../../../src/lib/domain/alarms/state';

const NOW = 1_700_000_000_000;
const UNTIL_PAST = NOW - 1; // shelf already over, so shelf-expired applies at NOW

const ROLES: AlarmActor[] = ['operator', 'engineer', 'quality', 'admin', 'viewer', 'system'];

// Who may send each event (Coatrail's alarm philosophy), written out by hand.
const ALLOWED: Record<AlarmEventType, AlarmActor[]> = {
  activate: ['system'],
  clear: ['system'],
  ack: ['operator', 'engineer'],
  shelve: ['engineer'],
  unshelve: ['engineer'],
  'shelf-expired': ['system'],
  suppress: ['system'],
  unsuppress: ['system'],
  'remove-from-service': ['engineer'],
  'return-to-service': ['engineer'],
};

// Starting records: the four alarm states fix `active`; the three held states are tried with
// the condition active (+) and inactive (-).
const START: Record<string, AlarmRecord> = {
  normal: { state: 'normal', active: false, shelvedUntilMs: null },
  unacked: { state: 'unacked', active: true, shelvedUntilMs: null },
  acked: { state: 'acked', active: true, shelvedUntilMs: null },
  'rtn-unacked': { state: 'rtn-unacked', active: false, shelvedUntilMs: null },
  'shelved+': { state: 'shelved', active: true, shelvedUntilMs: UNTIL_PAST },
  'shelved-': { state: 'shelved', active: false, shelvedUntilMs: UNTIL_PAST },
  'suppressed+': { state: 'suppressed', active: true, shelvedUntilMs: null },
  'suppressed-': { state: 'suppressed', active: false, shelvedUntilMs: null },
  'out-of-service+': { state: 'out-of-service', active: true, shelvedUntilMs: null },
  'out-of-service-': { state: 'out-of-service', active: false, shelvedUntilMs: null },
};

const EVENT: Record<AlarmEventType, AlarmEvent> = {
  activate: { type: 'activate' },
  clear: { type: 'clear' },
  ack: { type: 'ack', comment: 'checked the bath, solvent added' },
  shelve: { type: 'shelve', minutes: 30, reason: 'thermocouple being replaced' },
  unshelve: { type: 'unshelve' },
  'shelf-expired': { type: 'shelf-expired' },
  suppress: { type: 'suppress' },
  unsuppress: { type: 'unsuppress' },
  'remove-from-service': { type: 'remove-from-service', reason: 'oven 2 down for maintenance' },
  'return-to-service': { type: 'return-to-service', reason: 'maintenance finished' },
};

// Outcome for a permitted role. 'x' = refused; '=' = accepted, nothing changes;
// otherwise the next state and condition (+ active, - inactive).
type Cell = string;
const E = ALARM_EVENTS;
// prettier-ignore
const TABLE: Record<string, Cell[]> = {
  //                  activate              clear                 ack          shelve       unshelve   shelf-expired suppress        unsuppress   remove-from-service   return-to-service
  'normal':          ['unacked+',          '=',                  'x',         'shelved-',  'x',       'x',          'suppressed-',  '=',         'out-of-service-',    'x'],
  'unacked':         ['=',                 'rtn-unacked-',       'acked+',    'shelved+',  'x',       'x',          'suppressed+',  '=',         'out-of-service+',    'x'],
  'acked':           ['=',                 'normal-',            'x',         'shelved+',  'x',       'x',          'suppressed+',  '=',         'out-of-service+',    'x'],
  'rtn-unacked':     ['unacked+',          '=',                  'normal-',   'shelved-',  'x',       'x',          'suppressed-',  '=',         'out-of-service-',    'x'],
  'shelved+':        ['=',                 'shelved-',           'x',         'x',         'unacked+','unacked+',   '=',            '=',         'out-of-service+',    'x'],
  'shelved-':        ['shelved+',          '=',                  'x',         'x',         'normal-', 'normal-',    '=',            '=',         'out-of-service-',    'x'],
  'suppressed+':     ['=',                 'suppressed-',        'x',         'x',         'x',       'x',          '=',            'unacked+',  'out-of-service+',    'x'],
  'suppressed-':     ['suppressed+',       '=',                  'x',         'x',         'x',       'x',          '=',            'normal-',   'out-of-service-',    'x'],
  'out-of-service+': ['=',                 'out-of-service-',    'x',         'x',         'x',       'x',          '=',            '=',         'x',                  'unacked+'],
  'out-of-service-': ['out-of-service+',   '=',                  'x',         'x',         'x',       'x',          '=',            '=',         'x',                  'normal-'],
};

function parseCell(cell: string): { state: AlarmState; active: boolean } {
  const active = cell.endsWith('+');
  return { state: cell.slice(0, -1) as AlarmState, active };
}

describe('alarm state model — every state × event × role (ANSI/ISA-18.2 / IEC 62682 state diagram)', () => {
  it('the table covers every state and event', () => {
    expect(new Set(Object.values(START).map((r) => r.state))).toEqual(new Set(ALARM_STATES));
    for (const row of Object.values(TABLE)) expect(row).toHaveLength(E.length);
    expect(E).toHaveLength(10);
  });

  const cases: [string, AlarmEventType, AlarmActor][] = [];
  for (const start of Object.keys(START)) for (const ev of E) for (const role of ROLES) cases.push([start, ev, role]);
  it('has 600 cases', () => expect(cases).toHaveLength(10 * 10 * 6));

  it.each(cases)('%s + %s by %s', (start, ev, role) => {
    const before = START[start]!;
    const frozen = structuredClone(before);
    const result = transition(before, EVENT[ev], { nowMs: NOW, role });
    expect(before).toEqual(frozen); // input untouched

    if (!ALLOWED[ev].includes(role)) {
      expect(result.ok).toBe(false);
      if (!result.ok) expect(result.reason).toMatch(/ cannot /);
      return;
    }
    const cell = TABLE[start]![E.indexOf(ev)]!;
    if (cell === 'x') {
      expect(result.ok).toBe(false);
      if (!result.ok) expect(result.reason.length).toBeGreaterThan(5);
      return;
    }
    expect(result.ok).toBe(true);
    if (!result.ok) return;
    if (cell === '=') {
      expect(result.changed).toBe(false);
      expect(result.alarm).toEqual(before);
      return;
    }
    const want = parseCell(cell);
    expect(result.changed).toBe(true);
    expect(result.alarm.state).toBe(want.state);
    expect(result.alarm.active).toBe(want.active);
    if (want.state === 'shelved' && before.state !== 'shelved') {
      expect(result.alarm.shelvedUntilMs).toBe(NOW + 30 * 60_000);
    } else if (want.state !== 'shelved') {
      expect(result.alarm.shelvedUntilMs ?? null).toBeNull();
    }
  });
});

describe('alarm state model — refusals in plain words', () => {
  const unacked: AlarmRecord = { state: 'unacked', active: true };
  it('names the role', () => {
    expect(transition(unacked, EVENT.ack, { nowMs: NOW, role: 'viewer' })).toEqual({
      ok: false,
      reason: 'a viewer cannot acknowledge alarms',
    });
    expect(transition(unacked, EVENT.ack, { nowMs: NOW, role: 'admin' })).toEqual({
      ok: false,
      reason: 'an admin cannot acknowledge alarms',
    });
    expect(transition(unacked, EVENT.shelve, { nowMs: NOW, role: 'operator' })).toEqual({
      ok: false,
      reason: 'an operator cannot shelve alarms',
    });
    expect(transition(unacked, EVENT.clear, { nowMs: NOW, role: 'engineer' })).toEqual({
      ok: false,
      reason: 'an engineer cannot report a return to normal',
    });
  });
  it('ack needs a comment (blank after trimming refused, 500 characters the most)', () => {
    for (const comment of ['', '   ', '\n\t']) {
      expect(transition(unacked, { type: 'ack', comment }, { nowMs: NOW, role: 'operator' })).toEqual({
        ok: false,
        reason: 'ack needs a comment',
      });
    }
    expect(transition(unacked, { type: 'ack', comment: 'x' }, { nowMs: NOW, role: 'operator' }).ok).toBe(true);
    expect(transition(unacked, { type: 'ack', comment: 'x'.repeat(500) }, { nowMs: NOW, role: 'operator' }).ok).toBe(true);
    expect(transition(unacked, { type: 'ack', comment: 'x'.repeat(501) }, { nowMs: NOW, role: 'operator' }).ok).toBe(false);
  });
  it('already acknowledged', () => {
    expect(transition({ state: 'acked', active: true }, EVENT.ack, { nowMs: NOW, role: 'engineer' })).toEqual({
      ok: false,
      reason: 'already acknowledged',
    });
  });
  it('shelving: minutes 1..1440 whole, reason of at least 3 characters', () => {
    const eng = { nowMs: NOW, role: 'engineer' as const };
    for (const minutes of [0, -5, 1441, 1.5, Number.NaN]) {
      const r = transition(unacked, { type: 'shelve', minutes, reason: 'sensor swap' }, eng);
      expect(r.ok).toBe(false);
      if (!r.ok) expect(r.reason).toBe('shelve for whole minutes from 1 to 1440');
    }
    for (const reason of ['', '  ', 'ab']) {
      expect(transition(unacked, { type: 'shelve', minutes: 10, reason }, eng).ok).toBe(false);
    }
    const one = transition(unacked, { type: 'shelve', minutes: 1, reason: 'abc' }, eng);
    expect(one.ok && one.alarm.shelvedUntilMs).toBe(NOW + 60_000);
    const day = transition(unacked, { type: 'shelve', minutes: 1440, reason: 'abc' }, eng);
    expect(day.ok && day.alarm.shelvedUntilMs).toBe(NOW + 86_400_000);
  });
  it('out of service and back need a reason', () => {
    const eng = { nowMs: NOW, role: 'engineer' as const };
    expect(transition(unacked, { type: 'remove-from-service', reason: ' ' }, eng).ok).toBe(false);
    expect(transition({ state: 'out-of-service', active: false }, { type: 'return-to-service', reason: '' }, eng).ok).toBe(false);
  });
});

describe('alarm state model — shelf expiry and held states', () => {
  const shelvedAt = NOW;
  const until = shelvedAt + 15 * 60_000;
  const shelved: AlarmRecord = { state: 'shelved', active: true, shelvedUntilMs: until };
  const sys = (nowMs: number) => ({ nowMs, role: 'system' as const });

  it('shelf-expired is refused before the end and accepted at or after it', () => {
    expect(transition(shelved, { type: 'shelf-expired' }, sys(until - 1))).toEqual({
      ok: false,
      reason: 'the shelf has not expired yet',
    });
    const at = transition(shelved, { type: 'shelf-expired' }, sys(until));
    expect(at.ok && at.alarm).toEqual({ state: 'unacked', active: true, shelvedUntilMs: null });
  });

  it('a condition that comes and goes while shelved is tracked but not annunciated', () => {
    let a: AlarmRecord = { state: 'normal', active: false };
    const steps: [AlarmEvent, AlarmActor, AlarmState, boolean][] = [
      [{ type: 'activate' }, 'system', 'unacked', true],
      [{ type: 'shelve', minutes: 15, reason: 'chattering while tuning' }, 'engineer', 'shelved', true],
      [{ type: 'clear' }, 'system', 'shelved', false],
      [{ type: 'activate' }, 'system', 'shelved', true],
      [{ type: 'clear' }, 'system', 'shelved', false],
      [{ type: 'unshelve' }, 'engineer', 'normal', false], // condition gone: comes back normal
      [{ type: 'activate' }, 'system', 'unacked', true],
      [{ type: 'suppress' }, 'system', 'suppressed', true], // oven went idle
      [{ type: 'clear' }, 'system', 'suppressed', false],
      [{ type: 'activate' }, 'system', 'suppressed', true],
      [{ type: 'unsuppress' }, 'system', 'unacked', true], // still abnormal: must be seen
      [{ type: 'ack', comment: 'door closed' }, 'operator', 'acked', true],
      [{ type: 'clear' }, 'system', 'normal', false],
    ];
    for (const [ev, role, state, active] of steps) {
      const r = transition(a, ev, { nowMs: NOW, role });
      expect(r.ok, `${ev.type} by ${role}`).toBe(true);
      if (!r.ok) return;
      a = r.alarm;
      expect([a.state, a.active], ev.type).toEqual([state, active]);
      expect(isAnnunciated(a.state)).toBe(state === 'unacked' || state === 'acked' || state === 'rtn-unacked');
    }
  });

  it('keeps the caller’s extra fields', () => {
    const rec = { id: 42, source: 'oven-2/zone-1', state: 'unacked' as const, active: true };
    const r = transition(rec, EVENT.ack, { nowMs: NOW, role: 'operator' });
    expect(r.ok && r.alarm).toEqual({ id: 42, source: 'oven-2/zone-1', state: 'acked', active: true });
  });
});

describe('alarm state labels and annunciation', () => {
  it('annunciated and needs-acknowledgement states', () => {
    const ann: Record<AlarmState, boolean> = {
      normal: false,
      unacked: true,
      acked: true,
      'rtn-unacked': true,
      shelved: false,
      suppressed: false,
      'out-of-service': false,
    };
    const ack: Record<AlarmState, boolean> = { ...ann, acked: false };
    for (const s of ALARM_STATES) {
      expect(isAnnunciated(s), s).toBe(ann[s]);
      expect(needsAcknowledgement(s), s).toBe(ack[s]);
    }
  });
  it('plain English labels', () => {
    expect(STATE_LABELS.unacked).toBe('Needs acknowledgement');
    expect(STATE_LABELS.acked).toBe('Acknowledged, still active');
    expect(STATE_LABELS['rtn-unacked']).toBe('Cleared, not yet acknowledged');
    expect(STATE_LABELS.suppressed).toBe('Suppressed by design');
    expect(STATE_LABELS['out-of-service']).toBe('Out of service');
    expect(stateLabel({ state: 'shelved', active: true, shelvedUntilMs: 0 }, () => '14:30')).toBe('Shelved until 14:30');
    expect(stateLabel({ state: 'acked', active: true }, () => 'never')).toBe('Acknowledged, still active');
  });
});
