import { describe, expect, it } from 'vitest';
import { fitLayerErrors, symmetricEigen } from '../../../src/lib/domain/optics/layer-fit';
import { resolveStack, stackSpectrum, type StackSpec } from '../../../src/lib/domain/optics/stack';

const wl = Array.from({ length: 81 }, (_, i) => 380 + i * 5);

// A common four-layer AR shape (high/low/high/low on a 1.60 lens), dispersive materials of the table.
const design: StackSpec = {
  layers: [
    { index: { material: 'zro2' }, thicknessNm: 15 },
    { index: { material: 'sio2' }, thicknessNm: 32 },
    { index: { material: 'zro2' }, thicknessNm: 115 },
    { index: { material: 'sio2' }, thicknessNm: 88 },
  ],
  substrate: { material: 'hi-160' },
};

/** The "measured" spectrum: the design with given thickness factors (synthetic data), in %. */
function synthesise(spec: StackSpec, scales: number[], noisePct = 0, seed = 1) {
  const rs = resolveStack(spec, wl);
  let s = seed;
  const rnd = () => ((s = (s * 16807) % 2147483647) / 2147483647) * 2 - 1;
  return stackSpectrum(rs, {}, scales).reflectance.map((r) => r * 100 + noisePct * rnd());
}

describe('fitLayerErrors — per-layer thickness factors by Levenberg–Marquardt', () => {
  it('recovers a layer deposited 6 % thick to within 1 % and names it, with the tooling-factor correction', () => {
    const measured = synthesise(design, [1, 1, 1.06, 1]);
    const fit = fitLayerErrors({
      design: resolveStack(design, wl),
      measuredReflectancePct: measured,
      toolingFactorsPct: [112, 108, 112, 108],
    });
    expect(fit.identifiable).toBe(true);
    expect(fit.converged).toBe(true);
    expect(Math.abs(fit.scales[2]! - 1.06)).toBeLessThan(0.01);
    for (const j of [0, 1, 3]) expect(Math.abs(fit.scales[j]! - 1)).toBeLessThan(0.01);
    expect(fit.drifted.map((d) => d.layer)).toEqual([2]);
    expect(fit.drifted[0]!.errorPct).toBeCloseTo(6, 0);
    // TF_new = TF_old × actual/target (common practice for crystal monitoring): 112 × 1.06 = 118.72
    expect(fit.drifted[0]!.suggestedToolingFactorPct).toBeCloseTo(118.72, 0);
    expect(fit.rmsResidualPct).toBeLessThan(fit.initialRmsPct / 100);
    expect(fit.conditionNumber).toBeLessThan(1e4);
  });

  it('still recovers it with measurement noise of ±0.05 %R', () => {
    const measured = synthesise(design, [1, 1, 1.06, 1], 0.05, 99);
    const fit = fitLayerErrors({ design: resolveStack(design, wl), measuredReflectancePct: measured });
    expect(fit.identifiable).toBe(true);
    expect(Math.abs(fit.scales[2]! - 1.06)).toBeLessThan(0.01);
    expect(fit.drifted[0]?.layer).toBe(2);
    expect(fit.standardErrors[2]).toBeGreaterThan(0);
    expect(fit.standardErrors[2]).toBeLessThan(0.01);
  });

  it('a thin outer layer 5 % thin and nothing else: no false drift on the other layers', () => {
    const measured = synthesise(design, [1, 1, 1, 0.95]);
    const fit = fitLayerErrors({ design: resolveStack(design, wl), measuredReflectancePct: measured });
    expect(fit.drifted.map((d) => d.layer)).toEqual([3]);
    expect(fit.scales[3]).toBeCloseTo(0.95, 2);
  });

  it('says plainly when the fit is not identifiable: one SiO₂ layer split in two (only their sum matters)', () => {
    const split: StackSpec = {
      layers: [
        { index: { material: 'zro2' }, thicknessNm: 15 },
        { index: { material: 'sio2' }, thicknessNm: 32 },
        { index: { material: 'zro2' }, thicknessNm: 115 },
        { index: { material: 'sio2' }, thicknessNm: 44 },
        { index: { material: 'sio2' }, thicknessNm: 44 },
      ],
      substrate: { material: 'hi-160' },
    };
    const measured = synthesise(split, [1, 1, 1, 1.04, 1.04]);
    const fit = fitLayerErrors({ design: resolveStack(split, wl), measuredReflectancePct: measured });
    expect(fit.identifiable).toBe(false);
    expect(fit.drifted).toEqual([]);
    expect(fit.notIdentifiable).toMatch(/not identifiable/);
    expect(fit.notIdentifiable).toMatch(/layer 4/);
    expect(fit.notIdentifiable).toMatch(/layer 5/);
    // the sum of the two halves is still what the data say: 1.04 on average
    expect((fit.scales[3]! + fit.scales[4]!) / 2).toBeCloseTo(1.04, 2);
  });

  it('seven layers with a 5 nm ITO between two ZrO₂ layers: the spectrum cannot separate them (named); fitting the determinable layers finds the drift', () => {
    const seven: StackSpec = {
      layers: [
        { index: { material: 'sio2' }, thicknessNm: 20 },
        { index: { material: 'zro2' }, thicknessNm: 16 },
        { index: { material: 'sio2' }, thicknessNm: 30 },
        { index: { material: 'zro2' }, thicknessNm: 60 },
        { index: { material: 'ito' }, thicknessNm: 5 },
        { index: { material: 'zro2' }, thicknessNm: 52 },
        { index: { material: 'sio2' }, thicknessNm: 90 },
      ],
      substrate: { material: 'hi-160' },
    };
    const measured = synthesise(seven, [1, 1, 1, 1.06, 1, 1, 1]);
    const all = fitLayerErrors({ design: resolveStack(seven, wl), measuredReflectancePct: measured });
    expect(all.identifiable).toBe(false);
    expect(all.notIdentifiable).toMatch(/layer 5 only to ±/);
    expect(all.drifted).toEqual([]);
    // ZrO₂ 60 nm / ITO 5 nm (n ≈ 1.95) / ZrO₂ 52 nm act almost as one high-index layer, and the
    // 20 nm SiO₂ adhesion layer on a 1.60 lens barely shows: fit layers 2, 3, 4 and 7 only.
    const withoutIto = fitLayerErrors({
      design: resolveStack(seven, wl),
      measuredReflectancePct: measured,
      fitLayers: [1, 2, 3, 6],
    });
    expect(withoutIto.identifiable).toBe(true);
    expect(withoutIto.scales[4]).toBe(1);
    expect(Math.abs(withoutIto.scales[3]! - 1.06)).toBeLessThan(0.01);
    expect(withoutIto.drifted[0]?.layer).toBe(3);
  });

  it('refuses mismatched lengths and unknown layers', () => {
    const rs = resolveStack(design, wl);
    expect(() => fitLayerErrors({ design: rs, measuredReflectancePct: [1, 2] })).toThrow(RangeError);
    expect(() =>
      fitLayerErrors({ design: rs, measuredReflectancePct: synthesise(design, [1, 1, 1, 1]), fitLayers: [7] }),
    ).toThrow(/no layer 8/);
  });
});

describe('symmetricEigen (Jacobi) — a second method for the identifiability check', () => {
  it('[[2, 1], [1, 2]] has eigenvalues 1 and 3 (hand-computed)', () => {
    const { values } = symmetricEigen([2, 1, 1, 2], 2);
    expect([...values].sort()).toEqual([expect.closeTo(1, 12), expect.closeTo(3, 12)]);
  });
  it('A·v = λ·v for a random symmetric 6 × 6 matrix', () => {
    const n = 6;
    let s = 3;
    const rnd = () => ((s = (s * 16807) % 2147483647) / 2147483647) * 2 - 1;
    const A = new Array<number>(n * n).fill(0);
    for (let i = 0; i < n; i++)
      for (let j = i; j < n; j++) {
        const v = rnd();
        A[i * n + j] = v;
        A[j * n + i] = v;
      }
    const { values, vectors } = symmetricEigen(A, n);
    for (let e = 0; e < n; e++) {
      for (let i = 0; i < n; i++) {
        let av = 0;
        for (let k = 0; k < n; k++) av += A[i * n + k]! * vectors[k * n + e]!;
        expect(av).toBeCloseTo(values[e]! * vectors[i * n + e]!, 10);
      }
    }
  });
});
