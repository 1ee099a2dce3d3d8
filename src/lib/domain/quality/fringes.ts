/**
 * Coating thickness from reflectance interference fringes (thin-film optics at normal
 * incidence, non-absorbing film, dispersion neglected; H. A. Macleod, *Thin-Film Optical
 * Filters*): reflectance extrema satisfy 2·n·d = m·λ (or (m + ½)·λ), so two adjacent maxima
 * (or minima) λ1 > λ2 give d = λ1·λ2 / (2·n·(λ1 − λ2)); N fringes apart multiply by N.
 *
 * An index-matched coat (film index ≈ substrate index) shows almost no fringes: the spectrum
 * analysis says so instead of guessing.
 */
import { mean, sampleStandardDeviation } from 'simple-statistics';

/** Inputs of `POST /api/v1/calc/fringe-thickness`. */
export interface FringeThicknessInput {
  /** Longer-wavelength extremum, nm. */
  lambda1Nm: number;
  /** Shorter-wavelength extremum, nm (< lambda1Nm). */
  lambda2Nm: number;
  /** Refractive index of the coat, > 1 in practice. */
  refractiveIndex: number;
  /** Number of fringe orders between the two extrema (default 1 = adjacent). */
  fringes?: number | undefined;
}

/**
 * d = N·λ1·λ2 / (2·n·(λ1 − λ2)), nm (Macleod, *Thin-Film Optical Filters*; normal incidence).
 * @throws RangeError unless λ1 > λ2 > 0, n > 0 and N a positive integer.
 */
export function fringeThickness(input: FringeThicknessInput): { thicknessNm: number } {
  const { lambda1Nm: l1, lambda2Nm: l2, refractiveIndex: n } = input;
  const fringes = input.fringes ?? 1;
  if (!Number.isFinite(l1) || !Number.isFinite(l2) || !(l2 > 0) || !(l1 > l2)) {
    throw new RangeError('lambda1Nm must be greater than lambda2Nm, both greater than 0');
  }
  if (!Number.isFinite(n) || n <= 0) throw new RangeError('refractiveIndex must be greater than 0');
  if (!Number.isInteger(fringes) || fringes < 1) throw new RangeError('fringes must be a whole number ≥ 1');
  return { thicknessNm: (fringes * l1 * l2) / (2 * n * (l1 - l2)) };
}

import type { SpectrumPoint } from '../../shared/spectrum.ts';

export type { SpectrumPoint };

/** Options of the spectrum analysis. */
export interface FringeAnalysisOptions {
  /** Film refractive index (needed for a thickness). */
  refractiveIndex: number;
  /** Moving-average window, samples (odd; default 5). */
  smoothingWindow?: number;
  /**
   * Minimum prominence of an extremum as a fraction of the smoothed signal's range
   * (max − min); default 0.25.
   */
  minProminenceFraction?: number;
  /**
   * Minimum fringe contrast (max − min)/mean of the smoothed signal; below it the spectrum is
   * called unmeasurable. Default 0.05.
   */
  minContrast?: number;
}

/** A located extremum (refined by a parabola through the three samples around it). */
export interface Extremum {
  wavelengthNm: number;
  reflectance: number;
  kind: 'max' | 'min';
  prominence: number;
}

/** Result of the spectrum analysis. */
export type FringeAnalysis =
  | {
      measurable: true;
      /** Mean of the thickness estimates from all adjacent pairs of maxima and of minima, nm. */
      thicknessNm: number;
      /** Sample SD of those estimates, nm (0 with a single estimate). */
      sdNm: number;
      /** Number of estimates (adjacent pairs). */
      count: number;
      /** Fringe contrast (max − min)/mean. */
      contrast: number;
      maxima: Extremum[];
      minima: Extremum[];
    }
  | { measurable: false; reason: string; contrast: number; maxima: Extremum[]; minima: Extremum[] };

/** Centred moving average with the window shrunk at the ends. */
export function movingAverage(values: readonly number[], window: number): number[] {
  const half = Math.max(0, Math.floor(window / 2));
  return values.map((_, i) => {
    const lo = Math.max(0, i - half);
    const hi = Math.min(values.length - 1, i + half);
    let s = 0;
    for (let k = lo; k <= hi; k++) s += values[k] as number;
    return s / (hi - lo + 1);
  });
}

/** Topographic prominence of the peak at i in y (use −y for a minimum). */
function prominence(y: readonly number[], i: number): number {
  const v = y[i] as number;
  let leftMin = v;
  for (let k = i - 1; k >= 0; k--) {
    const yk = y[k] as number;
    if (yk > v) break;
    leftMin = Math.min(leftMin, yk);
  }
  let rightMin = v;
  for (let k = i + 1; k < y.length; k++) {
    const yk = y[k] as number;
    if (yk > v) break;
    rightMin = Math.min(rightMin, yk);
  }
  return v - Math.max(leftMin, rightMin);
}

