/**
 * High/low process-window alarm detection with deadband and on/off delays, as a pure stepper
 * fed one sample at a time.
 *
 * The three nuisance-alarm remedies are those ANSI/ISA-18.2-2016 and IEC 62682:2014 describe
 * for alarm design (alarm deadband, on-delay and off-delay; the standards' annex on
 * recommended settings by measurement type is not reproduced here — choose values from the
 * channel's noise):
 *
 * - Alarm condition (our convention): high when `v > high`, low when `v < low`; a value
 *   exactly at a limit is inside the window (spec windows are inclusive).
 * - On-delay: the condition must hold on every sample from its first abnormal sample `t₀`
 *   until a sample at `t ≥ t₀ + onDelayMs`; the alarm activates at that sample. A single
 *   sample back inside restarts the delay. `onDelayMs = 0` activates on the first abnormal
 *   sample.
 * - Deadband: an active high alarm is eligible to clear only when `v < high − deadband`
 *   (low: `v > low + deadband`) — back inside by more than the deadband. A value that dithers
 *   around the limit therefore cannot clear and re-activate (chatter).
 * - Off-delay: eligibility must hold on every sample from its first eligible sample `t₁`
 *   until a sample at `t ≥ t₁ + offDelayMs`; the alarm clears at that sample.
 *
 * One alarm is held at a time. If the value jumps from above `high` to below `low`, the low
 * on-delay starts running at once but the low alarm can activate only after the high alarm
 * has cleared, at the earliest on the next sample (one event per step).
 *
 * Delays are measured on sample times, not on a clock. Samples with a non-finite value or a
 * time earlier than the last accepted sample are ignored (state returned unchanged); a data
 * gap does not reset a running delay — the caller resets the detector when it wants a gap to
 * count as "unknown".
 */

/** Detector settings (validated upstream by `LimitAlarmConfigSchema` in `lib/shared/alarms.ts`). */
export interface LimitDetectorConfig {
  /** High alarm limit (channel unit); omit for a low-only alarm. */
  high?: number | undefined;
  /** Low alarm limit (channel unit); omit for a high-only alarm. */
  low?: number | undefined;
  /** Alarm deadband (channel unit, ≥ 0). */
  deadband: number;
  /** On-delay, ms (≥ 0). */
  onDelayMs: number;
  /** Off-delay, ms (≥ 0). */
  offDelayMs: number;
}

/** One reading: time (epoch ms) and value (channel unit). */
export interface Sample {
  tMs: number;
  v: number;
}

/** Which side of the window is in alarm. */
export type LimitSide = 'high' | 'low';

/** The detector's memory between samples. Start with {@link initialDetectorState}. */
export interface LimitDetectorState {
  /** The alarm currently active, or `null` when none. */
  alarm: LimitSide | null;
  /** The side whose on-delay is running, and since when (first abnormal sample, epoch ms). */
  pending: { side: LimitSide; sinceMs: number } | null;
  /** Since when the active alarm has been eligible to clear (first eligible sample), or `null`. */
  clearingSinceMs: number | null;
  /** Time of the last accepted sample, or `null` before the first. */
  lastTMs: number | null;
}

/** Event produced by a step. */
export type LimitDetectorEvent = 'activate-high' | 'activate-low' | 'clear';

/** Result of {@link step}. */
export interface LimitStepResult {
  state: LimitDetectorState;
  event?: LimitDetectorEvent;
}

/** A detector that has seen nothing: no alarm, no delay running. */
export function initialDetectorState(): LimitDetectorState {
  return { alarm: null, pending: null, clearingSinceMs: null, lastTMs: null };
}

/** The side the value is beyond, or `null` when inside the window (limits themselves are inside). */
export function limitCondition(v: number, cfg: Pick<LimitDetectorConfig, 'high' | 'low'>): LimitSide | null {
  if (cfg.high !== undefined && v > cfg.high) return 'high';
  if (cfg.low !== undefined && v < cfg.low) return 'low';
  return null;
}

/**
 * Advance the detector by one sample (ANSI/ISA-18.2 deadband, on-delay and off-delay; see the
 * module comment for the exact rules). Returns the new state and at most one event.
 */
export function step(state: LimitDetectorState, sample: Sample, cfg: LimitDetectorConfig): LimitStepResult {
  const { tMs: t, v } = sample;
  if (!Number.isFinite(v) || !Number.isFinite(t)) return { state };
  if (state.lastTMs !== null && t < state.lastTMs) return { state };

  const cond = limitCondition(v, cfg);

  // On-delay timer: runs while the value is beyond a limit that is not already in alarm.
  let pending = state.pending;
  if (cond !== null && cond !== state.alarm) {
    if (pending === null || pending.side !== cond) pending = { side: cond, sinceMs: t };
  } else {
    pending = null;
  }

  let alarm = state.alarm;
  let clearingSinceMs = state.clearingSinceMs;
  let event: LimitDetectorEvent | undefined;

  // Deadband and off-delay for the active alarm.
  if (alarm !== null) {
    const eligible =
      alarm === 'high'
        ? cfg.high === undefined || v < cfg.high - cfg.deadband
        : cfg.low === undefined || v > cfg.low + cfg.deadband;
    if (eligible) {
      clearingSinceMs ??= t;
      if (t - clearingSinceMs >= cfg.offDelayMs) {
        alarm = null;
        clearingSinceMs = null;
        event = 'clear';
      }
    } else {
      clearingSinceMs = null;
    }
  }

  // On-delay elapsed: activate (only when no alarm is held and nothing happened this step).
  if (event === undefined && alarm === null && pending !== null && t - pending.sinceMs >= cfg.onDelayMs) {
    alarm = pending.side;
    event = pending.side === 'high' ? 'activate-high' : 'activate-low';
    pending = null;
    clearingSinceMs = null;
  }

  const next: LimitDetectorState = { alarm, pending, clearingSinceMs, lastTMs: t };
  return event === undefined ? { state: next } : { state: next, event };
}

/** An event with the time of the sample that produced it. */
export interface TimedLimitEvent {
  tMs: number;
  event: LimitDetectorEvent;
}

/**
 * Run {@link step} over a series of samples from `initial` (default: a fresh detector) and
 * collect the events with their times, plus the final state (to carry on with later samples).
 */
export function runDetector(
  samples: readonly Sample[],
  cfg: LimitDetectorConfig,
  initial: LimitDetectorState = initialDetectorState(),
): { state: LimitDetectorState; events: TimedLimitEvent[] } {
  let state = initial;
  const events: TimedLimitEvent[] = [];
  for (const s of samples) {
    const r = step(state, s, cfg);
    state = r.state;
    if (r.event !== undefined) events.push({ tMs: s.tMs, event: r.event });
  }
  return { state, events };
}
