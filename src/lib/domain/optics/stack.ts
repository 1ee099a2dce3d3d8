/**
 * Reflectance and transmittance of a thin-film stack by the characteristic-matrix method
 * (H. A. Macleod, *Thin-Film Optical Filters*, ch. 2 “Basic theory”).
 *
 * Each layer r of complex index N_r = n_r − i·k_r and physical thickness d_r has the phase
 * thickness δ_r = 2π·N_r·d_r·cos θ_r / λ and the tilted optical admittance
 *   η_r = N_r·cos θ_r      (s polarisation),    η_r = N_r / cos θ_r      (p polarisation),
 * in units of the free-space admittance, with N_r·cos θ_r = √(N_r² − n₀²·sin²θ₀) (Snell's law;
 * the root with negative imaginary part, so the wave decays in an absorbing layer). Its
 * characteristic matrix is
 *   M_r = [[cos δ_r, i·sin δ_r / η_r], [i·η_r·sin δ_r, cos δ_r]],
 * and the assembly's [B, C]ᵀ = M₁·M₂·…·M_q·[1, η_s]ᵀ (layer 1 next to the incident medium,
 * η_s the substrate's admittance). Then
 *   r = (η₀B − C)/(η₀B + C),   R = |r|²,   T = 4·η₀·Re(η_s) / |η₀B + C|²
 * for a non-absorbing incident medium of index n₀ (Macleod eqs. 2.111–2.113 in the 4th ed.).
 * Unpolarised (“average”) light: R = (R_s + R_p)/2, T = (T_s + T_p)/2.
 *
 * Layers are given in deposition order (the first layer lies on the substrate), as a coater's
 * recipe lists them; wavelengths in nm, thicknesses in nm (physical, not optical), angles in
 * degrees in the incident medium. Results are fractions 0–1.
 *
 * A lens coated on both faces: the two coated surfaces are combined incoherently (the lens is
 * millimetres thick, far beyond the coherence length of the light a spectrophotometer uses):
 *   R = R₁ + T₁²·R₂·τ² / (1 − R₁′·R₂·τ²),   T = T₁·T₂·τ / (1 − R₁′·R₂·τ²),
 * with R₁, T₁ the front surface seen from the air, R₁′ the front surface seen from inside the
 * lens, R₂, T₂ the back surface seen from inside, and τ = exp(−4π·k_s·t / (λ·cos θ_s)) the
 * internal transmittance of a lens of thickness t (τ = 1 unless the substrate's k and thickness
 * are given). Each polarisation is summed on its own before averaging.
 */
import {
  findMaterial,
  indexAt,
  type CauchyModel,
  type OpticalMaterial,
  type SellmeierModel,
  DEFAULT_MATERIALS,
} from './materials.ts';

/** A refractive index: constant n, k, or a material of the table by id, or a dispersion model. */
export type IndexSource = { n: number; k?: number | undefined } | { material: string } | { model: SellmeierModel | CauchyModel };

/** A layer: its index and physical thickness (nm). */
export interface LayerSpec {
  index: IndexSource;
  thicknessNm: number;
}

/** A stack as specified: layers in deposition order (first on the substrate). */
export interface StackSpec {
  layers: LayerSpec[];
  substrate: IndexSource;
  /** Incident medium index (real, default 1 = air). */
  incidentN?: number | undefined;
  /** Layers of the back face in deposition order (default: the same as the front). */
  backLayers?: LayerSpec[] | undefined;
}

/** A layer with n and k resolved on the wavelength grid. */
export interface ResolvedLayer {
  thicknessNm: number;
  n: Float64Array;
  k: Float64Array;
}

/** A stack resolved on a wavelength grid (ready for repeated evaluation). */
export interface ResolvedStack {
  wavelengthsNm: number[];
  layers: ResolvedLayer[];
  backLayers: ResolvedLayer[];
  substrateN: Float64Array;
  substrateK: Float64Array;
  incidentN: number;
  /** Notes about the inputs (a material used outside its stated range …). */
  warnings: string[];
}

/** Evaluation options. */
export interface SpectrumOptions {
  /** Angle of incidence in the incident medium, degrees, 0 ≤ θ < 90 (default 0). */
  angleDeg?: number | undefined;
  /** 's', 'p' or 'average' (unpolarised; default). */
  polarization?: 's' | 'p' | 'average' | undefined;
  /** Both lens faces coated (incoherent sum of the two surfaces); default one face. */
  bothFaces?: boolean | undefined;
  /** Lens centre thickness, mm (only used with bothFaces and a substrate k > 0). */
  substrateThicknessMm?: number | undefined;
}

