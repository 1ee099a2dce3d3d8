/**
 * What went wrong in a chamber run: per-layer thickness errors fitted to a measured
 * reflectance spectrum.
 *
 * Model: the design stack with layer j's physical thickness multiplied by a factor p_j
 * (indices fixed), reflectance by the characteristic-matrix method (./stack.ts). The factors
 * minimise the sum of squared residuals Σᵢ (R_model(λᵢ; p) − R_measured(λᵢ))² (both in %), by
 * Levenberg–Marquardt (K. Levenberg, Q. Appl. Math. 2 (1944) 164–168; D. W. Marquardt,
 * J. SIAM 11 (1963) 431–441) with a forward-difference Jacobian and the factors kept inside
 * bounds by projection.
 *
 * Identifiability: at the solution the singular values σ of the Jacobian J (from the
 * eigenvalues of JᵀJ, Jacobi's method) give its rank and condition number κ = σ_max/σ_min.
 * A rank below the number of fitted layers, or κ above `maxCondition`, means that some
 * combination of thickness errors leaves the spectrum (almost) unchanged: the data cannot say
 * which layer drifted, and the result says so plainly, naming the layers in that combination
 * (the right singular vector of σ_min). Standard errors: σ²·(JᵀJ)⁻¹ (the usual linearised
 * least-squares covariance) with σ the larger of the residual spread √(SSR/(m − n)) and the
 * instrument's noise `noisePct`; a layer whose standard error exceeds `maxStandardError` is not
 * determined by the data either (a 5 nm anti-static layer hardly shows in a reflectance
 * spectrum), and the result says so.
 *
 * Tooling-factor correction (common practice for quartz-crystal monitoring): the controller
 * ends a layer when the crystal reading times the tooling factor reaches the target, so a
 * layer that came out p times its target needs TF_new = TF_old × p.
 */
import { stackSpectrum, type ResolvedStack, type SpectrumOptions } from './stack.ts';

/** Inputs of the fit. */
export interface LayerFitInput {
  /** The design, resolved on the measured wavelengths (layers in deposition order). */
  design: ResolvedStack;
  /** Measured reflectance, %, one per design wavelength. */
  measuredReflectancePct: ArrayLike<number>;
  /** How the spectrum was measured (angle, polarisation, one or both faces). */
  options?: SpectrumOptions;
  /** 0-based indices of the layers to fit (default all). */
  fitLayers?: number[];
  /** Bounds of every factor (default 0.7–1.3, i.e. ±30 %). */
  bounds?: [number, number];
  /** Current tooling factor per layer (%, as the controller holds it), for the suggested correction. */
  toolingFactorsPct?: (number | undefined)[];
  /** A layer counts as drifted beyond this fraction (default 0.02 = 2 %, a setting, from memory). */
  driftThreshold?: number;
  /** Above this condition number of J the fit is called not identifiable (default 1e8, a setting). */
  maxCondition?: number;
  /** Reflectance noise of the measurement, %R (default 0.05, a typical repeatability from memory; a setting). */
  noisePct?: number;
  /** Largest standard error of a factor for the fit to count as identifiable (default 0.02 = ±2 %, a setting). */
  maxStandardError?: number;
  /** Iteration cap (default 100). */
  maxIterations?: number;
}

/** A layer the fit says drifted. */
export interface DriftedLayer {
  /** 0-based layer index (deposition order). */
  layer: number;
  scale: number;
  /** (scale − 1) × 100, %. */
  errorPct: number;
  designThicknessNm: number;
  fittedThicknessNm: number;
  /** TF_old × scale, when the current tooling factor was given. */
  suggestedToolingFactorPct?: number;
}

/** Result of the fit. */
export interface LayerFitResult {
  /** Per layer (1 for a layer not fitted). */
  scales: number[];
  fittedThicknessNm: number[];
  /** Per layer; null where not fitted or not determinable. */
  standardErrors: (number | null)[];
  initialRmsPct: number;
  rmsResidualPct: number;
  iterations: number;
  /** Spectrum evaluations made (for the benchmark). */
  evaluations: number;
  converged: boolean;
  /** Numerical rank of J and its condition number (Infinity when rank-deficient). */
  rank: number;
  conditionNumber: number;
  identifiable: boolean;
  /** Plain words when not identifiable. */
  notIdentifiable?: string;
  /** Layers beyond the drift threshold, largest error first (empty when not identifiable). */
  drifted: DriftedLayer[];
  /** Any factor that ended on a bound. */
  atBound: number[];
}

