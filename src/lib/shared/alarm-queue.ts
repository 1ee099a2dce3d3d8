/**
 * The operator's alarm queue, pure: which alarms a view shows, the queue order, merging live
 * updates, when to sound the audible cue, and the small sparkline around an alarm. Shared by
 * the queue island and its tests.
 */
import type { AlarmState } from './alarms.ts';
import type { AlarmView } from './alarm-views.ts';

export const QUEUE_VIEWS = ['open', 'held', 'recent'] as const;
export type QueueView = (typeof QUEUE_VIEWS)[number];

export const VIEW_LABELS: Readonly<Record<QueueView, string>> = {
  open: 'Needs attention',
  held: 'Shelved or out of service',
  recent: 'All recent, including cleared',
};

const ANNUNCIATED: readonly AlarmState[] = ['unacked', 'acked', 'rtn-unacked'];
const HELD: readonly AlarmState[] = ['shelved', 'suppressed', 'out-of-service'];

/** Whether an alarm belongs in a view. */
export function inView(a: AlarmView, view: QueueView): boolean {
  if (view === 'open') return ANNUNCIATED.includes(a.state);
  if (view === 'held') return HELD.includes(a.state);
  return true;
}

const PRIORITY_RANK = { high: 0, medium: 1, low: 2 } as const;

export type QueueSort = 'priority' | 'newest';

/**
 * Queue order. `priority` (default): waiting for acknowledgement first, then high → low, then
 * still active before already cleared, then newest activation first. `newest`: newest
 * activation first.
 */
export function sortQueue(list: readonly AlarmView[], sort: QueueSort = 'priority'): AlarmView[] {
  const waiting = (a: AlarmView) => (a.state === 'unacked' || a.state === 'rtn-unacked' ? 0 : 1);
  return [...list].sort((a, b) => {
    if (sort === 'priority') {
      const d =
        waiting(a) - waiting(b) || PRIORITY_RANK[a.priority] - PRIORITY_RANK[b.priority] || Number(b.active) - Number(a.active);
      if (d !== 0) return d;
    }
    return b.lastActivatedAtMs - a.lastActivatedAtMs || b.id - a.id;
  });
}

/** Merge one live alarm into the map, keeping the newer of two versions (by `updatedAtMs`). */
export function mergeAlarm(map: ReadonlyMap<number, AlarmView>, a: AlarmView): Map<number, AlarmView> {
  const next = new Map(map);
  const old = map.get(a.id);
  if (!old || a.updatedAtMs >= old.updatedAtMs) next.set(a.id, a);
  return next;
}

/**
 * Should this live update sound the cue? Only for high and medium alarms that newly need
 * acknowledgement: a new alarm, or one that went (back) to `unacked` from another state.
 */
export function shouldSound(before: AlarmView | undefined, after: AlarmView): boolean {
  if (after.priority === 'low' || after.state !== 'unacked') return false;
  return !before || before.state !== 'unacked';
}

/** A sparkline as SVG path data in a `width × height` box, with where the alarm time and limit fall. */
export interface Sparkline {
  path: string;
  /** x of the alarm time, or null when outside the range. */
  alarmX: number | null;
  /** y of the limit, or null when none or outside the drawn range. */
  limitY: number | null;
  min: number;
  max: number;
}

/**
 * Scale points `{t, v}` into a `width × height` box over `[fromMs, toMs]`; the y range covers
 * the values and the limit. Gaps longer than `gapMs` break the line (no invented data).
 */
export function sparkline(
  points: readonly { t: number; v: number }[],
  fromMs: number,
  toMs: number,
  width: number,
  height: number,
  opts: { alarmAtMs?: number; limit?: number | null; gapMs?: number } = {},
): Sparkline | null {
  const pts = points.filter((p) => Number.isFinite(p.v) && p.t >= fromMs && p.t <= toMs);
  if (pts.length === 0 || !(toMs > fromMs)) return null;
  const values = pts.map((p) => p.v);
  if (typeof opts.limit === 'number' && Number.isFinite(opts.limit)) values.push(opts.limit);
  let min = Math.min(...values);
  let max = Math.max(...values);
  if (max === min) {
    min -= 1;
    max += 1;
  }
  const pad = 2;
  const x = (t: number) => ((t - fromMs) / (toMs - fromMs)) * width;
  const y = (v: number) => pad + (1 - (v - min) / (max - min)) * (height - 2 * pad);
  const gap = opts.gapMs ?? Number.POSITIVE_INFINITY;
  let path = '';
  let prevT: number | null = null;
  for (const p of pts) {
    const cmd = prevT === null || p.t - prevT > gap ? 'M' : 'L';
    path += `${cmd}${x(p.t).toFixed(1)},${y(p.v).toFixed(1)}`;
    prevT = p.t;
  }
  const at = opts.alarmAtMs;
  return {
    path,
    alarmX: typeof at === 'number' && at >= fromMs && at <= toMs ? x(at) : null,
    limitY: typeof opts.limit === 'number' && Number.isFinite(opts.limit) ? y(opts.limit) : null,
    min,
    max,
  };
}