/** Reflectance and transmittance per wavelength, fractions 0–1. */
export interface StackSpectrum {
  reflectance: number[];
  transmittance: number[];
}

function resolveIndex(
  src: IndexSource,
  wavelengthsNm: number[],
  table: readonly OpticalMaterial[],
  label: string,
  warnings: string[],
): { n: Float64Array; k: Float64Array } {
  const n = new Float64Array(wavelengthsNm.length);
  const k = new Float64Array(wavelengthsNm.length);
  if ('n' in src) {
    n.fill(src.n);
    k.fill(src.k ?? 0);
    return { n, k };
  }
  let model: SellmeierModel | CauchyModel;
  if ('material' in src) {
    const m = findMaterial(src.material, table);
    model = m.model;
    const lo = wavelengthsNm[0]!;
    const hi = wavelengthsNm[wavelengthsNm.length - 1]!;
    if (lo < m.validNm[0] || hi > m.validNm[1]) {
      warnings.push(`${label}: ${m.name} is modelled for ${m.validNm[0]}–${m.validNm[1]} nm; values outside are extrapolated`);
    }
  } else model = src.model;
  for (let i = 0; i < wavelengthsNm.length; i++) {
    const v = indexAt(model, wavelengthsNm[i]!);
    n[i] = v.n;
    k[i] = v.k;
  }
  return { n, k };
}

/**
 * Resolve every index of a stack on a wavelength grid (nm, strictly increasing).
 * @throws RangeError for an unknown material, a non-increasing grid or a bad thickness.
 */
export function resolveStack(
  spec: StackSpec,
  wavelengthsNm: number[],
  table: readonly OpticalMaterial[] = DEFAULT_MATERIALS,
): ResolvedStack {
  if (wavelengthsNm.length === 0) throw new RangeError('at least one wavelength is needed');
  for (let i = 0; i < wavelengthsNm.length; i++) {
    const w = wavelengthsNm[i]!;
    if (!(w > 0) || !Number.isFinite(w)) throw new RangeError(`wavelength ${i + 1} must be a positive number of nm`);
    if (i > 0 && !(w > wavelengthsNm[i - 1]!)) throw new RangeError('wavelengths must be strictly increasing');
  }
  const incidentN = spec.incidentN ?? 1;
  if (!(incidentN >= 1) || !Number.isFinite(incidentN)) throw new RangeError('incidentN must be a real index ≥ 1');
  const warnings: string[] = [];
  const layer = (l: LayerSpec, label: string): ResolvedLayer => {
    if (!(l.thicknessNm >= 0) || !Number.isFinite(l.thicknessNm)) throw new RangeError(`${label}: thickness must be ≥ 0 nm`);
    return { thicknessNm: l.thicknessNm, ...resolveIndex(l.index, wavelengthsNm, table, label, warnings) };
  };
  const layers = spec.layers.map((l, i) => layer(l, `layer ${i + 1}`));
  const backLayers = spec.backLayers ? spec.backLayers.map((l, i) => layer(l, `back layer ${i + 1}`)) : layers;
  const sub = resolveIndex(spec.substrate, wavelengthsNm, table, 'substrate', warnings);
  return { wavelengthsNm: [...wavelengthsNm], layers, backLayers, substrateN: sub.n, substrateK: sub.k, incidentN, warnings };
}

/** Scratch result of one surface at one wavelength and polarisation. */
interface SurfaceRT {
  R: number;
  T: number;
}

/**
 * One coated surface at one wavelength and one polarisation, by the characteristic matrix.
 * `layers` in deposition order: index 0 lies on the exit medium (the substrate for a front
 * face). When `reverse` is set the same layers are traversed from the exit side (the light
 * comes from the substrate side, through the first-deposited layer first, and leaves into the
 * exit medium: a front face seen from inside the lens, or a back face).
 *
 * @param n0 real index of the incident medium
 * @param s2 (n₀ sin θ₀)², the Snell invariant squared
 * @param nE, kE index of the exit medium (N = n − ik)
 * @param scales optional per-layer thickness factors (for the layer-error fit)
 */
