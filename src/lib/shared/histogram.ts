/**
 * Histogram bins and a fitted normal curve for the capability report (pure). Bin count by the
 * square-root rule (k = ⌈√n⌉, kept within 6…40), over a range that also spans the specification
 * limits, with bin edges on round numbers; the normal density is scaled to counts (n·w·φ).
 */

export interface HistogramBin {
  from: number;
  to: number;
  count: number;
}

/** A "nice" step (1, 2 or 5 × 10ᵏ) near `raw`. */
export function niceStep(raw: number): number {
  if (!(raw > 0) || !Number.isFinite(raw)) return 1;
  const p = Math.pow(10, Math.floor(Math.log10(raw)));
  const m = raw / p;
  return (m <= 1 ? 1 : m <= 2 ? 2 : m <= 5 ? 5 : 10) * p;
}

/** Bins covering the data and the given extra values (e.g. LSL, USL). */
export function histogram(xs: readonly number[], include: readonly number[] = []): { bins: HistogramBin[]; width: number } {
  if (xs.length === 0) return { bins: [], width: 0 };
  const all = [...xs, ...include];
  let lo = Math.min(...all);
  let hi = Math.max(...all);
  if (hi === lo) {
    lo -= 0.5;
    hi += 0.5;
  }
  const k = Math.min(40, Math.max(6, Math.ceil(Math.sqrt(xs.length))));
  const width = niceStep((hi - lo) / k);
  const start = Math.floor(lo / width) * width;
  const n = Math.max(1, Math.ceil((hi - start) / width + 1e-9));
  const bins: HistogramBin[] = Array.from({ length: n }, (_, i) => ({
    from: start + i * width,
    to: start + (i + 1) * width,
    count: 0,
  }));
  for (const x of xs) {
    const i = Math.min(n - 1, Math.max(0, Math.floor((x - start) / width)));
    bins[i]!.count += 1;
  }
  return { bins, width };
}

/** Normal density scaled to a histogram's counts at x: n·w·φ((x − μ)/σ)/σ. */
export function normalCountAt(x: number, n: number, width: number, mean: number, sigma: number): number {
  if (!(sigma > 0)) return 0;
  const z = (x - mean) / sigma;
  return (n * width * Math.exp(-0.5 * z * z)) / (sigma * Math.sqrt(2 * Math.PI));
}
