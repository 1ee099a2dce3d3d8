import { converter, differenceCiede2000, differenceEuclidean } from 'culori';
import { describe, expect, it } from 'vitest';
import { CIE1931_YBAR, CIE_D65, CIE_ROWS, CIE_WAVELENGTHS_NM } from '../../../src/lib/domain/colour/cie-tables';
import { chromaHue, D65_WHITE, spectrumColour, toCieGrid, xyzToLab } from '../../../src/lib/domain/colour/colorimetry';
import { deltaE2000, deltaE76, type Lab } from '../../../src/lib/domain/colour/difference';

/** Seeded pseudo-random numbers (mulberry32), so a failure can be reproduced. */
function mulberry32(seed: number) {
  return () => {
    seed = (seed + 0x6d2b79f5) | 0;
    let t = Math.imul(seed ^ (seed >>> 15), 1 | seed);
    t = (t + Math.imul(t ^ (t >>> 7), 61 | t)) ^ t;
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

const flat = (pct: number) => spectrumColour(CIE_WAVELENGTHS_NM, new Array(CIE_ROWS).fill(pct));

describe('CIE tables and the D65 white', () => {
  it('the shipped tables have 81 rows, 380–780 nm, with ȳ(555 nm) = 1 and D65(560 nm) = 100', () => {
    expect(CIE_WAVELENGTHS_NM[0]).toBe(380);
    expect(CIE_WAVELENGTHS_NM[80]).toBe(780);
    expect(CIE1931_YBAR[CIE_WAVELENGTHS_NM.indexOf(555)]).toBe(1);
    expect(CIE_D65[CIE_WAVELENGTHS_NM.indexOf(560)]).toBe(100);
  });

  it('D65 white point x = 0.3127, y = 0.3290 (CIE 015:2004, Table T.3: x 0.31272, y 0.32903)', () => {
    const c = flat(100);
    expect(c.x).toBeCloseTo(0.31272, 5);
    expect(c.y).toBeCloseTo(0.32903, 5);
  });

  it('perfect reflector XYZ ≈ 95.047 / 100 / 108.883 (the 1 nm figures; the 5 nm tables give 95.04 / 108.88, CIE 015:2004 Table T.3)', () => {
    expect(D65_WHITE.Y).toBe(100);
    expect(Math.abs(D65_WHITE.X - 95.047)).toBeLessThan(0.01);
    expect(Math.abs(D65_WHITE.Z - 108.883)).toBeLessThan(0.01);
    const c = flat(100);
    expect(c.X).toBeCloseTo(D65_WHITE.X, 10);
    expect(c.Z).toBeCloseTo(D65_WHITE.Z, 10);
  });
});

describe('colour of a spectrum', () => {
  it('a perfect white is L* 100, a* = b* = 0, C* 0; luminous reflectance 100 %', () => {
    const c = flat(100);
    expect(c.L).toBeCloseTo(100, 10);
    expect(c.a).toBeCloseTo(0, 10);
    expect(c.b).toBeCloseTo(0, 10);
    expect(c.chroma).toBeCloseTo(0, 10);
    expect(c.luminousReflectancePct).toBeCloseTo(100, 10);
  });

  it('a neutral 50 % grey: L* = 116·0.5^(1/3) − 16 = 76.0693 (CIE 015 §8.2.1, hand-computed), ρv = 50 %', () => {
    const c = flat(50);
    expect(c.L).toBeCloseTo(116 * Math.cbrt(0.5) - 16, 10);
    expect(c.luminousReflectancePct).toBeCloseTo(50, 10);
  });

  it('a dark 0.5 % grey falls on the linear segment of f: L* = 903.3·Y/Yn (CIE 015 §8.2.1: L* = (29/3)³·Y/Yn)', () => {
    const c = flat(0.5);
    expect(c.L).toBeCloseTo((29 / 3) ** 3 * 0.005, 10);
  });

  it('luminous reflectance is ISO 13666’s Σ R·S_D65·V / Σ S_D65·V over 380–780 nm (second computation)', () => {
    const rnd = mulberry32(7);
    const R = CIE_WAVELENGTHS_NM.map(() => rnd() * 5);
    let num = 0;
    let den = 0;
    for (let i = 0; i < CIE_ROWS; i++) {
      num += R[i]! * CIE_D65[i]! * CIE1931_YBAR[i]!;
      den += CIE_D65[i]! * CIE1931_YBAR[i]!;
    }
    expect(spectrumColour(CIE_WAVELENGTHS_NM, R).luminousReflectancePct).toBeCloseTo(num / den, 10);
  });

  it('a 1 nm spectrum is interpolated onto the 5 nm grid; a linear spectrum survives interpolation exactly', () => {
    const wl = Array.from({ length: 401 }, (_, i) => 380 + i);
    const R = wl.map((w) => 0.5 + (w - 380) * 0.01);
    const grid = toCieGrid(wl, R);
    CIE_WAVELENGTHS_NM.forEach((w, i) => expect(grid[i]).toBeCloseTo(0.5 + (w - 380) * 0.01, 12));
    const at5 = spectrumColour(
      CIE_WAVELENGTHS_NM,
      CIE_WAVELENGTHS_NM.map((w) => 0.5 + (w - 380) * 0.01),
    );
    expect(spectrumColour(wl, R).L).toBeCloseTo(at5.L, 10);
  });

  it('a 400–700 nm spectrum is accepted with a warning; narrower spans, mismatched lengths and non-monotone wavelengths are refused', () => {
    const wl = Array.from({ length: 61 }, (_, i) => 400 + i * 5);
    const c = spectrumColour(
      wl,
      wl.map(() => 1),
    );
    expect(c.warnings?.[0]).toMatch(/held/);
    expect(() => spectrumColour([420, 700], [1, 1])).toThrow(/at least 400–700/);
    expect(() => spectrumColour([380, 780], [1])).toThrow(/2 values but the spectrum has 1/);
    expect(() => spectrumColour([380, 500, 490, 780], [1, 1, 1, 1])).toThrow(/strictly increasing/);
    expect(() => spectrumColour([380, 780], [0, 0])).toThrow(/no chromaticity/);
  });

  it('chroma and hue angle: C* = √(a² + b²), h = atan2(b, a) in 0–360° (CIE 015 §8.2.1)', () => {
    expect(chromaHue(3, 4)).toEqual({ chroma: 5, hueDeg: (Math.atan2(4, 3) * 180) / Math.PI });
    expect(chromaHue(-1, -1).hueDeg).toBeCloseTo(225, 12);
    expect(chromaHue(0, -2).hueDeg).toBeCloseTo(270, 12);
    expect(chromaHue(0, 0)).toEqual({ chroma: 0, hueDeg: 0 });
  });

  it('XYZ → CIELAB agrees with culori (npm) for the same white on random colours', () => {
    const toLab = converter('lab65');
    // culori's D65 white from x 0.3127, y 0.3290 (scale 1)
    const white = { X: (0.3127 / 0.329) * 100, Y: 100, Z: ((1 - 0.3127 - 0.329) / 0.329) * 100 };
    const rnd = mulberry32(42);
    for (let i = 0; i < 500; i++) {
      const X = rnd() * 100;
      const Y = rnd() * 100;
      const Z = rnd() * 110;
      const ours = xyzToLab(X, Y, Z, white);
      const theirs = toLab({ mode: 'xyz65', x: X / 100, y: Y / 100, z: Z / 100 });
      expect(ours.L).toBeCloseTo(theirs.l, 9);
      expect(ours.a).toBeCloseTo(theirs.a, 9);
      expect(ours.b).toBeCloseTo(theirs.b, 9);
    }
  });
});

// G. Sharma, W. Wu, E. N. Dalal, Color Res. Appl. 30(1) (2005) 21–30, Table 1: all 34 pairs
// [L1, a1, b1, L2, a2, b2, ΔE00], published to 4 decimals.
// prettier-ignore
const SHARMA_2005: [number, number, number, number, number, number, number][] = [
  [50.0, 2.6772, -79.7751, 50.0, 0.0, -82.7485, 2.0425],
  [50.0, 3.1571, -77.2803, 50.0, 0.0, -82.7485, 2.8615],
  [50.0, 2.8361, -74.02, 50.0, 0.0, -82.7485, 3.4412],
  [50.0, -1.3802, -84.2814, 50.0, 0.0, -82.7485, 1.0],
  [50.0, -1.1848, -84.8006, 50.0, 0.0, -82.7485, 1.0],
  [50.0, -0.9009, -85.5211, 50.0, 0.0, -82.7485, 1.0],
  [50.0, 0.0, 0.0, 50.0, -1.0, 2.0, 2.3669],
  [50.0, -1.0, 2.0, 50.0, 0.0, 0.0, 2.3669],
  [50.0, 2.49, -0.001, 50.0, -2.49, 0.0009, 7.1792],
  [50.0, 2.49, -0.001, 50.0, -2.49, 0.001, 7.1792],
  [50.0, 2.49, -0.001, 50.0, -2.49, 0.0011, 7.2195],
  [50.0, 2.49, -0.001, 50.0, -2.49, 0.0012, 7.2195],
  [50.0, -0.001, 2.49, 50.0, 0.0009, -2.49, 4.8045],
  [50.0, -0.001, 2.49, 50.0, 0.001, -2.49, 4.8045],
  [50.0, -0.001, 2.49, 50.0, 0.0011, -2.49, 4.7461],
  [50.0, 2.5, 0.0, 50.0, 0.0, -2.5, 4.3065],
  [50.0, 2.5, 0.0, 73.0, 25.0, -18.0, 27.1492],
  [50.0, 2.5, 0.0, 61.0, -5.0, 29.0, 22.8977],
  [50.0, 2.5, 0.0, 56.0, -27.0, -3.0, 31.903],
  [50.0, 2.5, 0.0, 58.0, 24.0, 15.0, 19.4535],
  [50.0, 2.5, 0.0, 50.0, 3.1736, 0.5854, 1.0],
  [50.0, 2.5, 0.0, 50.0, 3.2972, 0.0, 1.0],
  [50.0, 2.5, 0.0, 50.0, 1.8634, 0.5757, 1.0],
  [50.0, 2.5, 0.0, 50.0, 3.2592, 0.335, 1.0],
  [60.2574, -34.0099, 36.2677, 60.4626, -34.1751, 39.4387, 1.2644],
  [63.0109, -31.0961, -5.8663, 62.8187, -29.7946, -4.0864, 1.263],
  [61.2901, 3.7196, -5.3901, 61.4292, 2.248, -4.962, 1.8731],
  [35.0831, -44.1164, 3.7933, 35.0232, -40.0716, 1.5901, 1.8645],
  [22.7233, 20.0904, -46.694, 23.0331, 14.973, -42.5619, 2.0373],
  [36.4612, 47.858, 18.3852, 36.2715, 50.5065, 21.2231, 1.4146],
  [90.8027, -2.0831, 1.441, 91.1528, -1.6435, 0.0447, 1.4441],
  [90.9257, -0.5406, -0.9208, 88.6381, -0.8985, -0.7239, 1.5381],
  [6.7747, -0.2908, -2.4247, 5.8714, -0.0985, -2.2286, 0.6377],
  [2.0776, 0.0795, -1.135, 0.9033, -0.0636, -0.5514, 0.9082],
];

describe('CIEDE2000 — Sharma, Wu & Dalal (2005) Table 1, all 34 pairs', () => {
  it('has 34 pairs', () => expect(SHARMA_2005).toHaveLength(34));
  it.each(SHARMA_2005.map((r, i) => [i + 1, r] as const))('pair %i (both orders) to 4 decimals', (_i, r) => {
    const lab1: Lab = [r[0], r[1], r[2]];
    const lab2: Lab = [r[3], r[4], r[5]];
    expect(Math.abs(deltaE2000(lab1, lab2) - r[6])).toBeLessThan(5e-5);
    expect(Math.abs(deltaE2000(lab2, lab1) - r[6])).toBeLessThan(5e-5);
  });
});

describe('colour differences against culori (npm) on seeded random Lab pairs', () => {
  const de00 = differenceCiede2000();
  const de76 = differenceEuclidean('lab65');
  it('ΔE00 and ΔE76 agree with culori to 1e-9 on 2,000 pairs', () => {
    const rnd = mulberry32(2005);
    for (let i = 0; i < 2000; i++) {
      const lab1: Lab = [rnd() * 100, rnd() * 200 - 100, rnd() * 200 - 100];
      // half the pairs close together (a pair of lenses), half anywhere
      const near = i % 2 === 0;
      const lab2: Lab = near
        ? [lab1[0] + rnd() * 4 - 2, lab1[1] + rnd() * 4 - 2, lab1[2] + rnd() * 4 - 2]
        : [rnd() * 100, rnd() * 200 - 100, rnd() * 200 - 100];
      const c1 = { mode: 'lab65' as const, l: lab1[0], a: lab1[1], b: lab1[2] };
      const c2 = { mode: 'lab65' as const, l: lab2[0], a: lab2[1], b: lab2[2] };
      expect(deltaE2000(lab1, lab2)).toBeCloseTo(de00(c1, c2), 9);
      expect(deltaE76(lab1, lab2)).toBeCloseTo(de76(c1, c2), 9);
    }
  });
  it('ΔE76 of a 3-4-0 offset is 5 (hand-computed)', () => {
    expect(deltaE76([50, 0, 0], [50, 3, 4])).toBe(5);
  });
});
