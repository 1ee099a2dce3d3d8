/**
 * The invented demo plant's physics-ish generators, shared by the seeded history
 * (`seeds/history.ts`) and the live simulator (`seeds/simulator.ts`). Pure and deterministic:
 * no clock, no I/O, randomness only from seeded generators and hashes.
 *
 * Determinism contract (the loads/quality seed rebuilds the same lists): every list below is a
 * function of `anchorMs = nowMs rounded DOWN to the whole hour` and of `days`. Day schedules
 * (oven loads, dip strokes, lens spins) are keyed by the site's local calendar date, so two
 * anchors on the same local day give the same past; the bath and lamp histories start a fixed
 * {@link MODEL_SPAN_DAYS} before the anchor's local day. Lists hold only what is complete at
 * the anchor (a load that would end after it is left out; the oven stays idle instead).
 *
 * Models (estimates for a demo, not process data):
 * - Dip lines: a stroke every ~4 min during shifts (06:00–22:00 site time, Monday–Saturday,
 *   a 30-minute break at 12:00); withdrawal speed = target + N(0, 0.02 mm/s) + rare drift.
 * - Bath: solids mass fraction s rises as solvent evaporates (50 g/h running, 8 g/h covered);
 *   kinematic viscosity ν = 8.8·exp(k·(s − 0.30)) mm²/s with k = ln(12.5/8.8)/0.022, i.e.
 *   8.8 mm²/s at 30 wt % and 12.5 mm²/s at 32.2 wt % (an exponential solids–viscosity law,
 *   common for polymer solutions; invented constants), about +0.07 mm²/s per running hour.
 *   Each bath was charged fresh (38 kg) on a fixed day before the anchor. The operator checks hourly and adds
 *   solvent by solids mass balance (`bathAddition`, src/lib/domain/film/bath-maintenance.ts)
 *   once ν passes a per-cycle threshold of 12.3–13.0 mm²/s; drag-out lowers the bath mass and
 *   fresh lacquer tops it up; filters are changed on Mondays.
 * - Ovens: load in (door), ramp at ~3 °C/min to the setpoint, soak 180 min measured from when
 *   the coldest zone enters the ±5 °C soak band, setpoint back to standby, Newtonian cooling,
 *   unload (door). Zone 2 sits 1.5 °C below zone 1. An open door pulls the air toward the
 *   room (first order) and the oven recovers with τ ≈ 3.3 min (≈ 10 min to recover).
 * - UV coater: irradiance I = I₀·(1 − 2.2·10⁻⁴·lamp hours), a new lamp below 175 mW/cm².
 */
import { bathAddition } from '../src/lib/domain/film/bath-maintenance.ts';

export const MINUTE_MS = 60_000;
export const HOUR_MS = 3_600_000;
export const DAY_MS = 86_400_000;

/** Default length of the seeded history, days. */
export const DEFAULT_HISTORY_DAYS = 21;
/** The bath and lamp models start this many days before the anchor's local day. */
export const MODEL_SPAN_DAYS = 60;
/** Local days before the anchor's day on which the story load runs (a Sunday moves it a day earlier). */
export const STORY_DAYS_BACK = 9;

export const OVENS = ['oven-a', 'oven-b', 'oven-c'] as const;
export type OvenCode = (typeof OVENS)[number];
export const DIP_LINES = ['dip-1', 'dip-2'] as const;
export type DipLineCode = (typeof DIP_LINES)[number];

/** Withdrawal-speed targets per line, mm/s. */
export const WITHDRAWAL_TARGET_MM_S: Record<DipLineCode, number> = { 'dip-1': 2.0, 'dip-2': 2.0 };
/** Cure setpoint of the demo ovens, °C; standby setpoint between loads, °C. */
export const CURE_SETPOINT_C = 110;
export const STANDBY_SETPOINT_C = 25;
/** Soak length of a normal load, min; the story load's setpoint drops after this many minutes. */
export const SOAK_MINUTES = 180;
export const STORY_SOAK_MINUTES = 70;
/** Soak band: the soak starts when the coldest zone is within this of the setpoint, °C (common practice). */
export const SOAK_BAND_C = 5;
/** The demo's bath-viscosity window high the story is told against, mm²/s (invented). */
export const VISCOSITY_WINDOW_HIGH_MM2_S = 12.5;
/** Viscosity at the solids target (12 °C), mm²/s; solids target, mass fraction (the example lacquer of seeds/windows.ts: 30 wt %). */
export const VISCOSITY_AT_TARGET_MM2_S = 8.8;
export const SOLIDS_TARGET = 0.3;
/** ν = 8.8·exp(k·(s − 0.30)) reaches the window high 12.5 mm²/s at 32.2 wt % (as seeds/windows.ts's example relation does). */
const VISCOSITY_SOLIDS_K = Math.log(12.5 / 8.8) / 0.022;

// ───────────────────────────── time at the site (Europe/London) ─────────────────────────────

/** The anchor all lists derive from: nowMs rounded down to the whole hour. */
export function anchorOf(nowMs: number): number {
  return Math.floor(nowMs / HOUR_MS) * HOUR_MS;
}

function lastSundayOneUtc(year: number, month: number): number {
  const last = new Date(Date.UTC(year, month + 1, 0));
  return Date.UTC(year, month, last.getUTCDate() - last.getUTCDay(), 1);
}

/**
 * Offset of Europe/London from UTC at an instant, ms: +1 h from the last Sunday of March
 * 01:00 UTC to the last Sunday of October 01:00 UTC (the EU summer-time rule), else 0.
 * Computed here rather than read from the runtime's time-zone data so that every machine
 * generates the same plant.
 */
export function siteOffsetMs(tMs: number): number {
  const y = new Date(tMs).getUTCFullYear();
  return tMs >= lastSundayOneUtc(y, 2) && tMs < lastSundayOneUtc(y, 9) ? HOUR_MS : 0;
}

/** UTC ms of the local midnight that starts the site day containing tMs. */
export function localDayStart(tMs: number): number {
  const local = tMs + siteOffsetMs(tMs);
  const midnightLocal = Math.floor(local / DAY_MS) * DAY_MS;
  return midnightLocal - siteOffsetMs(midnightLocal - siteOffsetMs(tMs));
}

/** Local calendar date as a day number (days since 1970-01-01 local). */
export function localDayKey(tMs: number): number {
  return Math.floor((tMs + siteOffsetMs(tMs)) / DAY_MS);
}

/** UTC ms of `hours` (fractional) after local midnight on the local day `dayKey`. */
export function atLocal(dayKey: number, hours: number): number {
  const localMs = dayKey * DAY_MS + hours * HOUR_MS;
  let utc = localMs - siteOffsetMs(localMs);
  utc = localMs - siteOffsetMs(utc);
  return Math.round(utc);
}

