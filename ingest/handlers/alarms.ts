/**
 * Alarm sources evaluated in the ingest worker, after each committed batch and on the
 * worker's tick. Everything goes through the alarm store (`raiseAlarm` / `clearAlarm` /
 * `transitionAlarm`), and every raise or state change is published as a live `alarms` event.
 *
 * Sources (ANSI/ISA-18.2 / IEC 62682 alarm design ideas: deadband, on-delay, off-delay):
 *
 * 1. **Process limits per channel** (`limit`, source key `channel:{id}:high|low`): the domain's
 *    limit detector (`lib/domain/alarms/limit-detector.ts`) stepped on every stored reading,
 *    with its state held in memory per channel (nothing is written per sample). Settings come
 *    from `alarm_configs`; a channel without its own limits falls back to the process window in
 *    force for its asset (viscosity, withdrawal speed, bath temperature, room humidity), with a
 *    deadband of 2 % of the window's width, a 10 s on-delay, no off-delay and medium priority.
 *    `target-offset` limits are added to the window's target (e.g. withdrawal speed ± 0.15 mm/s).
 *    With `onlyWhileRunning` the channel raises only while its asset runs (see suppression below).
 * 2. **Stale data** (`stale`, `stale:channel:{id}`): no reading for `staleSeconds` while the
 *    asset runs. "Running": an oven (and its zones) runs while its last setpoint is ≥ 50 °C;
 *    any other asset (dip lines, coater, room) counts as running when the channel had data in
 *    the last hour — a channel silent for longer is taken to be switched off for the shift and
 *    raises nothing. The alarm clears when data returns.
 *
 * Suppression by design (ANSI/ISA-18.2 "suppressed by design"): while an oven idles (setpoint
 * below 50 °C), the open alarms of its only-while-running channels (door open during cure) and
 * its no-data alarms are suppressed — not annunciated, their condition still tracked — and
 * come back when it runs again: as needing acknowledgement if the condition is still abnormal,
 * else to normal. A condition that starts while the oven idles raises nothing.
 * 3. **Device offline** (`device`, `device:{id}`): an enabled device that has been seen at
 *    least once and has been offline (`devices.online = false`) for more than 60 s. A device
 *    never seen is not commissioned yet and raises nothing.
 * 4. **System** (`system`): ingest lag above 10 s for a worker with a live heartbeat
 *    (`system:ingest-lag:{worker}`, clears below 5 s), or its disk journal growing over three
 *    consecutive checks (`system:journal:{worker}`), both from `ingest_status`.
 *
 * Duties on the tick: shelf expiry (system event `shelf-expired`), the stale / device / system
 * checks (every 5 s), and escalation e-mail for unacknowledged alarms by the rules per
 * priority (`dueEscalations`; one message per alarm per step, recorded in
 * `escalation_steps_sent` before sending and released again if the relay refuses).
 *
 * Scale-out note: the limit detector and the stale check assume one worker sees all of a
 * channel's readings (the default single worker). With several workers on a shared
 * subscription, run alarm evaluation on one of them (`INGEST_ALARMS=off` on the others).
 * Store operations are safe to repeat (one open alarm per source, escalation steps claimed
 * atomically), so tick duties running in several workers do not duplicate alarms or e-mail.
 *
 * These alarms are advisory. They are not a safety-instrumented function; oven
 * over-temperature protection and interlocks stay in the equipment.
 */
import nodemailer, { type Transporter } from 'nodemailer';
import {
  initialDetectorState,
  step,
  type LimitDetectorConfig,
  type LimitDetectorState,
  type LimitSide,
} from '../../src/lib/domain/alarms/limit-detector.ts';
import { dueEscalations } from '../../src/lib/domain/alarms/escalation.ts';
import type { AlarmPriority } from '../../src/lib/shared/alarms.ts';
import {
  DEVICE_OFFLINE_MS,
  LAG_CLEAR_MS,
  LAG_RAISE_MS,
  OVEN_RUNNING_SETPOINT_C,
  RECENT_DATA_MS,
  WINDOW_FALLBACK,
  type AlarmView,
  type EscalationSettings,
} from '../../src/lib/shared/alarm-views.ts';
import type { ProcessWindowInForce, Range } from '../../src/lib/shared/windows.ts';
import {
  alarmsAwaitingAck,
  clearAlarmReturning,
  expireShelves,
  getAlarm,
  raiseAlarmReturning,
  systemEventForSource,
  recordEscalation,
  releaseEscalation,
  type AlarmHint,
  type RaiseAlarmInput,
} from '../../src/lib/core/alarm-store.ts';
import {
  channelAlarmConfigs,
  escalationSettings,
  rulesByPriority,
  type ChannelAlarmConfig,
} from '../../src/lib/core/alarm-config-store.ts';
import { windowInForce } from '../../src/lib/core/window-store.ts';
import type { PostCommitHandler, StoredReading, WorkerContext } from './index.ts';

