/**
 * Gauge repeatability and reproducibility (crossed study: every appraiser measures every part the
 * same number of times), by the two methods of AIAG, *Measurement Systems Analysis* reference
 * manual, 4th ed. (2010), ch. III §B: the average-and-range method and the ANOVA method.
 *
 * Data are `values[appraiser][part][trial]` in the gauge's unit. Standard deviations are σ (one
 * sigma); the "study variation" is 6σ (AIAG 4th ed.; earlier editions used 5.15σ — %GRR against
 * total variation does not depend on the multiplier, %GRR against tolerance does).
 *
 * Verdict bands (AIAG MSA 4th ed., ch. II §D): %GRR under 10 % acceptable; 10–30 % may be
 * acceptable depending on the application (here "conditional"); over 30 % unacceptable; and the
 * number of distinct categories ndc = ⌊1.41·PV/GRR⌋ should be 5 or more.
 */
import { fSurvival } from './distributions.ts';

/** Balanced crossed data: values[appraiser][part][trial]. */
export type GaugeData = readonly (readonly (readonly number[])[])[];

export type GaugeVerdict = 'acceptable' | 'conditional' | 'unacceptable';

/** One variance component as σ, 6σ study variation and its shares. */
export interface GaugeComponent {
  variance: number;
  sd: number;
  /** 6σ */
  studyVariation: number;
  /** 100·σ/σ_TV */
  pctTotalVariation: number;
  /** 100·σ²/σ²_TV */
  pctContribution: number;
  /** 100·6σ/tolerance, when a tolerance is given */
  pctTolerance: number | null;
}

export interface GaugeRrResult {
  method: 'anova' | 'average-range';
  appraisers: number;
  parts: number;
  trials: number;
  /** Repeatability (equipment variation, EV). */
  repeatability: GaugeComponent;
  /** Reproducibility (appraiser variation, AV; with the ANOVA method it includes the interaction). */
  reproducibility: GaugeComponent;
  /** Appraiser × part interaction (ANOVA only; zero when pooled). */
  interaction: GaugeComponent | null;
  grr: GaugeComponent;
  /** Part-to-part variation (PV). */
  partVariation: GaugeComponent;
  totalVariation: GaugeComponent;
  /** ⌊1.41·PV/GRR⌋, at least 1 */
  ndc: number;
  verdict: GaugeVerdict;
  reasons: string[];
}

/** The ANOVA table of the two-factor crossed random-effects model with interaction. */
export interface GaugeAnovaTable {
  rows: {
    source: 'part' | 'appraiser' | 'interaction' | 'repeatability' | 'total';
    df: number;
    ss: number;
    ms: number | null;
    f: number | null;
    p: number | null;
  }[];
  /** True when the interaction was pooled into repeatability (p above the pooling level). */
  interactionPooled: boolean;
}

/** AIAG MSA 4th ed. K1 = 1/d₂ by trials (Table III-B): 2 → 0.8862, 3 → 0.5908. */
export const K1: Readonly<Record<number, number>> = { 2: 0.8862, 3: 0.5908 };
/** AIAG MSA 4th ed. K2 = 1/d₂* (one range of all appraiser means) by appraisers: 2 → 0.7071, 3 → 0.5231. */
export const K2: Readonly<Record<number, number>> = { 2: 0.7071, 3: 0.5231 };
/** AIAG MSA 4th ed. K3 = 1/d₂* (one range of the part means) by parts, 2–10. */
export const K3: Readonly<Record<number, number>> = {
  2: 0.7071,
  3: 0.5231,
  4: 0.4467,
  5: 0.403,
  6: 0.3742,
  7: 0.3534,
  8: 0.3375,
  9: 0.3249,
  10: 0.3146,
};
/** D4 for the range chart of the trials (r = 2 → 3.267, r = 3 → 2.574; ASTM Manual 7A / AIAG). */
export const D4: Readonly<Record<number, number>> = { 2: 3.267, 3: 2.574 };

/** Study-variation multiplier (AIAG MSA 4th ed.: 6σ). */
export const STUDY_SIGMAS = 6;