function residuals(
  design: ResolvedStack,
  options: SpectrumOptions,
  scales: Float64Array,
  meas: ArrayLike<number>,
  out: Float64Array,
) {
  const r = stackSpectrum(design, options, scales).reflectance;
  let ss = 0;
  for (let i = 0; i < out.length; i++) {
    out[i] = r[i]! * 100 - meas[i]!;
    ss += out[i]! * out[i]!;
  }
  return ss;
}

/** Solve A x = b for symmetric positive definite A (Cholesky); null when not positive definite. */
function choleskySolve(A: Float64Array, n: number, b: Float64Array): Float64Array | null {
  const L = new Float64Array(n * n);
  for (let i = 0; i < n; i++) {
    for (let j = 0; j <= i; j++) {
      let s = A[i * n + j]!;
      for (let k = 0; k < j; k++) s -= L[i * n + k]! * L[j * n + k]!;
      if (i === j) {
        if (!(s > 0)) return null;
        L[i * n + i] = Math.sqrt(s);
      } else L[i * n + j] = s / L[j * n + j]!;
    }
  }
  const y = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    let s = b[i]!;
    for (let k = 0; k < i; k++) s -= L[i * n + k]! * y[k]!;
    y[i] = s / L[i * n + i]!;
  }
  const x = new Float64Array(n);
  for (let i = n - 1; i >= 0; i--) {
    let s = y[i]!;
    for (let k = i + 1; k < n; k++) s -= L[k * n + i]! * x[k]!;
    x[i] = s / L[i * n + i]!;
  }
  return x;
}

/** Eigenvalues and eigenvectors (columns of V) of a symmetric matrix, cyclic Jacobi rotations. */
export function symmetricEigen(A: ArrayLike<number>, n: number): { values: number[]; vectors: Float64Array } {
  const a = Float64Array.from(A);
  const v = new Float64Array(n * n);
  for (let i = 0; i < n; i++) v[i * n + i] = 1;
  for (let sweep = 0; sweep < 100; sweep++) {
    let off = 0;
    for (let p = 0; p < n; p++) for (let q = p + 1; q < n; q++) off += a[p * n + q]! ** 2;
    if (off < 1e-30) break;
    for (let p = 0; p < n; p++) {
      for (let q = p + 1; q < n; q++) {
        const apq = a[p * n + q]!;
        if (Math.abs(apq) < 1e-300) continue;
        const theta = (a[q * n + q]! - a[p * n + p]!) / (2 * apq);
        const t = Math.sign(theta || 1) / (Math.abs(theta) + Math.sqrt(theta * theta + 1));
        const c = 1 / Math.sqrt(t * t + 1);
        const s = t * c;
        for (let k = 0; k < n; k++) {
          const akp = a[k * n + p]!;
          const akq = a[k * n + q]!;
          a[k * n + p] = c * akp - s * akq;
          a[k * n + q] = s * akp + c * akq;
        }
        for (let k = 0; k < n; k++) {
          const apk = a[p * n + k]!;
          const aqk = a[q * n + k]!;
          a[p * n + k] = c * apk - s * aqk;
          a[q * n + k] = s * apk + c * aqk;
        }
        for (let k = 0; k < n; k++) {
          const vkp = v[k * n + p]!;
          const vkq = v[k * n + q]!;
          v[k * n + p] = c * vkp - s * vkq;
          v[k * n + q] = s * vkp + c * vkq;
        }
      }
    }
  }
  return { values: Array.from({ length: n }, (_, i) => a[i * n + i]!), vectors: v };
}

/**
 * Fit per-layer thickness factors to a measured spectrum (see the module note).
 * @throws RangeError for mismatched lengths, an empty or out-of-range layer list, or more
 *   fitted layers than measured points
 */
