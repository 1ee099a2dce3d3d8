/**
 * Seeded pseudo-random numbers for Monte-Carlo checks in the domain tests (reproducible runs):
 * mulberry32 (a 32-bit generator by T. Ettinger, public domain) and the Box–Muller transform for
 * standard normal deviates (G. E. P. Box & M. E. Muller, Ann. Math. Statist. 29, 1958).
 */
export function mulberry32(seed: number): () => number {
  let a = seed >>> 0;
  return () => {
    a = (a + 0x6d2b79f5) >>> 0;
    let t = a;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

/** Standard normal deviates from a uniform source (Box–Muller, one deviate per call). */
export function normalSource(seed: number): () => number {
  const u = mulberry32(seed);
  return () => {
    let u1 = u();
    while (u1 <= 0) u1 = u();
    return Math.sqrt(-2 * Math.log(u1)) * Math.cos(2 * Math.PI * u());
  };
}
