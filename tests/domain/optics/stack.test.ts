import { describe, expect, it } from 'vitest';
import { cauchyFromAbbe, DEFAULT_MATERIALS, findMaterial, indexAt } from '../../../src/lib/domain/optics/materials';
import { computeStack, resolveStack, stackSpectrum, type LayerSpec } from '../../../src/lib/domain/optics/stack';

const layer = (n: number, thicknessNm: number, k = 0): LayerSpec => ({ index: { n, k }, thicknessNm });
const one = (layers: LayerSpec[], substrateN: number, opts: Parameters<typeof computeStack>[2] = {}, wl = 550, ks = 0) =>
  computeStack({ layers, substrate: { n: substrateN, k: ks } }, [wl], opts);

describe('stack reflectance — closed forms (Macleod, Thin-Film Optical Filters, ch. 2–4)', () => {
  it('uncoated surface at normal incidence: R = ((n − 1)/(n + 1))², T = 1 − R (Fresnel)', () => {
    for (const n of [1.498, 1.5, 1.6, 1.74]) {
      const r = one([], n);
      const expected = ((n - 1) / (n + 1)) ** 2;
      expect(r.reflectance[0]).toBeCloseTo(expected, 14);
      expect(r.transmittance[0]).toBeCloseTo(1 - expected, 14);
    }
    // n = 1.5: R = 0.04 exactly (hand-computed: (0.5/2.5)²)
    expect(one([], 1.5).reflectance[0]).toBeCloseTo(0.04, 14);
  });

  it('uncoated surface at 45°: the Fresnel equations for s and p (Hecht, Optics, §4.6)', () => {
    const n = 1.5;
    const t0 = Math.PI / 4;
    const t1 = Math.asin(Math.sin(t0) / n);
    const rs = (Math.cos(t0) - n * Math.cos(t1)) / (Math.cos(t0) + n * Math.cos(t1));
    const rp = (n * Math.cos(t0) - Math.cos(t1)) / (n * Math.cos(t0) + Math.cos(t1));
    expect(one([], n, { angleDeg: 45, polarization: 's' }).reflectance[0]).toBeCloseTo(rs * rs, 13);
    expect(one([], n, { angleDeg: 45, polarization: 'p' }).reflectance[0]).toBeCloseTo(rp * rp, 13);
    expect(one([], n, { angleDeg: 45 }).reflectance[0]).toBeCloseTo((rs * rs + rp * rp) / 2, 13);
  });

  it('Brewster angle θB = atan(n/n0): p-reflectance of an uncoated surface is zero', () => {
    for (const n of [1.5, 1.67]) {
      const theta = (Math.atan(n) * 180) / Math.PI;
      expect(one([], n, { angleDeg: theta, polarization: 'p' }).reflectance[0]).toBeLessThan(1e-28);
      expect(one([], n, { angleDeg: theta, polarization: 's' }).reflectance[0]).toBeGreaterThan(0.05);
    }
  });

  it('quarter-wave single layer at its design wavelength: R = ((n0·ns − n1²)/(n0·ns + n1²))²', () => {
    const cases = [
      { n1: 1.38, ns: 1.52 }, // MgF₂-like on crown glass (Macleod ch. 3)
      { n1: 1.46, ns: 1.6 },
      { n1: 2.0, ns: 1.5 },
    ];
    for (const { n1, ns } of cases) {
      const r = one([layer(n1, 550 / (4 * n1))], ns, {}, 550);
      expect(r.reflectance[0]).toBeCloseTo(((ns - n1 * n1) / (ns + n1 * n1)) ** 2, 13);
    }
    // hand-computed: ((1.52 − 1.9044)/(1.52 + 1.9044))² = 0.012601
    expect(one([layer(1.38, 550 / (4 * 1.38))], 1.52).reflectance[0]).toBeCloseTo(0.012601, 6);
  });

  it('a half-wave layer is absent at its design wavelength (Macleod: absentee layer)', () => {
    const r = one([layer(2.1, 550 / (2 * 2.1))], 1.6);
    expect(r.reflectance[0]).toBeCloseTo(((1.6 - 1) / (1.6 + 1)) ** 2, 13);
  });

  it('quarter-quarter zero: n2/n1 = √(ns/n0) gives R = 0 at λ0 (Macleod ch. 4, double-layer AR)', () => {
    const ns = 1.52;
    const n1 = 1.38; // outer layer, next to the air
    const n2 = n1 * Math.sqrt(ns); // inner layer, next to the substrate
    // deposition order: inner (high) first on the substrate, then the outer low-index layer
    const r = one([layer(n2, 550 / (4 * n2)), layer(n1, 550 / (4 * n1))], ns);
    expect(r.reflectance[0]).toBeLessThan(1e-28);
    // and the general quarter-quarter formula R = ((n0·n2² − ns·n1²)/(n0·n2² + ns·n1²))² off the zero condition
    const m2 = 2.0;
    const r2 = one([layer(m2, 550 / (4 * m2)), layer(n1, 550 / (4 * n1))], ns);
    expect(r2.reflectance[0]).toBeCloseTo(((m2 * m2 - ns * n1 * n1) / (m2 * m2 + ns * n1 * n1)) ** 2, 13);
  });

  it('published check: tmm (S. J. Byrnes, PyPI `tmm`) tests.py basic_test, absorbing layers and substrate', () => {
    // tmm: n_list [1, 2+4j, 3+0.3j, 1+0.1j], d_list [inf, 2, 3, inf] nm, θ0 = 0.1 rad, λ = 100 nm.
    // tmm writes n + ik for an absorbing medium; Macleod's n − ik describes the same medium.
    // Deposition order (first on the substrate): the 3 nm layer, then the 2 nm layer.
    const spec = {
      layers: [
        { index: { n: 3, k: 0.3 }, thicknessNm: 3 },
        { index: { n: 2, k: 4 }, thicknessNm: 2 },
      ],
      substrate: { n: 1, k: 0.1 },
    };
    const angleDeg = (0.1 * 180) / Math.PI;
    const s = computeStack(spec, [100], { angleDeg, polarization: 's' });
    const p = computeStack(spec, [100], { angleDeg, polarization: 'p' });
    expect(s.reflectance[0]).toBeCloseTo(0.37273208839139516, 12);
    expect(s.transmittance[0]).toBeCloseTo(0.22604491247079261, 12);
    expect(p.reflectance[0]).toBeCloseTo(0.37016110373044969, 12);
    expect(p.transmittance[0]).toBeCloseTo(0.22824374314132009, 12);
  });

  it('energy conservation: R + T = 1 for lossless stacks at any angle and polarisation (property)', () => {
    let seed = 12345;
    const rnd = () => (seed = (seed * 1103515245 + 12345) % 2147483648) / 2147483648;
    for (let trial = 0; trial < 200; trial++) {
      const layers = Array.from({ length: 1 + Math.floor(rnd() * 9) }, () => layer(1.35 + rnd() * 1.1, rnd() * 300));
      const ns = 1.45 + rnd() * 0.35;
      const wls = [380 + rnd() * 100, 500 + rnd() * 100, 650 + rnd() * 130];
      const angleDeg = rnd() * 85;
      for (const polarization of ['s', 'p', 'average'] as const) {
        const r = computeStack({ layers, substrate: { n: ns } }, wls, { angleDeg, polarization });
        r.reflectance.forEach((R, i) => expect(R + r.transmittance[i]!).toBeCloseTo(1, 12));
      }
    }
  });

  it('an absorbing layer takes energy: R + T < 1 (ITO-like k = 0.005)', () => {
    const r = one([layer(1.95, 100, 0.005)], 1.5);
    expect(r.reflectance[0]! + r.transmittance[0]!).toBeLessThan(1);
    expect(r.reflectance[0]! + r.transmittance[0]!).toBeGreaterThan(0.98);
  });

  it('an opaque absorbing layer acts as the substrate: R = |(1 − N)/(1 + N)|² = 0.68 for N = 2 − 4i, T = 0 (Macleod, thick absorbing film)', () => {
    // hand-computed: (1 − N)/(1 + N) = (−1 + 4i)/(3 − 4i), |…|² = 17/25
    const r = computeStack({ layers: [layer(2, 10_000, 4)], substrate: { n: 1.5 } }, [100]);
    expect(r.reflectance[0]).toBeCloseTo(0.68, 12);
    expect(r.transmittance[0]).toBe(0);
  });

  it('s = p at normal incidence', () => {
    const layers = [layer(2.0, 15), layer(1.46, 30), layer(2.0, 120), layer(1.46, 90)];
    const wls = [400, 450, 500, 550, 600, 650, 700];
    const s = computeStack({ layers, substrate: { n: 1.6 } }, wls, { polarization: 's' });
    const p = computeStack({ layers, substrate: { n: 1.6 } }, wls, { polarization: 'p' });
    s.reflectance.forEach((R, i) => expect(R).toBeCloseTo(p.reflectance[i]!, 14));
  });

  it('lens with both faces uncoated: R = 2R₁/(1 + R₁), T = (1 − R₁)/(1 + R₁) (incoherent plate, Stokes)', () => {
    const r = one([], 1.5, { bothFaces: true });
    // hand-computed with R₁ = 0.04: 0.08/1.04 = 0.0769231, 0.96/1.04 = 0.9230769
    expect(r.reflectance[0]).toBeCloseTo(0.08 / 1.04, 13);
    expect(r.transmittance[0]).toBeCloseTo(0.96 / 1.04, 13);
  });

  it('both faces coated with a lossless stack: R + T = 1 and R ≈ 2 × one face for a good AR', () => {
    const layers = [layer(2.0, 14), layer(1.46, 33), layer(2.0, 117), layer(1.46, 88)];
    const wls = [450, 500, 550, 600];
    const single = computeStack({ layers, substrate: { n: 1.6 } }, wls);
    const both = computeStack({ layers, substrate: { n: 1.6 } }, wls, { bothFaces: true, angleDeg: 10 });
    both.reflectance.forEach((R, i) => expect(R + both.transmittance[i]!).toBeCloseTo(1, 12));
    const bothNormal = computeStack({ layers, substrate: { n: 1.6 } }, wls, { bothFaces: true });
    bothNormal.reflectance.forEach((R, i) => {
      const R1 = single.reflectance[i]!;
      // incoherent sum with equal faces: R = R1 + (1−R1)²R1/(1−R1²) = 2R1/(1+R1)
      expect(R).toBeCloseTo((2 * R1) / (1 + R1), 12);
    });
  });

  it('a substrate k with a thickness attenuates the lens’s transmittance by τ = exp(−4πkt/λ)', () => {
    const spec = { layers: [], substrate: { n: 1.5, k: 1e-7 } };
    const r = computeStack(spec, [550], { bothFaces: true, substrateThicknessMm: 2 });
    const tau = Math.exp((-4 * Math.PI * 1e-7 * 2e6) / 550);
    const R1 = 0.04;
    expect(r.transmittance[0]).toBeCloseTo(((1 - R1) ** 2 * tau) / (1 - R1 * R1 * tau * tau), 10);
  });

  it('refuses a non-increasing wavelength grid and an unknown material', () => {
    expect(() => computeStack({ layers: [], substrate: { n: 1.5 } }, [500, 500])).toThrow(RangeError);
    expect(() =>
      computeStack({ layers: [{ index: { material: 'unobtainium' }, thicknessNm: 10 }], substrate: { n: 1.5 } }, [500]),
    ).toThrow(/unknown material/);
    expect(() => stackSpectrum(resolveStack({ layers: [], substrate: { n: 1.5 } }, [500]), { angleDeg: 90 })).toThrow(RangeError);
  });
});

