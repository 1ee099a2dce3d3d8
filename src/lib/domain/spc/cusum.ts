/**
 * Tabular (two one-sided) CUSUM (E. S. Page, Biometrika 41, 1954; NIST/SEMATECH e-Handbook
 * §6.3.2.3; Montgomery, *Introduction to SQC*, §9.1, including the fast-initial-response head
 * start of Lucas & Crosier (1982) as presented there).
 *
 * C⁺ᵢ = max(0, xᵢ − (μ0 + K) + C⁺ᵢ₋₁), C⁻ᵢ = max(0, (μ0 − K) − xᵢ + C⁻ᵢ₋₁), C±₀ = head start;
 * K = k·σₓ, H = h·σₓ (k, h in sigma units; σₓ the sigma of one plotted input, data units).
 * A point signals when C⁺ᵢ > H or C⁻ᵢ > H (strictly). N± counts the consecutive periods the sum has
 * been non-zero; on a signal the new mean is estimated as μ0 + K + C⁺/N⁺ (or μ0 − K − C⁻/N⁻)
 * (Montgomery §9.1.2). With a head start the sum of a run that began at C±₀ = HS holds HS on top
 * of the N± deviations, so HS is taken off first: μ0 + K + (C⁺ − HS)/N⁺ while the run that began
 * at the start is unbroken (a run that starts after a reset at 0 carries no head start).
 * The sums are not reset after a signal (as in the NIST table); restart by posting new data.
 */

/** CUSUM design in data units. */
export interface CusumDesign {
  /** Target μ0. */
  center: number;
  /** Reference value K = k·σₓ. */
  K: number;
  /** Decision interval H = h·σₓ. */
  H: number;
  /** Head start C±₀ (data units), 0 for none; H/2 is the usual FIR choice. */
  headStart: number;
}

/** One CUSUM point. */
export interface CusumPoint {
  x: number;
  cPlus: number;
  cMinus: number;
  nPlus: number;
  nMinus: number;
  upper: boolean;
  lower: boolean;
  /** μ0 + K + (C⁺ − HS)/N⁺ on an upper signal, μ0 − K − (C⁻ − HS)/N⁻ on a lower one (HS only while the run from the head start is unbroken; upper wins if both), else null. */
  shiftEstimate: number | null;
}

/** Run the tabular CUSUM over the inputs. */
export function cusumSeries(xs: readonly number[], d: CusumDesign): CusumPoint[] {
  let cPlus = d.headStart;
  let cMinus = d.headStart;
  let nPlus = 0;
  let nMinus = 0;
  // Head start still inside the current run's sum (HS until the sum first returns to 0).
  let hsPlus = d.headStart;
  let hsMinus = d.headStart;
  return xs.map((x) => {
    cPlus = Math.max(0, x - (d.center + d.K) + cPlus);
    cMinus = Math.max(0, d.center - d.K - x + cMinus);
    nPlus = cPlus > 0 ? nPlus + 1 : 0;
    nMinus = cMinus > 0 ? nMinus + 1 : 0;
    if (cPlus === 0) hsPlus = 0;
    if (cMinus === 0) hsMinus = 0;
    const upper = cPlus > d.H;
    const lower = cMinus > d.H;
    let shiftEstimate: number | null = null;
    if (upper) shiftEstimate = d.center + d.K + (cPlus - hsPlus) / nPlus;
    else if (lower) shiftEstimate = d.center - d.K - (cMinus - hsMinus) / nMinus;
    return { x, cPlus, cMinus, nPlus, nMinus, upper, lower, shiftEstimate };
  });
}
