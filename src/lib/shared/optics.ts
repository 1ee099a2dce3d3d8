/**
 * Zod schemas (and inferred types) for the AR-coating calculators of product.md §6:
 * `POST /api/v1/calc/stack-reflectance`, `/spectrum-colour` and `/colour-difference`. One
 * schema serves the browser form, the endpoint and the OpenAPI document.
 *
 * Caps (so every request is answered in bounded, linear time): at most `MAX_STACK_LAYERS` (50)
 * layers and `MAX_SPECTRUM_POINTS` (2,001) wavelengths — 380–780 nm at 0.2 nm, or 200–2,200 nm
 * at 1 nm. Wavelengths must increase strictly. Indices are sanity-bounded (1 ≤ n ≤ 5,
 * 0 ≤ k ≤ 10), thicknesses 0–100,000 nm. The maths is in `lib/domain/optics` and
 * `lib/domain/colour`.
 */
import { z } from 'zod';

/** Narrowest span a spectrum must cover, nm (the rest of 380–780 is held at the end values). */
export const MIN_COVERAGE_NM: readonly [number, number] = [400, 700];

/** Most layers a stack may have. */
export const MAX_STACK_LAYERS = 50;
/** Most wavelengths (spectrum points) in one request. */
export const MAX_SPECTRUM_POINTS = 2001;

const num = (label: string) => z.number({ error: `${label} must be a finite number` });
const bounded = (label: string, min: number, max: number, unit = '') =>
  num(label)
    .min(min, { error: `${label} must be at least ${min}${unit}` })
    .max(max, { error: `${label} must be at most ${max}${unit}` });

/** Strictly increasing wavelengths in nm (the path of the first offending value is reported). */
export const wavelengthsSchema = (min: number) =>
  z
    .array(bounded('wavelength', 100, 5000, ' nm'), { error: 'wavelengthsNm must be an array of numbers (nm)' })
    .min(min, { error: `give at least ${min} wavelength${min > 1 ? 's' : ''}` })
    .max(MAX_SPECTRUM_POINTS, { error: `at most ${MAX_SPECTRUM_POINTS} wavelengths` })
    .superRefine((w, ctx) => {
      for (let i = 1; i < w.length; i++) {
        if (!(w[i]! > w[i - 1]!)) {
          ctx.addIssue({
            code: 'custom',
            path: [i],
            message: `wavelengths must increase strictly (${w[i]} nm follows ${w[i - 1]} nm)`,
          });
          return;
        }
      }
    });

/** One layer: a constant index `{n, k?}` or a material of the table `{material}`, and its physical thickness. */
export const StackLayerSchema = z
  .object({
    n: bounded('n', 1, 5).optional(),
    k: bounded('k', 0, 10).optional(),
    material: z.string({ error: 'material must be a material id' }).min(1).max(40).optional(),
    thicknessNm: bounded('thicknessNm', 0, 100_000, ' nm'),
  })
  .strict()
  .superRefine((l, ctx) => {
    if ((l.n === undefined) === (l.material === undefined)) {
      ctx.addIssue({
        code: 'custom',
        path: ['n'],
        message: l.n === undefined ? 'give n (with optional k) or a material id' : 'give either n or a material id, not both',
      });
    }
    if (l.material !== undefined && l.k !== undefined) {
      ctx.addIssue({ code: 'custom', path: ['k'], message: 'k comes from the material; give k only with n' });
    }
  });
/** A parsed layer. */
export type StackLayer = z.infer<typeof StackLayerSchema>;

/** Polarisation of the incident light. */
export const POLARIZATIONS = ['s', 'p', 'average'] as const;

