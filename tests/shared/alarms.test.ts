// Shared alarm request schemas (src/lib/shared/alarms.ts): the contracts of
// POST /api/v1/alarms/{id}/ack {"comment"} and POST /api/v1/alarms/{id}/shelve {"minutes","reason"}
// (product brief §6) and the alarm settings.
import { describe, it, expect } from 'vitest';
import {
  AckAlarmSchema,
  AlarmPrioritySchema,
  AlarmStateSchema,
  BulkAckSchema,
  LimitAlarmConfigSchema,
  OutOfServiceSchema,
  PRIORITY_MEANINGS,
  ShelveAlarmSchema,
} from '../../src/lib/shared/alarms';

const paths = (r: { success: boolean; error?: { issues: { path: PropertyKey[] }[] } }) =>
  r.success ? [] : (r.error?.issues ?? []).map((i) => i.path.join('.'));

describe('alarm schemas', () => {
  it('priorities have a documented meaning', () => {
    expect(AlarmPrioritySchema.options).toEqual(['high', 'medium', 'low']);
    expect(Object.keys(PRIORITY_MEANINGS)).toEqual(['high', 'medium', 'low']);
    expect(AlarmStateSchema.safeParse('rtn-unacked').success).toBe(true);
    expect(AlarmStateSchema.safeParse('active').success).toBe(false);
  });
  it('ack comment: trimmed, 1..500', () => {
    expect(AckAlarmSchema.parse({ comment: '  solvent added  ' })).toEqual({ comment: 'solvent added' });
    expect(paths(AckAlarmSchema.safeParse({ comment: '   ' }))).toEqual(['comment']);
    expect(AckAlarmSchema.safeParse({ comment: 'x'.repeat(500) }).success).toBe(true);
    expect(AckAlarmSchema.safeParse({ comment: 'x'.repeat(501) }).success).toBe(false);
    expect(paths(AckAlarmSchema.safeParse({}))).toEqual(['comment']);
  });
  it('bulk ack: 1..200 distinct positive ids and a comment', () => {
    expect(BulkAckSchema.safeParse({ ids: [1, 2, 3], comment: 'ok' }).success).toBe(true);
    expect(paths(BulkAckSchema.safeParse({ ids: [], comment: 'ok' }))).toEqual(['ids']);
    expect(BulkAckSchema.safeParse({ ids: Array.from({ length: 200 }, (_, i) => i + 1), comment: 'ok' }).success).toBe(true);
    expect(BulkAckSchema.safeParse({ ids: Array.from({ length: 201 }, (_, i) => i + 1), comment: 'ok' }).success).toBe(false);
    expect(BulkAckSchema.safeParse({ ids: [1, 1], comment: 'ok' }).success).toBe(false);
    expect(paths(BulkAckSchema.safeParse({ ids: [0, 2.5], comment: 'ok' }))).toEqual(['ids.0', 'ids.1']);
  });
  it('shelve: whole minutes 1..1440, reason 3..500', () => {
    expect(ShelveAlarmSchema.safeParse({ minutes: 1, reason: 'abc' }).success).toBe(true);
    expect(ShelveAlarmSchema.safeParse({ minutes: 1440, reason: 'abc' }).success).toBe(true);
    for (const minutes of [0, 1441, 2.5, '30']) {
      expect(paths(ShelveAlarmSchema.safeParse({ minutes, reason: 'abc' })), String(minutes)).toEqual(['minutes']);
    }
    expect(paths(ShelveAlarmSchema.safeParse({ minutes: 30, reason: ' ab ' }))).toEqual(['reason']);
  });
  it('out of service needs a reason', () => {
    expect(OutOfServiceSchema.safeParse({ reason: 'TC replaced' }).success).toBe(true);
    expect(OutOfServiceSchema.safeParse({ reason: '' }).success).toBe(false);
  });
  it('limit alarm settings: at least one limit, low below high, non-negative deadband and delays', () => {
    const base = { deadband: 0.5, onDelayMs: 5000, offDelayMs: 10000, priority: 'medium' };
    expect(LimitAlarmConfigSchema.safeParse({ ...base, high: 28 }).success).toBe(true);
    expect(LimitAlarmConfigSchema.safeParse({ ...base, low: 18 }).success).toBe(true);
    expect(LimitAlarmConfigSchema.safeParse({ ...base, low: 18, high: 28 }).success).toBe(true);
    expect(paths(LimitAlarmConfigSchema.safeParse(base))).toEqual(['high']);
    expect(paths(LimitAlarmConfigSchema.safeParse({ ...base, low: 28, high: 18 }))).toEqual(['low']);
    expect(paths(LimitAlarmConfigSchema.safeParse({ ...base, high: 28, deadband: -1 }))).toEqual(['deadband']);
    expect(paths(LimitAlarmConfigSchema.safeParse({ ...base, high: 28, onDelayMs: -1 }))).toEqual(['onDelayMs']);
    expect(paths(LimitAlarmConfigSchema.safeParse({ ...base, high: Number.POSITIVE_INFINITY }))).toContain('high');
    expect(paths(LimitAlarmConfigSchema.safeParse({ ...base, high: 28, priority: 'urgent' }))).toEqual(['priority']);
  });
});