/** Local hour of day (fractional) at tMs. */
export function localHour(tMs: number): number {
  const local = tMs + siteOffsetMs(tMs);
  return (local - Math.floor(local / DAY_MS) * DAY_MS) / HOUR_MS;
}

/** Monday–Saturday are working days; Sunday the plant is idle. */
export function isWorkingDay(dayKey: number): boolean {
  return (((dayKey + 4) % 7) + 7) % 7 !== 0; // 1970-01-01 was a Thursday (4); 0 = Sunday
}

/** Whether the shift runs at tMs (06:00–22:00 site time on a working day). */
export function isShift(tMs: number): boolean {
  const h = localHour(tMs);
  return isWorkingDay(localDayKey(tMs)) && h >= 6 && h < 22;
}

// ───────────────────────────── randomness ─────────────────────────────

/** FNV-1a 32-bit hash of the parts, joined with '|': a stable seed from names. */
export function seedOf(...parts: (string | number)[]): number {
  const s = parts.join('|');
  let h = 0x811c9dc5;
  for (let i = 0; i < s.length; i++) {
    h ^= s.charCodeAt(i);
    h = Math.imul(h, 0x01000193);
  }
  return h >>> 0;
}

/** A seeded PRNG (mulberry32) with uniform, range and gaussian draws. */
export interface Rng {
  (): number;
  range(lo: number, hi: number): number;
  gauss(): number;
}

export function rngFrom(seed: number): Rng {
  let a = seed >>> 0;
  const next = (() => {
    a = (a + 0x6d2b79f5) >>> 0;
    let t = a;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  }) as Rng;
  next.range = (lo, hi) => lo + (hi - lo) * next();
  next.gauss = () => {
    const u = Math.max(next(), 1e-12);
    return Math.sqrt(-2 * Math.log(u)) * Math.cos(2 * Math.PI * next());
  };
  return next;
}

function mix32(a: number, b: number): number {
  let h = (a ^ Math.imul(b | 0, 0x9e3779b1)) >>> 0;
  h = Math.imul(h ^ (h >>> 16), 0x85ebca6b);
  h = Math.imul(h ^ (h >>> 13), 0xc2b2ae35);
  return (h ^ (h >>> 16)) >>> 0;
}

/** Uniform (0, 1) from a seed and an integer index (stateless). */
export function hashUnit(seed: number, n: number): number {
  const hi = Math.floor(n / 4294967296);
  return (mix32(mix32(seed, n >>> 0), hi) + 0.5) / 4294967296;
}

/** Standard normal from a seed and an integer index (stateless Box–Muller). */
export function hashGauss(seed: number, n: number): number {
  const u1 = hashUnit(seed, n);
  const u2 = hashUnit(seed ^ 0x5bd1e995, n);
  return Math.sqrt(-2 * Math.log(u1)) * Math.cos(2 * Math.PI * u2);
}

/** Smooth noise (cosine-interpolated gaussian knots every periodMs), about N(0, 0.75²). */
export function smoothNoise(seed: number, tMs: number, periodMs: number): number {
  const x = tMs / periodMs;
  const k = Math.floor(x);
  const f = (1 - Math.cos(Math.PI * (x - k))) / 2;
  const a = hashGauss(seed, k);
  return a + (hashGauss(seed, k + 1) - a) * f;
}

const round = (v: number, digits: number) => {
  const p = 10 ** digits;
  return Math.round(v * p) / p;
};
const secondOf = (tMs: number) => Math.round(tMs / 1000) * 1000;

// ───────────────────────────── room and bath temperature ─────────────────────────────

const WEATHER_SEED = seedOf('fernhollow', 'weather');

/** Room temperature near a dip line, °C: 21 ± 1 with a mid-afternoon peak. */
export function roomTempC(line: DipLineCode, tMs: number): number {
  const h = localHour(tMs);
  const sensor = line === 'dip-1' ? 0 : -0.2;
  return (
    21 +
    sensor +
    0.6 * Math.sin((2 * Math.PI * (h - 9)) / 24) +
    0.35 * smoothNoise(WEATHER_SEED + 1, tMs, 6 * HOUR_MS) +
    0.04 * hashGauss(seedOf(line, 'room-temp'), Math.floor(tMs / 1000))
  );
}

/** Room relative humidity near a dip line, %: 35–55 % with the diurnal cycle (high at night). */
export function roomRhPct(line: DipLineCode, tMs: number): number {
  const h = localHour(tMs);
  const sensor = line === 'dip-1' ? 0 : 0.4;
  const v =
    43.5 +
    sensor -
    4.5 * Math.sin((2 * Math.PI * (h - 9)) / 24) +
    2.4 * smoothNoise(WEATHER_SEED, tMs, 8 * HOUR_MS) +
    0.25 * hashGauss(seedOf(line, 'room-rh'), Math.floor(tMs / 1000));
  return Math.min(56, Math.max(34, v));
}

/** Chilled bath temperature, °C: 12 ± 0.3 (slow wander plus the chiller's 18-minute cycle). */
export function bathTempC(line: DipLineCode, tMs: number): number {
  const seed = seedOf(line, 'bath-temp');
  return (
    12 +
    0.07 * smoothNoise(seed, tMs, 40 * MINUTE_MS) +
    0.06 * Math.sin((2 * Math.PI * tMs) / (18 * MINUTE_MS) + (line === 'dip-1' ? 0 : 1.7)) +
    0.025 * hashGauss(seed + 1, Math.floor(tMs / 1000))
  );
}

// ───────────────────────────── dip bath ─────────────────────────────

/** Bath kinematic viscosity at bath solids s (mass fraction) and 12 °C, mm²/s. */
export function viscosityOfSolids(s: number): number {
  return VISCOSITY_AT_TARGET_MM2_S * Math.exp(VISCOSITY_SOLIDS_K * (s - SOLIDS_TARGET));
}

/** The solids mass fraction at which the bath reaches a viscosity (12 °C), the inverse of {@link viscosityOfSolids}. */
export function solidsForViscosity(nu12: number): number {
  return SOLIDS_TARGET + Math.log(nu12 / VISCOSITY_AT_TARGET_MM2_S) / VISCOSITY_SOLIDS_K;
}

/** Temperature correction of viscosity: about −2.2 % per °C around 12 °C (invented, typical of solvent-borne lacquers). */
export function viscosityAtTemp(nu12: number, tempC: number): number {
  return nu12 * Math.exp(-0.022 * (tempC - 12));
}

/** State of a hard-coat bath: mass kg and solids mass fraction. */
export interface BathState {
  massKg: number;
  solids: number;
}

