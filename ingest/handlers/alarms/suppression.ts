/**
 * Suppression by design (ANSI/ISA-18.2 "suppressed by design") while an oven idles: the open
 * alarms of its only-while-running channels (door open during cure) are suppressed — not
 * annunciated, their condition still tracked — and come back when it runs again: as needing
 * acknowledgement if the condition is still abnormal, else to normal. (The oven's no-data alarms
 * follow the same rule in `stale.ts`.)
 */
import { initialDetectorState, type LimitSide } from '../../../src/lib/domain/alarms/limit-detector.ts';
import type { WorkerContext } from '../index.ts';
import { systemEvent, type AlarmsRuntime, type ChannelInfo, type ChannelRuntime } from './runtime.ts';

/**
 * An only-while-running channel's asset started or stopped: suppress or unsuppress its open
 * limit alarms, and let the detector judge afresh (keeping the side still held) when it runs again.
 */
export async function syncRunning(
  rt: AlarmsRuntime,
  ctx: WorkerContext,
  ch: ChannelInfo,
  det: ChannelRuntime,
  isRunning: boolean,
  atMs: number,
): Promise<void> {
  const was = det.running ?? true;
  det.running = isRunning;
  if (was === isRunning) return;
  let held: LimitSide | null = null;
  for (const side of ['high', 'low'] as const) {
    const view = await systemEvent(rt, ctx, `channel:${ch.id}:${side}`, isRunning ? 'unsuppress' : 'suppress', atMs);
    if (isRunning && view?.active) held = side;
  }
  if (isRunning) det.det = { ...initialDetectorState(), alarm: held };
}
