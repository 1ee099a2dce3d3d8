/**
 * Colour of a reflectance spectrum: CIE 1931 2° observer, CIE illuminant D65 (CIE 015:2004
 * *Colorimetry*, §7; tables in ./cie-tables.ts, 380–780 nm at 5 nm).
 *
 *   X = k·Σ S(λ)·x̄(λ)·R(λ)·Δλ,  Y = k·Σ S(λ)·ȳ(λ)·R(λ)·Δλ,  Z = k·Σ S(λ)·z̄(λ)·R(λ)·Δλ,
 *   k = 100 / Σ S(λ)·ȳ(λ)·Δλ          (R as a fraction; Y = 100 for the perfect reflector)
 *   x = X/(X+Y+Z),  y = Y/(X+Y+Z)
 *   CIELAB (CIE 015:2004 §8.2.1, ISO/CIE 11664-4): with f(t) = t^(1/3) for t > (6/29)³, else
 *   t/(3·(6/29)²) + 4/29, and the white Xn, Yn, Zn of the perfect reflector under D65 from the
 *   same tables: L* = 116·f(Y/Yn) − 16, a* = 500·(f(X/Xn) − f(Y/Yn)), b* = 200·(f(Y/Yn) − f(Z/Zn)),
 *   C*ab = √(a*² + b*²), h_ab = atan2(b*, a*) in degrees, 0–360.
 *
 * Luminous reflectance as ISO 13666 (spectacle-lens vocabulary) defines it: the reflectance
 * weighted by the D65 spectral power and the photopic luminous efficiency V(λ) = ȳ(λ) over
 * 380–780 nm, ρv = Σ R·S_D65·V / Σ S_D65·V — numerically the tristimulus value Y (in %).
 *
 * A measured spectrum is interpolated linearly onto the 5 nm table grid (CIE 015 §7.2.2
 * recommends the tables' grid; linear interpolation of a densely sampled measurement).
 */
import { MIN_COVERAGE_NM } from '../../shared/optics.ts';
import { CIE1931_XBAR, CIE1931_YBAR, CIE1931_ZBAR, CIE_D65, CIE_ROWS, CIE_START_NM, CIE_STEP_NM } from './cie-tables.ts';

/** The colour of a reflectance spectrum (product.md §6 `spectrum-colour`). */
export interface SpectrumColour {
  /** ISO 13666 luminous reflectance ρv, % (D65 × V(λ), 380–780 nm). */
  luminousReflectancePct: number;
  X: number;
  Y: number;
  Z: number;
  x: number;
  y: number;
  /** CIELAB L*, a*, b* (D65 white of the same tables). */
  L: number;
  a: number;
  b: number;
  /** C*ab. */
  chroma: number;
  /** h_ab, degrees 0–360 (0 when the chroma is 0). */
  hueDeg: number;
  warnings?: string[];
}

const WEIGHTS = (() => {
  const wx = new Float64Array(CIE_ROWS);
  const wy = new Float64Array(CIE_ROWS);
  const wz = new Float64Array(CIE_ROWS);
  let sum = 0;
  for (let i = 0; i < CIE_ROWS; i++) sum += CIE_D65[i]! * CIE1931_YBAR[i]!;
  const k = 100 / sum;
  for (let i = 0; i < CIE_ROWS; i++) {
    wx[i] = k * CIE_D65[i]! * CIE1931_XBAR[i]!;
    wy[i] = k * CIE_D65[i]! * CIE1931_YBAR[i]!;
    wz[i] = k * CIE_D65[i]! * CIE1931_ZBAR[i]!;
  }
  let Xn = 0;
  let Zn = 0;
  for (let i = 0; i < CIE_ROWS; i++) {
    Xn += wx[i]!;
    Zn += wz[i]!;
  }
  return { wx, wy, wz, white: { X: Xn, Y: 100, Z: Zn } };
})();

/** Tristimulus values of the perfect reflecting diffuser under D65 (Y = 100) from the shipped tables. */
export const D65_WHITE: Readonly<{ X: number; Y: number; Z: number }> = WEIGHTS.white;

/**
 * Linear interpolation of a spectrum onto the CIE grid (380–780 nm, 5 nm) in one sweep
 * (linear time). Beyond the measured range the end value is held.
 * @param values same length as wavelengthsNm, any linear unit
 * @throws RangeError for mismatched lengths, fewer than 2 points or non-increasing wavelengths
 */
export function toCieGrid(wavelengthsNm: ArrayLike<number>, values: ArrayLike<number>): Float64Array {
  const n = wavelengthsNm.length;
  if (n !== values.length) throw new RangeError(`wavelengthsNm has ${n} values but the spectrum has ${values.length}`);
  if (n < 2) throw new RangeError('a spectrum needs at least 2 points');
  for (let i = 1; i < n; i++) {
    if (!(wavelengthsNm[i]! > wavelengthsNm[i - 1]!))
      throw new RangeError(`wavelengths must be strictly increasing (row ${i + 1})`);
  }
  const out = new Float64Array(CIE_ROWS);
  let j = 0;
  for (let g = 0; g < CIE_ROWS; g++) {
    const w = CIE_START_NM + g * CIE_STEP_NM;
    if (w <= wavelengthsNm[0]!) {
      out[g] = values[0]!;
      continue;
    }
    if (w >= wavelengthsNm[n - 1]!) {
      out[g] = values[n - 1]!;
      continue;
    }
    while (wavelengthsNm[j + 1]! < w) j++;
    const w0 = wavelengthsNm[j]!;
    const w1 = wavelengthsNm[j + 1]!;
    const t = (w - w0) / (w1 - w0);
    out[g] = values[j]! + t * (values[j + 1]! - values[j]!);
  }
  return out;
}

