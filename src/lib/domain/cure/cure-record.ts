/**
 * The cure record of one oven load: time at temperature, peak, ramp rates, Arrhenius
 * equivalent minutes, data gaps, door openings and the verdict
 * (complete / under-cured / over-temperature / unverifiable); and the oven-load phase helper.
 *
 * Several zone thermocouples: at each instant the MINIMUM of the zone thermocouples stands for
 * the part for under-cure questions (time at temperature, equivalent minutes, soak), the
 * MAXIMUM for over-temperature (peak), and the MEAN for ramp rates. A thermocouple that
 * reads a non-finite value at an instant is left out of that instant; an instant with no
 * finite reading is no data.
 *
 * Coatrail's verdict is advisory: over-temperature protection and interlocks stay in the oven.
 * Cure windows come from the lacquer maker's data and the lab's validation.
 */
import { equivalentMinutes as equivalentMinutesOf, minutesAtOrAbove as minutesAtOrAboveOf, type ProfilePoint } from './arrhenius';

/** One instant of oven data: epoch ms and the zone thermocouple(s) in °C. */
export interface OvenReading {
  tMs: number;
  /** One thermocouple, or all zone thermocouples read at this instant. */
  tempC: number | readonly number[];
}

/** A door switch change: opened (true) or closed (false) at epoch ms. */
export interface DoorEvent {
  tMs: number;
  open: boolean;
}

/** The recipe's cure window. */
export interface CureWindow {
  /** Minimum part temperature that counts as soak, °C. */
  minTempC: number;
  /** Required Arrhenius equivalent minutes at referenceC. */
  minEquivalentMinutes: number;
  /** Reference temperature of the equivalent minutes, °C. */
  referenceC: number;
  /** Lacquer activation energy, kJ/mol. */
  activationEnergyKJMol: number;
  /** Highest allowed part temperature, °C (over-temperature above it). */
  maxPartTempC: number;
  /** Highest allowed heat-up or cool-down rate, °C/min. */
  maxRampCPerMin: number;
  /** A spacing between readings longer than this is a data gap, s. */
  maxGapSeconds: number;
  /**
   * Minutes the part must spend at or above minTempC, whatever the equivalent minutes say
   * (optional; without it only "never reached the minimum" and the equivalent minutes apply).
   */
  minSoakMinutes?: number | undefined;
}

/**
 * The verdict rule in plain words, for the cure record page, the calculator and the README.
 * Keep in step with {@link cureRecord}.
 */
export const CURE_VERDICT_RULE: readonly string[] = [
  'Equivalent minutes accrue only while the coldest thermocouple is at or above the window’s minimum cure temperature (the datum-temperature idea of the maturity method); time below it counts nothing, however long.',
  'Unverifiable: data are missing during the soak, or the minimum is never seen while data are missing.',
  'Over-temperature: the hottest thermocouple went above the maximum part temperature.',
  'Under-cured: the coldest thermocouple never reached the minimum cure temperature, or spent less than the window’s soak minutes at or above it, or the equivalent minutes fall short of the window’s minimum.',
  'Complete: none of the above. Ramp-rate excursions and door openings are reported beside the verdict; they do not change it.',
];

/** Inputs of the cure record. */
export interface CureRecordInput {
  readings: readonly OvenReading[];
  doorEvents?: readonly DoorEvent[] | undefined;
  window: CureWindow;
  /** When the load started / ended, epoch ms (optional: missing data at either end is a gap). */
  loadStartMs?: number | undefined;
  loadEndMs?: number | undefined;
  /** Span over which ramp rates are taken (smoothing), minutes; default 2. */
  rampSpanMinutes?: number | undefined;
}

/** A stretch without data. */
export interface DataGap {
  startMs: number;
  endMs: number;
  durationS: number;
}

/** One door opening. */
export interface DoorOpening {
  openedMs: number;
  closedMs: number;
  durationS: number;
  /** True when the record ended with the door still open (closed at the record's end). */
  stillOpen: boolean;
}

/** Cure verdict, in the order of precedence. */
export type CureVerdict = 'unverifiable' | 'over-temperature' | 'under-cured' | 'complete';

