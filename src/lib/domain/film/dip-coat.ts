/**
 * Dip-coat film thickness: Landau–Levich drag-out, the withdrawal-speed advisor and the
 * calibration of the thickness constant from measured films.
 *
 * Sources: L. Landau & B. Levich, "Dragging of a liquid by a moving plate", Acta
 * Physicochimica URSS 17 (1942) 42–54; B. V. Derjaguin, Acta Physicochimica URSS 20 (1943)
 * 349–352 (the gravity–viscous limit h = √(ηU/(ρg))); D. A. White & J. A. Tallmadge, Chem. Eng.
 * Sci. 20 (1965) 33–37 and R. P. Spiers, C. V. Subbaraman & W. L. Wilkinson, Chem. Eng. Sci. 29
 * (1974) 389–396 (one equation across both regimes, in the form N/(1 − N²)^(2/3) = 0.944·Ca^(1/6),
 * N = h·√(ρg/(ηU)), as W. M. Deen, *Analysis of Transport Phenomena*, quotes it);
 * C. J. Brinker & G. W. Scherer, *Sol-Gel Science* (Academic Press, 1990), ch. 13.
 *
 * One continuous model (the Landau–Levich–Derjaguin drag-out with its drainage limit):
 *   N/(1 − N²)^(2/3) = 0.94·Ca^(1/6),  h = N·√(ηU/(ρg)),  Ca = ηU/γ.
 * As Ca → 0, N → 0.94·Ca^(1/6) and h → 0.94·ℓc·Ca^(2/3) (Landau–Levich); as Ca → ∞, N → 1 and
 * h → √(ηU/(ρg)) (Derjaguin). The prefactor is Landau–Levich's 0.94 (0.944 in the quoted
 * form), so the low-Ca limit is exactly the Landau–Levich formula. h rises smoothly and strictly
 * with U and η; the speed advisor inverts this same function, so the two always agree.
 *
 * The model is an estimate inside its stated validity (Newtonian liquid, wetting substrate,
 * steady withdrawal, Ca ≪ 1). The lacquer maker's data and the lab's own calibration govern.
 *
 * Units at the boundary are the API's (mPa·s, mm/s, mN/m, kg/m³, µm); the maths runs in SI.
 */
import { linearRegression, rSquared } from 'simple-statistics';

/** Standard acceleration of gravity g_n = 9.80665 m/s² (3rd CGPM, 1901; exact by definition). */
export const STANDARD_GRAVITY_M_S2 = 9.80665;

/** Landau–Levich prefactor 0.94 in h = 0.94·ℓc·Ca^(2/3) (Landau & Levich 1942). */
export const LANDAU_LEVICH_PREFACTOR = 0.94;

/**
 * Capillary-number bound above which the Landau–Levich form is no longer trusted:
 * Ca ≤ 1·10⁻². The theory needs Ca ≪ 1; the 10⁻² cut-off is common practice (a trade
 * bound, not a value from the 1942 paper).
 */
export const LANDAU_LEVICH_MAX_CAPILLARY = 1e-2;

/**
 * Limit of h/√(ηU/(ρg)) as Ca → ∞ in the continuous model: 1 (Derjaguin 1943). Brinker &
 * Scherer's working value 0.8 is what the model gives near Ca ≈ 1–10.
 */
export const GRAVITY_DRAINAGE_LIMIT = 1;

/**
 * N of the continuous model: the root in [0, 1) of N/(1 − N²)^(2/3) = 0.94·Ca^(1/6), i.e. of
 * g(N) = N − c·(1 − N²)^(2/3) (strictly increasing, g(0) = −c, g(1) = 1), by bisection to
 * machine precision. Dimensionless.
 */
export function drainageNumber(capillary: number): number {
  if (!(capillary > 0) || !Number.isFinite(capillary)) throw new RangeError('capillary number must be finite and > 0');
  const c = LANDAU_LEVICH_PREFACTOR * Math.pow(capillary, 1 / 6);
  let lo = 0;
  let hi = Math.min(1, c);
  for (let i = 0; i < 200 && hi - lo > 1e-16 * hi; i++) {
    const mid = (lo + hi) / 2;
    if (mid - c * Math.pow(1 - mid * mid, 2 / 3) < 0) lo = mid;
    else hi = mid;
  }
  return (lo + hi) / 2;
}

/** Wet thickness of the continuous model in metres from SI inputs (Pa·s, m/s, N/m, kg/m³). */
function wetThicknessM(etaPaS: number, uMs: number, gammaNm: number, rho: number): number {
  const ca = (etaPaS * uMs) / gammaNm;
  return drainageNumber(ca) * Math.sqrt((etaPaS * uMs) / (rho * STANDARD_GRAVITY_M_S2));
}

