/**
 * Coating and lens materials: dispersive refractive index n(λ) and extinction coefficient k(λ)
 * as a table of editable defaults. The complex index is N = n − ik (the sign convention of
 * H. A. Macleod, *Thin-Film Optical Filters*; k ≥ 0 means absorption).
 *
 * Two dispersion models:
 * - Sellmeier: n² = 1 + Σ Bᵢ·λ² / (λ² − Cᵢ), λ in µm, Cᵢ in µm².
 * - Cauchy: n = A + B/λ² + C/λ⁴, λ in µm (B in µm², C in µm⁴); k = k0 (constant) when given.
 *
 * Provenance: `published` values are quoted from the named source; `from memory` values are
 * typical figures recalled, not read from a source, and are meant to be replaced by the lab's
 * own (measured or supplier) data. Evaporated films differ from bulk material and from one
 * chamber to the next (packing density, ion assistance), so even the published bulk values are
 * a starting point for a design, not a property of the lab's films.
 */

/** Sellmeier coefficients (λ in µm): n² = 1 + Σ Bᵢλ²/(λ² − Cᵢ). */
export interface SellmeierModel {
  kind: 'sellmeier';
  /** Bᵢ (dimensionless). */
  b: number[];
  /** Cᵢ in µm² (the squares of the resonance wavelengths). */
  c: number[];
  /** Constant extinction coefficient k (default 0). */
  k?: number;
}

/** Cauchy coefficients (λ in µm): n = A + B/λ² + C/λ⁴. */
export interface CauchyModel {
  kind: 'cauchy';
  a: number;
  /** µm². */
  b: number;
  /** µm⁴ (default 0). */
  c?: number;
  /** Constant extinction coefficient k (default 0). */
  k?: number;
}

/** A material of the table. */
export interface OpticalMaterial {
  /** Stable id used by the API (`{material: id}`). */
  id: string;
  name: string;
  /** Coating material or lens substrate. */
  role: 'coating' | 'substrate';
  model: SellmeierModel | CauchyModel;
  /** Wavelength range, nm, over which the model is claimed (outside it: a warning, not a refusal). */
  validNm: [number, number];
  provenance: 'published' | 'from memory';
  source: string;
}

/**
 * Two-term Cauchy coefficients that reproduce a refractive index n_d at the helium d line
 * (587.56 nm) and an Abbe number V_d = (n_d − 1)/(n_F − n_C) (F 486.13 nm, C 656.27 nm).
 * With n = A + B/λ²: n_F − n_C = B·(1/λF² − 1/λC²), so B = (n_d − 1)/(V_d·(1/λF² − 1/λC²)) and
 * A = n_d − B/λd². This is how lens makers quote their materials (index and Abbe number).
 */
export function cauchyFromAbbe(nd: number, vd: number): CauchyModel {
  const lF = 0.48613;
  const lC = 0.65627;
  const lD = 0.58756;
  const b = (nd - 1) / (vd * (1 / (lF * lF) - 1 / (lC * lC)));
  return { kind: 'cauchy', a: nd - b / (lD * lD), b };
}