function surface(
  n0: number,
  s2: number,
  layers: ResolvedLayer[],
  i: number,
  nE: number,
  kE: number,
  wl: number,
  p: boolean,
  reverse: boolean,
  scales: ArrayLike<number> | undefined,
  out: SurfaceRT,
): void {
  // Admittance of the incident medium (real: n0 ≥ 1 and s2 < n0²).
  const c0 = Math.sqrt(n0 * n0 - s2);
  const eta0 = p ? (n0 * n0) / c0 : c0;
  // Exit medium: q = √(N² − s²) with Im q ≤ 0.
  csqrtDecaying(nE * nE - kE * kE - s2, -2 * nE * kE);
  let qr = sqRe;
  let qi = sqIm;
  let etaR: number;
  let etaI: number;
  if (p) {
    // η = N²/q
    const Nr = nE * nE - kE * kE;
    const Ni = -2 * nE * kE;
    const d = qr * qr + qi * qi;
    etaR = (Nr * qr + Ni * qi) / d;
    etaI = (Ni * qr - Nr * qi) / d;
  } else {
    etaR = qr;
    etaI = qi;
  }
  const etaSubR = etaR;
  // [B, C] = [1, η_s]; apply the layers from the exit side outwards.
  let Br = 1;
  let Bi = 0;
  let Cr = etaR;
  let Ci = etaI;
  const L = layers.length;
  const k2pi = (2 * Math.PI) / wl;
  let logScale = 0;
  for (let step = 0; step < L; step++) {
    // Deposition order runs from the exit medium outwards; a reversed traversal starts at the
    // incident medium's side, i.e. the exit side is the last-deposited layer.
    const j = reverse ? L - 1 - step : step;
    const layer = layers[j]!;
    const n = layer.n[i]!;
    const k = layer.k[i]!;
    const d = layer.thicknessNm * (scales ? scales[j]! : 1);
    csqrtDecaying(n * n - k * k - s2, -2 * n * k);
    qr = sqRe;
    qi = sqIm;
    if (p) {
      const Nr = n * n - k * k;
      const Ni = -2 * n * k;
      const dd = qr * qr + qi * qi;
      etaR = (Nr * qr + Ni * qi) / dd;
      etaI = (Ni * qr - Nr * qi) / dd;
    } else {
      etaR = qr;
      etaI = qi;
    }
    // δ = 2π q d / λ = a + ib
    const a = k2pi * qr * d;
    const b = k2pi * qi * d;
    // cosh b and sinh b divided by e^|b| (the factor is carried in logScale), so that an opaque
    // layer cannot overflow: R is a ratio and does not see the factor; T is divided by its square.
    const ab = Math.abs(b);
    const e2 = Math.exp(-2 * ab);
    const ch = (1 + e2) / 2;
    const sh = (b < 0 ? -(1 - e2) : 1 - e2) / 2;
    logScale += ab;
    const ca = Math.cos(a);
    const sa = Math.sin(a);
    // cos δ = cos a cosh b − i sin a sinh b ; sin δ = sin a cosh b + i cos a sinh b
    const cosR = ca * ch;
    const cosI = -sa * sh;
    const sinR = sa * ch;
    const sinI = ca * sh;
    // i sin δ
    const isR = -sinI;
    const isI = sinR;
    // m12 = i sin δ / η ; m21 = i η sin δ
    const ed = etaR * etaR + etaI * etaI;
    const m12R = (isR * etaR + isI * etaI) / ed;
    const m12I = (isI * etaR - isR * etaI) / ed;
    const m21R = isR * etaR - isI * etaI;
    const m21I = isR * etaI + isI * etaR;
    const nBr = cosR * Br - cosI * Bi + (m12R * Cr - m12I * Ci);
    const nBi = cosR * Bi + cosI * Br + (m12R * Ci + m12I * Cr);
    const nCr = m21R * Br - m21I * Bi + (cosR * Cr - cosI * Ci);
    const nCi = m21R * Bi + m21I * Br + (cosR * Ci + cosI * Cr);
    Br = nBr;
    Bi = nBi;
    Cr = nCr;
    Ci = nCi;
  }
  // r = (η0 B − C)/(η0 B + C)
  const numR = eta0 * Br - Cr;
  const numI = eta0 * Bi - Ci;
  const denR = eta0 * Br + Cr;
  const denI = eta0 * Bi + Ci;
  const den2 = denR * denR + denI * denI;
  out.R = (numR * numR + numI * numI) / den2;
  out.T = logScale > 0 ? ((4 * eta0 * etaSubR) / den2) * Math.exp(-2 * logScale) : (4 * eta0 * etaSubR) / den2;
}

/** Result registers of csqrtDecaying (synchronous scratch: no allocation on the hot path). */
let sqRe = 0;
let sqIm = 0;

