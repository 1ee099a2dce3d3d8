/**
 * Cross-cut (cross-hatch) adhesion class from the percentage of the lattice area removed:
 * ISO 2409 classes 0–5 and ASTM D3359 test method B classes 5B–0B, which share the bands
 * 0 %, ≤ 5 %, 5–15 %, 15–35 %, 35–65 %, > 65 %.
 *
 * Band edges (ISO 2409 Table 1 wording: class 1 "not significantly greater than 5 %", class 2
 * "greater than 5 % but not significantly greater than 15 %", class 3 "greater than 15 % but
 * not significantly greater than 35 %", class 4 "greater than 35 % but not significantly
 * greater than 65 %", class 5 beyond class 4), taken literally:
 *
 * | percent removed p | ISO 2409 | ASTM D3359 B |
 * |---|---|---|
 * | p = 0 | 0 | 5B |
 * | 0 < p ≤ 5 | 1 | 4B |
 * | 5 < p ≤ 15 | 2 | 3B |
 * | 15 < p ≤ 35 | 3 | 2B |
 * | 35 < p ≤ 65 | 4 | 1B |
 * | p > 65 | 5 | 0B |
 *
 * So exactly 5 → 1/4B, 15 → 2/3B, 35 → 3/2B, 65 → 4/1B. ASTM D3359 words its bands as
 * "less than 5 %", "5 to 15 %" … which leave the exact edges ambiguous; Coatrail applies the
 * ISO edges to both scales so the pair always agrees. Lens labs accept only 0 / 5B (common
 * practice).
 */

/** ISO 2409 class 0–5. */
export type Iso2409Class = 0 | 1 | 2 | 3 | 4 | 5;

/** ASTM D3359 method B class. */
export type AstmD3359Class = '5B' | '4B' | '3B' | '2B' | '1B' | '0B';

/** Output of `POST /api/v1/calc/crosscut`. */
export interface CrosscutResult {
  iso2409: Iso2409Class;
  astmD3359: AstmD3359Class;
}

const ASTM: readonly AstmD3359Class[] = ['5B', '4B', '3B', '2B', '1B', '0B'];

/**
 * Percent of the lattice area removed → ISO 2409 class and ASTM D3359 method B class, with the
 * band edges documented in this module (ISO 2409 Table 1; ASTM D3359 classification).
 * @throws RangeError when percentRemoved is not a finite number in 0..100.
 */
export function crosscutClass(input: { percentRemoved: number }): CrosscutResult {
  const p = input.percentRemoved;
  if (!Number.isFinite(p) || p < 0 || p > 100) {
    throw new RangeError('percentRemoved must be a number from 0 to 100');
  }
  const iso: Iso2409Class = p === 0 ? 0 : p <= 5 ? 1 : p <= 15 ? 2 : p <= 35 ? 3 : p <= 65 ? 4 : 5;
  return { iso2409: iso, astmD3359: ASTM[iso] as AstmD3359Class };
}