/** Film-formation regime: Ca ≤ 10⁻² (the Landau–Levich limit holds) or above (drainage-limited branch). */
export type DipRegime = 'landau-levich' | 'gravity-viscous';

/** Inputs of the dip-thickness calculation, in the API's units. */
export interface DipThicknessInput {
  /** Dynamic viscosity η of the bath, mPa·s (= cP). */
  viscosityMPaS: number;
  /** Withdrawal speed U, mm/s. */
  speedMmS: number;
  /** Liquid–vapour surface tension γ, mN/m. */
  surfaceTensionMNm: number;
  /** Bath density ρ, kg/m³. */
  densityKgM3: number;
  /** Volume fraction of solids in the wet film, 0 < φ ≤ 1 (optional). */
  solidsVolumeFraction?: number | undefined;
}

/** Result of the dip-thickness calculation (the API contract plus the warnings). */
export interface DipThicknessResult {
  /** Wet film thickness h, µm. */
  wetThicknessUm: number;
  /** Dry thickness = wet × solids volume fraction, µm (only when φ was given). */
  dryThicknessUm?: number;
  /** Capillary number Ca = ηU/γ, dimensionless. */
  capillaryNumber: number;
  /** Capillary length ℓc = √(γ/(ρg)), mm. */
  capillaryLengthMm: number;
  /** 'landau-levich' when Ca ≤ 10⁻² (the Landau–Levich limit holds), otherwise 'gravity-viscous' (same model, drainage-limited). */
  regime: DipRegime;
  /** Plain-words cautions (e.g. outside the Landau–Levich range). */
  warnings: string[];
}

function requirePositive(name: string, value: number): void {
  if (!Number.isFinite(value) || value <= 0) {
    throw new RangeError(`${name} must be a finite number greater than 0 (got ${value})`);
  }
}

function requireFraction(name: string, value: number): void {
  if (!Number.isFinite(value) || value <= 0 || value > 1) {
    throw new RangeError(`${name} must be a fraction in (0, 1] (got ${value})`);
  }
}

/**
 * Capillary number Ca = η·U/γ (dimensionless).
 * @param viscosityMPaS η in mPa·s
 * @param speedMmS U in mm/s
 * @param surfaceTensionMNm γ in mN/m
 * Source: Brinker & Scherer 1990, ch. 13.
 */
export function capillaryNumber(viscosityMPaS: number, speedMmS: number, surfaceTensionMNm: number): number {
  requirePositive('viscosityMPaS', viscosityMPaS);
  requirePositive('speedMmS', speedMmS);
  requirePositive('surfaceTensionMNm', surfaceTensionMNm);
  return (viscosityMPaS * 1e-3 * (speedMmS * 1e-3)) / (surfaceTensionMNm * 1e-3);
}

/**
 * Capillary length ℓc = √(γ/(ρ·g)), returned in mm.
 * @param surfaceTensionMNm γ in mN/m
 * @param densityKgM3 ρ in kg/m³
 * Source: Brinker & Scherer 1990, ch. 13; g = 9.80665 m/s².
 */
export function capillaryLengthMm(surfaceTensionMNm: number, densityKgM3: number): number {
  requirePositive('surfaceTensionMNm', surfaceTensionMNm);
  requirePositive('densityKgM3', densityKgM3);
  return Math.sqrt((surfaceTensionMNm * 1e-3) / (densityKgM3 * STANDARD_GRAVITY_M_S2)) * 1e3;
}

/**
 * Wet (and dry) film thickness for dip coating — the `POST /api/v1/calc/dip-thickness`
 * calculation.
 *
 * - One continuous model (module note): N/(1 − N²)^(2/3) = 0.94·Ca^(1/6), h = N·√(ηU/(ρg));
 *   it is the Landau–Levich form 0.94·ℓc·Ca^(2/3) as Ca → 0 and Derjaguin's √(ηU/(ρg)) as
 *   Ca → ∞, with no jump anywhere.
 * - The regime says whether the Landau–Levich limit holds (Ca ≤ 10⁻², common practice); above
 *   it a warning says that gravity drainage shapes the film.
 * - Dry thickness ≈ wet × volume fraction of solids (Brinker & Scherer 1990, ch. 13).
 *
 * Units: η mPa·s, U mm/s, γ mN/m, ρ kg/m³ in; thickness µm, ℓc mm out.
 * @throws RangeError on a non-finite or non-positive input, or φ outside (0, 1].
 */