/** The default table (editable: every consumer takes the table as a parameter). */
export const DEFAULT_MATERIALS: readonly OpticalMaterial[] = [
  {
    id: 'sio2',
    name: 'SiO₂ (fused silica)',
    role: 'coating',
    model: {
      kind: 'sellmeier',
      b: [0.6961663, 0.4079426, 0.8974794],
      c: [0.0684043 ** 2, 0.1162414 ** 2, 9.896161 ** 2],
    },
    validNm: [210, 3710],
    provenance: 'published',
    source:
      'I. H. Malitson, “Interspecimen comparison of the refractive index of fused silica”, J. Opt. Soc. Am. 55 (1965) 1205–1209 (bulk; evaporated films are often 1.45–1.47 at 550 nm)',
  },
  {
    id: 'zro2',
    name: 'ZrO₂ (evaporated)',
    role: 'coating',
    model: { kind: 'cauchy', a: 1.95, b: 0.0155 },
    validNm: [380, 1000],
    provenance: 'from memory',
    source: 'Typical evaporated-film value, n ≈ 2.00 at 550 nm (from memory; replace with the lab’s own data)',
  },
  {
    id: 'tio2',
    name: 'TiO₂ (evaporated)',
    role: 'coating',
    model: { kind: 'cauchy', a: 2.18, b: 0.035 },
    validNm: [400, 1000],
    provenance: 'from memory',
    source: 'Typical ion-assisted film value, n ≈ 2.30 at 550 nm (from memory; replace with the lab’s own data)',
  },
  {
    id: 'ito',
    name: 'ITO (anti-static)',
    role: 'coating',
    model: { kind: 'cauchy', a: 1.85, b: 0.03, k: 0.005 },
    validNm: [400, 800],
    provenance: 'from memory',
    source: 'Typical thin-film value, n ≈ 1.95 and k ≈ 0.005 at 550 nm (from memory; ITO varies widely with deposition)',
  },
  {
    id: 'cr39',
    name: 'CR-39 (n_d 1.498, V_d 58)',
    role: 'substrate',
    model: cauchyFromAbbe(1.498, 58),
    validNm: [380, 800],
    provenance: 'from memory',
    source: 'Index and Abbe number as commonly quoted (from memory), Cauchy fitted by cauchyFromAbbe',
  },
  {
    id: 'polycarbonate',
    name: 'Polycarbonate (n_d 1.586, V_d 30)',
    role: 'substrate',
    model: cauchyFromAbbe(1.586, 30),
    validNm: [380, 800],
    provenance: 'from memory',
    source: 'Index and Abbe number as commonly quoted (from memory), Cauchy fitted by cauchyFromAbbe',
  },
  {
    id: 'hi-160',
    name: 'High-index 1.60 (V_d 42)',
    role: 'substrate',
    model: cauchyFromAbbe(1.6, 42),
    validNm: [380, 800],
    provenance: 'from memory',
    source: 'Typical 1.60 lens material (from memory), Cauchy fitted by cauchyFromAbbe',
  },
  {
    id: 'hi-167',
    name: 'High-index 1.67 (V_d 32)',
    role: 'substrate',
    model: cauchyFromAbbe(1.67, 32),
    validNm: [380, 800],
    provenance: 'from memory',
    source: 'Typical 1.67 lens material (from memory), Cauchy fitted by cauchyFromAbbe',
  },
  {
    id: 'hi-174',
    name: 'High-index 1.74 (V_d 33)',
    role: 'substrate',
    model: cauchyFromAbbe(1.74, 33),
    validNm: [380, 800],
    provenance: 'from memory',
    source: 'Typical 1.74 lens material (from memory), Cauchy fitted by cauchyFromAbbe',
  },
];

/** Material ids of the default table. */
export const DEFAULT_MATERIAL_IDS = DEFAULT_MATERIALS.map((m) => m.id);

/** Look a material up by id. @throws RangeError for an unknown id. */
export function findMaterial(id: string, table: readonly OpticalMaterial[] = DEFAULT_MATERIALS): OpticalMaterial {
  const m = table.find((x) => x.id === id);
  if (!m) throw new RangeError(`unknown material "${id}" (known: ${table.map((x) => x.id).join(', ')})`);
  return m;
}

/**
 * Refractive index n and extinction coefficient k of a material at λ (nm), by its model
 * (Sellmeier or Cauchy, λ converted to µm). @throws RangeError where the Sellmeier sum is not
 * positive (λ at or below a resonance).
 */
export function indexAt(model: SellmeierModel | CauchyModel, wavelengthNm: number): { n: number; k: number } {
  const l = wavelengthNm / 1000;
  const l2 = l * l;
  if (model.kind === 'sellmeier') {
    let n2 = 1;
    for (let i = 0; i < model.b.length; i++) n2 += (model.b[i]! * l2) / (l2 - model.c[i]!);
    if (!(n2 > 0)) throw new RangeError(`Sellmeier model has no real index at ${wavelengthNm} nm`);
    return { n: Math.sqrt(n2), k: model.k ?? 0 };
  }
  return { n: model.a + model.b / l2 + (model.c ?? 0) / (l2 * l2), k: model.k ?? 0 };
}
