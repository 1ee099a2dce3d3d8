/**
 * `npm run bench:optics`: the thin-film optics at the sizes a chamber run uses.
 *
 *  1. one 301-point spectrum (400–700 nm at 1 nm, unpolarised, one face) of a 7-layer stack
 *     with dispersive materials (ZrO₂ / SiO₂ / ITO), the characteristic-matrix method;
 *  2. a full layer-error fit (all 7 layers free, Levenberg–Marquardt) to a synthetic measured
 *     spectrum of the same stack with layer 4 deposited 6 % thick — which the fit rightly calls
 *     not identifiable (the 5 nm ITO between two ZrO₂ layers and the thin adhesion layer do not
 *     show separately) — and the fit of the four determinable layers (2, 3, 4, 7);
 *
 * each printed beside a plain loop over the same number of 2×2 complex matrix products
 * (four complex multiply-adds per product, on typed arrays, no allocation) measured in the same
 * run, as a ratio. Figures only; nothing is asserted.
 */
import { performance } from 'node:perf_hooks';
import { fitLayerErrors } from '../../src/lib/domain/optics/layer-fit.ts';
import { matrixProductsPerSpectrum, resolveStack, stackSpectrum, type StackSpec } from '../../src/lib/domain/optics/stack.ts';

const wl = Array.from({ length: 301 }, (_, i) => 400 + i);
const spec: StackSpec = {
  layers: [
    { index: { material: 'sio2' }, thicknessNm: 20 }, // adhesion layer
    { index: { material: 'zro2' }, thicknessNm: 16 },
    { index: { material: 'sio2' }, thicknessNm: 30 },
    { index: { material: 'zro2' }, thicknessNm: 60 },
    { index: { material: 'ito' }, thicknessNm: 5 }, // anti-static
    { index: { material: 'zro2' }, thicknessNm: 52 },
    { index: { material: 'sio2' }, thicknessNm: 90 },
  ],
  substrate: { material: 'hi-160' },
};
const design = resolveStack(spec, wl);
const products = matrixProductsPerSpectrum(design);

function time<T>(runs: number, f: () => T): { ms: number; out: T } {
  let out = f(); // warm-up
  const samples: number[] = [];
  for (let r = 0; r < runs; r++) {
    const t0 = performance.now();
    out = f();
    samples.push(performance.now() - t0);
  }
  samples.sort((a, b) => a - b);
  return { ms: samples[Math.floor(samples.length / 2)]!, out };
}

/** `count` products of 2×2 complex matrices accumulated into one (re, im interleaved). */
function matrixLoop(count: number): number {
  const m = new Float64Array([0.9, 0.1, 0.0, 0.3, 0.0, 0.2, 0.95, -0.05]);
  const acc = new Float64Array([1, 0, 0, 0, 0, 0, 1, 0]);
  const t = new Float64Array(8);
  for (let n = 0; n < count; n++) {
    for (let r = 0; r < 2; r++) {
      for (let c = 0; c < 2; c++) {
        let re = 0;
        let im = 0;
        for (let k = 0; k < 2; k++) {
          const ar = acc[(r * 2 + k) * 2]!;
          const ai = acc[(r * 2 + k) * 2 + 1]!;
          const br = m[(k * 2 + c) * 2]!;
          const bi = m[(k * 2 + c) * 2 + 1]!;
          re += ar * br - ai * bi;
          im += ar * bi + ai * br;
        }
        t[(r * 2 + c) * 2] = re;
        t[(r * 2 + c) * 2 + 1] = im;
      }
    }
    // renormalise so the numbers stay finite over long loops
    const s = 1 / Math.max(1e-300, Math.abs(t[0]!) + Math.abs(t[6]!));
    for (let i = 0; i < 8; i++) acc[i] = t[i]! * s;
  }
  return acc[0]!;
}

const spectrum = time(51, () => stackSpectrum(design));
const spectrumLoop = time(51, () => matrixLoop(products));

const measured = stackSpectrum(design, {}, [1, 1, 1, 1.06, 1, 1, 1]).reflectance.map((r) => r * 100);
const fit = time(5, () => fitLayerErrors({ design, measuredReflectancePct: measured }));
const fitProducts = fit.out.evaluations * products;
const fitLoop = time(5, () => matrixLoop(fitProducts));
const fit4 = time(5, () => fitLayerErrors({ design, measuredReflectancePct: measured, fitLayers: [1, 2, 3, 6] }));
const fit4Products = fit4.out.evaluations * products;
const fit4Loop = time(5, () => matrixLoop(fit4Products));

const ms = (x: number) => `${x.toFixed(3)} ms`;
console.log(
  `Optics benchmark — 7-layer stack, 301 wavelengths (400–700 nm), unpolarised (median of runs, Node ${process.version})`,
);
console.log(`  one spectrum (characteristic matrix, s + p):           ${ms(spectrum.ms)}`);
console.log(`  plain loop, ${products.toLocaleString('en')} 2×2 complex matrix products:     ${ms(spectrumLoop.ms)}`);
console.log(`  ratio spectrum / plain loop:                            ${(spectrum.ms / spectrumLoop.ms).toFixed(2)} ×`);
const verdict = (f: typeof fit.out) =>
  `layer 4 factor ${f.scales[3]!.toFixed(4)} (true 1.06), identifiable: ${f.identifiable}, κ = ${f.conditionNumber.toExponential(2)}`;
console.log(
  `  layer-error fit, all 7 layers (${fit.out.iterations} iterations, ${fit.out.evaluations} spectra): ${ms(fit.ms)}  → ${verdict(fit.out)}`,
);
console.log(`  plain loop, ${fitProducts.toLocaleString('en')} 2×2 complex matrix products:   ${ms(fitLoop.ms)}`);
console.log(`  ratio fit / plain loop:                                 ${(fit.ms / fitLoop.ms).toFixed(2)} ×`);
console.log(
  `  layer-error fit, layers 2, 3, 4, 7 (${fit4.out.iterations} iterations, ${fit4.out.evaluations} spectra): ${ms(fit4.ms)}  → ${verdict(fit4.out)}`,
);
console.log(`  plain loop, ${fit4Products.toLocaleString('en')} 2×2 complex matrix products:   ${ms(fit4Loop.ms)}`);
console.log(`  ratio fit / plain loop:                                 ${(fit4.ms / fit4Loop.ms).toFixed(2)} ×`);