/** The computed cure record. */
export interface CureRecord {
  /** Minutes the coldest thermocouple was at or above minTempC (interpolated crossings; gaps excluded). */
  minutesAtOrAboveMin: number;
  /** Highest reading of any thermocouple, °C (null without data). */
  peakC: number | null;
  peakAtMs: number | null;
  /** Largest heat-up rate of the zone mean over the ramp span, °C/min (null if none measurable). */
  maxHeatUpCPerMin: number | null;
  /** Largest cool-down rate of the zone mean over the ramp span, as a positive °C/min. */
  maxCoolDownCPerMin: number | null;
  /** True when either ramp rate exceeds the window's maxRampCPerMin. */
  rampExceeded: boolean;
  /** Arrhenius equivalent minutes of the coldest thermocouple at referenceC, accrued only at or above minTempC (gaps excluded). */
  equivalentMinutes: number;
  gaps: DataGap[];
  /** Soak span: first to last instant the coldest thermocouple is at/above minTempC. */
  soak: { startMs: number; endMs: number } | null;
  door: { openings: number; openSeconds: number; openingsDuringSoak: number; events: DoorOpening[] };
  verdict: CureVerdict;
  /** Plain-words reasons behind the verdict and any cautions. */
  reasons: string[];
}

interface Row {
  tMs: number;
  cold: number;
  hot: number;
  mean: number;
}

function toRows(readings: readonly OvenReading[]): Row[] {
  const rows: Row[] = [];
  for (const r of readings) {
    if (!Number.isFinite(r.tMs)) continue;
    const temps = (typeof r.tempC === 'number' ? [r.tempC] : [...r.tempC]).filter(Number.isFinite);
    if (temps.length === 0) continue;
    rows.push({
      tMs: r.tMs,
      cold: Math.min(...temps),
      hot: Math.max(...temps),
      mean: temps.reduce((s, x) => s + x, 0) / temps.length,
    });
  }
  return rows.sort((a, b) => a.tMs - b.tMs);
}

function fmtMin(ms: number, t0: number): string {
  return `minute ${((ms - t0) / 60000).toFixed(1)}`;
}

/**
 * Builds the cure record of one oven load.
 *
 * - Equivalent minutes: Σ Δt·exp(−(Ea/R)(1/T̄ − 1/T_ref)) over the coldest thermocouple, T̄ the
 *   interval mean (ASTM C1074 equivalent-age form); intervals inside data gaps do not count.
 * - Time at or above minTempC: linear interpolation of crossings, gaps excluded.
 * - Ramp rates: (T̄(t+span) − T̄(t))/span over the zone mean, spans that cross a gap skipped.
 * - Data gaps: reading spacing > maxGapSeconds (and missing data at the load's start/end).
 *   Equivalent minutes accrue only at or above minTempC (datum temperature; see
 *   `equivalentMinutes` in arrhenius.ts).
 * - Verdict, first that applies ({@link CURE_VERDICT_RULE}): 'unverifiable' if any gap overlaps
 *   the soak (or no soak is seen while data is missing); 'over-temperature' if peak >
 *   maxPartTempC; 'under-cured' if the coldest thermocouple never reaches minTempC, spends less
 *   than minSoakMinutes at or above it, or equivalent minutes < minEquivalentMinutes; else
 *   'complete'.
 * Units: epoch ms, °C, minutes, seconds as named.
 */
