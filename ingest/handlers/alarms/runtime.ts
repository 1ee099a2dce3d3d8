/**
 * The alarm worker's state, in one typed object instead of maps captured by a closure: what it
 * knows of the plant (channels, configs, windows, setpoints), what each source last did (limit
 * detectors, held stale / device / system conditions) and what each source's open alarm was
 * when last seen (`known`, so a raise or clear is usually one statement). The writers here
 * (`raise`, `clear`, `systemEvent`) go through the alarm store and publish every change live.
 */
import type { LimitDetectorState } from '../../../src/lib/domain/alarms/limit-detector.ts';
import type { AlarmView, EscalationSettings } from '../../../src/lib/shared/alarm-views.ts';
import type { ProcessWindowInForce } from '../../../src/lib/shared/windows.ts';
import {
  clearAlarmReturning,
  getAlarm,
  raiseAlarmReturning,
  systemEventForSource,
  type AlarmHint,
  type RaiseAlarmInput,
} from '../../../src/lib/core/alarm-store.ts';
import type { ChannelAlarmConfig } from '../../../src/lib/core/alarm-config-store.ts';
import type { WorkerContext } from '../index.ts';

export interface ChannelInfo {
  id: number;
  name: string;
  kind: string;
  unit: string;
  assetId: number;
  assetName: string;
  deviceId: number;
  /** The oven this channel belongs to (the oven itself or a zone's parent), else null. */
  ovenAssetId: number | null;
}

export interface ChannelRuntime {
  det: LimitDetectorState;
  sig: string;
  lastValue: number | null;
  /** Whether the asset ran at the last judged sample (only-while-running channels); undefined before the first. */
  running?: boolean;
}

export interface AlarmsRuntime {
  channels: Map<number, ChannelInfo>;
  channelsAt: number;
  configs: Map<number, ChannelAlarmConfig>;
  configsAt: number;
  windows: Map<number, { w: ProcessWindowInForce | null; at: number }>;
  windowsBrokenUntil: number;
  /** Limit detector per channel. */
  detectors: Map<number, ChannelRuntime>;
  /** Newest reading time per channel. */
  lastSeen: Map<number, number>;
  /** Last setpoint per oven asset. */
  setpoints: Map<number, number>;
  staleActive: Set<number>;
  staleSuppressed: Set<number>;
  deviceActive: Set<number>;
  systemActive: Set<string>;
  journalHistory: Map<string, number[]>;
  settings: { value: EscalationSettings; at: number } | null;
  siteZone: string;
  /** The open alarm of each source as last seen here, or 'none'. */
  known: Map<string, AlarmHint>;
  /** Load figures for the worker log. */
  load: { rows: number; busyMs: number; raises: number; clears: number; since: number };
}

export function createRuntime(nowMs = Date.now()): AlarmsRuntime {
  return {
    channels: new Map(),
    channelsAt: 0,
    configs: new Map(),
    configsAt: 0,
    windows: new Map(),
    windowsBrokenUntil: 0,
    detectors: new Map(),
    lastSeen: new Map(),
    setpoints: new Map(),
    staleActive: new Set(),
    staleSuppressed: new Set(),
    deviceActive: new Set(),
    systemActive: new Set(),
    journalHistory: new Map(),
    settings: null,
    siteZone: 'UTC',
    known: new Map(),
    load: { rows: 0, busyMs: 0, raises: 0, clears: 0, since: nowMs },
  };
}

function remember(rt: AlarmsRuntime, key: string, a: AlarmView): void {
  rt.known.set(key, a.state === 'normal' ? 'none' : a);
}

/** Publish an alarm live (by id when no view is at hand). */
export async function publish(ctx: WorkerContext, id: number | null, view?: AlarmView | null): Promise<void> {
  const alarm = view ?? (id !== null ? await getAlarm(ctx.sequelize, id) : null);
  if (alarm) ctx.publishLive('alarms', alarm);
}

/** Raise (or update) a source's alarm and publish it. */
export async function raise(rt: AlarmsRuntime, ctx: WorkerContext, input: RaiseAlarmInput): Promise<void> {
  const r = await raiseAlarmReturning(ctx.sequelize, input, rt.known.get(input.sourceKey));
  if (!r) return;
  remember(rt, input.sourceKey, r.alarm);
  rt.load.raises++;
  ctx.publishLive('alarms', r.alarm);
}

/** Report a source back to normal and publish the alarm when it changed. */
export async function clear(rt: AlarmsRuntime, ctx: WorkerContext, sourceKey: string, atMs: number): Promise<void> {
  const view = await clearAlarmReturning(ctx.sequelize, sourceKey, atMs, rt.known.get(sourceKey));
  rt.load.clears++;
  if (view) {
    remember(rt, sourceKey, view);
    await publish(ctx, null, view);
  } else {
    rt.known.delete(sourceKey);
  }
}

/** Suppression by design (system event on a source's open alarm): returns the alarm when it changed. */
export async function systemEvent(
  rt: AlarmsRuntime,
  ctx: WorkerContext,
  sourceKey: string,
  type: 'suppress' | 'unsuppress',
  atMs: number,
): Promise<AlarmView | null> {
  const hint = rt.known.get(sourceKey);
  if (hint === 'none') return null;
  const view = await systemEventForSource(ctx.sequelize, sourceKey, { type }, atMs, hint);
  if (view) {
    remember(rt, sourceKey, view);
    ctx.publishLive('alarms', view);
  } else {
    rt.known.delete(sourceKey);
  }
  return view;
}
