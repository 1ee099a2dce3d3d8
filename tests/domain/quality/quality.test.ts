import { describe, expect, it } from 'vitest';
import { crosscutClass } from '../../../src/lib/domain/quality/crosscut';
import { bayerRatio, hazeGain } from '../../../src/lib/domain/quality/abrasion';
import { findExtrema, fringeThickness, type SpectrumPoint } from '../../../src/lib/domain/quality/fringes';
import { CrosscutInputSchema, FringeThicknessInputSchema } from '../../../src/lib/shared/calc';

describe('crosscutClass — ISO 2409 Table 1 and ASTM D3359 method B', () => {
  // Band edges per ISO 2409 Table 1 wording ("not significantly greater than 5 %" …), applied
  // to both scales (see the module note).
  const cases = [
    { p: 0, iso: 0, astm: '5B' },
    { p: 0.01, iso: 1, astm: '4B' },
    { p: 5, iso: 1, astm: '4B' },
    { p: 5.01, iso: 2, astm: '3B' },
    { p: 15, iso: 2, astm: '3B' },
    { p: 15.01, iso: 3, astm: '2B' },
    { p: 35, iso: 3, astm: '2B' },
    { p: 35.01, iso: 4, astm: '1B' },
    { p: 65, iso: 4, astm: '1B' },
    { p: 65.01, iso: 5, astm: '0B' },
    { p: 100, iso: 5, astm: '0B' },
  ] as const;
  for (const c of cases) {
    it(`${c.p} % removed → ${c.iso} / ${c.astm} (ISO 2409 Table 1; ASTM D3359 classification)`, () => {
      expect(crosscutClass({ percentRemoved: c.p })).toEqual({ iso2409: c.iso, astmD3359: c.astm });
    });
  }
  it('rejects values outside 0..100', () => {
    for (const p of [-0.1, 100.1, Number.NaN, Number.POSITIVE_INFINITY]) {
      expect(() => crosscutClass({ percentRemoved: p })).toThrow(RangeError);
    }
  });
  it('schema rejects percent > 100 at percentRemoved', () => {
    const r = CrosscutInputSchema.safeParse({ percentRemoved: 120 });
    expect(r.success).toBe(false);
    expect(r.error?.issues[0]?.path).toEqual(['percentRemoved']);
  });
});

describe('bayerRatio — ASTM F735', () => {
  it('ratio = reference haze gain ÷ test haze gain (hand-computed)', () => {
    expect(bayerRatio({ referenceHazeGainPct: 12, testHazeGainPct: 3 })).toEqual({ bayerRatio: 4, premium: true });
    expect(bayerRatio({ referenceHazeGainPct: 12, testHazeGainPct: 12 }).bayerRatio).toBe(1); // = uncoated CR-39
    expect(bayerRatio({ referenceHazeGainPct: 9, testHazeGainPct: 4 }).premium).toBe(false); // 2.25 (≥ 4 premium: common practice)
    expect(hazeGain(0.4, 12.4)).toBeCloseTo(12, 12);
  });
  it('rejects a non-positive test gain', () => {
    expect(() => bayerRatio({ referenceHazeGainPct: 12, testHazeGainPct: 0 })).toThrow(RangeError);
    expect(() => bayerRatio({ referenceHazeGainPct: 12, testHazeGainPct: -1 })).toThrow(RangeError);
  });
});

describe('fringeThickness — d = N·λ1·λ2/(2n(λ1 − λ2)) (Macleod, Thin-Film Optical Filters)', () => {
  const cases = [
    // Maxima of a 2000 nm, n 1.50 film sit at λ = 2nd/m = 6000/m nm: m = 8 → 750, m = 9 → 666.667.
    { l1: 750, l2: 6000 / 9, n: 1.5, N: 1, d: 2000, source: 'hand-computed from 2nd = mλ' },
    { l1: 750, l2: 600, n: 1.5, N: 2, d: 2000, source: 'hand-computed, m = 8 and m = 10, two fringes apart' },
    { l1: 600, l2: 500, n: 1.6, N: 1, d: 937.5, source: 'hand-computed: 600·500/(2·1.6·100)' },
  ];
  for (const c of cases) {
    it(`${c.l1}/${c.l2.toFixed(3)} nm, n ${c.n}, N ${c.N} → ${c.d} nm (${c.source})`, () => {
      expect(fringeThickness({ lambda1Nm: c.l1, lambda2Nm: c.l2, refractiveIndex: c.n, fringes: c.N }).thicknessNm).toBeCloseTo(
        c.d,
        9,
      );
    });
  }
  it('rejects lambda2 ≥ lambda1', () => {
    expect(() => fringeThickness({ lambda1Nm: 500, lambda2Nm: 500, refractiveIndex: 1.5 })).toThrow(RangeError);
  });
  it('schema rejects lambda2 ≥ lambda1 at lambda2Nm', () => {
    for (const l2 of [600, 700]) {
      const r = FringeThicknessInputSchema.safeParse({ lambda1Nm: 600, lambda2Nm: l2, refractiveIndex: 1.5 });
      expect(r.success).toBe(false);
      expect(r.error?.issues[0]?.path).toEqual(['lambda2Nm']);
    }
  });
});