export function cureRecord(input: CureRecordInput): CureRecord {
  const { window: w } = input;
  const spanMin = input.rampSpanMinutes ?? 2;
  if (!(spanMin > 0)) throw new RangeError('rampSpanMinutes must be greater than 0');
  if (!(w.maxGapSeconds > 0)) throw new RangeError('maxGapSeconds must be greater than 0');
  const rows = toRows(input.readings);
  const reasons: string[] = [];
  const first = rows[0];
  const last = rows[rows.length - 1];
  const t0 = input.loadStartMs ?? first?.tMs ?? 0;
  const maxGapMs = w.maxGapSeconds * 1000;

  // Data gaps: interior intervals (by index) and the load's ends.
  const gapIntervals = new Set<number>();
  const gaps: DataGap[] = [];
  const addGap = (startMs: number, endMs: number): void => {
    gaps.push({ startMs, endMs, durationS: (endMs - startMs) / 1000 });
  };
  if (first && input.loadStartMs !== undefined && first.tMs - input.loadStartMs > maxGapMs) {
    addGap(input.loadStartMs, first.tMs);
  }
  for (let i = 1; i < rows.length; i++) {
    const a = rows[i - 1] as Row;
    const b = rows[i] as Row;
    if (b.tMs - a.tMs > maxGapMs) {
      gapIntervals.add(i - 1);
      addGap(a.tMs, b.tMs);
    }
  }
  if (last && input.loadEndMs !== undefined && input.loadEndMs - last.tMs > maxGapMs) {
    addGap(last.tMs, input.loadEndMs);
  }

  const door = doorSummary(input.doorEvents ?? [], last?.tMs ?? input.loadEndMs ?? t0, input.loadEndMs);

  if (rows.length < 2 || !first || !last) {
    return {
      minutesAtOrAboveMin: 0,
      peakC: first ? first.hot : null,
      peakAtMs: first ? first.tMs : null,
      maxHeatUpCPerMin: null,
      maxCoolDownCPerMin: null,
      rampExceeded: false,
      equivalentMinutes: 0,
      gaps,
      soak: null,
      door: { ...door, openingsDuringSoak: 0 },
      verdict: 'unverifiable',
      reasons: ['Fewer than two oven readings were recorded: the cure cannot be verified.'],
    };
  }

  const coldProfile: ProfilePoint[] = rows.map((r) => ({ minutes: (r.tMs - t0) / 60000, tempC: r.cold }));
  const notGap = (i: number): boolean => !gapIntervals.has(i);
  const equivalentMinutes = equivalentMinutesOf(
    coldProfile,
    { activationEnergyKJMol: w.activationEnergyKJMol, referenceC: w.referenceC },
    notGap,
    w.minTempC,
  );
  const minutesAtOrAboveMin = minutesAtOrAboveOf(coldProfile, w.minTempC, notGap);

  // Peak (hottest thermocouple).
  let peak = first;
  for (const r of rows) if (r.hot > peak.hot) peak = r;

  // Ramp rates over the span (zone mean), two pointers; skip spans that contain a gap.
  const gapPrefix: number[] = [0];
  for (let i = 0; i < rows.length - 1; i++) gapPrefix.push((gapPrefix[i] as number) + (gapIntervals.has(i) ? 1 : 0));
  const spanMs = spanMin * 60000;
  let maxUp: number | null = null;
  let maxDown: number | null = null;
  let j = 0;
  for (let i = 0; i < rows.length; i++) {
    const a = rows[i] as Row;
    if (j <= i) j = i + 1;
    while (j < rows.length && (rows[j] as Row).tMs - a.tMs < spanMs) j++;
    if (j >= rows.length) break;
    if ((gapPrefix[j] as number) - (gapPrefix[i] as number) > 0) continue;
    const b = rows[j] as Row;
    const rate = (b.mean - a.mean) / ((b.tMs - a.tMs) / 60000);
    if (rate > 0) maxUp = Math.max(maxUp ?? 0, rate);
    if (rate < 0) maxDown = Math.max(maxDown ?? 0, -rate);
  }
  const rampExceeded = (maxUp ?? 0) > w.maxRampCPerMin || (maxDown ?? 0) > w.maxRampCPerMin;

  // Soak: first to last instant the coldest thermocouple is at/above the minimum (interpolated).
  const crossing = (a: Row, b: Row): number => a.tMs + ((w.minTempC - a.cold) / (b.cold - a.cold)) * (b.tMs - a.tMs);
  let soakStart: number | null = null;
  let soakEnd: number | null = null;
  rows.forEach((r, i) => {
    if (r.cold < w.minTempC) return;
    const prev = rows[i - 1];
    const next = rows[i + 1];
    if (soakStart === null) soakStart = prev && prev.cold < w.minTempC ? crossing(prev, r) : r.tMs;
    soakEnd = next && next.cold < w.minTempC ? crossing(r, next) : r.tMs;
  });
  const soak = soakStart !== null && soakEnd !== null ? { startMs: soakStart, endMs: soakEnd } : null;

  const openingsDuringSoak = soak ? door.events.filter((e) => e.closedMs >= soak.startMs && e.openedMs <= soak.endMs).length : 0;

  // Verdict.
  let verdict: CureVerdict;
  const soakGaps = soak ? gaps.filter((g) => g.endMs >= soak.startMs && g.startMs <= soak.endMs) : [];
  if (soak && soakGaps.length > 0) {
    verdict = 'unverifiable';
    for (const g of soakGaps) {
      reasons.push(
        `No oven data for ${(g.durationS / 60).toFixed(1)} min (from ${fmtMin(g.startMs, t0)} to ${fmtMin(g.endMs, t0)}) during the soak: the cure cannot be verified.`,
      );
    }
  } else if (!soak && gaps.length > 0) {
    verdict = 'unverifiable';
    reasons.push(
      `The oven never showed ${w.minTempC} °C in the recorded data, and ${gaps.length} stretch(es) of data are missing: the cure cannot be verified.`,
    );
  } else if (peak.hot > w.maxPartTempC) {
    verdict = 'over-temperature';
    reasons.push(
      `Peak ${peak.hot.toFixed(1)} °C at ${fmtMin(peak.tMs, t0)} is above the ${w.maxPartTempC} °C limit for the parts.`,
    );
  } else if (
    !soak ||
    (w.minSoakMinutes !== undefined && minutesAtOrAboveMin < w.minSoakMinutes) ||
    equivalentMinutes < w.minEquivalentMinutes
  ) {
    verdict = 'under-cured';
    if (!soak) {
      reasons.push(
        `The coldest thermocouple never reached the minimum ${w.minTempC} °C: under-cured, however long the load stayed below it (equivalent minutes count only at or above the minimum).`,
      );
    } else if (w.minSoakMinutes !== undefined && minutesAtOrAboveMin < w.minSoakMinutes) {
      reasons.push(
        `The coldest thermocouple spent ${minutesAtOrAboveMin.toFixed(1)} min at or above ${w.minTempC} °C; the recipe needs ${w.minSoakMinutes}.`,
      );
    }
    if (equivalentMinutes < w.minEquivalentMinutes) {
      reasons.push(
        `The load got ${equivalentMinutes.toFixed(1)} equivalent minutes at ${w.referenceC} °C (counted only at or above ${w.minTempC} °C); the recipe needs ${w.minEquivalentMinutes}.`,
      );
    }
  } else {
    verdict = 'complete';
    reasons.push(
      `${equivalentMinutes.toFixed(1)} equivalent minutes at ${w.referenceC} °C (needed ${w.minEquivalentMinutes}, counted only at or above ${w.minTempC} °C), ${minutesAtOrAboveMin.toFixed(1)} min at or above ${w.minTempC} °C, peak ${peak.hot.toFixed(1)} °C within ${w.maxPartTempC} °C, no data missing during the soak.`,
    );
  }
  if (!soak && verdict !== 'under-cured') reasons.push(`The coldest thermocouple never reached the minimum ${w.minTempC} °C.`);
  if (verdict !== 'unverifiable' && gaps.length > 0) {
    reasons.push(`${gaps.length} data gap(s) outside the soak; they do not count toward equivalent minutes.`);
  }
  if (rampExceeded) {
    reasons.push(
      `Ramp rate above the ${w.maxRampCPerMin} °C/min limit (heat-up ${(maxUp ?? 0).toFixed(1)}, cool-down ${(maxDown ?? 0).toFixed(1)} °C/min).`,
    );
  }
  if (openingsDuringSoak > 0) reasons.push(`The door was opened ${openingsDuringSoak} time(s) during the soak.`);

  return {
    minutesAtOrAboveMin,
    peakC: peak.hot,
    peakAtMs: peak.tMs,
    maxHeatUpCPerMin: maxUp,
    maxCoolDownCPerMin: maxDown,
    rampExceeded,
    equivalentMinutes,
    gaps,
    soak,
    door: { ...door, openingsDuringSoak },
    verdict,
    reasons,
  };
}