export function fitLayerErrors(input: LayerFitInput): LayerFitResult {
  const { design } = input;
  const options = input.options ?? {};
  const meas = input.measuredReflectancePct;
  const m = design.wavelengthsNm.length;
  if (meas.length !== m) throw new RangeError(`${m} wavelengths but ${meas.length} measured values`);
  const L = design.layers.length;
  const fit = input.fitLayers ?? Array.from({ length: L }, (_, i) => i);
  if (fit.length === 0) throw new RangeError('no layers to fit');
  for (const j of fit) if (!Number.isInteger(j) || j < 0 || j >= L) throw new RangeError(`no layer ${j + 1} in the design`);
  const n = fit.length;
  if (m <= n) throw new RangeError(`${n} layers need more than ${n} measured points`);
  const [lo, hi] = input.bounds ?? [0.7, 1.3];
  const maxCondition = input.maxCondition ?? 1e8;
  const noisePct = input.noisePct ?? 0.05;
  const maxSe = input.maxStandardError ?? 0.02;
  const threshold = input.driftThreshold ?? 0.02;
  const maxIter = input.maxIterations ?? 100;

  const scales = new Float64Array(L).fill(1);
  const r = new Float64Array(m);
  const rTrial = new Float64Array(m);
  const rStep = new Float64Array(m);
  const J = new Float64Array(m * n);
  let evaluations = 0;
  const evalAt = (s: Float64Array, out: Float64Array) => {
    evaluations++;
    return residuals(design, options, s, meas, out);
  };
  let cost = evalAt(scales, r);
  const initialRmsPct = Math.sqrt(cost / m);

  const jacobian = () => {
    const h = 1e-6;
    for (let c = 0; c < n; c++) {
      const j = fit[c]!;
      const keep = scales[j]!;
      // step inwards at the upper bound so the difference stays inside the bounds
      const step = keep + h > hi ? -h : h;
      scales[j] = keep + step;
      evalAt(scales, rStep);
      scales[j] = keep;
      for (let i = 0; i < m; i++) J[i * n + c] = (rStep[i]! - r[i]!) / step;
    }
  };
  const normal = () => {
    const A = new Float64Array(n * n);
    const g = new Float64Array(n);
    for (let i = 0; i < m; i++) {
      const row = i * n;
      for (let a = 0; a < n; a++) {
        const ja = J[row + a]!;
        g[a] = g[a]! + ja * r[i]!;
        for (let b = a; b < n; b++) A[a * n + b] = A[a * n + b]! + ja * J[row + b]!;
      }
    }
    for (let a = 0; a < n; a++) for (let b = 0; b < a; b++) A[a * n + b] = A[b * n + a]!;
    return { A, g };
  };

  let mu = 1e-3;
  let iterations = 0;
  let converged = false;
  const trial = new Float64Array(L);
  jacobian();
  while (iterations < maxIter) {
    iterations++;
    const { A, g } = normal();
    let accepted = false;
    for (let tries = 0; tries < 30 && !accepted; tries++) {
      const D = Float64Array.from(A);
      for (let a = 0; a < n; a++) D[a * n + a] = A[a * n + a]! * (1 + mu) + 1e-12;
      const neg = g.map((x) => -x);
      const delta = choleskySolve(D, n, neg);
      if (!delta) {
        mu *= 10;
        continue;
      }
      trial.set(scales);
      let stepNorm = 0;
      for (let c = 0; c < n; c++) {
        const j = fit[c]!;
        const v = Math.min(hi, Math.max(lo, scales[j]! + delta[c]!));
        stepNorm = Math.max(stepNorm, Math.abs(v - scales[j]!));
        trial[j] = v;
      }
      const trialCost = evalAt(trial, rTrial);
      if (trialCost < cost) {
        const improvement = (cost - trialCost) / Math.max(cost, 1e-300);
        scales.set(trial);
        r.set(rTrial);
        cost = trialCost;
        mu = Math.max(mu / 3, 1e-12);
        accepted = true;
        if (improvement < 1e-12 || stepNorm < 1e-10 || cost < 1e-20) converged = true;
      } else {
        mu *= 4;
        if (stepNorm < 1e-12) {
          converged = true;
          break;
        }
      }
    }
    if (!accepted) {
      converged = true; // no descent direction left: a (local) minimum within the bounds
      break;
    }
    if (converged) break;
    jacobian();
  }
  jacobian();

  // Identifiability and standard errors from JᵀJ at the solution.
  const { A } = normal();
  const eig = symmetricEigen(A, n);
  const maxEig = Math.max(...eig.values);
  const sigmas = eig.values.map((x) => Math.sqrt(Math.max(0, x)));
  const sMax = Math.sqrt(Math.max(0, maxEig));
  const tol = sMax * Math.max(m, n) * 1e-10;
  const rank = sigmas.filter((s) => s > tol).length;
  let minIdx = 0;
  for (let i = 1; i < n; i++) if (eig.values[i]! < eig.values[minIdx]!) minIdx = i;
  const sMin = sigmas[minIdx]!;
  const conditionNumber = rank < n || sMin === 0 ? Number.POSITIVE_INFINITY : sMax / sMin;
  const wellConditioned = rank === n && conditionNumber <= maxCondition;

  const sigma = Math.max(noisePct, Math.sqrt(cost / (m - n)));
  const standardErrors: (number | null)[] = new Array(L).fill(null);
  if (rank === n) {
    // (JᵀJ)⁻¹ = V Λ⁻¹ Vᵀ
    for (let c = 0; c < n; c++) {
      let vsum = 0;
      for (let e = 0; e < n; e++) vsum += eig.vectors[c * n + e]! ** 2 / eig.values[e]!;
      standardErrors[fit[c]!] = sigma * Math.sqrt(vsum);
    }
  }
  const vague = wellConditioned ? fit.filter((j) => standardErrors[j]! > maxSe) : [];
  const identifiable = wellConditioned && vague.length === 0;

  const atBound = fit.filter((j) => scales[j]! <= lo + 1e-9 || scales[j]! >= hi - 1e-9);
  let notIdentifiable: string | undefined;
  if (!wellConditioned) {
    const parts = fit.map((j, c) => ({ layer: j, w: eig.vectors[c * n + minIdx]! })).filter((x) => Math.abs(x.w) >= 0.3);
    const names = (xs: typeof parts) => xs.map((x) => `layer ${x.layer + 1}`).join(' and ');
    const up = parts.filter((x) => x.w > 0);
    const down = parts.filter((x) => x.w < 0);
    const how =
      up.length && down.length
        ? `${names(up)} ${up.length > 1 ? 'get' : 'gets'} thicker while ${names(down)} ${down.length > 1 ? 'get' : 'gets'} thinner (or the reverse)`
        : `${names(parts)} change together`;
    notIdentifiable =
      `The fit is not identifiable: the spectrum hardly changes when ${how} ` +
      `(Jacobian rank ${rank} of ${n}, condition number ${Number.isFinite(conditionNumber) ? conditionNumber.toExponential(2) : '∞'} > ${maxCondition.toExponential(0)}). ` +
      'The data cannot tell which of these layers drifted; fit fewer layers, or measure over a wider range or at another angle.';
  } else if (vague.length) {
    notIdentifiable =
      `The fit is not identifiable: at a measurement noise of ${sigma.toPrecision(2)} %R the data determine ` +
      vague.map((j) => `layer ${j + 1} only to ±${(standardErrors[j]! * 100).toPrecision(2)} %`).join(', ') +
      ` (more than ±${(maxSe * 100).toPrecision(2)} %; condition number ${conditionNumber.toExponential(2)}). ` +
      'Leave such layers out of the fit (fitLayers), or measure over a wider range or at another angle.';
  }
  const drifted: DriftedLayer[] = identifiable
    ? fit
        .filter((j) => Math.abs(scales[j]! - 1) >= threshold)
        .map((j) => {
          const tf = input.toolingFactorsPct?.[j];
          return {
            layer: j,
            scale: scales[j]!,
            errorPct: (scales[j]! - 1) * 100,
            designThicknessNm: design.layers[j]!.thicknessNm,
            fittedThicknessNm: design.layers[j]!.thicknessNm * scales[j]!,
            ...(tf !== undefined ? { suggestedToolingFactorPct: tf * scales[j]! } : {}),
          };
        })
        .sort((a, b) => Math.abs(b.errorPct) - Math.abs(a.errorPct))
    : [];
  return {
    scales: Array.from(scales),
    fittedThicknessNm: design.layers.map((l, j) => l.thicknessNm * scales[j]!),
    standardErrors,
    initialRmsPct,
    rmsResidualPct: Math.sqrt(cost / m),
    iterations,
    evaluations,
    converged,
    rank,
    conditionNumber,
    identifiable,
    ...(notIdentifiable ? { notIdentifiable } : {}),
    drifted,
    atBound,
  };
}
