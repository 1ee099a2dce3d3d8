/**
 * Exponentially weighted moving average chart (S. W. Roberts, Technometrics 1(3), 1959; design
 * and ARL: J. M. Lucas & M. S. Saccucci, Technometrics 32(1), 1990; NIST/SEMATECH e-Handbook
 * §6.3.2.4; Montgomery, *Introduction to SQC*, §9.2).
 *
 * zᵢ = λ·xᵢ + (1 − λ)·zᵢ₋₁, z₀ = μ0 (the target, or the phase-1 mean);
 * σ_z,i = σₓ·√(λ/(2−λ)·(1 − (1−λ)^(2i))) (exact, time-varying) → σₓ·√(λ/(2−λ)) (asymptotic);
 * limits μ0 ± L·σ_z. xᵢ is an observation (σₓ = σ) or a subgroup mean (σₓ = σ/√n). Units: data units.
 * NIST §6.3.2.4 prints asymptotic limits with the given s; Montgomery's example uses the exact ones.
 */

/** EWMA design. */
export interface EwmaDesign {
  /** Centre μ0 (data units). */
  center: number;
  /** Sigma of one plotted input xᵢ (σ for observations, σ/√n for subgroup means), data units. */
  sigmaX: number;
  /** Weight 0 < λ ≤ 1. */
  lambda: number;
  /** Limit width in sigmas of z. */
  L: number;
  /** Exact time-varying limits (default) or asymptotic ones. */
  limits: 'exact' | 'asymptotic';
}

/** One EWMA point. */
export interface EwmaPoint {
  /** The input xᵢ. */
  x: number;
  /** The statistic zᵢ. */
  z: number;
  ucl: number;
  lcl: number;
  /** Sigma of zᵢ used for its limits. */
  sigmaZ: number;
  signal: 'upper' | 'lower' | null;
}

/** σ_z for point i (1-based): σₓ√(λ/(2−λ)(1−(1−λ)^(2i))), or the asymptotic σₓ√(λ/(2−λ)) when i is null. */
export function ewmaSigma(sigmaX: number, lambda: number, i: number | null): number {
  const asymptotic = lambda / (2 - lambda);
  return sigmaX * Math.sqrt(i === null ? asymptotic : asymptotic * (1 - Math.pow(1 - lambda, 2 * i)));
}

/** Asymptotic EWMA limits μ0 ± L·σₓ·√(λ/(2−λ)). */
export function ewmaAsymptoticLimits(d: EwmaDesign): { center: number; ucl: number; lcl: number } {
  const half = d.L * ewmaSigma(d.sigmaX, d.lambda, null);
  return { center: d.center, ucl: d.center + half, lcl: d.center - half };
}

/**
 * Run the EWMA over the inputs; a point signals when zᵢ is strictly beyond its limit
 * (a point exactly on a limit is not beyond it).
 */
export function ewmaSeries(xs: readonly number[], d: EwmaDesign): EwmaPoint[] {
  let z = d.center;
  return xs.map((x, k) => {
    z = d.lambda * x + (1 - d.lambda) * z;
    const sigmaZ = ewmaSigma(d.sigmaX, d.lambda, d.limits === 'exact' ? k + 1 : null);
    const ucl = d.center + d.L * sigmaZ;
    const lcl = d.center - d.L * sigmaZ;
    return { x, z, ucl, lcl, sigmaZ, signal: z > ucl ? 'upper' : z < lcl ? 'lower' : null };
  });
}