/** Inputs of `POST /api/v1/calc/cure-verdict`: a profile (elapsed minutes, °C) and the cure window. */
export interface CureVerdictInput {
  readings: readonly { minutes: number; tempC: number }[];
  window: CureWindow;
}

/** Output of `POST /api/v1/calc/cure-verdict` (product.md §6). */
export interface CureVerdictResult {
  verdict: CureVerdict;
  reasons: string[];
  equivalentMinutes: number;
  minutesAtOrAbove: number;
  peakC: number | null;
}

/**
 * The cure-verdict calculator: the oven-load record's own {@link cureRecord} on a planned or
 * exported profile, minute 0 as the load's start, no door events, the profile's ends as the
 * load's ends. Linear in the number of readings (they arrive in time order).
 */
export function cureVerdict(input: CureVerdictInput): CureVerdictResult {
  const readings: OvenReading[] = input.readings.map((r) => ({ tMs: r.minutes * 60000, tempC: r.tempC }));
  const rec = cureRecord({ readings, window: input.window });
  return {
    verdict: rec.verdict,
    reasons: rec.reasons,
    equivalentMinutes: rec.equivalentMinutes,
    minutesAtOrAbove: rec.minutesAtOrAboveMin,
    peakC: rec.peakC,
  };
}

function doorSummary(
  events: readonly DoorEvent[],
  recordEndMs: number,
  loadEndMs: number | undefined,
): { openings: number; openSeconds: number; events: DoorOpening[] } {
  const sorted = [...events].filter((e) => Number.isFinite(e.tMs)).sort((a, b) => a.tMs - b.tMs);
  const out: DoorOpening[] = [];
  let openedAt: number | null = null;
  for (const e of sorted) {
    if (e.open && openedAt === null) openedAt = e.tMs;
    else if (!e.open && openedAt !== null) {
      out.push({ openedMs: openedAt, closedMs: e.tMs, durationS: (e.tMs - openedAt) / 1000, stillOpen: false });
      openedAt = null;
    }
  }
  if (openedAt !== null) {
    const end = Math.max(loadEndMs ?? recordEndMs, openedAt);
    out.push({ openedMs: openedAt, closedMs: end, durationS: (end - openedAt) / 1000, stillOpen: true });
  }
  return { openings: out.length, openSeconds: out.reduce((s, o) => s + o.durationS, 0), events: out };
}