/** √(re + i·im) into (sqRe, sqIm): the root with Im ≤ 0 (a decaying wave for N = n − ik; Macleod's choice). */
function csqrtDecaying(re: number, im: number): void {
  const m = Math.hypot(re, im);
  const r = Math.sqrt(Math.max(0, (m + re) / 2));
  const i = Math.sqrt(Math.max(0, (m - re) / 2));
  // The two roots are ±(r + i·sgn(im)·i); keep the one with Im ≤ 0. An evanescent wave in a
  // lossless medium (im = 0, re < 0) gets the decaying branch −i·√|re|.
  sqRe = im > 0 ? -r : r;
  sqIm = -i;
}

/**
 * Reflectance and transmittance of a resolved stack on its wavelength grid (fractions 0–1):
 * one coated face on a semi-infinite substrate, or a lens coated on both faces (incoherent
 * sum; see the module note).
 *
 * @param scales per-layer thickness factors (front layers; the back face uses the same factors
 *   when it shares the front's layers), default all 1
 * @throws RangeError for an angle outside 0 ≤ θ < 90°
 */
export function stackSpectrum(stack: ResolvedStack, options: SpectrumOptions = {}, scales?: ArrayLike<number>): StackSpectrum {
  const angle = options.angleDeg ?? 0;
  if (!(angle >= 0 && angle < 90)) throw new RangeError('angleDeg must be at least 0 and below 90');
  const pol = options.polarization ?? 'average';
  const n0 = stack.incidentN;
  const s = n0 * Math.sin((angle * Math.PI) / 180);
  const s2 = s * s;
  const both = options.bothFaces ?? false;
  const backScales = stack.backLayers === stack.layers ? scales : undefined;
  const W = stack.wavelengthsNm.length;
  const reflectance = new Array<number>(W);
  const transmittance = new Array<number>(W);
  const front: SurfaceRT = { R: 0, T: 0 };
  const frontInside: SurfaceRT = { R: 0, T: 0 };
  const back: SurfaceRT = { R: 0, T: 0 };
  const pols = pol === 'average' ? [false, true] : [pol === 'p'];
  for (let i = 0; i < W; i++) {
    const wl = stack.wavelengthsNm[i]!;
    const ns = stack.substrateN[i]!;
    const ks = stack.substrateK[i]!;
    let R = 0;
    let T = 0;
    for (const p of pols) {
      surface(n0, s2, stack.layers, i, ns, ks, wl, p, false, scales, front);
      if (!both) {
        R += front.R;
        T += front.T;
        continue;
      }
      // Inside the lens the incident medium is the substrate (its k enters through τ only).
      surface(ns, s2, stack.layers, i, n0, 0, wl, p, true, scales, frontInside);
      surface(ns, s2, stack.backLayers, i, n0, 0, wl, p, true, backScales, back);
      let tau = 1;
      if (ks > 0 && options.substrateThicknessMm !== undefined) {
        const cosS = Math.sqrt(1 - s2 / (ns * ns));
        tau = Math.exp((-4 * Math.PI * ks * options.substrateThicknessMm * 1e6) / (wl * cosS));
      }
      const denom = 1 - frontInside.R * back.R * tau * tau;
      R += front.R + (front.T * front.T * back.R * tau * tau) / denom;
      T += (front.T * back.T * tau) / denom;
    }
    reflectance[i] = R / pols.length;
    transmittance[i] = T / pols.length;
  }
  return { reflectance, transmittance };
}

/**
 * Convenience: resolve and evaluate in one call (fractions 0–1).
 * @throws RangeError as resolveStack and stackSpectrum do
 */
export function computeStack(
  spec: StackSpec,
  wavelengthsNm: number[],
  options: SpectrumOptions = {},
  table: readonly OpticalMaterial[] = DEFAULT_MATERIALS,
): StackSpectrum & { warnings: string[] } {
  const resolved = resolveStack(spec, wavelengthsNm, table);
  return { ...stackSpectrum(resolved, options), warnings: resolved.warnings };
}

/** Number of 2×2 characteristic-matrix applications one evaluation of `stackSpectrum` makes. */
export function matrixProductsPerSpectrum(stack: ResolvedStack, options: SpectrumOptions = {}): number {
  const pols = (options.polarization ?? 'average') === 'average' ? 2 : 1;
  const perPol = options.bothFaces ? 2 * stack.layers.length + stack.backLayers.length : stack.layers.length;
  return stack.wavelengthsNm.length * pols * perPol;
}
