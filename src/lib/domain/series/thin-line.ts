import type { ChartPoint } from '../../shared/trend.ts';
import { lttb } from './lttb.ts';

/**
 * Thin a line for drawing when it holds more points than `targetPoints` (e.g. the plot was
 * narrowed after the data came): each unbroken stretch between gaps is downsampled by LTTB
 * (Steinarsson 2013, lttb.ts) to its share of the target (at least 3 points),
 * and the gap breaks are kept — chart.js's own decimation would read a break as a value.
 * Lines within the target are returned as they are.
 */
export function thinLine(line: readonly ChartPoint[], targetPoints: number): ChartPoint[] {
  const total = line.reduce((n, p) => n + (p.y === null ? 0 : 1), 0);
  if (total <= targetPoints) return line as ChartPoint[];
  const runs: { x: number; y: number }[][] = [[]];
  for (const p of line) {
    if (p.y === null) runs.push([]);
    else runs[runs.length - 1]!.push({ x: p.x, y: p.y });
  }
  const out: ChartPoint[] = [];
  let first = true;
  for (const run of runs) {
    if (run.length === 0) continue;
    if (!first) out.push({ x: (out[out.length - 1]!.x + run[0]!.x) / 2, y: null });
    first = false;
    const share = Math.max(3, Math.floor((targetPoints * run.length) / total));
    out.push(...lttb(run, share));
  }
  return out;
}