/** Rates of the bath model, per hour of model time. */
export const BATH_RATES = {
  evaporationRunningKgH: 0.05,
  evaporationCoveredKgH: 0.008,
  dragOutRunningKgH: 0.075,
  chargeMassKg: 38,
  fullMassKg: 36,
  freshLacquerBelowKg: 32,
  freshLacquerSolids: 0.302,
} as const;

/** Advances the bath by `hours`: evaporation concentrates solids, drag-out removes bath. */
export function stepBath(state: BathState, hours: number, running: boolean, evaporationFactor = 1): BathState {
  const evap = (running ? BATH_RATES.evaporationRunningKgH : BATH_RATES.evaporationCoveredKgH) * hours * evaporationFactor;
  const drag = running ? BATH_RATES.dragOutRunningKgH * hours : 0;
  const solidsKg = state.solids * state.massKg - drag * state.solids;
  const massKg = state.massKg - evap - drag;
  return { massKg, solids: solidsKg / massKg };
}

/** Solvent that returns solids to target by mass balance, with the operator's measuring error (fraction). */
export function solventTopUp(state: BathState, measureError = 0): { massKg: number; after: BathState } {
  const measured = state.solids * (1 + measureError);
  const r = bathAddition({ bathMassKg: state.massKg, solidsNowPct: measured * 100, solidsTargetPct: SOLIDS_TARGET * 100 });
  const massKg = r.ok && r.kind === 'solvent' ? round(r.massKg, 1) : 0;
  const after = { massKg: state.massKg + massKg, solids: (state.solids * state.massKg) / (state.massKg + massKg) };
  return { massKg, after };
}

/** Fresh lacquer back up to the full mass. */
export function freshLacquerTopUp(state: BathState): { massKg: number; after: BathState } {
  const massKg = Math.round((BATH_RATES.fullMassKg - state.massKg) * 2) / 2;
  const solidsKg = state.solids * state.massKg + BATH_RATES.freshLacquerSolids * massKg;
  return { massKg, after: { massKg: state.massKg + massKg, solids: solidsKg / (state.massKg + massKg) } };
}

export type BathEventKind = 'solvent-addition' | 'fresh-lacquer-addition' | 'filter-change' | 'charge';

/** One bath event. massKg is null for a filter change; for a charge it is the fresh bath's mass. */
export interface BathEvent {
  tank: 'dip-1-hc' | 'dip-2-hc';
  line: DipLineCode;
  kind: BathEventKind;
  tMs: number;
  massKg: number | null;
  viscosityBeforeMm2S: number;
  viscosityAfterMm2S: number;
  solidsBeforePct: number;
  solidsAfterPct: number;
  bathMassAfterKg: number;
}

interface BathKnot {
  tMs: number;
  solids: number;
  massKg: number;
}

/** A bath's whole modelled history: piecewise-linear knots plus its maintenance events. */
export interface BathHistory {
  line: DipLineCode;
  knots: BathKnot[];
  events: BathEvent[];
}

/** When each bath was last charged (local days before the anchor's day, at 06:15) and the lot's solids (as seeds/windows.ts charges them). */
export const BATH_CHARGES: Record<DipLineCode, { daysBack: number; solids: number }> = {
  'dip-1': { daysBack: 26, solids: 0.304 },
  'dip-2': { daysBack: 9, solids: 0.302 },
};

function buildBathHistory(line: DipLineCode, startMs: number, endMs: number, anchorMs: number): BathHistory {
  const rng = rngFrom(seedOf('bath', line, localDayKey(startMs)));
  const tank = `${line}-hc` as const;
  const charge = BATH_CHARGES[line];
  let chargeMs: number | null = atLocal(localDayKey(anchorMs) - charge.daysBack, 6.25);
  let state: BathState = { massKg: BATH_RATES.fullMassKg, solids: SOLIDS_TARGET + rng.range(0, 0.015) };
  let threshold = rng.range(12.3, 13.0);
  const knots: BathKnot[] = [{ tMs: startMs, ...state }];
  const events: BathEvent[] = [];
  const STEP = 10 * MINUTE_MS;
  let t = startMs;
  let nextGrid = startMs + STEP;
  let pending: { tMs: number; kind: BathEventKind } | null = null;
  let lastFilterDay = -1;
  const evapFactor = (tMs: number) => Math.min(1.3, Math.max(0.7, 1 + 0.15 * hashGauss(seedOf('evap', line), localDayKey(tMs))));
  while (t < endMs) {
    const boundary = Math.min(nextGrid, pending?.tMs ?? Infinity, chargeMs ?? Infinity);
    state = stepBath(state, (boundary - t) / HOUR_MS, isShift(t), evapFactor(t));
    t = boundary;
    knots.push({ tMs: t, ...state });
    if (chargeMs !== null && t === chargeMs) {
      const before = state;
      state = { massKg: BATH_RATES.chargeMassKg, solids: charge.solids };
      threshold = rng.range(12.3, 13.0);
      const temp = bathTempC(line, t);
      events.push({
        tank,
        line,
        kind: 'charge',
        tMs: t,
        massKg: BATH_RATES.chargeMassKg,
        viscosityBeforeMm2S: round(viscosityAtTemp(viscosityOfSolids(before.solids), temp), 2),
        viscosityAfterMm2S: round(viscosityAtTemp(viscosityOfSolids(state.solids), temp), 2),
        solidsBeforePct: round(before.solids * 100, 2),
        solidsAfterPct: round(state.solids * 100, 2),
        bathMassAfterKg: state.massKg,
      });
      knots.push({ tMs: t, ...state });
      chargeMs = null;
      if (pending?.tMs === t) pending = null;
      continue;
    }
    if (pending && t === pending.tMs) {
      const before = state;
      let massKg: number | null = null;
      if (pending.kind === 'solvent-addition') {
        const r = solventTopUp(state, 0.01 * rng.gauss());
        massKg = r.massKg;
        state = r.after;
        threshold = rng.range(12.3, 13.0);
      } else if (pending.kind === 'fresh-lacquer-addition') {
        const r = freshLacquerTopUp(state);
        massKg = r.massKg;
        state = r.after;
      } else {
        state = { massKg: state.massKg - 0.3, solids: state.solids }; // bath held in the old cartridge
      }
      const temp = bathTempC(line, t);
      events.push({
        tank,
        line,
        kind: pending.kind,
        tMs: t,
        massKg,
        viscosityBeforeMm2S: round(viscosityAtTemp(viscosityOfSolids(before.solids), temp), 2),
        viscosityAfterMm2S: round(viscosityAtTemp(viscosityOfSolids(state.solids), temp), 2),
        solidsBeforePct: round(before.solids * 100, 2),
        solidsAfterPct: round(state.solids * 100, 2),
        bathMassAfterKg: round(state.massKg, 2),
      });
      knots.push({ tMs: t, ...state });
      pending = null;
      continue;
    }
    if (t === nextGrid) {
      nextGrid += STEP;
      // The operator's hourly bath check at hh:20 during the shift.
      const h = localHour(t);
      if (isShift(t) && Math.abs(h - Math.floor(h) - 20 / 60) < 1e-6) {
        const nu = viscosityOfSolids(state.solids);
        const day = localDayKey(t);
        let kind: BathEventKind | null = null;
        if (nu > threshold) kind = 'solvent-addition';
        else if (state.massKg < BATH_RATES.freshLacquerBelowKg) kind = 'fresh-lacquer-addition';
        else if ((day + 4) % 7 === 1 && h >= 7 && lastFilterDay !== day) {
          kind = 'filter-change';
          lastFilterDay = day;
        }
        if (kind) pending = { tMs: secondOf(t + rng.range(1, 8.5) * MINUTE_MS), kind };
      }
    }
  }
  return { line, knots, events };
}