function shape(data: GaugeData): { a: number; p: number; r: number } {
  const a = data.length;
  const p = data[0]?.length ?? 0;
  const r = data[0]?.[0]?.length ?? 0;
  if (a < 2) throw new RangeError('a gauge study needs at least 2 appraisers');
  if (p < 2) throw new RangeError('a gauge study needs at least 2 parts');
  if (r < 2) throw new RangeError('a gauge study needs at least 2 trials per part and appraiser');
  for (let i = 0; i < a; i += 1) {
    const row = data[i] as readonly (readonly number[])[];
    if (row.length !== p)
      throw new RangeError(`appraiser ${i + 1} measured ${row.length} parts, not ${p}: the study must be crossed`);
    for (let j = 0; j < p; j += 1) {
      const cell = row[j] as readonly number[];
      if (cell.length !== r)
        throw new RangeError(`appraiser ${i + 1}, part ${j + 1} has ${cell.length} trials, not ${r}: the study must be balanced`);
      for (const v of cell) if (!Number.isFinite(v)) throw new RangeError(`appraiser ${i + 1}, part ${j + 1}: not a number`);
    }
  }
  return { a, p, r };
}

function component(variance: number, totalVariance: number, tolerance: number | undefined): GaugeComponent {
  const sd = Math.sqrt(variance);
  const tv = Math.sqrt(totalVariance);
  return {
    variance,
    sd,
    studyVariation: STUDY_SIGMAS * sd,
    pctTotalVariation: tv > 0 ? (100 * sd) / tv : 0,
    pctContribution: totalVariance > 0 ? (100 * variance) / totalVariance : 0,
    pctTolerance: tolerance && tolerance > 0 ? (100 * STUDY_SIGMAS * sd) / tolerance : null,
  };
}

/**
 * The verdict from %GRR (against total variation and, when given, against tolerance — the worse
 * of the two governs) and ndc (AIAG MSA 4th ed. bands: < 10 %, 10–30 %, > 30 %; ndc ≥ 5).
 */
export function gaugeVerdict(
  pctGrrTv: number,
  pctGrrTol: number | null,
  ndc: number,
): { verdict: GaugeVerdict; reasons: string[] } {
  const reasons: string[] = [];
  const worst = Math.max(pctGrrTv, pctGrrTol ?? 0);
  let verdict: GaugeVerdict = worst < 10 ? 'acceptable' : worst <= 30 ? 'conditional' : 'unacceptable';
  reasons.push(`%GRR of total variation ${pctGrrTv.toFixed(1)} %`);
  if (pctGrrTol !== null) reasons.push(`%GRR of tolerance ${pctGrrTol.toFixed(1)} %`);
  if (verdict === 'conditional') reasons.push('10–30 %: may be acceptable for the application (AIAG MSA 4th ed.)');
  if (ndc < 5) {
    verdict = 'unacceptable';
    reasons.push(`ndc ${ndc} < 5: the gauge cannot tell enough part categories apart`);
  }
  return { verdict, reasons };
}

function assemble(
  method: GaugeRrResult['method'],
  dims: { a: number; p: number; r: number },
  ev2: number,
  av2: number,
  int2: number | null,
  pv2: number,
  tolerance: number | undefined,
): GaugeRrResult {
  const grr2 = ev2 + av2 + (int2 ?? 0);
  const tv2 = grr2 + pv2;
  if (!(grr2 > 0))
    throw new RangeError('the readings show no measurement variation: the gauge resolution is too coarse for this study');
  const grr = component(grr2, tv2, tolerance);
  const pv = component(pv2, tv2, tolerance);
  const ndc = Math.max(1, Math.floor((1.41 * pv.sd) / grr.sd));
  const { verdict, reasons } = gaugeVerdict(grr.pctTotalVariation, grr.pctTolerance, ndc);
  return {
    method,
    appraisers: dims.a,
    parts: dims.p,
    trials: dims.r,
    repeatability: component(ev2, tv2, tolerance),
    reproducibility: component(av2 + (int2 ?? 0), tv2, tolerance),
    interaction: int2 === null ? null : component(int2, tv2, tolerance),
    grr,
    partVariation: pv,
    totalVariation: component(tv2, tv2, tolerance),
    ndc,
    verdict,
    reasons,
  };
}

