/**
 * Stale data (`stale`, source key `stale:channel:{id}`): no reading for `staleSeconds` while the
 * asset runs. An oven (and its zones) runs while its last setpoint is ≥ 50 °C; any other asset
 * counts as running when the channel had data in the last hour — a channel silent for longer is
 * taken to be switched off for the shift and raises nothing. The alarm clears when data returns
 * (`limits.ts`). An idle oven needs no data: its no-data alarm is suppressed by design until it
 * runs again.
 */
import { RECENT_DATA_MS } from '../../../src/lib/shared/alarm-views.ts';
import type { WorkerContext } from '../index.ts';
import { running, sourceLabelOf } from './channels.ts';
import { clear, raise, systemEvent, type AlarmsRuntime } from './runtime.ts';

export async function checkStale(rt: AlarmsRuntime, ctx: WorkerContext, nowMs: number): Promise<void> {
  for (const [id, cfg] of rt.configs) {
    const ch = rt.channels.get(id);
    const key = `stale:channel:${id}`;
    if (!ch || cfg.staleSeconds === null || !cfg.enabled) {
      if (rt.staleActive.has(id)) {
        rt.staleActive.delete(id);
        await clear(rt, ctx, key, nowMs);
      }
      continue;
    }
    const seen = rt.lastSeen.get(id);
    const silentMs = seen === undefined ? Number.POSITIVE_INFINITY : nowMs - seen;
    const isOven = ch.ovenAssetId !== null;
    if (isOven && rt.staleSuppressed.has(id) && running(rt, ch, nowMs)) {
      rt.staleSuppressed.delete(id);
      await systemEvent(rt, ctx, key, 'unsuppress', nowMs);
    }
    if (rt.staleActive.has(id)) {
      if (isOven && !running(rt, ch, nowMs) && !rt.staleSuppressed.has(id)) {
        rt.staleSuppressed.add(id);
        await systemEvent(rt, ctx, key, 'suppress', nowMs);
      }
      continue; // other assets clear only when data returns
    }
    if (silentMs <= cfg.staleSeconds * 1000) continue;
    if (isOven ? !running(rt, ch, nowMs) : seen === undefined || silentMs > RECENT_DATA_MS) continue;
    rt.staleActive.add(id);
    const since = seen === undefined ? '' : ` for ${Math.round(silentMs / 1000)} s`;
    await raise(rt, ctx, {
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