function lastIndexAtOrBefore<T>(arr: readonly T[], tMs: number, key: (x: T) => number): number {
  let lo = 0;
  let hi = arr.length - 1;
  let ans = -1;
  while (lo <= hi) {
    const mid = (lo + hi) >> 1;
    if (key(arr[mid] as T) <= tMs) {
      ans = mid;
      lo = mid + 1;
    } else hi = mid - 1;
  }
  return ans;
}

/** Bath state at tMs (linear between knots; after an event at exactly tMs). */
export function bathStateAt(bath: BathHistory, tMs: number): BathState {
  const i = lastIndexAtOrBefore(bath.knots, tMs, (k) => k.tMs);
  const a = bath.knots[Math.max(0, i)] as BathKnot;
  const b = bath.knots[i + 1];
  if (!b || b.tMs === a.tMs || tMs <= a.tMs) return { massKg: a.massKg, solids: a.solids };
  const f = (tMs - a.tMs) / (b.tMs - a.tMs);
  return { massKg: a.massKg + (b.massKg - a.massKg) * f, solids: a.solids + (b.solids - a.solids) * f };
}

/** True bath viscosity at bath temperature (no sensor noise), mm²/s. */
export function bathViscosityAt(bath: BathHistory, tMs: number): number {
  return viscosityAtTemp(viscosityOfSolids(bathStateAt(bath, tMs).solids), bathTempC(bath.line, tMs));
}

/** The in-line viscometer's reading: true viscosity plus N(0, 0.03 mm²/s). */
export function viscositySensorReading(line: DipLineCode, trueMm2S: number, tMs: number): number {
  return trueMm2S + 0.03 * hashGauss(seedOf(line, 'viscometer'), Math.floor(tMs / 1000));
}

// ───────────────────────────── dip strokes ─────────────────────────────

/** One dip stroke: the rack withdrawn at tMs, its measured mean withdrawal speed and the bath viscosity then. */
export interface DipStroke {
  line: DipLineCode;
  tank: 'dip-1-hc' | 'dip-2-hc';
  tMs: number;
  speedMmS: number;
  viscosityMm2S: number;
}

interface DriftEpisode {
  startMs: number;
  rampMs: number;
  holdMs: number;
  amplitude: number;
}

/** Offset of a drift episode at tMs, mm/s (a slow ramp, a hold, then an abrupt correction). */
export function driftOffset(ep: DriftEpisode | null, tMs: number): number {
  if (!ep || tMs < ep.startMs) return 0;
  const dt = tMs - ep.startMs;
  if (dt < ep.rampMs) return (ep.amplitude * dt) / ep.rampMs;
  if (dt < ep.rampMs + ep.holdMs) return ep.amplitude;
  return 0;
}

/** Withdrawal speed of one stroke: target + drift + N(0, 0.02 mm/s). */
export function strokeSpeed(line: DipLineCode, drift: number, gauss: number): number {
  return round(WITHDRAWAL_TARGET_MM_S[line] + drift + 0.02 * gauss, 3);
}

function dayStrokes(line: DipLineCode, dayKey: number, bath: BathHistory): DipStroke[] {
  if (!isWorkingDay(dayKey)) return [];
  const rng = rngFrom(seedOf('strokes', line, dayKey));
  const ep: DriftEpisode | null =
    rng() < 0.1
      ? {
          startMs: atLocal(dayKey, rng.range(8, 17)),
          rampMs: 90 * MINUTE_MS,
          holdMs: rng.range(30, 60) * MINUTE_MS,
          amplitude: (rng() < 0.5 ? -1 : 1) * rng.range(0.06, 0.1),
        }
      : null;
  const out: DipStroke[] = [];
  const end = atLocal(dayKey, 22);
  const breakStart = atLocal(dayKey, 12);
  const breakEnd = atLocal(dayKey, 12.5);
  let t = atLocal(dayKey, 6) + rng.range(5, 10) * MINUTE_MS;
  while (t < end) {
    if (t >= breakStart && t < breakEnd) t = breakEnd + rng.range(1, 4) * MINUTE_MS;
    const tMs = secondOf(t);
    out.push({
      line,
      tank: `${line}-hc`,
      tMs,
      speedMmS: strokeSpeed(line, driftOffset(ep, tMs), rng.gauss()),
      viscosityMm2S: round(bathViscosityAt(bath, tMs), 2),
    });
    t += 240_000 + rng.range(-30_000, 30_000);
  }
  return out.filter((s) => s.tMs < end);
}

// ───────────────────────────── ovens ─────────────────────────────

export type OvenCycleKind = 'normal' | 'under-cured' | 'door-opened' | 'tc-dropout';

/** A door opening: load in, unload, or mid-soak. */
export interface DoorOpening {
  startMs: number;
  endMs: number;
  reason: 'load-in' | 'unload' | 'mid-soak';
}

/** A thermocouple that reported nothing from startMs to endMs (zone asset code). */
export interface ThermocoupleDropout {
  zone: string;
  startMs: number;
  endMs: number;
}

/**
 * One oven load cycle. loadStart = door opens to load; rampStart = door closed and setpoint up;
 * soakStart = the coldest zone enters the ±5 °C band; soakEnd = setpoint back to standby;
 * loadEnd = the door closes after unloading.
 */
export interface OvenCycle {
  /** Stable code, e.g. 'oven-b-20261123-2' (oven, local date, load of the day). */
  code: string;
  oven: OvenCode;
  kind: OvenCycleKind;
  loadStartMs: number;
  rampStartMs: number;
  soakStartMs: number;
  soakEndMs: number;
  loadEndMs: number;
  setpointC: number;
  rampCPerMin: number;
  doorOpenings: DoorOpening[];
  dropouts: ThermocoupleDropout[];
  /** Model detail: zone 1 and zone 2 air temperatures at ramp start, °C. */
  rampFromC: [number, number];
}