const CHECK_EVERY_MS = 5_000;
/** Readings waiting to be judged before the worker is made to wait for the alarm handler. */
const MAX_BACKLOG_ROWS = 20_000;
/** Channels judged at once within a batch (the worker's pool has 4 connections). */
const CHANNEL_LANES = 3;
const CHANNELS_EVERY_MS = 60_000;
const CONFIGS_EVERY_MS = 2_000;
const WINDOW_TTL_MS = 30_000;
const SETTINGS_TTL_MS = 5_000;

interface ChannelInfo {
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

interface EffectiveLimit extends LimitDetectorConfig {
  priority: AlarmPriority;
  /** The window's target when the limits are offsets from it. */
  target?: number;
  onlyWhileRunning: boolean;
  label: string | null;
  origin: string;
}

interface ChannelRuntime {
  det: LimitDetectorState;
  sig: string;
  lastValue: number | null;
  /** Whether the asset ran at the last judged sample (only-while-running channels); undefined before the first. */
  running?: boolean;
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

/**
 * The channel's name, prefixed by its asset's when the name alone does not say where it is
 * (fewer than two words in common: "Spin speed" → "UV spin coater 1: Spin speed", while
 * "Line 2 bath viscosity" under "Line 2 hard-coat bath" stays as it is).
 */
export function sourceLabelOf(ch: { name: string; assetName: string }): string {
  const words = (t: string) =>
    new Set(
      t
        .toLowerCase()
        .split(/[^a-z0-9]+/)
        .filter(Boolean),
    );
  const asset = words(ch.assetName);
  const shared = [...words(ch.name)].filter((w) => asset.has(w)).length;
  return shared >= 2 ? ch.name : `${ch.assetName}: ${ch.name}`;
}

export function fmt(v: number): string {
  const a = Math.abs(v);
  if (a >= 100) return v.toFixed(0);
  if (a >= 10) return v.toFixed(1);
  return v.toFixed(2);
}

export function createAlarmsHandler(): PostCommitHandler {
  const channels = new Map<number, ChannelInfo>();
  let channelsAt = 0;
  let configs = new Map<number, ChannelAlarmConfig>();
  let configsAt = 0;
  const windows = new Map<number, { w: ProcessWindowInForce | null; at: number }>();
  let windowsBrokenUntil = 0;
  const runtime = new Map<number, ChannelRuntime>();
  const lastSeen = new Map<number, number>();
  const setpoints = new Map<number, number>();
  const staleActive = new Set<number>();
  const staleSuppressed = new Set<number>();
  const deviceActive = new Set<number>();
  const systemActive = new Set<string>();
  const journalHistory = new Map<string, number[]>();
  let lastCheck = 0;
  let settings: { value: EscalationSettings; at: number } | null = null;
  let mailer: Transporter | null = null;
  let warnedNoSmtp = false;
  let siteZone = 'UTC';
  let chain: Promise<unknown> = Promise.resolve();
  let backlog = 0;
  // Load figures for the worker log (one line per 10 s while readings flow).
  const load = { rows: 0, busyMs: 0, raises: 0, clears: 0, since: Date.now() };
  const disabled = (process.env['INGEST_ALARMS'] ?? 'on') === 'off';

  /** Run one piece of work at a time (detector state is shared between readings and ticks). */
  function serial<T>(fn: () => Promise<T>): Promise<T> {
    const next = chain.then(fn, fn);
    chain = next.catch(() => {});
    return next;
  }

  async function publish(ctx: WorkerContext, id: number | null, view?: AlarmView | null): Promise<void> {
    const alarm = view ?? (id !== null ? await getAlarm(ctx.pool, id) : null);
    if (alarm) ctx.publishLive('alarms', alarm);
  }

  /**
   * The open alarm of each source as this worker last saw it (or 'none'), so a raise or clear
   * is usually one statement; a stale entry (e.g. acknowledged on the web meanwhile) costs one
   * extra read in the store.
   */
  const known = new Map<string, AlarmHint>();
  const remember = (key: string, a: AlarmView) => known.set(key, a.state === 'normal' ? 'none' : a);

  async function raise(ctx: WorkerContext, input: RaiseAlarmInput): Promise<void> {
    const r = await raiseAlarmReturning(ctx.pool, input, known.get(input.sourceKey));
    if (!r) return;
    remember(input.sourceKey, r.alarm);
    load.raises++;
    ctx.publishLive('alarms', r.alarm);
  }

  async function clear(ctx: WorkerContext, sourceKey: string, atMs: number): Promise<void> {
    const view = await clearAlarmReturning(ctx.pool, sourceKey, atMs, known.get(sourceKey));
    load.clears++;
    if (view) {
      remember(sourceKey, view);
      await publish(ctx, null, view);
    } else {
      known.delete(sourceKey);
    }
  }

  /** Suppression by design: returns the alarm when it changed. */
  async function systemEvent(
    ctx: WorkerContext,
    sourceKey: string,
    type: 'suppress' | 'unsuppress',
    atMs: number,
  ): Promise<AlarmView | null> {
    const hint = known.get(sourceKey);
    if (hint === 'none') return null;
    const view = await systemEventForSource(ctx.pool, sourceKey, { type }, atMs, hint);
    if (view) {
      remember(sourceKey, view);
      ctx.publishLive('alarms', view);
    } else {
      known.delete(sourceKey);
    }
    return view;
  }

  /**
   * An only-while-running channel's asset started or stopped: while it is idle its open alarms
   * are suppressed by design (not annunciated, condition still tracked); when it runs again they
   * come back — as needing acknowledgement if the condition is still abnormal, else normal —
   * and the detector judges afresh.
   */
  async function syncRunning(
    ctx: WorkerContext,
    ch: ChannelInfo,
    rt: ChannelRuntime,
    isRunning: boolean,
    atMs: number,
  ): Promise<void> {
    const was = rt.running ?? true;
    rt.running = isRunning;
    if (was === isRunning) return;
    let held: LimitSide | null = null;
    for (const side of ['high', 'low'] as const) {
      const view = await systemEvent(ctx, `channel:${ch.id}:${side}`, isRunning ? 'unsuppress' : 'suppress', atMs);
      if (isRunning && view?.active) held = side;
    }
    if (isRunning) rt.det = { ...initialDetectorState(), alarm: held };
  }

  async function loadChannels(ctx: WorkerContext, nowMs: number): Promise<void> {
    const res = await ctx.pool.query<{
      id: number;
      name: string;
      kind: string;
      unit: string;
      asset_id: number;
      asset_name: string;
      asset_kind: string;
      parent_id: number | null;
      parent_kind: string | null;
      device_id: number;
    }>(
      `select c.id, c.name, c.kind, c.unit, c.asset_id, a.name as asset_name, a.kind as asset_kind, a.parent_id,
              p.kind as parent_kind, c.device_id
         from channels c join assets a on a.id = c.asset_id left join assets p on p.id = a.parent_id`,
    );
    channels.clear();
    for (const r of res.rows) {
      const ovenAssetId = r.asset_kind === 'oven' ? r.asset_id : r.parent_kind === 'oven' ? r.parent_id : null;
      channels.set(r.id, {
        id: r.id,
        name: r.name,
        kind: r.kind,
        unit: r.unit,
        assetId: r.asset_id,
        assetName: r.asset_name,
        deviceId: r.device_id,
        ovenAssetId,
      });
    }
    channelsAt = nowMs;
  }

  async function loadConfigs(ctx: WorkerContext, nowMs: number): Promise<void> {
    configs = await channelAlarmConfigs(ctx.pool);
    configsAt = nowMs;
  }

  async function windowFor(ctx: WorkerContext, assetId: number, nowMs: number): Promise<ProcessWindowInForce | null> {
    const hit = windows.get(assetId);
    if (hit && nowMs - hit.at < WINDOW_TTL_MS) return hit.w;
    if (nowMs < windowsBrokenUntil) return hit?.w ?? null;
    try {
      const w = await windowInForce(ctx.pool, assetId, nowMs);
      windows.set(assetId, { w, at: nowMs });
      return w;
    } catch (e) {
      // The windows tables may not exist yet on an older database: try again in 5 minutes.
      windowsBrokenUntil = nowMs + 300_000;
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

  /** The limits a channel is judged against now, or null when it has none. */
  async function effectiveLimit(ctx: WorkerContext, ch: ChannelInfo, nowMs: number): Promise<EffectiveLimit | null> {
    const cfg = configs.get(ch.id);
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
      const r = windowRange(await windowFor(ctx, ch.assetId, nowMs), ch.kind);
      if (!r || r.target === undefined) return null;
      return {
        ...base,
        ...limitsOf(cfg.high === null ? null : r.target + cfg.high, cfg.low === null ? null : r.target + cfg.low),
        origin: 'target',
        target: r.target,
      };
    }
    if (!WINDOW_FIELD[ch.kind]) return null;
    const r = windowRange(await windowFor(ctx, ch.assetId, nowMs), ch.kind);
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

  function running(ch: ChannelInfo, nowMs: number): boolean {
    if (ch.ovenAssetId !== null) {
      const sp = setpoints.get(ch.ovenAssetId);
      return sp !== undefined && sp >= OVEN_RUNNING_SETPOINT_C;
    }
    const seen = lastSeen.get(ch.id);
    return seen !== undefined && nowMs - seen <= RECENT_DATA_MS;
  }

  function limitMessage(ch: ChannelInfo, lim: EffectiveLimit, side: LimitSide, v: number): string {
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

  async function evaluateChannel(ctx: WorkerContext, ch: ChannelInfo, samples: StoredReading[]): Promise<void> {
    let rt = runtime.get(ch.id);
    const tLast = samples[samples.length - 1]!.tMs;
    const lim = await effectiveLimit(ctx, ch, tLast);
    const sig = lim ? JSON.stringify([lim.high, lim.low, lim.deadband, lim.onDelayMs, lim.offDelayMs]) : '';
    if (!rt) {
      rt = { det: initialDetectorState(), sig, lastValue: null };
      runtime.set(ch.id, rt);
    }
    if (rt.sig !== sig) {
      // Settings changed: keep a held alarm if its side still exists (the deadband decides), else clear it.
      const held = rt.det.alarm;
      const keep = held !== null && lim !== null && (held === 'high' ? lim.high !== undefined : lim.low !== undefined);
      if (held !== null && !keep) await clear(ctx, `channel:${ch.id}:${held}`, tLast);
      rt.det = { ...initialDetectorState(), alarm: keep ? held : null };
      rt.sig = sig;
    }
    if (!lim) return;
    for (const s of samples) {
      rt.lastValue = s.value;
      const isRunning = !lim.onlyWhileRunning || running(ch, s.tMs);
      if (lim.onlyWhileRunning) await syncRunning(ctx, ch, rt, isRunning, s.tMs);
      const before = rt.det.alarm;
      const r = step(rt.det, { tMs: s.tMs, v: s.value }, lim);
      rt.det = r.state;
      if (r.event === 'clear' && before !== null) {
        await clear(ctx, `channel:${ch.id}:${before}`, s.tMs);
      } else if (r.event === 'activate-high' || r.event === 'activate-low') {
        const side: LimitSide = r.event === 'activate-high' ? 'high' : 'low';
        const key = `channel:${ch.id}:${side}`;
        // While idle the condition is expected (a door open between loads): track it on a
        // suppressed alarm if there is one, raise nothing new.
        if (!isRunning) {
          const hint = known.get(key) ?? null;
          if (hint === null || hint === 'none' || hint.state !== 'suppressed') continue;
        }
        await raise(ctx, {
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

  async function onReadings(ctx: WorkerContext, rows: StoredReading[]): Promise<void> {
    if (disabled || rows.length === 0) return;
    const started = performance.now();
    try {
      await evaluateReadings(ctx, rows);
    } finally {
      load.rows += rows.length;
      load.busyMs += performance.now() - started;
      if (Date.now() - load.since >= 60_000) {
        ctx.log(
          `alarms: ${load.rows} readings judged in ${((Date.now() - load.since) / 1000).toFixed(0)} s ` +
            `(${load.raises} raises, ${load.clears} clears, ${(load.busyMs / 1000).toFixed(1)} s busy)`,
        );
        Object.assign(load, { rows: 0, busyMs: 0, raises: 0, clears: 0, since: Date.now() });
      }
    }
  }

  async function evaluateReadings(ctx: WorkerContext, rows: StoredReading[]): Promise<void> {
    const nowMs = Date.now();
    if (nowMs - configsAt > CONFIGS_EVERY_MS) await loadConfigs(ctx, nowMs);
    const byChannel = new Map<number, StoredReading[]>();
    for (const r of rows) {
      const list = byChannel.get(r.channelId);
      if (list) list.push(r);
      else byChannel.set(r.channelId, [r]);
    }
    if ([...byChannel.keys()].some((id) => !channels.has(id))) await loadChannels(ctx, nowMs);
    // Setpoints first, so an oven's channels in the same batch see it running.
    for (const [id, list] of byChannel) {
      const ch = channels.get(id);
      if (!ch) continue;
      list.sort((a, b) => a.tMs - b.tMs);
      if (ch.kind === 'setpoint' && ch.ovenAssetId !== null) setpoints.set(ch.ovenAssetId, list[list.length - 1]!.value);
    }
    // Channels are independent: judge a few at a time (each channel's readings stay in order).
    const queue = [...byChannel];
    const lane = async () => {
      for (let next = queue.shift(); next; next = queue.shift()) {
        const [id, list] = next;
        const ch = channels.get(id);
        if (!ch) continue;
        const newest = list[list.length - 1]!.tMs;
        lastSeen.set(id, Math.max(lastSeen.get(id) ?? 0, newest));
        if (staleActive.has(id)) {
          staleActive.delete(id);
          await clear(ctx, `stale:channel:${id}`, newest);
        }
        await evaluateChannel(ctx, ch, list);
      }
    };
    await Promise.all(Array.from({ length: Math.min(CHANNEL_LANES, queue.length) }, lane));
  }

  async function checkStale(ctx: WorkerContext, nowMs: number): Promise<void> {
    for (const [id, cfg] of configs) {
      const ch = channels.get(id);
      if (!ch || cfg.staleSeconds === null || !cfg.enabled) {
        if (staleActive.has(id)) {
          staleActive.delete(id);
          await clear(ctx, `stale:channel:${id}`, nowMs);
        }
        continue;
      }
      const seen = lastSeen.get(id);
      const silentMs = seen === undefined ? Number.POSITIVE_INFINITY : nowMs - seen;
      const isOven = ch.ovenAssetId !== null;
      const key = `stale:channel:${id}`;
      // An idle oven needs no data: its no-data alarm is suppressed by design until it runs again.
      if (isOven && staleSuppressed.has(id) && running(ch, nowMs)) {
        staleSuppressed.delete(id);
        await systemEvent(ctx, key, 'unsuppress', nowMs);
      }
      if (staleActive.has(id)) {
        if (isOven && !running(ch, nowMs) && !staleSuppressed.has(id)) {
          staleSuppressed.add(id);
          await systemEvent(ctx, key, 'suppress', nowMs);
        }
        continue; // other assets clear only when data returns
      }
      if (silentMs <= cfg.staleSeconds * 1000) continue;
      if (isOven ? !running(ch, nowMs) : seen === undefined || silentMs > RECENT_DATA_MS) continue;
      staleActive.add(id);
      const since = seen === undefined ? '' : ` for ${Math.round(silentMs / 1000)} s`;
      await raise(ctx, {
        sourceKind: 'stale',
        sourceKey: key,
        sourceLabel: sourceLabelOf(ch),
        assetId: ch.assetId,
        channelId: ch.id,
        priority: cfg.stalePriority,
        message: `No reading from ${ch.name}${since}${isOven ? ' while the oven runs' : ''} (expected within ${cfg.staleSeconds} s)`,
        value: null,
        limit: cfg.staleSeconds,
        atMs: nowMs,
      });
    }
  }

  async function checkDevices(ctx: WorkerContext, nowMs: number): Promise<void> {
    const res = await ctx.pool.query<{
      id: number;
      name: string;
      username: string;
      online: boolean;
      enabled: boolean;
      last_seen_at: Date | null;
      offline_at: Date | null;
    }>(
      `select d.id, d.name, d.username, d.online, d.enabled, d.last_seen_at,
              (select max(e.at) from device_events e where e.device_id = d.id and e.kind = 'offline') as offline_at
         from devices d`,
    );
    for (const d of res.rows) {
      const key = `device:${d.id}`;
      const since = d.offline_at ?? d.last_seen_at;
      const offline =
        d.enabled && !d.online && d.last_seen_at !== null && since !== null && nowMs - since.getTime() > DEVICE_OFFLINE_MS;
      if (offline && !deviceActive.has(d.id)) {
        deviceActive.add(d.id);
        await raise(ctx, {
          sourceKind: 'device',
          sourceKey: key,
          sourceLabel: `${d.name} (${d.username})`,
          priority: 'medium',
          message: `Device ${d.username} offline for ${Math.round((nowMs - since.getTime()) / 1000)} s: its channels are not being recorded`,
          atMs: nowMs,
        });
      } else if (!offline && deviceActive.has(d.id)) {
        deviceActive.delete(d.id);
        await clear(ctx, key, nowMs);
      }
    }
  }

  async function checkSystem(ctx: WorkerContext, nowMs: number): Promise<void> {
    const res = await ctx.pool.query<{ worker_id: string; heartbeat_at: Date; lag_ms: number | null; journal_bytes: number }>(
      `select worker_id, heartbeat_at, lag_ms, journal_bytes from ingest_status`,
    );
    for (const w of res.rows) {
      const live = nowMs - w.heartbeat_at.getTime() < 30_000;
      const lagKey = `system:ingest-lag:${w.worker_id}`;
      const lag = w.lag_ms ?? 0;
      if (live && lag > LAG_RAISE_MS && !systemActive.has(lagKey)) {
        systemActive.add(lagKey);
        await raise(ctx, {
          sourceKind: 'system',
          sourceKey: lagKey,
          sourceLabel: `Ingest worker ${w.worker_id}`,
          priority: 'medium',
          message: `Readings reach the database ${fmt(lag / 1000)} s late (more than ${LAG_RAISE_MS / 1000} s): live screens and alarms are behind`,
          value: lag / 1000,
          limit: LAG_RAISE_MS / 1000,
          atMs: nowMs,
        });
      } else if ((!live || lag < LAG_CLEAR_MS) && systemActive.has(lagKey)) {
        systemActive.delete(lagKey);
        await clear(ctx, lagKey, nowMs);
      }
      const journalKey = `system:journal:${w.worker_id}`;
      const hist = [...(journalHistory.get(w.worker_id) ?? []), Number(w.journal_bytes)].slice(-4);
      journalHistory.set(w.worker_id, hist);
      const growing = hist.length === 4 && hist.every((b, i) => i === 0 || b > hist[i - 1]!);
      if (live && growing && !systemActive.has(journalKey)) {
        systemActive.add(journalKey);
        await raise(ctx, {
          sourceKind: 'system',
          sourceKey: journalKey,
          sourceLabel: `Ingest worker ${w.worker_id}`,
          priority: 'high',
          message: `The ingest journal keeps growing (${Math.round(Number(w.journal_bytes) / 1024)} KiB): readings are held on disk because the database is not taking them`,
          value: Number(w.journal_bytes),
          atMs: nowMs,
        });
      } else if (systemActive.has(journalKey) && (Number(w.journal_bytes) === 0 || !growing)) {
        systemActive.delete(journalKey);
        await clear(ctx, journalKey, nowMs);
      }
    }
  }

  function transport(ctx: WorkerContext): Transporter | null {
    const url = process.env['SMTP_URL'];
    if (!url) {
      if (!warnedNoSmtp) ctx.log('alarms: SMTP_URL is not set; escalation e-mail is not sent');
      warnedNoSmtp = true;
      return null;
    }
    mailer ??= nodemailer.createTransport(url);
    return mailer;
  }

  async function recipients(ctx: WorkerContext, notify: string, s: EscalationSettings): Promise<string[]> {
    if (notify === 'on-shift-engineer') return [s.onShiftEngineerEmail];
    const role = /^role-(viewer|operator|engineer|quality|admin)$/.exec(notify)?.[1];
    if (role) {
      const res = await ctx.pool.query<{ email: string }>(
        `select email from users where role = $1 and active and email is not null order by id`,
        [role],
      );
      return res.rows.map((r) => r.email);
    }
    return [];
  }

  async function escalate(ctx: WorkerContext, nowMs: number): Promise<void> {
    if (!settings || nowMs - settings.at > SETTINGS_TTL_MS) {
      settings = { value: await escalationSettings(ctx.pool), at: nowMs };
    }
    const s = settings.value;
    const rules = rulesByPriority(s.rules);
    if (Object.values(rules).every((steps) => !steps || steps.length === 0)) return;
    const waiting = await alarmsAwaitingAck(ctx.pool);
    if (waiting.length === 0) return;
    const origin = (process.env['PUBLIC_ORIGIN'] ?? 'http://127.0.0.1:4321').replace(/\/$/, '');
    for (const a of waiting) {
      const due = dueEscalations(
        { priority: a.priority, state: a.state, raisedAtMs: a.lastActivatedAtMs, escalationStepsSent: a.escalationStepsSent },
        rules,
        nowMs,
      );
      for (const d of due) {
        const to = await recipients(ctx, d.notify, s);
        const mail = transport(ctx);
        if (to.length === 0) {
          await recordEscalation(ctx.pool, a.id, d.stepIndex, nowMs, `step ${d.stepIndex + 1}: no address for "${d.notify}"`);
          ctx.log(`alarms: escalation of alarm ${a.id} step ${d.stepIndex + 1}: no address for "${d.notify}"`);
          continue;
        }
        if (!mail) return;
        const claimed = await recordEscalation(
          ctx.pool,
          a.id,
          d.stepIndex,
          nowMs,
          `step ${d.stepIndex + 1} e-mailed to ${to.join(', ')}`,
        );
        if (!claimed) continue;
        const raised = new Date(a.lastActivatedAtMs).toLocaleString('en-GB', { timeZone: siteZone, timeZoneName: 'short' });
        const text = [
          `A ${a.priority}-priority alarm has not been acknowledged for ${d.afterMinutes} min.`,
          '',
          `Source:  ${a.sourceLabel}`,
          `Alarm:   ${a.message}`,
          `Raised:  ${raised} (${siteZone})`,
          `State:   ${a.state === 'unacked' ? 'needs acknowledgement' : 'cleared, not yet acknowledged'}`,
          '',
          `Open it: ${origin}/alarms?focus=${a.id}`,
          '',
          'These alarms are advisory. They are not a safety-instrumented function; oven over-temperature',
          'protection and interlocks stay in the equipment.',
        ].join('\n');
        try {
          await mail.sendMail({
            from: `Coatrail <coatrail@${hostOf(origin)}>`,
            to: to.join(', '),
            subject: `Coatrail: ${a.priority}-priority alarm unacknowledged ${d.afterMinutes} min — ${a.sourceLabel}`,
            text,
          });
          await publish(ctx, a.id);
        } catch (e) {
          await releaseEscalation(ctx.pool, a.id, d.stepIndex);
          ctx.log(`alarms: escalation e-mail for alarm ${a.id} failed (${(e as Error).message}); will retry`);
        }
      }
    }
  }

  async function restore(ctx: WorkerContext): Promise<void> {
    // Held conditions from before a restart: no duplicate raises, and clears still happen.
    const open = await ctx.pool.query<{ source_key: string; state: string; active: boolean }>(
      `select source_key, state, active from alarms where state <> 'normal' and source_kind in ('limit','stale','device','system')`,
    );
    for (const { source_key: key, state, active } of open.rows) {
      const suppressed = state === 'suppressed';
      let m = /^channel:(\d+):(high|low)$/.exec(key);
      if (m) {
        const prev = runtime.get(Number(m[1]));
        runtime.set(Number(m[1]), {
          det: { ...initialDetectorState(), alarm: active ? (m[2] as LimitSide) : (prev?.det.alarm ?? null) },
          sig: '\u0000restored',
          lastValue: null,
          ...(suppressed || prev?.running === false ? { running: false } : {}),
        });
        continue;
      }
      if ((m = /^stale:channel:(\d+)$/.exec(key))) {
        if (active) staleActive.add(Number(m[1]));
        if (suppressed) staleSuppressed.add(Number(m[1]));
        continue;
      }
      if (!active) continue;
      if ((m = /^device:(\d+)$/.exec(key))) deviceActive.add(Number(m[1]));
      else if (key.startsWith('system:')) systemActive.add(key);
    }
    // Latest reading per channel in the last hour (stale checks) and each oven's last setpoint.
    const latest = await ctx.pool.query<{ channel_id: number; t_ms: number; value: number }>(
      `select c.id as channel_id, r.t_ms, r.value from channels c
         cross join lateral (select (extract(epoch from ts) * 1000)::float8 as t_ms, value from readings
                              where channel_id = c.id and ts > now() - interval '1 hour' order by ts desc limit 1) r`,
    );
    for (const r of latest.rows) {
      lastSeen.set(r.channel_id, r.t_ms);
      const ch = channels.get(r.channel_id);
      if (ch && ch.kind === 'setpoint' && ch.ovenAssetId !== null) setpoints.set(ch.ovenAssetId, r.value);
    }
    const zone = await ctx.pool.query<{ time_zone: string }>(`select time_zone from sites order by id limit 1`);
    siteZone = zone.rows[0]?.time_zone ?? 'UTC';
  }

  return {
    name: 'alarms',
    async init(ctx) {
      if (disabled) {
        ctx.log('alarms: evaluation off in this worker (INGEST_ALARMS=off)');
        return;
      }
      await serial(async () => {
        const now = Date.now();
        await loadChannels(ctx, now);
        await loadConfigs(ctx, now);
        await restore(ctx);
      });
    },
    onReadings(ctx, rows) {
      // Judge in the background, in order, so the other post-commit handlers need not wait for
      // the alarm writes; past a backlog, hold the worker back instead of growing without bound.
      backlog += rows.length;
      const done = serial(() => onReadings(ctx, rows))
        .catch((e: Error) => ctx.log(`alarms: judging ${rows.length} readings failed: ${e.stack ?? e.message}`))
        .finally(() => (backlog -= rows.length));
      return backlog > MAX_BACKLOG_ROWS ? done : Promise.resolve();
    },
    onTick(ctx, nowMs) {
      if (disabled) return Promise.resolve();
      return serial(async () => {
        for (const a of await expireShelves(ctx.pool, nowMs)) await publish(ctx, null, a);
        if (nowMs - lastCheck < CHECK_EVERY_MS) return;
        lastCheck = nowMs;
        if (nowMs - channelsAt > CHANNELS_EVERY_MS) await loadChannels(ctx, nowMs);
        if (nowMs - configsAt > CONFIGS_EVERY_MS) await loadConfigs(ctx, nowMs);
        // Each duty on its own: one failing must not starve the others.
        const duties: [string, () => Promise<void>][] = [
          ['stale data', () => checkStale(ctx, nowMs)],
          ['devices', () => checkDevices(ctx, nowMs)],
          ['system', () => checkSystem(ctx, nowMs)],
          ['escalation', () => escalate(ctx, nowMs)],
        ];
        for (const [what, duty] of duties) {
          try {
            await duty();
          } catch (e) {
            ctx.log(`alarms: ${what} check failed: ${(e as Error).message}`);
          }
        }
      });
    },
  };
}

function limitsOf(high: number | null, low: number | null): Pick<LimitDetectorConfig, 'high' | 'low'> {
  return { ...(high !== null ? { high } : {}), ...(low !== null ? { low } : {}) };
}

function hostOf(origin: string): string {
  try {
    return new URL(origin).hostname || 'localhost';
  } catch {
    return 'localhost';
  }
}

export const alarmsHandler: PostCommitHandler = createAlarmsHandler();