/** CIELAB f(t) (CIE 015:2004 §8.2.1): the cube root above (6/29)³, the linear segment below. */
function f(t: number): number {
  const d = 6 / 29;
  return t > d * d * d ? Math.cbrt(t) : t / (3 * d * d) + 4 / 29;
}

/** CIELAB from XYZ against a white (default the D65 perfect reflector of the shipped tables). */
export function xyzToLab(X: number, Y: number, Z: number, white = D65_WHITE): { L: number; a: number; b: number } {
  const fx = f(X / white.X);
  const fy = f(Y / white.Y);
  const fz = f(Z / white.Z);
  return { L: 116 * fy - 16, a: 500 * (fx - fy), b: 200 * (fy - fz) };
}

/** Chroma C*ab = √(a² + b²) and hue angle h_ab = atan2(b, a) in degrees 0–360 (0 at zero chroma). */
export function chromaHue(a: number, b: number): { chroma: number; hueDeg: number } {
  const chroma = Math.hypot(a, b);
  if (chroma === 0) return { chroma, hueDeg: 0 };
  const h = (Math.atan2(b, a) * 180) / Math.PI;
  return { chroma, hueDeg: h < 0 ? h + 360 : h };
}

/**
 * Colour of a reflectance spectrum (reflectance in %, wavelengths in nm, strictly increasing).
 * The spectrum must cover at least 400–700 nm; the rest of 380–780 nm is held at the end
 * values, with a warning.
 * @throws RangeError for bad input (see toCieGrid), too narrow a span, or an all-black spectrum
 */
export function spectrumColour(wavelengthsNm: ArrayLike<number>, reflectancePct: ArrayLike<number>): SpectrumColour {
  const grid = toCieGrid(wavelengthsNm, reflectancePct);
  const lo = wavelengthsNm[0]!;
  const hi = wavelengthsNm[wavelengthsNm.length - 1]!;
  if (lo > MIN_COVERAGE_NM[0] || hi < MIN_COVERAGE_NM[1]) {
    throw new RangeError(
      `the spectrum covers ${lo}–${hi} nm; it must cover at least ${MIN_COVERAGE_NM[0]}–${MIN_COVERAGE_NM[1]} nm (380–780 nm preferred)`,
    );
  }
  const warnings: string[] = [];
  if (lo > CIE_START_NM || hi < CIE_START_NM + (CIE_ROWS - 1) * CIE_STEP_NM) {
    warnings.push(`the spectrum covers ${lo}–${hi} nm; the end values are held out to 380–780 nm`);
  }
  let X = 0;
  let Y = 0;
  let Z = 0;
  for (let i = 0; i < CIE_ROWS; i++) {
    const r = grid[i]! / 100;
    X += WEIGHTS.wx[i]! * r;
    Y += WEIGHTS.wy[i]! * r;
    Z += WEIGHTS.wz[i]! * r;
  }
  const sum = X + Y + Z;
  if (!(sum > 0)) throw new RangeError('the spectrum reflects nothing in 380–780 nm; it has no chromaticity');
  const lab = xyzToLab(X, Y, Z);
  const ch = chromaHue(lab.a, lab.b);
  return {
    luminousReflectancePct: Y,
    X,
    Y,
    Z,
    x: X / sum,
    y: Y / sum,
    ...lab,
    ...ch,
    ...(warnings.length ? { warnings } : {}),
  };
}

/**
 * A display colour for a swatch: XYZ → linear sRGB (IEC 61966-2-1:1999 matrix, D65 white) →
 * the sRGB transfer curve, with the luminance raised to `displayY` (default 40 of 100) so that
 * the hue of a dim AR reflection is visible. Out-of-gamut channels are clipped. For display only:
 * a screen cannot show the measured colour, and the page says so.
 */
export function swatchHex(X: number, Y: number, Z: number, displayY = 40): string {
  const s = Y > 0 ? displayY / 100 / Y : 0;
  const x = X * s;
  const y = Y * s;
  const z = Z * s;
  const lin = [3.2406 * x - 1.5372 * y - 0.4986 * z, -0.9689 * x + 1.8758 * y + 0.0415 * z, 0.0557 * x - 0.204 * y + 1.057 * z];
  const max = Math.max(1, ...lin);
  return (
    '#' +
    lin
      .map((c) => {
        const v = Math.min(1, Math.max(0, c / max));
        const g = v <= 0.0031308 ? 12.92 * v : 1.055 * v ** (1 / 2.4) - 0.055;
        return Math.round(g * 255)
          .toString(16)
          .padStart(2, '0');
      })
      .join('')
  );
}

export { MIN_COVERAGE_NM };
