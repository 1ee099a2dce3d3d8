/**
 * System (`system`): ingest lag above 10 s for a worker with a live heartbeat
 * (`system:ingest-lag:{worker}`, clears below 5 s), or its disk journal growing over three
 * consecutive checks (`system:journal:{worker}`), both from `ingest_status`.
 */
import { LAG_CLEAR_MS, LAG_RAISE_MS } from '../../../src/lib/shared/alarm-views.ts';
import { select } from '../../../src/lib/core/db.ts';
import type { WorkerContext } from '../index.ts';
import { fmt } from './channels.ts';
import { clear, raise, type AlarmsRuntime } from './runtime.ts';

export async function checkSystem(rt: AlarmsRuntime, ctx: WorkerContext, nowMs: number): Promise<void> {
  const rows = await select<{ worker_id: string; heartbeat_at: Date; lag_ms: number | null; journal_bytes: number }>(
    ctx.sequelize,
    `select worker_id, heartbeat_at, lag_ms, journal_bytes from ingest_status`,
  );
  for (const w of rows) {
    const live = nowMs - w.heartbeat_at.getTime() < 30_000;
    const lagKey = `system:ingest-lag:${w.worker_id}`;
    const lag = w.lag_ms ?? 0;
    if (live && lag > LAG_RAISE_MS && !rt.systemActive.has(lagKey)) {
      rt.systemActive.add(lagKey);
      await raise(rt, ctx, {
        sourceKind: 'system',
        sourceKey: lagKey,
        sourceLabel: `Ingest worker ${w.worker_id}`,
        priority: 'medium',
        message: `Readings reach the database ${fmt(lag / 1000)} s late (more than ${LAG_RAISE_MS / 1000} s): live screens and alarms are behind`,
        value: lag / 1000,
        limit: LAG_RAISE_MS / 1000,
        atMs: nowMs,
      });
    } else if ((!live || lag < LAG_CLEAR_MS) && rt.systemActive.has(lagKey)) {
      rt.systemActive.delete(lagKey);
      await clear(rt, ctx, lagKey, nowMs);
    }
    const journalKey = `system:journal:${w.worker_id}`;
    const hist = [...(rt.journalHistory.get(w.worker_id) ?? []), Number(w.journal_bytes)].slice(-4);
    rt.journalHistory.set(w.worker_id, hist);
    const growing = hist.length === 4 && hist.every((b, i) => i === 0 || b > hist[i - 1]!);
    if (live && growing && !rt.systemActive.has(journalKey)) {
      rt.systemActive.add(journalKey);
      await raise(rt, ctx, {
        sourceKind: 'system',
        sourceKey: journalKey,
        sourceLabel: `Ingest worker ${w.worker_id}`,
        priority: 'high',
        message: `The ingest journal keeps growing (${Math.round(Number(w.journal_bytes) / 1024)} KiB): readings are held on disk because the database is not taking them`,
        value: Number(w.journal_bytes),
        atMs: nowMs,
      });
    } else if (rt.systemActive.has(journalKey) && (Number(w.journal_bytes) === 0 || !growing)) {
      rt.systemActive.delete(journalKey);
      await clear(rt, ctx, journalKey, nowMs);
    }
  }
}