/** `POST /api/v1/calc/stack-reflectance` body (layers in deposition order, first on the substrate). */
export const StackReflectanceInputSchema = z.object({
  layers: z
    .array(StackLayerSchema, { error: 'layers must be an array' })
    .max(MAX_STACK_LAYERS, { error: `at most ${MAX_STACK_LAYERS} layers` }),
  substrateN: bounded('substrateN', 1, 5),
  incidentN: bounded('incidentN', 1, 3).optional(),
  wavelengthsNm: wavelengthsSchema(1),
  angleDeg: num('angleDeg')
    .min(0, { error: 'angleDeg must be at least 0°' })
    .lt(90, { error: 'angleDeg must be below 90°' })
    .optional(),
  polarization: z.enum(POLARIZATIONS, { error: 'polarization must be s, p or average' }).optional(),
  bothFaces: z.boolean({ error: 'bothFaces must be true or false' }).optional(),
});
/** Parsed stack-reflectance body. */
export type StackReflectanceInput = z.infer<typeof StackReflectanceInputSchema>;

/** Stack-reflectance answer: % per wavelength. */
export const StackReflectanceOutputSchema = z.object({
  reflectancePct: z.array(z.number()),
  transmittancePct: z.array(z.number()),
  warnings: z.array(z.string()).optional(),
});
/** Stack-reflectance answer. */
export type StackReflectanceOutput = z.infer<typeof StackReflectanceOutputSchema>;

/** `POST /api/v1/calc/spectrum-colour` body: a reflectance spectrum covering at least 400–700 nm. */
export const SpectrumColourInputSchema = z
  .object({
    wavelengthsNm: wavelengthsSchema(2),
    reflectancePct: z
      .array(bounded('reflectance', -10, 110, ' %'), { error: 'reflectancePct must be an array of numbers (%)' })
      .max(MAX_SPECTRUM_POINTS, { error: `at most ${MAX_SPECTRUM_POINTS} values` }),
  })
  .superRefine((v, ctx) => {
    if (v.reflectancePct.length !== v.wavelengthsNm.length) {
      ctx.addIssue({
        code: 'custom',
        path: ['reflectancePct'],
        message: `reflectancePct has ${v.reflectancePct.length} values but wavelengthsNm has ${v.wavelengthsNm.length}`,
      });
      return;
    }
    const lo = v.wavelengthsNm[0];
    const hi = v.wavelengthsNm[v.wavelengthsNm.length - 1];
    if (lo !== undefined && hi !== undefined && (lo > MIN_COVERAGE_NM[0] || hi < MIN_COVERAGE_NM[1])) {
      ctx.addIssue({
        code: 'custom',
        path: ['wavelengthsNm'],
        message: `the spectrum covers ${lo}–${hi} nm; it must cover at least ${MIN_COVERAGE_NM[0]}–${MIN_COVERAGE_NM[1]} nm (380–780 nm preferred)`,
      });
    }
  });
/** Parsed spectrum-colour body. */
export type SpectrumColourInput = z.infer<typeof SpectrumColourInputSchema>;

/** Spectrum-colour answer (CIE 1931 2°, D65). */
export const SpectrumColourOutputSchema = z.object({
  luminousReflectancePct: z.number(),
  X: z.number(),
  Y: z.number(),
  Z: z.number(),
  x: z.number(),
  y: z.number(),
  L: z.number(),
  a: z.number(),
  b: z.number(),
  chroma: z.number(),
  hueDeg: z.number(),
  warnings: z.array(z.string()).optional(),
});
/** Spectrum-colour answer. */
export type SpectrumColourOutput = z.infer<typeof SpectrumColourOutputSchema>;

const labSchema = (label: string) =>
  z.tuple([bounded(`${label} L*`, 0, 100), bounded(`${label} a*`, -200, 200), bounded(`${label} b*`, -200, 200)], {
    error: `${label} must be [L*, a*, b*]`,
  });

/** `POST /api/v1/calc/colour-difference` body. */
export const ColourDifferenceInputSchema = z.object({ lab1: labSchema('lab1'), lab2: labSchema('lab2') });
/** Parsed colour-difference body. */
export type ColourDifferenceInput = z.infer<typeof ColourDifferenceInputSchema>;

/** Colour-difference answer. */
export const ColourDifferenceOutputSchema = z.object({ deltaE76: z.number(), deltaE2000: z.number() });
/** Colour-difference answer. */
export type ColourDifferenceOutput = z.infer<typeof ColourDifferenceOutputSchema>;