/** The two-factor crossed ANOVA table (sums of squares partition the total exactly). */
export function gaugeAnovaTable(data: GaugeData, poolingP = 0.25): GaugeAnovaTable {
  const { a, p, r } = shape(data);
  let grand = 0;
  const apprMean = new Array<number>(a).fill(0);
  const partMean = new Array<number>(p).fill(0);
  const cellMean: number[][] = [];
  for (let i = 0; i < a; i += 1) {
    cellMean.push([]);
    for (let j = 0; j < p; j += 1) {
      const cell = data[i]![j]!;
      let s = 0;
      for (const v of cell) s += v;
      cellMean[i]!.push(s / r);
      apprMean[i]! += s;
      partMean[j]! += s;
      grand += s;
    }
  }
  grand /= a * p * r;
  for (let i = 0; i < a; i += 1) apprMean[i]! /= p * r;
  for (let j = 0; j < p; j += 1) partMean[j]! /= a * r;
  let ssA = 0;
  let ssP = 0;
  let ssAP = 0;
  let ssE = 0;
  let ssT = 0;
  for (const m of apprMean) ssA += (m - grand) ** 2;
  for (const m of partMean) ssP += (m - grand) ** 2;
  ssA *= p * r;
  ssP *= a * r;
  for (let i = 0; i < a; i += 1)
    for (let j = 0; j < p; j += 1) {
      const cm = cellMean[i]![j]!;
      ssAP += (cm - apprMean[i]! - partMean[j]! + grand) ** 2;
      for (const v of data[i]![j]!) {
        ssE += (v - cm) ** 2;
        ssT += (v - grand) ** 2;
      }
    }
  ssAP *= r;
  const dfA = a - 1;
  const dfP = p - 1;
  const dfAP = dfA * dfP;
  const dfE = a * p * (r - 1);
  const msA = ssA / dfA;
  const msP = ssP / dfP;
  const msAP = ssAP / dfAP;
  const msE = ssE / dfE;
  const fAP = msE > 0 ? msAP / msE : Number.POSITIVE_INFINITY;
  const pAP = msE > 0 ? fSurvival(fAP, dfAP, dfE) : 0;
  const pooled = pAP > poolingP;
  const denom = pooled ? (ssAP + ssE) / (dfAP + dfE) : msAP;
  const denomDf = pooled ? dfAP + dfE : dfAP;
  const fA = denom > 0 ? msA / denom : null;
  const fP = denom > 0 ? msP / denom : null;
  return {
    interactionPooled: pooled,
    rows: [
      { source: 'part', df: dfP, ss: ssP, ms: msP, f: fP, p: fP === null ? null : fSurvival(fP, dfP, denomDf) },
      { source: 'appraiser', df: dfA, ss: ssA, ms: msA, f: fA, p: fA === null ? null : fSurvival(fA, dfA, denomDf) },
      { source: 'interaction', df: dfAP, ss: ssAP, ms: msAP, f: Number.isFinite(fAP) ? fAP : null, p: pAP },
      { source: 'repeatability', df: dfE, ss: ssE, ms: msE, f: null, p: null },
      { source: 'total', df: a * p * r - 1, ss: ssT, ms: null, f: null, p: null },
    ],
  };
}

/**
 * Gauge R&R by the ANOVA method (AIAG MSA 4th ed. III-B; Montgomery, *Introduction to Statistical
 * Quality Control*, §8.7): expected mean squares of the random two-factor model,
 * σ²_e = MS_E, σ²_AP = (MS_AP − MS_E)/r, σ²_A = (MS_A − MS_AP)/(p·r), σ²_P = (MS_P − MS_AP)/(a·r),
 * negative estimates set to zero. When the interaction F test has p above `poolingP` (default
 * 0.25, common practice) the interaction is pooled with repeatability and MS_pool replaces both.
 */
export function gaugeRrAnova(
  data: GaugeData,
  opts: { tolerance?: number; poolingP?: number } = {},
): GaugeRrResult & { anova: GaugeAnovaTable } {
  const { a, p, r } = shape(data);
  const anova = gaugeAnovaTable(data, opts.poolingP ?? 0.25);
  const ms = (s: string) => anova.rows.find((row) => row.source === s)!;
  const msP = ms('part').ms!;
  const msA = ms('appraiser').ms!;
  const msAP = ms('interaction').ms!;
  const msE = ms('repeatability').ms!;
  let ev2: number;
  let int2: number;
  let av2: number;
  let pv2: number;
  if (anova.interactionPooled) {
    const pool = (ms('interaction').ss + ms('repeatability').ss) / (ms('interaction').df + ms('repeatability').df);
    ev2 = pool;
    int2 = 0;
    av2 = Math.max(0, (msA - pool) / (p * r));
    pv2 = Math.max(0, (msP - pool) / (a * r));
  } else {
    ev2 = msE;
    int2 = Math.max(0, (msAP - msE) / r);
    av2 = Math.max(0, (msA - msAP) / (p * r));
    pv2 = Math.max(0, (msP - msAP) / (a * r));
  }
  return { ...assemble('anova', { a, p, r }, ev2, av2, int2, pv2, opts.tolerance), anova };
}