export function dipThickness(input: DipThicknessInput): DipThicknessResult {
  const { viscosityMPaS, speedMmS, surfaceTensionMNm, densityKgM3, solidsVolumeFraction } = input;
  requirePositive('densityKgM3', densityKgM3);
  if (solidsVolumeFraction !== undefined) requireFraction('solidsVolumeFraction', solidsVolumeFraction);
  const ca = capillaryNumber(viscosityMPaS, speedMmS, surfaceTensionMNm);
  const lcMm = capillaryLengthMm(surfaceTensionMNm, densityKgM3);
  const warnings: string[] = [];
  const regime: DipRegime = ca <= LANDAU_LEVICH_MAX_CAPILLARY ? 'landau-levich' : 'gravity-viscous';
  if (regime === 'gravity-viscous') {
    warnings.push(
      `Capillary number ${ca.toPrecision(3)} is above 1e-2: the Landau–Levich limit no longer holds and gravity drainage ` +
        'shapes the film; the thickness comes from the continuous drag-out model (tending to √(ηU/(ρg)) at high Ca).',
    );
  }
  const wetM = wetThicknessM(viscosityMPaS * 1e-3, speedMmS * 1e-3, surfaceTensionMNm * 1e-3, densityKgM3);
  const wetThicknessUm = wetM * 1e6;
  const result: DipThicknessResult = {
    wetThicknessUm,
    capillaryNumber: ca,
    capillaryLengthMm: lcMm,
    regime,
    warnings,
  };
  if (solidsVolumeFraction !== undefined) {
    result.dryThicknessUm = wetThicknessUm * solidsVolumeFraction;
  }
  return result;
}

/**
 * Theoretical Landau–Levich thickness constant C in h = C·(ηU)^(2/3), expressed in the
 * calibration units µm / (mPa·s · mm/s)^(2/3):
 * C = 0.94 / (γ^(1/6)·(ρg)^(1/2)) in SI, × 100 for the unit change
 * (h µm = 10⁶ h m; (ηU)^(2/3) SI = 10⁻⁴·(ηU)^(2/3) in mPa·s·mm/s).
 * This is the low-Ca limit of the continuous model (at Ca 10⁻⁴–10⁻³ the model gives 3–6 %
 * less, from drainage). Useful to compare a calibrated constant with theory. Source: Landau &
 * Levich 1942.
 */
export function theoreticalThicknessConstant(surfaceTensionMNm: number, densityKgM3: number): number {
  requirePositive('surfaceTensionMNm', surfaceTensionMNm);
  requirePositive('densityKgM3', densityKgM3);
  const cSi =
    LANDAU_LEVICH_PREFACTOR / (Math.pow(surfaceTensionMNm * 1e-3, 1 / 6) * Math.sqrt(densityKgM3 * STANDARD_GRAVITY_M_S2));
  return cSi * 100;
}

/** Inputs of the withdrawal-speed advisor (API units). Give exactly one target. */
export interface SpeedAdvisorInput {
  /** Current bath viscosity η, mPa·s. */
  viscosityMPaS: number;
  /** Target dry (cured) thickness, µm. */
  targetDryThicknessUm?: number | undefined;
  /** Target wet thickness, µm. */
  targetWetThicknessUm?: number | undefined;
  /** Solids volume fraction φ; needed to turn a dry target into a wet one for the theory. */
  solidsVolumeFraction?: number | undefined;
  /** Surface tension γ, mN/m (needed without a calibrated constant, and for the regime check). */
  surfaceTensionMNm?: number | undefined;
  /** Density ρ, kg/m³ (needed without a calibrated constant). */
  densityKgM3?: number | undefined;
  /**
   * Calibrated constant C in h = C·(ηU)^(2/3), µm/(mPa·s·mm/s)^(2/3), fitted by
   * {@link calibrateThicknessConstant} against the SAME kind of thickness as the target
   * (a cured-thickness calibration for a dry target). When present it replaces the theory.
   */
  thicknessConstant?: number | undefined;
}

/** Result of the withdrawal-speed advisor. */
export interface SpeedAdvice {
  /** Withdrawal speed U that gives the target at the current viscosity, mm/s. */
  speedMmS: number;
  /** Which model produced it. */
  model: 'calibrated' | 'landau-levich' | 'gravity-viscous';
  /** Ca = ηU/γ at that speed, when γ is known. */
  capillaryNumber?: number;
  /** Plain-words cautions. */
  warnings: string[];
}

