/**
 * Process limits per channel (`limit`, source key `channel:{id}:high|low`): the domain's limit
 * detector (deadband, on-delay, off-delay; `lib/domain/alarms/limit-detector.ts`) stepped on
 * every stored reading, its state held in memory per channel (nothing is written per sample).
 * Settings come from `alarm_configs`; a channel without its own limits falls back to the process
 * window in force for its asset (viscosity, withdrawal speed, bath temperature, room humidity),
 * with a deadband of 2 % of the window's width, a 10 s on-delay, no off-delay and medium
 * priority. `target-offset` limits are added to the window's target. With `onlyWhileRunning`
 * the channel raises only while its asset runs (see `suppression.ts`).
 */
import {
  initialDetectorState,
  step,
  type LimitDetectorConfig,
  type LimitSide,
} from '../../../src/lib/domain/alarms/limit-detector.ts';
import type { AlarmPriority } from '../../../src/lib/shared/alarms.ts';
import { WINDOW_FALLBACK } from '../../../src/lib/shared/alarm-views.ts';
import type { ProcessWindowInForce, Range } from '../../../src/lib/shared/windows.ts';
import { channelAlarmConfigs } from '../../../src/lib/core/alarm-config-store.ts';
import { windowInForce } from '../../../src/lib/core/window-store.ts';
import type { StoredReading, WorkerContext } from '../index.ts';
import { fmt, loadChannels, running, sourceLabelOf } from './channels.ts';
import { clear, raise, type AlarmsRuntime, type ChannelInfo } from './runtime.ts';
import { syncRunning } from './suppression.ts';

const WINDOW_TTL_MS = 30_000;
/** Channels judged at once within a batch (the worker's pool has a few connections). */
const CHANNEL_LANES = 3;
export const CONFIGS_EVERY_MS = 2_000;

export interface EffectiveLimit extends LimitDetectorConfig {
  priority: AlarmPriority;
  /** The window's target when the limits are offsets from it. */
  target?: number;
  onlyWhileRunning: boolean;
  label: string | null;
  origin: string;
}

/** Which window field a channel kind is judged against. */
const WINDOW_FIELD: Readonly<Record<string, 'viscosityMm2S' | 'withdrawalSpeedMmS' | 'bathTempC' | 'roomRhPct'>> = {
  viscosity: 'viscosityMm2S',
  'withdrawal-speed': 'withdrawalSpeedMmS',
  'bath-temperature': 'bathTempC',
  'room-humidity': 'roomRhPct',
};

const KIND_WORDS: Readonly<Record<string, string>> = {
  viscosity: 'Viscosity',
  'withdrawal-speed': 'Withdrawal speed',
  'bath-temperature': 'Bath temperature',
  'room-humidity': 'Room humidity',
  'room-temperature': 'Room temperature',
  'air-temperature': 'Air temperature',
  setpoint: 'Setpoint',
  door: 'Door',
  irradiance: 'UV irradiance',
  'spin-speed': 'Spin speed',
  solids: 'Solids',
};

export async function loadConfigs(rt: AlarmsRuntime, ctx: WorkerContext, nowMs: number): Promise<void> {
  rt.configs = await channelAlarmConfigs(ctx.sequelize);
  rt.configsAt = nowMs;
}

async function windowFor(
  rt: AlarmsRuntime,
  ctx: WorkerContext,
  assetId: number,
  nowMs: number,
): Promise<ProcessWindowInForce | null> {
  const hit = rt.windows.get(assetId);
  if (hit && nowMs - hit.at < WINDOW_TTL_MS) return hit.w;
  if (nowMs < rt.windowsBrokenUntil) return hit?.w ?? null;
  try {
    const w = await windowInForce(ctx.sequelize, assetId, nowMs);
    rt.windows.set(assetId, { w, at: nowMs });
    return w;
  } catch (e) {
    // The windows tables may not exist yet on an older database: try again in 5 minutes.
    rt.windowsBrokenUntil = nowMs + 300_000;
    ctx.log(`alarms: process windows unavailable (${(e as Error).message}); limit alarms use alarm settings only`);
    return null;
  }
}