/** Time constants of the oven model (the history uses real ones; the live demo compresses them). */
export interface OvenDynamics {
  kneeTauMin: number;
  coolTauMin: readonly [number, number];
  doorOpenTauS: number;
  doorRecoverTauMin: number;
  /** Air temperature of an idle oven, °C. */
  idleC: number;
  roomC: number;
  zoneOffsetC: readonly [number, number];
  zoneRampFactor: readonly [number, number];
  wobbleC: number;
  wobblePeriodMin: number;
  noiseC: number;
}

export const HISTORY_OVEN_DYNAMICS: OvenDynamics = {
  kneeTauMin: 2.5,
  coolTauMin: [35, 38],
  doorOpenTauS: 506,
  doorRecoverTauMin: 3.3,
  idleC: 24,
  roomC: 21,
  zoneOffsetC: [0, 1.5],
  zoneRampFactor: [1, 0.97],
  wobbleC: 0.25,
  wobblePeriodMin: 7,
  noiseC: 0.08,
};

/** The live demo's compressed oven: a full ramp–soak–cool in about 25 minutes of wall time. */
export const DEMO_OVEN_DYNAMICS: OvenDynamics = {
  ...HISTORY_OVEN_DYNAMICS,
  kneeTauMin: 0.4,
  coolTauMin: [3, 3.3],
  doorOpenTauS: 120,
  doorRecoverTauMin: 0.8,
  wobblePeriodMin: 1.5,
};

/** An oven's cycles with the model's time constants and its state before the first cycle. */
export interface OvenTrack {
  oven: OvenCode;
  dyn: OvenDynamics;
  cycles: OvenCycle[];
  initialMs: number;
  initialC: [number, number];
}

/** Heating curve: linear at rampCPerMin up to 3 °C below the zone setpoint, then a first-order knee. */
function heatCurve(t0: number, sp: number, dtMin: number, rate: number, kneeTau: number): number {
  if (dtMin <= 0) return t0;
  if (t0 >= sp - 3) return sp - (sp - t0) * Math.exp(-dtMin / kneeTau);
  const linMin = (sp - 3 - t0) / rate;
  if (dtMin < linMin) return t0 + rate * dtMin;
  return sp - 3 * Math.exp(-(dtMin - linMin) / kneeTau);
}

function cycleAtOrBefore(track: OvenTrack, tMs: number, key: (c: OvenCycle) => number): number {
  return lastIndexAtOrBefore(track.cycles, tMs, key);
}

/** Air temperature of a zone (0 or 1) without door effects, wobble or noise, °C. */
export function ovenBaseTemp(track: OvenTrack, zone: 0 | 1, tMs: number): number {
  const d = track.dyn;
  const j = cycleAtOrBefore(track, tMs, (c) => c.rampStartMs);
  const tau = d.coolTauMin[zone];
  if (j < 0) {
    const t0 = track.initialC[zone];
    return d.idleC + (t0 - d.idleC) * Math.exp(-Math.max(0, tMs - track.initialMs) / MINUTE_MS / tau);
  }
  const c = track.cycles[j] as OvenCycle;
  const sp = c.setpointC - d.zoneOffsetC[zone];
  const rate = c.rampCPerMin * d.zoneRampFactor[zone];
  if (tMs < c.soakEndMs) return heatCurve(c.rampFromC[zone], sp, (tMs - c.rampStartMs) / MINUTE_MS, rate, d.kneeTauMin);
  const end = heatCurve(c.rampFromC[zone], sp, (c.soakEndMs - c.rampStartMs) / MINUTE_MS, rate, d.kneeTauMin);
  return d.idleC + (end - d.idleC) * Math.exp(-(tMs - c.soakEndMs) / MINUTE_MS / tau);
}

function doorDip(track: OvenTrack, zone: 0 | 1, tMs: number, j: number): number {
  const d = track.dyn;
  let dip = 0;
  for (let k = Math.max(0, j - 1); k <= Math.min(track.cycles.length - 1, j + 1); k++) {
    for (const o of (track.cycles[k] as OvenCycle).doorOpenings) {
      if (tMs < o.startMs || tMs > o.endMs + 8 * d.doorRecoverTauMin * MINUTE_MS) continue;
      const full = 0.35 * Math.max(0, ovenBaseTemp(track, zone, o.startMs) - d.roomC) * (zone === 0 ? 1 : 0.9);
      const openS = (Math.min(tMs, o.endMs) - o.startMs) / 1000;
      const depth = full * (1 - Math.exp(-openS / d.doorOpenTauS));
      if (tMs <= o.endMs) dip += depth;
      else dip += depth * Math.exp(-(tMs - o.endMs) / MINUTE_MS / d.doorRecoverTauMin);
    }
  }
  return dip;
}

/** What an oven's gateway reads at tMs: setpoint, door switch and the two zone air temperatures (null in a dropout). */
export interface OvenSample {
  setpointC: number;
  door: 0 | 1;
  zonesC: [number | null, number | null];
}

/** The oven's readings at tMs, from its track (noise is a stateless hash of the time). */
export function ovenSampleAt(track: OvenTrack, tMs: number): OvenSample {
  const d = track.dyn;
  const j = cycleAtOrBefore(track, tMs, (c) => c.loadStartMs);
  const c = j >= 0 ? (track.cycles[j] as OvenCycle) : null;
  const heating = c !== null && tMs >= c.rampStartMs && tMs < c.soakEndMs;
  let door: 0 | 1 = 0;
  if (c) for (const o of c.doorOpenings) if (tMs >= o.startMs && tMs < o.endMs) door = 1;
  const zonesC: [number | null, number | null] = [null, null];
  for (const zone of [0, 1] as const) {
    const zoneCode = `${track.oven}-z${zone + 1}`;
    if (c?.dropouts.some((x) => x.zone === zoneCode && tMs >= x.startMs && tMs < x.endMs)) continue;
    const base = ovenBaseTemp(track, zone, tMs);
    const sp = c ? c.setpointC - d.zoneOffsetC[zone] : 0;
    const near = heating && base > sp - 5 ? Math.min(1, (base - (sp - 5)) / 5) : 0;
    const wobble = near * d.wobbleC * Math.sin((2 * Math.PI * tMs) / (d.wobblePeriodMin * MINUTE_MS) + zone * 1.3);
    const noise = d.noiseC * hashGauss(seedOf(track.oven, zone, 'tc'), Math.floor(tMs / 1000));
    zonesC[zone] = base - doorDip(track, zone, tMs, j) + wobble + noise;
  }
  return { setpointC: heating ? c.setpointC : STANDBY_SETPOINT_C, door, zonesC };
}