/**
 * Withdrawal-speed advisor: the speed that holds a target thickness at the current viscosity,
 * by inverting the film-thickness law.
 *
 * - Calibrated: h = C·(ηU)^(2/3) ⇒ U = (h/C)^(3/2) / η (h µm, η mPa·s, U mm/s).
 * - Theory: the continuous model of {@link dipThickness} inverted by bisection on ln U (h is
 *   strictly increasing in U), so the advised speed always gives the target in the forward model;
 *   a warning when the speed lies above Ca = 10⁻².
 * - A dry target becomes a wet target h_wet = h_dry/φ (theory only).
 * Sources: Landau & Levich 1942; Derjaguin 1943; White & Tallmadge 1965; Brinker & Scherer 1990.
 * @throws RangeError when the target is missing/ambiguous or a needed property is absent.
 */
export function withdrawalSpeedForThickness(input: SpeedAdvisorInput): SpeedAdvice {
  const { viscosityMPaS, targetDryThicknessUm, targetWetThicknessUm, thicknessConstant } = input;
  requirePositive('viscosityMPaS', viscosityMPaS);
  const hasDry = targetDryThicknessUm !== undefined;
  const hasWet = targetWetThicknessUm !== undefined;
  if (hasDry === hasWet) {
    throw new RangeError('give exactly one of targetDryThicknessUm or targetWetThicknessUm');
  }
  const warnings: string[] = [];
  if (thicknessConstant !== undefined) {
    requirePositive('thicknessConstant', thicknessConstant);
    const h = (hasDry ? targetDryThicknessUm : targetWetThicknessUm) as number;
    requirePositive(hasDry ? 'targetDryThicknessUm' : 'targetWetThicknessUm', h);
    const speedMmS = Math.pow(h / thicknessConstant, 1.5) / viscosityMPaS;
    const advice: SpeedAdvice = { speedMmS, model: 'calibrated', warnings };
    if (input.surfaceTensionMNm !== undefined) {
      const ca = capillaryNumber(viscosityMPaS, speedMmS, input.surfaceTensionMNm);
      advice.capillaryNumber = ca;
      if (ca > LANDAU_LEVICH_MAX_CAPILLARY) {
        warnings.push('The advised speed gives Ca above 1e-2: outside the calibrated law’s usual range.');
      }
    }
    return advice;
  }
  const { surfaceTensionMNm, densityKgM3, solidsVolumeFraction } = input;
  if (surfaceTensionMNm === undefined || densityKgM3 === undefined) {
    throw new RangeError('surfaceTensionMNm and densityKgM3 are needed without a calibrated thicknessConstant');
  }
  requirePositive('surfaceTensionMNm', surfaceTensionMNm);
  requirePositive('densityKgM3', densityKgM3);
  let wetUm: number;
  if (hasDry) {
    requirePositive('targetDryThicknessUm', targetDryThicknessUm);
    if (solidsVolumeFraction === undefined) {
      throw new RangeError('solidsVolumeFraction is needed to advise on a dry-thickness target');
    }
    requireFraction('solidsVolumeFraction', solidsVolumeFraction);
    wetUm = targetDryThicknessUm / solidsVolumeFraction;
  } else {
    requirePositive('targetWetThicknessUm', targetWetThicknessUm as number);
    wetUm = targetWetThicknessUm as number;
  }
  const eta = viscosityMPaS * 1e-3;
  const gamma = surfaceTensionMNm * 1e-3;
  const target = wetUm * 1e-6;
  const h = (lnU: number): number => wetThicknessM(eta, Math.exp(lnU), gamma, densityKgM3);
  // Bracket in ln(U m/s), then bisect: h(U) is continuous and strictly increasing.
  let lo = Math.log(1e-15);
  let hi = Math.log(1e3);
  while (h(lo) > target && lo > -700) lo -= 10;
  while (h(hi) < target && hi < 700) hi += 10;
  for (let i = 0; i < 300 && hi - lo > 1e-15; i++) {
    const mid = (lo + hi) / 2;
    if (h(mid) < target) lo = mid;
    else hi = mid;
  }
  const speedMmS = Math.exp((lo + hi) / 2) * 1e3;
  const ca = capillaryNumber(viscosityMPaS, speedMmS, surfaceTensionMNm);
  if (ca <= LANDAU_LEVICH_MAX_CAPILLARY) return { speedMmS, model: 'landau-levich', capillaryNumber: ca, warnings };
  warnings.push(
    'The target needs Ca above 1e-2: the Landau–Levich limit does not hold there; the speed comes from the same continuous drag-out model, where gravity drainage shapes the film.',
  );
  return { speedMmS, model: 'gravity-viscous', capillaryNumber: ca, warnings };
}

