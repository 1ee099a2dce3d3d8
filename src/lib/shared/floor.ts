/**
 * The Floor's snapshot (what the server page passes to the island and `GET /api/v1/floor`
 * answers) and the small pure helpers the island uses to keep it live. Times are epoch ms.
 */
import type { ChartPoint, WindowRange } from './trend.ts';

export interface FloorChannel {
  id: number;
  name: string;
  /** The name without the tile's own prefix ("Bath viscosity" on "Dip line 1"). */
  shortName: string;
  kind: string;
  unit: string;
  min: number;
  max: number;
  assetId: number;
  deviceId: number;
  window: WindowRange | null;
  /** Name and version of the window in force, e.g. "HC-300 on CR-39 v2". */
  windowName: string | null;
  latest: { tMs: number; value: number } | null;
  /** Open alarms on this channel (any priority), and the highest priority among them. */
  alarms: number;
  alarmPriority: 'high' | 'medium' | 'low' | null;
}

export interface FloorLoad {
  id: number;
  openedAtMs: number;
  phase: 'idle' | 'ramp' | 'soak' | 'cool';
  soakStartMs: number | null;
  predictedEndMs: number | null;
  setpointC: number | null;
  jobs: number;
}

export interface FloorDevice {
  id: number;
  name: string;
  username: string;
  online: boolean;
  lastSeenMs: number | null;
}

export interface FloorAlarm {
  id: number;
  priority: 'high' | 'medium' | 'low';
  state: string;
  message: string;
  raisedAtMs: number;
  channelId: number | null;
}

export interface FloorTile {
  id: number;
  code: string;
  name: string;
  kind: 'line' | 'oven' | 'coater';
  channels: FloorChannel[];
  deviceIds: number[];
  /** Open (annunciated) alarms on the asset or anything under it, newest first (at most 5). */
  alarms: FloorAlarm[];
  alarmCount: number;
  shelvedCount: number;
  /** Ovens only: the load in progress, or null. */
  load: FloorLoad | null;
}

export interface FloorSnapshot {
  siteName: string;
  timeZone: string;
  atMs: number;
  tiles: FloorTile[];
  devices: FloorDevice[];
}

/** A reading as the live stream carries it. */
export interface LiveReading {
  channelId: number;
  tMs: number;
  value: number;
}

/**
 * A channel's name without its tile's prefix: when the tile's name ends with the channel
 * name's first words ("Dip line 1" / "Line 1 bath viscosity"), those words are dropped and the
 * rest capitalised ("Bath viscosity"). Otherwise the name is kept.
 */
export function shortChannelName(channelName: string, tileName: string): string {
  const words = channelName.split(/\s+/);
  const tile = tileName.toLowerCase();
  for (let k = Math.min(words.length - 1, 4); k >= 1; k--) {
    const head = words.slice(0, k).join(' ').toLowerCase();
    if (tile === head || tile.endsWith(` ${head}`)) {
      const rest = words.slice(k).join(' ');
      return rest.charAt(0).toUpperCase() + rest.slice(1);
    }
  }
  return channelName;
}

/**
 * Append a live point to a sparkline: ignored unless newer than the last point; points older
 * than `windowMs` before the new one drop off the front.
 */
export function appendSpark(points: readonly ChartPoint[], p: ChartPoint, windowMs: number): ChartPoint[] {
  const last = points[points.length - 1];
  if (last && p.x <= last.x) return points as ChartPoint[];
  const cut = p.x - windowMs;
  let i = 0;
  while (i < points.length && points[i]!.x < cut) i++;
  return [...points.slice(i), p];
}

/**
 * Apply a batch of live readings to the latest values: the newest reading per channel wins;
 * an older reading (out-of-order delivery) never replaces a newer one. Returns the same map
 * when nothing changed (so React skips a render).
 */
export function applyLatest(
  latest: ReadonlyMap<number, { tMs: number; value: number }>,
  batch: readonly LiveReading[],
): ReadonlyMap<number, { tMs: number; value: number }> {
  let out: Map<number, { tMs: number; value: number }> | null = null;
  for (const r of batch) {
    if (!Number.isFinite(r.value) || !Number.isFinite(r.tMs)) continue;
    const cur = (out ?? latest).get(r.channelId);
    if (cur && cur.tMs >= r.tMs) continue;
    out ??= new Map(latest);
    out.set(r.channelId, { tMs: r.tMs, value: r.value });
  }
  return out ?? latest;
}

/** Age beyond which a channel's latest reading counts as stale on the Floor: 2 minutes (our default). */
export const STALE_AFTER_MS = 120_000;

export const PHASE_WORDS: Readonly<Record<FloorLoad['phase'], string>> = {
  idle: 'Idle',
  ramp: 'Heating up',
  soak: 'Soaking',
  cool: 'Cooling',
};

/** SVG polyline points ("x,y x,y …") for a sparkline in a `width × height` box; gaps split into several lines. */
export function sparkPaths(
  points: readonly ChartPoint[],
  fromMs: number,
  toMs: number,
  lo: number,
  hi: number,
  width: number,
  height: number,
): string[] {
  const span = toMs - fromMs || 1;
  const vspan = hi - lo || 1;
  const paths: string[] = [];
  let cur: string[] = [];
  for (const p of points) {
    if (p.y === null || p.x < fromMs) {
      if (cur.length) paths.push(cur.join(' '));
      cur = [];
      continue;
    }
    const x = ((p.x - fromMs) / span) * width;
    const y = height - ((Math.min(hi, Math.max(lo, p.y)) - lo) / vspan) * height;
    cur.push(`${x.toFixed(1)},${y.toFixed(1)}`);
  }
  if (cur.length) paths.push(cur.join(' '));
  return paths;
}

/**
 * Decimals to print a value with, from the span it is judged over (the window, else the
 * channel range): span ≥ 100 → 0, ≥ 10 → 1, ≥ 1 → 2, else 3. Enough to see movement inside the
 * window without printing sensor noise.
 */
export function valueDecimals(span: number): number {
  const s = Math.abs(span);
  return s >= 100 ? 0 : s >= 10 ? 1 : s >= 1 ? 2 : 3;
}

/** A value with its unit ("9.52 mm²/s"); the door channel reads "Open"/"Closed". */
export function formatValue(value: number, unit: string, kind: string, span: number): string {
  if (kind === 'door') return value >= 0.5 ? 'Open' : 'Closed';
  return `${value.toFixed(valueDecimals(span))} ${unit}`;
}