function peaks(x: readonly number[], y: readonly number[], minProm: number): { x: number; y: number; prom: number }[] {
  const out: { x: number; y: number; prom: number }[] = [];
  for (let i = 1; i < y.length - 1; i++) {
    const a = y[i - 1] as number;
    const b = y[i] as number;
    const c = y[i + 1] as number;
    if (!(b > a && b >= c)) continue;
    const prom = prominence(y, i);
    if (prom < minProm || prom <= 0) continue;
    // Parabolic refinement through (i−1, i, i+1) — exact for a locally quadratic peak.
    const x0 = x[i - 1] as number;
    const x1 = x[i] as number;
    const x2 = x[i + 1] as number;
    const denom = (x0 - x1) * (x0 - x2) * (x1 - x2);
    let xp = x1;
    let yp = b;
    if (denom !== 0) {
      const A = (x2 * (b - a) + x1 * (a - c) + x0 * (c - b)) / denom;
      const B = (x2 * x2 * (a - b) + x1 * x1 * (c - a) + x0 * x0 * (b - c)) / denom;
      const C = (x1 * x2 * (x1 - x2) * a + x2 * x0 * (x2 - x0) * b + x0 * x1 * (x0 - x1) * c) / denom;
      if (A < 0) {
        const v = -B / (2 * A);
        if (v >= x0 && v <= x2) {
          xp = v;
          yp = A * v * v + B * v + C;
        }
      }
    }
    out.push({ x: xp, y: yp, prom });
  }
  return out;
}

/**
 * Finds the reflectance extrema of a spectrum and the coat thickness from them:
 * 1. sort by wavelength, smooth with a centred moving average;
 * 2. fringe contrast = (max − min)/mean of the smoothed signal; below `minContrast` return
 *    `{measurable:false, reason:'fringes too weak — the coat may be index-matched to the substrate'}`;
 * 3. local maxima and minima with a prominence ≥ minProminenceFraction·(max − min), each
 *    refined by a parabola through its three samples;
 * 4. d = λ1·λ2/(2n(λ1 − λ2)) for every adjacent pair of maxima and every adjacent pair of
 *    minima; report mean, sample SD and count.
 * Source: Macleod, *Thin-Film Optical Filters* (normal incidence, dispersion neglected).
 * @throws RangeError on fewer than 5 points or non-finite values.
 */
export function findExtrema(spectrum: readonly SpectrumPoint[], options: FringeAnalysisOptions): FringeAnalysis {
  const n = options.refractiveIndex;
  if (!Number.isFinite(n) || n <= 0) throw new RangeError('refractiveIndex must be greater than 0');
  if (spectrum.length < 5) throw new RangeError('a spectrum needs at least 5 points');
  for (const p of spectrum) {
    if (!Number.isFinite(p.wavelengthNm) || p.wavelengthNm <= 0 || !Number.isFinite(p.reflectance)) {
      throw new RangeError('spectrum points need a positive wavelength and a finite reflectance');
    }
  }
  const sorted = [...spectrum].sort((a, b) => a.wavelengthNm - b.wavelengthNm);
  const x = sorted.map((p) => p.wavelengthNm);
  const y = movingAverage(
    sorted.map((p) => p.reflectance),
    options.smoothingWindow ?? 5,
  );
  const yMax = Math.max(...y);
  const yMin = Math.min(...y);
  const yMean = mean(y);
  const contrast = yMean !== 0 ? (yMax - yMin) / Math.abs(yMean) : 0;
  const range = yMax - yMin;
  const minProm = (options.minProminenceFraction ?? 0.25) * range;
  const maxima: Extremum[] = peaks(x, y, minProm).map((p) => ({
    wavelengthNm: p.x,
    reflectance: p.y,
    kind: 'max',
    prominence: p.prom,
  }));
  const minima: Extremum[] = peaks(
    x,
    y.map((v) => -v),
    minProm,
  ).map((p) => ({ wavelengthNm: p.x, reflectance: -p.y, kind: 'min', prominence: p.prom }));
  if (contrast < (options.minContrast ?? 0.05)) {
    return {
      measurable: false,
      reason: 'fringes too weak — the coat may be index-matched to the substrate',
      contrast,
      maxima: [],
      minima: [],
    };
  }
  const estimates: number[] = [];
  for (const list of [maxima, minima]) {
    for (let i = 1; i < list.length; i++) {
      const shorter = (list[i - 1] as Extremum).wavelengthNm;
      const longer = (list[i] as Extremum).wavelengthNm;
      estimates.push(fringeThickness({ lambda1Nm: longer, lambda2Nm: shorter, refractiveIndex: n }).thicknessNm);
    }
  }
  if (estimates.length === 0) {
    return {
      measurable: false,
      reason: 'fewer than two maxima or two minima in the range — widen the range or the coat is too thin for fringes',
      contrast,
      maxima,
      minima,
    };
  }
  return {
    measurable: true,
    thicknessNm: mean(estimates),
    sdNm: estimates.length > 1 ? sampleStandardDeviation(estimates) : 0,
    count: estimates.length,
    contrast,
    maxima,
    minima,
  };
}