/** Times at which the setpoint or door channel changes within [fromMs, toMs). */
export function ovenEdges(track: OvenTrack, fromMs: number, toMs: number): { setpoint: number[]; door: number[] } {
  const setpoint: number[] = [];
  const door: number[] = [];
  for (const c of track.cycles) {
    for (const t of [c.rampStartMs, c.soakEndMs]) if (t >= fromMs && t < toMs) setpoint.push(t);
    for (const o of c.doorOpenings) for (const t of [o.startMs, o.endMs]) if (t >= fromMs && t < toMs) door.push(t);
  }
  return { setpoint: setpoint.sort((a, b) => a - b), door: door.sort((a, b) => a - b) };
}

/** Time for zone 2 (the colder) to enter the soak band from its ramp start, ms. */
function soakEntryMs(c: Pick<OvenCycle, 'setpointC' | 'rampCPerMin' | 'rampFromC'>, d: OvenDynamics): number {
  const target = c.setpointC - SOAK_BAND_C;
  const from = c.rampFromC[1];
  if (from >= target) return 0;
  const sp2 = c.setpointC - d.zoneOffsetC[1];
  const rate = c.rampCPerMin * d.zoneRampFactor[1];
  const linEnd = sp2 - 3;
  if (target <= linEnd) return ((target - from) / rate) * MINUTE_MS;
  // Inside the knee: sp2 − 3·exp(−x/τ) = target.
  return ((linEnd - from) / rate + d.kneeTauMin * Math.log(3 / (sp2 - target))) * MINUTE_MS;
}

interface CyclePlan {
  kind: OvenCycleKind;
  loadStartMs: number;
  loadInS: number;
  soakMinutes: number;
  rampCPerMin: number;
  unloadDelayMin: number;
  unloadS: number;
  midSoakDoor?: { afterSoakMin: number; durationS: number };
  dropout?: { zone: 1 | 2; afterSoakMin: number; durationMin: number };
  cutShort?: { doorOpenS: number };
}

/** Builds a cycle from its plan, starting from the track's state at the load's ramp start. */
export function planCycle(track: OvenTrack, code: string, p: CyclePlan): OvenCycle {
  const d = track.dyn;
  const rampStartMs = secondOf(p.loadStartMs + p.loadInS * 1000);
  const rampFromC: [number, number] = [ovenBaseTemp(track, 0, rampStartMs), ovenBaseTemp(track, 1, rampStartMs)];
  const base = { setpointC: CURE_SETPOINT_C, rampCPerMin: p.rampCPerMin, rampFromC };
  const soakStartMs = secondOf(rampStartMs + soakEntryMs(base, d));
  const soakEndMs = secondOf(soakStartMs + p.soakMinutes * MINUTE_MS);
  const doorOpenings: DoorOpening[] = [{ startMs: secondOf(p.loadStartMs), endMs: rampStartMs, reason: 'load-in' }];
  const dropouts: ThermocoupleDropout[] = [];
  if (p.midSoakDoor) {
    const s = secondOf(soakStartMs + p.midSoakDoor.afterSoakMin * MINUTE_MS);
    doorOpenings.push({ startMs: s, endMs: secondOf(s + p.midSoakDoor.durationS * 1000), reason: 'mid-soak' });
  }
  if (p.dropout) {
    const s = secondOf(soakStartMs + p.dropout.afterSoakMin * MINUTE_MS);
    dropouts.push({
      zone: `${track.oven}-z${p.dropout.zone}`,
      startMs: s,
      endMs: secondOf(s + p.dropout.durationMin * MINUTE_MS),
    });
  }
  let loadEndMs: number;
  if (p.cutShort) {
    const s = soakEndMs + 30_000;
    loadEndMs = secondOf(s + p.cutShort.doorOpenS * 1000);
    doorOpenings.push({ startMs: s, endMs: loadEndMs, reason: 'unload' });
  } else {
    // Unload once zone 1 has cooled below 50 °C, plus the operator's delay.
    const endC = heatCurve(
      rampFromC[0],
      CURE_SETPOINT_C - d.zoneOffsetC[0],
      (soakEndMs - rampStartMs) / MINUTE_MS,
      p.rampCPerMin,
      d.kneeTauMin,
    );
    const coolMin = endC > 50 ? d.coolTauMin[0] * Math.log((endC - d.idleC) / (50 - d.idleC)) : 0;
    const s = secondOf(soakEndMs + (coolMin + p.unloadDelayMin) * MINUTE_MS);
    loadEndMs = secondOf(s + p.unloadS * 1000);
    doorOpenings.push({ startMs: s, endMs: loadEndMs, reason: 'unload' });
  }
  return {
    code,
    oven: track.oven,
    kind: p.kind,
    loadStartMs: secondOf(p.loadStartMs),
    rampStartMs,
    soakStartMs,
    soakEndMs,
    loadEndMs,
    setpointC: CURE_SETPOINT_C,
    rampCPerMin: p.rampCPerMin,
    doorOpenings,
    dropouts,
    rampFromC,
  };
}

function dateCode(dayKey: number): string {
  return new Date(dayKey * DAY_MS).toISOString().slice(0, 10).replace(/-/g, '');
}

/** The local day of the story load for an anchor: 9 days back, or 10 when that is a Sunday. */
export function storyDayKey(anchorMs: number): number {
  const k = localDayKey(anchorMs) - STORY_DAYS_BACK;
  return isWorkingDay(k) ? k : k - 1;
}

function nearestWorkingDay(k: number): number {
  return isWorkingDay(k) ? k : k - 1;
}

