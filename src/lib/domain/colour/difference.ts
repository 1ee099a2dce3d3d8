/**
 * Colour differences between two CIELAB colours [L*, a*, b*].
 *
 * - ΔE*ab (CIE 1976): the Euclidean distance in CIELAB (CIE 015:2004 §8.2.1).
 * - ΔE00 (CIEDE2000): CIE 142-2001 / ISO/CIE 11664-6, implemented as written out step by step in
 *   G. Sharma, W. Wu & E. N. Dalal, “The CIEDE2000 color-difference formula: implementation
 *   notes, supplementary test data, and mathematical observations”, Color Res. Appl. 30(1)
 *   (2005) 21–30, eqs. (1)–(22), with their conventions: the hue angle is 0 where C′ = 0, the
 *   mean hue of a pair with a zero chroma is the plain sum h′₁ + h′₂, and Δh′ = 0 then.
 *   Parametric factors kL = kC = kH = 1 (reference conditions) unless given.
 */

/** A CIELAB colour [L*, a*, b*]. */
export type Lab = readonly [number, number, number];

/** ΔE*ab = √(ΔL*² + Δa*² + Δb*²) (CIE 1976). */
export function deltaE76(lab1: Lab, lab2: Lab): number {
  return Math.hypot(lab1[0] - lab2[0], lab1[1] - lab2[1], lab1[2] - lab2[2]);
}

const deg = Math.PI / 180;
const POW25_7 = 25 ** 7;

/** CIEDE2000 ΔE00 (Sharma, Wu & Dalal 2005, eqs. 1–22); symmetric in its arguments. */
export function deltaE2000(lab1: Lab, lab2: Lab, kL = 1, kC = 1, kH = 1): number {
  const [L1, a1, b1] = lab1;
  const [L2, a2, b2] = lab2;
  // (2)–(3): C*ab and its mean
  const C1ab = Math.hypot(a1, b1);
  const C2ab = Math.hypot(a2, b2);
  const Cbar7 = ((C1ab + C2ab) / 2) ** 7;
  // (4): G
  const G = 0.5 * (1 - Math.sqrt(Cbar7 / (Cbar7 + POW25_7)));
  // (5)–(7): a′, C′, h′
  const a1p = (1 + G) * a1;
  const a2p = (1 + G) * a2;
  const C1p = Math.hypot(a1p, b1);
  const C2p = Math.hypot(a2p, b2);
  const hp = (b: number, ap: number) => {
    if (b === 0 && ap === 0) return 0;
    const h = Math.atan2(b, ap) / deg;
    return h < 0 ? h + 360 : h;
  };
  const h1p = hp(b1, a1p);
  const h2p = hp(b2, a2p);
  // (8)–(10): ΔL′, ΔC′, Δh′, ΔH′
  const dLp = L2 - L1;
  const dCp = C2p - C1p;
  let dhp = 0;
  if (C1p * C2p !== 0) {
    dhp = h2p - h1p;
    if (dhp > 180) dhp -= 360;
    else if (dhp < -180) dhp += 360;
  }
  const dHp = 2 * Math.sqrt(C1p * C2p) * Math.sin((dhp / 2) * deg);
  // (12)–(14): means
  const Lbarp = (L1 + L2) / 2;
  const Cbarp = (C1p + C2p) / 2;
  let hbarp = h1p + h2p;
  if (C1p * C2p !== 0) {
    if (Math.abs(h1p - h2p) <= 180) hbarp = (h1p + h2p) / 2;
    else hbarp = h1p + h2p < 360 ? (h1p + h2p + 360) / 2 : (h1p + h2p - 360) / 2;
  }
  // (15)–(21): T, Δθ, R_C, S_L, S_C, S_H, R_T
  const T =
    1 -
    0.17 * Math.cos((hbarp - 30) * deg) +
    0.24 * Math.cos(2 * hbarp * deg) +
    0.32 * Math.cos((3 * hbarp + 6) * deg) -
    0.2 * Math.cos((4 * hbarp - 63) * deg);
  const dTheta = 30 * Math.exp(-(((hbarp - 275) / 25) ** 2));
  const Cbarp7 = Cbarp ** 7;
  const RC = 2 * Math.sqrt(Cbarp7 / (Cbarp7 + POW25_7));
  const l50 = (Lbarp - 50) ** 2;
  const SL = 1 + (0.015 * l50) / Math.sqrt(20 + l50);
  const SC = 1 + 0.045 * Cbarp;
  const SH = 1 + 0.015 * Cbarp * T;
  const RT = -Math.sin(2 * dTheta * deg) * RC;
  // (22)
  const l = dLp / (kL * SL);
  const c = dCp / (kC * SC);
  const h = dHp / (kH * SH);
  return Math.sqrt(l * l + c * c + h * h + RT * c * h);
}