/**
 * Gauge R&R by the average-and-range method (AIAG MSA 4th ed. III-B, the GRR report form):
 * EV = R̄̄·K1, AV = √((X̄_diff·K2)² − EV²/(n·r)) (zero when negative), GRR = √(EV² + AV²),
 * PV = R_p·K3, TV = √(GRR² + PV²). Ranges above D4·R̄̄ are listed (the manual asks for them to be
 * re-measured or discarded before the study is judged). Tables cover 2–3 trials, 2–3 appraisers
 * and 2–10 parts, as the manual's form does.
 */
export function gaugeRrAverageRange(
  data: GaugeData,
  opts: { tolerance?: number } = {},
): GaugeRrResult & {
  rBarBar: number;
  xDiff: number;
  rangeOfParts: number;
  rangeLimit: number;
  rangesOutOfControl: { appraiser: number; part: number; range: number }[];
} {
  const { a, p, r } = shape(data);
  const k1 = K1[r];
  const k2 = K2[a];
  const k3 = K3[p];
  if (k1 === undefined) throw new RangeError('the average-and-range method covers 2 or 3 trials; use the ANOVA method');
  if (k2 === undefined) throw new RangeError('the average-and-range method covers 2 or 3 appraisers; use the ANOVA method');
  if (k3 === undefined) throw new RangeError('the average-and-range method covers 2 to 10 parts; use the ANOVA method');
  const apprMeans: number[] = [];
  const partSums = new Array<number>(p).fill(0);
  let rSum = 0;
  const ranges: { appraiser: number; part: number; range: number }[] = [];
  for (let i = 0; i < a; i += 1) {
    let s = 0;
    for (let j = 0; j < p; j += 1) {
      const cell = data[i]![j]!;
      let lo = Infinity;
      let hi = -Infinity;
      for (const v of cell) {
        s += v;
        partSums[j]! += v;
        if (v < lo) lo = v;
        if (v > hi) hi = v;
      }
      rSum += hi - lo;
      ranges.push({ appraiser: i + 1, part: j + 1, range: hi - lo });
    }
    apprMeans.push(s / (p * r));
  }
  const rBarBar = rSum / (a * p);
  const xDiff = Math.max(...apprMeans) - Math.min(...apprMeans);
  const partMeans = partSums.map((s) => s / (a * r));
  const rangeOfParts = Math.max(...partMeans) - Math.min(...partMeans);
  const ev = rBarBar * k1;
  const av2 = Math.max(0, (xDiff * k2) ** 2 - (ev * ev) / (p * r));
  const pv = rangeOfParts * k3;
  const rangeLimit = D4[r]! * rBarBar;
  return {
    ...assemble('average-range', { a, p, r }, ev * ev, av2, null, pv * pv, opts.tolerance),
    rBarBar,
    xDiff,
    rangeOfParts,
    rangeLimit,
    rangesOutOfControl: ranges.filter((x) => x.range > rangeLimit + 1e-12),
  };
}

/** One reading of a crossed study in long form (as entered in the grid or a CSV row). */
export interface GaugeReading {
  appraiser: string;
  part: number;
  trial: number;
  value: number;
}

/**
 * Long-form readings → `values[appraiser][part][trial]` (appraisers in order of first
 * appearance, parts and trials ascending). Throws a RangeError naming the first missing or
 * repeated cell: the methods need a balanced, crossed study.
 */
export function gridFromReadings(readings: readonly GaugeReading[]): {
  appraisers: string[];
  parts: number[];
  values: number[][][];
} {
  const appraisers: string[] = [];
  const partSet = new Set<number>();
  const trialSet = new Set<number>();
  const cells = new Map<string, number>();
  for (const r of readings) {
    if (!appraisers.includes(r.appraiser)) appraisers.push(r.appraiser);
    partSet.add(r.part);
    trialSet.add(r.trial);
    const key = `${r.appraiser}\u0000${r.part}\u0000${r.trial}`;
    if (cells.has(key)) throw new RangeError(`appraiser ${r.appraiser}, part ${r.part}, trial ${r.trial} is entered twice`);
    cells.set(key, r.value);
  }
  const parts = [...partSet].sort((x, y) => x - y);
  const trials = [...trialSet].sort((x, y) => x - y);
  const values = appraisers.map((a) =>
    parts.map((p) =>
      trials.map((t) => {
        const v = cells.get(`${a}\u0000${p}\u0000${t}`);
        if (v === undefined)
          throw new RangeError(
            `appraiser ${a}, part ${p}, trial ${t} is missing: every appraiser measures every part in every trial`,
          );
        return v;
      }),
    ),
  );
  return { appraisers, parts, values };
}