function buildOvenTrack(oven: OvenCode, startMs: number, anchorMs: number): OvenTrack {
  const track: OvenTrack = { oven, dyn: HISTORY_OVEN_DYNAMICS, cycles: [], initialMs: startMs, initialC: [24, 24] };
  const anchorDay = localDayKey(anchorMs);
  const story = oven === 'oven-b' ? storyDayKey(anchorMs) : null;
  // Guarantee one of each alarm-worthy kind in any history of a week or more.
  const forcedDoor = oven === 'oven-a' ? nearestWorkingDay(anchorDay - 3) : null;
  const forcedDropout = oven === 'oven-c' ? nearestWorkingDay(anchorDay - 5) : null;
  const ovenShift = OVENS.indexOf(oven) * 0.15;
  for (let day = localDayKey(startMs); day <= anchorDay; day++) {
    if (!isWorkingDay(day)) continue;
    const rng = rngFrom(seedOf('oven', oven, day));
    const n = day === story || rng() < 0.5 ? 3 : 2;
    const slots = n === 3 ? [6.1, 10.6, 15.1].map((h) => h + rng.range(0, 0.4)) : [7.0, 13.0].map((h) => h + rng.range(0, 1.0));
    let prevEnd = track.cycles.at(-1)?.loadEndMs ?? 0;
    slots.forEach((h, i) => {
      const u = rng();
      let kind: OvenCycleKind = u < 0.07 ? 'door-opened' : u < 0.12 ? 'tc-dropout' : 'normal';
      if (day === story && i === 1) kind = 'under-cured';
      else if (day === forcedDoor && i === 0) kind = 'door-opened';
      else if (day === forcedDropout && i === 1) kind = 'tc-dropout';
      const plan: CyclePlan = {
        kind,
        loadStartMs: Math.max(atLocal(day, h + ovenShift), prevEnd + 10 * MINUTE_MS),
        loadInS: rng.range(90, 180),
        soakMinutes: kind === 'under-cured' ? STORY_SOAK_MINUTES : SOAK_MINUTES,
        rampCPerMin: rng.range(2.8, 3.2),
        unloadDelayMin: rng.range(0, 12),
        unloadS: rng.range(120, 240),
      };
      const extra = [
        rng.range(40, 140),
        rng.range(100, 180),
        rng() < 0.5 ? 1 : 2,
        rng.range(20, 120),
        rng.range(20, 40),
      ] as const;
      if (kind === 'door-opened') plan.midSoakDoor = { afterSoakMin: extra[0], durationS: extra[1] };
      if (kind === 'tc-dropout') plan.dropout = { zone: extra[2], afterSoakMin: extra[3], durationMin: extra[4] };
      if (kind === 'under-cured') plan.cutShort = { doorOpenS: 11 * 60 + 20 };
      const c = planCycle(track, `${oven}-${dateCode(day)}-${i + 1}`, plan);
      if (c.loadEndMs > atLocal(day, 22.5) || c.loadEndMs > anchorMs) return;
      track.cycles.push(c);
      prevEnd = c.loadEndMs;
    });
  }
  return track;
}

// ───────────────────────────── UV spin coater ─────────────────────────────

/** Irradiance loss per lamp hour (fraction), and the level below which the lamp is changed, mW/cm². */
export const LAMP_DECAY_PER_HOUR = 2.2e-4;
export const LAMP_CHANGE_BELOW = 175;

interface LampDay {
  dayKey: number;
  i0: number;
  hoursAtDayStart: number;
}

/** The UV lamp's history: per working day, its new-lamp irradiance and hours at the shift start. */
export interface LampHistory {
  days: Map<number, LampDay>;
}

function buildLampHistory(startMs: number, endMs: number): LampHistory {
  const rng = rngFrom(seedOf('uv-lamp', localDayKey(startMs)));
  let i0 = 186 + rng.range(-2, 2);
  let hours = rng.range(0, 250);
  const days = new Map<number, LampDay>();
  for (let day = localDayKey(startMs); day <= localDayKey(endMs) + 1; day++) {
    if (!isWorkingDay(day)) continue;
    if (i0 * (1 - LAMP_DECAY_PER_HOUR * hours) < LAMP_CHANGE_BELOW) {
      i0 = 186 + rng.range(-2, 2);
      hours = 0;
    }
    days.set(day, { dayKey: day, i0, hoursAtDayStart: hours });
    hours += 16;
  }
  return { days };
}

/** Lamp irradiance at tMs (null when the lamp is off: outside the shift), mW/cm². */
export function uvIrradianceAt(lamp: LampHistory, tMs: number, alwaysOn = false): number | null {
  const day = localDayKey(tMs);
  let ld = lamp.days.get(day);
  const h = localHour(tMs);
  if (!ld) {
    if (!alwaysOn) return null;
    for (let k = day - 1; k > day - 8 && !ld; k--) ld = lamp.days.get(k);
    if (!ld) return null;
  } else if (!alwaysOn && (h < 6 || h >= 22)) return null;
  const hours = ld.hoursAtDayStart + Math.min(16, Math.max(0, h - 6));
  return (
    ld.i0 * (1 - LAMP_DECAY_PER_HOUR * hours) +
    1.0 * smoothNoise(seedOf('uv', 'slow'), tMs, 20 * MINUTE_MS) +
    1.2 * hashGauss(seedOf('uv', 'irr'), Math.floor(tMs / 1000))
  );
}

/** Spin speed of one lens, rpm: 1500 + N(0, 6). */
export function spinSpeed(gauss: number): number {
  return Math.round(1500 + 6 * gauss);
}

// ───────────────────────────── the whole plant ─────────────────────────────

/** Everything the generators need, built once per anchor. */
export interface PlantModel {
  anchorMs: number;
  modelStartMs: number;
  ovens: Record<OvenCode, OvenTrack>;
  baths: Record<DipLineCode, BathHistory>;
  lamp: LampHistory;
  strokes: DipStroke[];
}

let cache: { anchorMs: number; model: PlantModel } | null = null;

/** Builds (and caches for the last anchor) the plant model for nowMs rounded down to the hour. */
export function buildPlantModel(nowMs: number): PlantModel {
  const anchorMs = anchorOf(nowMs);
  if (cache?.anchorMs === anchorMs) return cache.model;
  const modelStartMs = atLocal(localDayKey(anchorMs) - MODEL_SPAN_DAYS, 0);
  const endMs = anchorMs + 2 * HOUR_MS;
  const baths = {
    'dip-1': buildBathHistory('dip-1', modelStartMs, endMs, anchorMs),
    'dip-2': buildBathHistory('dip-2', modelStartMs, endMs, anchorMs),
  };
  const ovens = Object.fromEntries(OVENS.map((o) => [o, buildOvenTrack(o, modelStartMs, anchorMs)])) as Record<
    OvenCode,
    OvenTrack
  >;
  const strokes: DipStroke[] = [];
  for (let day = localDayKey(modelStartMs); day <= localDayKey(anchorMs); day++) {
    for (const line of DIP_LINES) for (const s of dayStrokes(line, day, baths[line])) if (s.tMs <= anchorMs) strokes.push(s);
  }
  strokes.sort((a, b) => a.tMs - b.tMs || a.line.localeCompare(b.line));
  const model: PlantModel = { anchorMs, modelStartMs, ovens, baths, lamp: buildLampHistory(modelStartMs, endMs), strokes };
  cache = { anchorMs, model };
  return model;
}

/** Options of the exported lists. */
export interface DemoListOptions {
  /** History length, days (default 21; at most MODEL_SPAN_DAYS − 5). */
  days?: number;
}

