import { useEffect, useState } from 'react';
import { apiFetch } from '../../lib/client/api.ts';
import type { AlarmView } from '../../lib/shared/alarm-views.ts';
import { sparkline } from '../../lib/shared/alarm-queue.ts';
import type { ReadingsResponse } from '../../lib/shared/telemetry.ts';
import { PALETTE } from '../../styles/palette.mjs';

const SPARK_W = 120;
const SPARK_H = 28;

const sparkCache = new Map<string, Promise<ReadingsResponse>>();

/** The channel around the alarm: 10 min before to 5 min after (or now), the limit dashed, the alarm time marked. */
export function AlarmSpark({ a }: { a: AlarmView }) {
  const [data, setData] = useState<ReadingsResponse | null>(null);
  const [failed, setFailed] = useState(false);
  const from = a.lastActivatedAtMs - 10 * 60_000;
  const to = Math.min(Date.now(), a.lastActivatedAtMs + 5 * 60_000);
  useEffect(() => {
    // Fetched once per alarm activation (the cache key), whatever the clock says at re-render.
    const key = `${a.channelId}:${a.lastActivatedAtMs}`;
    const from = a.lastActivatedAtMs - 10 * 60_000;
    const to = Math.min(Date.now(), a.lastActivatedAtMs + 5 * 60_000);
    let gone = false;
    let p = sparkCache.get(key);
    if (!p) {
      p = apiFetch<ReadingsResponse>(
        `/api/v1/channels/${a.channelId}/readings?from=${Math.round(from)}&to=${Math.round(to) + 1}&maxPoints=120`,
      );
      sparkCache.set(key, p);
      p.catch(() => sparkCache.delete(key));
    }
    p.then((d) => !gone && setData(d)).catch(() => !gone && setFailed(true));
    return () => {
      gone = true;
    };
  }, [a.channelId, a.lastActivatedAtMs]);
  if (failed) return <span className="text-xs font-normal text-ink-soft">Trend unavailable</span>;
  if (!data) return <span className="block h-7 w-[120px] animate-pulse rounded bg-slate-panel" aria-label="Loading trend" />;
  const points = data.mode === 'raw' ? data.points : data.buckets.map((b) => ({ t: b.t, v: b.mean }));
  const s = sparkline(points, from, to, SPARK_W, SPARK_H, { alarmAtMs: a.lastActivatedAtMs, limit: a.limit, gapMs: 120_000 });
  if (!s) return <span className="text-xs font-normal text-ink-soft">No readings around the alarm</span>;
  return (
    <svg
      width={SPARK_W}
      height={SPARK_H}
      viewBox={`0 0 ${SPARK_W} ${SPARK_H}`}
      role="img"
      aria-label={`Trend of the channel from 10 minutes before the alarm, range ${s.min.toFixed(2)}–${s.max.toFixed(2)} ${data.unit}`}
      className="block"
    >
      {s.limitY !== null && (
        <line x1={0} x2={SPARK_W} y1={s.limitY} y2={s.limitY} stroke={PALETTE.alertHigh} strokeDasharray="3 2" strokeWidth={1} />
      )}
      {s.alarmX !== null && <line x1={s.alarmX} x2={s.alarmX} y1={0} y2={SPARK_H} stroke={PALETTE.inkFaint} strokeWidth={1} />}
      <path d={s.path} fill="none" stroke={PALETTE.slateDeep} strokeWidth={1.4} />
    </svg>
  );
}