/** One calibration measurement: the withdrawal conditions and the measured thickness. */
export interface CalibrationPoint {
  /** Withdrawal speed, mm/s. */
  speedMmS: number;
  /** Bath viscosity at dip time, mPa·s. */
  viscosityMPaS: number;
  /** Measured thickness (usually cured/dry), µm. */
  thicknessUm: number;
}

/** A least-squares fit of h = C·(ηU)^k in log space. */
export interface ThicknessFit {
  /** Constant C, µm/(mPa·s·mm/s)^k. */
  constant: number;
  /** Exponent k on ηU (2/3 when fixed). */
  exponent: number;
  /** Coefficient of determination in log space, 1 − SS_res/SS_tot (may be < 0 for the fixed fit). */
  rSquared: number;
  /** Residual SD of ln h (≈ relative SD), with n − p degrees of freedom. */
  residualSdLog: number;
  /** Residual SD of h in µm, with n − p degrees of freedom. */
  residualSdUm: number;
  /** Number of points. */
  n: number;
}

/** Result of {@link calibrateThicknessConstant}. */
export interface ThicknessCalibration {
  /** Fit with the Landau–Levich exponent fixed at 2/3. */
  fixedExponent: ThicknessFit;
  /** Fit with a free exponent (null with fewer than 3 points or no spread in ηU). */
  freeExponent: ThicknessFit | null;
}

function fitStats(
  points: readonly CalibrationPoint[],
  logPairs: number[][],
  lnC: number,
  k: number,
  dof: number,
): Omit<ThicknessFit, 'n'> {
  const line = (x: number): number => lnC + k * x;
  let ssLog = 0;
  let ssUm = 0;
  points.forEach((p, i) => {
    const pair = logPairs[i] as number[];
    ssLog += (Number(pair[1]) - line(Number(pair[0]))) ** 2;
    ssUm += (p.thicknessUm - Math.exp(line(Number(pair[0])))) ** 2;
  });
  const yMean = logPairs.reduce((s, p) => s + Number(p[1]), 0) / logPairs.length;
  const ssTot = logPairs.reduce((s, p) => s + (Number(p[1]) - yMean) ** 2, 0);
  return {
    constant: Math.exp(lnC),
    exponent: k,
    // simple-statistics rSquared: 1 − Σ(y − f(x))² / Σ(y − ȳ)²; defined as 1 when all y equal.
    rSquared: ssTot === 0 ? (ssLog === 0 ? 1 : 0) : rSquared(logPairs, line),
    residualSdLog: dof > 0 ? Math.sqrt(ssLog / dof) : 0,
    residualSdUm: dof > 0 ? Math.sqrt(ssUm / dof) : 0,
  };
}

/**
 * Calibrates the thickness constant from measured (speed, viscosity, thickness) triples by
 * least squares in log space:
 * - fixed exponent: ln h = ln C + (2/3)·ln(ηU) ⇒ ln C = mean(ln h − (2/3)·ln(ηU));
 * - free exponent: ordinary least squares of ln h on ln(ηU) (simple-statistics
 *   `linearRegression`), C = e^b, k = m.
 * Units: h µm, η mPa·s, U mm/s; C in µm/(mPa·s·mm/s)^k. r² from simple-statistics `rSquared`
 * (log space); residual SDs use n − 1 (fixed) and n − 2 (free) degrees of freedom.
 * Source: the 2/3 exponent is Landau & Levich 1942; the regression is ordinary least squares.
 * @throws RangeError with fewer than 2 points or a non-positive value.
 */
export function calibrateThicknessConstant(points: readonly CalibrationPoint[]): ThicknessCalibration {
  if (points.length < 2) throw new RangeError('calibration needs at least 2 measurements');
  for (const p of points) {
    requirePositive('speedMmS', p.speedMmS);
    requirePositive('viscosityMPaS', p.viscosityMPaS);
    requirePositive('thicknessUm', p.thicknessUm);
  }
  const logPairs = points.map((p) => [Math.log(p.viscosityMPaS * p.speedMmS), Math.log(p.thicknessUm)]);
  const n = points.length;
  const k = 2 / 3;
  const lnC = logPairs.reduce((s, p) => s + (Number(p[1]) - k * Number(p[0])), 0) / n;
  const fixedExponent: ThicknessFit = { ...fitStats(points, logPairs, lnC, k, n - 1), n };
  const xs = logPairs.map((p) => Number(p[0]));
  const spread = Math.max(...xs) - Math.min(...xs);
  let freeExponent: ThicknessFit | null = null;
  if (n >= 3 && spread > 1e-12) {
    const { m, b } = linearRegression(logPairs);
    freeExponent = { ...fitStats(points, logPairs, b, m, n - 2), n };
  }
  return { fixedExponent, freeExponent };
}