function historyFrom(nowMs: number, opts: DemoListOptions = {}): { model: PlantModel; fromMs: number } {
  const days = opts.days ?? DEFAULT_HISTORY_DAYS;
  if (!(days > 0 && days <= MODEL_SPAN_DAYS - 5)) throw new RangeError(`days must be in (0, ${MODEL_SPAN_DAYS - 5}]`);
  const model = buildPlantModel(nowMs);
  return { model, fromMs: model.anchorMs - days * DAY_MS };
}

/**
 * The seeded history's oven loads, oldest first: every cycle that starts at or after
 * anchor − days and ends at or before the anchor (nowMs rounded down to the hour).
 */
export function demoOvenCycles(nowMs: number, opts?: DemoListOptions): OvenCycle[] {
  const { model, fromMs } = historyFrom(nowMs, opts);
  return OVENS.flatMap((o) => model.ovens[o].cycles)
    .filter((c) => c.loadStartMs >= fromMs && c.loadEndMs <= model.anchorMs)
    .sort((a, b) => a.loadStartMs - b.loadStartMs);
}

/** The story load: oven-b's under-cured load ~9 days before the anchor. */
export function demoStoryLoad(nowMs: number): OvenCycle {
  const model = buildPlantModel(nowMs);
  const c = model.ovens['oven-b'].cycles.find((x) => x.kind === 'under-cured');
  if (!c) throw new Error('the plant model has no story load');
  return c;
}

/** The seeded history's dip strokes, oldest first, in [anchor − days, anchor]. */
export function demoDipStrokes(nowMs: number, opts?: DemoListOptions): DipStroke[] {
  const { model, fromMs } = historyFrom(nowMs, opts);
  return model.strokes.filter((s) => s.tMs >= fromMs);
}

/** The seeded history's bath events (solvent, fresh lacquer, filter changes), oldest first, in [anchor − days, anchor]. */
export function demoBathEvents(nowMs: number, opts?: DemoListOptions): BathEvent[] {
  const { model, fromMs } = historyFrom(nowMs, opts);
  return DIP_LINES.flatMap((l) => model.baths[l].events)
    .filter((e) => e.tMs >= fromMs && e.tMs <= model.anchorMs)
    .sort((a, b) => a.tMs - b.tMs);
}

// ───────────────────────────── sampled history ─────────────────────────────

/** One channel's samples: time-ordered epoch ms and values. */
export interface ChannelSeries {
  asset: string;
  channel: string;
  tMs: number[];
  values: number[];
}

function grid(fromMs: number, toMs: number, stepMs: number): number[] {
  const out: number[] = [];
  for (let t = Math.ceil(fromMs / stepMs) * stepMs; t < toMs; t += stepMs) out.push(t);
  return out;
}

function mergeEdges(gridTimes: number[], edges: number[]): number[] {
  if (edges.length === 0) return gridTimes;
  const set = new Set(gridTimes);
  const extra = edges.filter((t) => !set.has(t));
  return [...gridTimes, ...extra].sort((a, b) => a - b);
}

/**
 * Every channel's history in [fromMs, toMs), one channel at a time: ovens every 30 s (plus
 * setpoint and door edges; nothing from a thermocouple in a dropout), bath temperature and room
 * every 60 s, viscosity every 10 min, withdrawal speed one value per stroke, UV irradiance every
 * 60 s while the lamp is on, spin speed one value per lens.
 */
export function* historySeries(model: PlantModel, fromMs: number, toMs: number): Generator<ChannelSeries> {
  const g30 = grid(fromMs, toMs, 30_000);
  const g60 = grid(fromMs, toMs, 60_000);
  const g600 = grid(fromMs, toMs, 600_000);
  for (const oven of OVENS) {
    const track = model.ovens[oven];
    const samples = new Map<number, OvenSample>();
    for (const t of g30) samples.set(t, ovenSampleAt(track, t));
    const at = (t: number) => samples.get(t) ?? ovenSampleAt(track, t);
    const edges = ovenEdges(track, fromMs, toMs);
    const spT = mergeEdges(g30, edges.setpoint);
    yield { asset: oven, channel: 'setpoint', tMs: spT, values: spT.map((t) => at(t).setpointC) };
    const doorT = mergeEdges(g30, edges.door);
    yield { asset: oven, channel: 'door', tMs: doorT, values: doorT.map((t) => at(t).door) };
    for (const zone of [0, 1] as const) {
      const ts: number[] = [];
      const vs: number[] = [];
      for (const t of g30) {
        const v = at(t).zonesC[zone];
        if (v === null) continue;
        ts.push(t);
        vs.push(round(v, 2));
      }
      yield { asset: `${oven}-z${zone + 1}`, channel: 'air-temp', tMs: ts, values: vs };
    }
  }
  for (const line of DIP_LINES) {
    const bath = model.baths[line];
    const strokes = model.strokes.filter((s) => s.line === line && s.tMs >= fromMs && s.tMs < toMs);
    yield {
      asset: `${line}-hc`,
      channel: 'withdrawal-speed',
      tMs: strokes.map((s) => s.tMs),
      values: strokes.map((s) => s.speedMmS),
    };
    yield {
      asset: `${line}-hc`,
      channel: 'viscosity',
      tMs: g600,
      values: g600.map((t) => round(viscositySensorReading(line, bathViscosityAt(bath, t), t), 3)),
    };
    yield { asset: `${line}-hc`, channel: 'bath-temp', tMs: g60, values: g60.map((t) => round(bathTempC(line, t), 2)) };
    yield { asset: line, channel: 'room-rh', tMs: g60, values: g60.map((t) => round(roomRhPct(line, t), 1)) };
    yield { asset: line, channel: 'room-temp', tMs: g60, values: g60.map((t) => round(roomTempC(line, t), 2)) };
  }
  const irrT: number[] = [];
  const irrV: number[] = [];
  for (const t of g60) {
    const v = uvIrradianceAt(model.lamp, t);
    if (v === null) continue;
    irrT.push(t);
    irrV.push(round(v, 1));
  }
  yield { asset: 'uv-1', channel: 'irradiance', tMs: irrT, values: irrV };
  const spinT: number[] = [];
  const spinV: number[] = [];
  for (let day = localDayKey(fromMs); day <= localDayKey(toMs); day++) {
    if (!isWorkingDay(day)) continue;
    const rng = rngFrom(seedOf('spin', day));
    const end = atLocal(day, 22);
    for (let t = atLocal(day, 6) + rng.range(2, 6) * MINUTE_MS; t < end; t += rng.range(70, 110) * 1000) {
      const tMs = secondOf(t);
      const v = spinSpeed(rng.gauss());
      if (tMs < fromMs || tMs >= toMs) continue;
      spinT.push(tMs);
      spinV.push(v);
    }
  }
  yield { asset: 'uv-1', channel: 'spin-speed', tMs: spinT, values: spinV };
}