describe('materials table', () => {
  it('fused silica, Malitson (1965) Sellmeier: n = 1.45846 at the d line 587.56 nm (Malitson, Table 1)', () => {
    expect(indexAt(findMaterial('sio2').model, 587.56).n).toBeCloseTo(1.45846, 4);
    // n_F 1.46313 and n_C 1.45637 (Abbe number V_d ≈ 67.8) for fused silica: from memory
    expect(indexAt(findMaterial('sio2').model, 486.13).n).toBeCloseTo(1.46313, 4);
    expect(indexAt(findMaterial('sio2').model, 656.27).n).toBeCloseTo(1.45637, 4);
  });

  it('cauchyFromAbbe reproduces n_d and the Abbe number it was given', () => {
    const m = cauchyFromAbbe(1.498, 58);
    const nd = indexAt(m, 587.56).n;
    const nF = indexAt(m, 486.13).n;
    const nC = indexAt(m, 656.27).n;
    expect(nd).toBeCloseTo(1.498, 10);
    expect((nd - 1) / (nF - nC)).toBeCloseTo(58, 3);
  });

  it('every recalled value is marked “from memory” and every material has a source', () => {
    for (const m of DEFAULT_MATERIALS) {
      expect(m.source.length).toBeGreaterThan(10);
      if (m.provenance === 'from memory') expect(m.source).toMatch(/from memory/);
    }
  });
});