function windowRange(w: ProcessWindowInForce | null, kind: string): Range | null {
  const field = WINDOW_FIELD[kind];
  if (!w || !field) return null;
  const r = w.limits[field] as Range | undefined;
  return r && Number.isFinite(r.min) && Number.isFinite(r.max) ? r : null;
}

function limitsOf(high: number | null, low: number | null): Pick<LimitDetectorConfig, 'high' | 'low'> {
  return { ...(high !== null ? { high } : {}), ...(low !== null ? { low } : {}) };
}

/** The limits a channel is judged against now, or null when it has none. */
export async function effectiveLimit(
  rt: AlarmsRuntime,
  ctx: WorkerContext,
  ch: ChannelInfo,
  nowMs: number,
): Promise<EffectiveLimit | null> {
  const cfg = rt.configs.get(ch.id);
  if (cfg && !cfg.enabled) return null;
  const own = cfg && (cfg.high !== null || cfg.low !== null);
  if (cfg && own) {
    const base = {
      deadband: cfg.deadband,
      onDelayMs: cfg.onDelayMs,
      offDelayMs: cfg.offDelayMs,
      priority: cfg.priority,
      onlyWhileRunning: cfg.onlyWhileRunning,
      label: cfg.label,
    };
    if (cfg.limitsMode === 'absolute') {
      return { ...base, ...limitsOf(cfg.high, cfg.low), origin: 'alarm' };
    }
    const r = windowRange(await windowFor(rt, ctx, ch.assetId, nowMs), ch.kind);
    if (!r || r.target === undefined) return null;
    return {
      ...base,
      ...limitsOf(cfg.high === null ? null : r.target + cfg.high, cfg.low === null ? null : r.target + cfg.low),
      origin: 'target',
      target: r.target,
    };
  }
  if (!WINDOW_FIELD[ch.kind]) return null;
  const r = windowRange(await windowFor(rt, ctx, ch.assetId, nowMs), ch.kind);
  if (!r) return null;
  return {
    high: r.max,
    low: r.min,
    deadband: WINDOW_FALLBACK.deadbandFraction * (r.max - r.min),
    onDelayMs: WINDOW_FALLBACK.onDelayMs,
    offDelayMs: WINDOW_FALLBACK.offDelayMs,
    priority: cfg?.priority ?? WINDOW_FALLBACK.priority,
    onlyWhileRunning: cfg?.onlyWhileRunning ?? false,
    label: cfg?.label ?? null,
    origin: 'window',
  };
}

export function limitMessage(ch: ChannelInfo, lim: EffectiveLimit, side: LimitSide, v: number): string {
  if (lim.label) {
    return ch.kind === 'door' ? `${lim.label}: ${ch.name} open` : `${lim.label}: ${ch.name} ${fmt(v)} ${ch.unit}`;
  }
  const what = KIND_WORDS[ch.kind] ?? ch.name;
  const limit = side === 'high' ? lim.high! : lim.low!;
  const where = lim.origin === 'window' ? 'the process window' : 'the alarm';
  const text = `${what} ${fmt(v)} ${ch.unit} ${side === 'high' ? 'above' : 'below'} ${where} ${side} ${fmt(limit)} ${ch.unit}`;
  if (lim.target === undefined) return text;
  const offset = limit - lim.target;
  return `${text} (window target ${fmt(lim.target)} ${ch.unit} ${offset >= 0 ? '+' : '−'} ${fmt(Math.abs(offset))})`;
}