/** Band around the setpoint that counts as soak in the phase helper, ±5 °C (common practice). */
export const SOAK_BAND_C = 5;

/** Setpoint at or below which an oven counts as switched off, 40 °C (common practice). */
export const IDLE_SETPOINT_C = 40;

/** Inputs of the oven-load phase helper. */
export interface OvenPhaseInput {
  /** Latest setpoint, °C (null when the controller reports none). */
  setpointC: number | null;
  /** Time-ordered readings of the load so far. */
  readings: readonly OvenReading[];
  /** Soak minutes the recipe requires (for the predicted end). */
  soakMinutesRequired: number;
  /** Soak band ±°C around the setpoint (default 5, common practice). */
  bandC?: number | undefined;
  /** Setpoints at or below this count as "off" (default 40 °C, common practice). */
  idleSetpointC?: number | undefined;
}

/** Current phase of a load and the predicted end of its soak. */
export interface OvenPhase {
  phase: 'idle' | 'ramp' | 'soak' | 'cool';
  /** Start of the current soak (first instant of the run of readings inside the band), epoch ms. */
  soakStartMs?: number;
  /** soakStartMs + soakMinutesRequired, epoch ms. */
  predictedEndMs?: number;
}

/**
 * Oven-load phase from the latest setpoint and the temperature series (coldest thermocouple):
 * - setpoint off (null or ≤ idleSetpointC): 'cool' while the oven is still above
 *   idleSetpointC + band, else 'idle';
 * - |T − setpoint| ≤ band: 'soak', with soak start = first instant of the unbroken run of
 *   in-band readings ending now, and predicted end = soak start + soak minutes required;
 * - T < setpoint − band: 'ramp'; T > setpoint + band: 'cool' (falling to a lower setpoint).
 * Band and idle threshold are common practice, configurable.
 */
export function ovenLoadPhase(input: OvenPhaseInput): OvenPhase {
  const band = input.bandC ?? SOAK_BAND_C;
  const idle = input.idleSetpointC ?? IDLE_SETPOINT_C;
  const rows = toRows(input.readings);
  const latest = rows[rows.length - 1];
  if (!latest) return { phase: 'idle' };
  const sp = input.setpointC;
  if (sp === null || !Number.isFinite(sp) || sp <= idle) {
    return { phase: latest.cold > idle + band ? 'cool' : 'idle' };
  }
  if (latest.cold < sp - band) return { phase: 'ramp' };
  if (latest.cold > sp + band) return { phase: 'cool' };
  let k = rows.length - 1;
  while (k > 0 && Math.abs((rows[k - 1] as Row).cold - sp) <= band) k--;
  const soakStartMs = (rows[k] as Row).tMs;
  return { phase: 'soak', soakStartMs, predictedEndMs: soakStartMs + input.soakMinutesRequired * 60000 };
}