/**
 * Single-layer reflectance at normal incidence, non-absorbing (Airy summation; Macleod,
 * Thin-Film Optical Filters, ch. 2): R = (r1² + r2² + 2r1r2·cos2δ)/(1 + r1²r2² + 2r1r2·cos2δ),
 * r1 = (1 − n)/(1 + n), r2 = (n − ns)/(n + ns), δ = 2πnd/λ. The expected thickness in the tests
 * is the d fed to this physics formula, not a value from the code under test.
 */
function airySpectrum(dNm: number, n: number, ns: number, from = 400, to = 800, step = 0.5): SpectrumPoint[] {
  const r1 = (1 - n) / (1 + n);
  const r2 = (n - ns) / (n + ns);
  const out: SpectrumPoint[] = [];
  for (let w = from; w <= to + 1e-9; w += step) {
    const c = Math.cos((4 * Math.PI * n * dNm) / w);
    out.push({ wavelengthNm: w, reflectance: (r1 * r1 + r2 * r2 + 2 * r1 * r2 * c) / (1 + r1 * r1 * r2 * r2 + 2 * r1 * r2 * c) });
  }
  return out;
}

describe('findExtrema — thickness from a reflectance spectrum', () => {
  it('2000 nm, n 1.50 on substrate n 1.60, 400–800 nm (thin-film reflectance formula)', () => {
    const r = findExtrema(airySpectrum(2000, 1.5, 1.6), { refractiveIndex: 1.5 });
    expect(r.measurable).toBe(true);
    if (!r.measurable) return;
    // Maxima at 6000/m nm for m = 8…15 (750 … 400 nm; 400 is the range edge) → 7 inside.
    expect(r.maxima.length).toBeGreaterThanOrEqual(6);
    expect(r.minima.length).toBeGreaterThanOrEqual(6);
    expect(r.count).toBe(r.maxima.length - 1 + r.minima.length - 1);
    expect(Math.abs(r.thicknessNm - 2000) / 2000).toBeLessThan(0.001); // 0.1 %
    expect(r.sdNm).toBeLessThan(2);
    expect(r.maxima[0]?.wavelengthNm).toBeCloseTo(6000 / 14, 0);
  });

  it('still measures with a little noise on the spectrum', () => {
    let seed = 7;
    const rand = (): number => {
      seed = (seed * 1103515245 + 12345) % 2147483648;
      return seed / 2147483648 - 0.5;
    };
    const noisy = airySpectrum(3000, 1.5, 1.6).map((p) => ({ ...p, reflectance: p.reflectance + 0.0005 * rand() }));
    const r = findExtrema(noisy, { refractiveIndex: 1.5, smoothingWindow: 7 });
    expect(r.measurable).toBe(true);
    if (r.measurable) expect(Math.abs(r.thicknessNm - 3000) / 3000).toBeLessThan(0.01);
  });

  it('a flat spectrum is not measurable: "fringes too weak"', () => {
    const flat = Array.from({ length: 200 }, (_, i) => ({ wavelengthNm: 400 + 2 * i, reflectance: 0.04 }));
    const r = findExtrema(flat, { refractiveIndex: 1.5 });
    expect(r).toMatchObject({ measurable: false, reason: 'fringes too weak — the coat may be index-matched to the substrate' });
  });

  it('an index-matched coat (n 1.50 on 1.505) is not measurable (thin-film reflectance formula)', () => {
    const r = findExtrema(airySpectrum(2000, 1.5, 1.505), { refractiveIndex: 1.5 });
    expect(r.measurable).toBe(false);
  });
});