/** Step one channel's detector over its new samples (oldest first), raising and clearing as it goes. */
export async function evaluateChannel(
  rt: AlarmsRuntime,
  ctx: WorkerContext,
  ch: ChannelInfo,
  samples: StoredReading[],
): Promise<void> {
  let d = rt.detectors.get(ch.id);
  const tLast = samples[samples.length - 1]!.tMs;
  const lim = await effectiveLimit(rt, ctx, ch, tLast);
  const sig = lim ? JSON.stringify([lim.high, lim.low, lim.deadband, lim.onDelayMs, lim.offDelayMs]) : '';
  if (!d) {
    d = { det: initialDetectorState(), sig, lastValue: null };
    rt.detectors.set(ch.id, d);
  }
  if (d.sig !== sig) {
    // Settings changed: keep a held alarm if its side still exists (the deadband decides), else clear it.
    const held = d.det.alarm;
    const keep = held !== null && lim !== null && (held === 'high' ? lim.high !== undefined : lim.low !== undefined);
    if (held !== null && !keep) await clear(rt, ctx, `channel:${ch.id}:${held}`, tLast);
    d.det = { ...initialDetectorState(), alarm: keep ? held : null };
    d.sig = sig;
  }
  if (!lim) return;
  for (const s of samples) {
    d.lastValue = s.value;
    const isRunning = !lim.onlyWhileRunning || running(rt, ch, s.tMs);
    if (lim.onlyWhileRunning) await syncRunning(rt, ctx, ch, d, isRunning, s.tMs);
    const before = d.det.alarm;
    const r = step(d.det, { tMs: s.tMs, v: s.value }, lim);
    d.det = r.state;
    if (r.event === 'clear' && before !== null) {
      await clear(rt, ctx, `channel:${ch.id}:${before}`, s.tMs);
    } else if (r.event === 'activate-high' || r.event === 'activate-low') {
      const side: LimitSide = r.event === 'activate-high' ? 'high' : 'low';
      const key = `channel:${ch.id}:${side}`;
      // While idle the condition is expected (a door open between loads): track it on a
      // suppressed alarm if there is one, raise nothing new.
      if (!isRunning) {
        const hint = rt.known.get(key) ?? null;
        if (hint === null || hint === 'none' || hint.state !== 'suppressed') continue;
      }
      await raise(rt, ctx, {
        sourceKind: 'limit',
        sourceKey: key,
        sourceLabel: sourceLabelOf(ch),
        assetId: ch.assetId,
        channelId: ch.id,
        priority: lim.priority,
        message: limitMessage(ch, lim, side, s.value),
        value: s.value,
        limit: side === 'high' ? (lim.high ?? null) : (lim.low ?? null),
        atMs: s.tMs,
      });
    }
  }
}

/** Judge a committed batch: setpoints first (so an oven's channels see it running), then each channel in order. */
export async function evaluateReadings(
  rt: AlarmsRuntime,
  ctx: WorkerContext,
  rows: StoredReading[],
  nowMs: number,
): Promise<void> {
  if (nowMs - rt.configsAt > CONFIGS_EVERY_MS) await loadConfigs(rt, ctx, nowMs);
  const byChannel = new Map<number, StoredReading[]>();
  for (const r of rows) {
    const list = byChannel.get(r.channelId);
    if (list) list.push(r);
    else byChannel.set(r.channelId, [r]);
  }
  if ([...byChannel.keys()].some((id) => !rt.channels.has(id))) await loadChannels(rt, ctx, nowMs);
  for (const [id, list] of byChannel) {
    const ch = rt.channels.get(id);
    if (!ch) continue;
    list.sort((a, b) => a.tMs - b.tMs);
    if (ch.kind === 'setpoint' && ch.ovenAssetId !== null) rt.setpoints.set(ch.ovenAssetId, list[list.length - 1]!.value);
  }
  // Channels are independent: judge a few at a time (each channel's readings stay in order).
  const queue = [...byChannel];
  const lane = async () => {
    for (let next = queue.shift(); next; next = queue.shift()) {
      const [id, list] = next;
      const ch = rt.channels.get(id);
      if (!ch) continue;
      const newest = list[list.length - 1]!.tMs;
      rt.lastSeen.set(id, Math.max(rt.lastSeen.get(id) ?? 0, newest));
      if (rt.staleActive.has(id)) {
        rt.staleActive.delete(id);
        await clear(rt, ctx, `stale:channel:${id}`, newest);
      }
      await evaluateChannel(rt, ctx, ch, list);
    }
  };
  await Promise.all(Array.from({ length: Math.min(CHANNEL_LANES, queue.length) }, lane));
}
