/**
 * Shaping the control-chart view (src/lib/shared/control-chart.ts): zone lines, limit steps where
 * a new set took effect, signal and exclusion markers, CUSUM sums, CSV. Hand-computed values.
 */
import { describe, expect, it } from 'vitest';
import type { ChartPoint, LimitSetView } from '../../src/lib/shared/characteristics.ts';
import { controlChartCsv, shapeControlChart, yRange, zoneLines } from '../../src/lib/shared/control-chart.ts';

const pt = (index: number, value: number, extra: Partial<ChartPoint> = {}): ChartPoint => ({
  id: index,
  index,
  tMs: Date.UTC(2026, 11, 1, 9, index),
  tFromMs: null,
  value,
  observation: value,
  dispersion: null,
  n: 1,
  center: null,
  ucl: null,
  lcl: null,
  violations: [],
  limitSetId: null,
  excluded: false,
  exclusionReason: null,
  dipRunId: null,
  ovenLoadId: null,
  extra: {},
  ...extra,
});
const set = (id: number, version: number, dispersion: LimitSetView['dispersion']) =>
  ({ id, version, dispersion }) as LimitSetView;

describe('zone lines', () => {
  it('centre ± 1σ and ± 2σ with σ = (UCL − centre)/3', () => {
    expect(zoneLines(10, 13)).toEqual({ plus1: 11, minus1: 9, plus2: 12, minus2: 8 });
    expect(zoneLines(null, 13).plus1).toBeNull();
  });
});

describe('shapeControlChart', () => {
  const points = [
    pt(1, 10), // before any limits
    pt(2, 10.5, { center: 10, ucl: 13, lcl: 7, limitSetId: 1, dispersion: 0.5 }),
    pt(3, 14, { center: 10, ucl: 13, lcl: 7, limitSetId: 1, violations: ['we1'], dispersion: 3.5 }),
    pt(4, 9, { center: 9.5, ucl: 11, lcl: 8, limitSetId: 2, excluded: true, exclusionReason: 'probe cleaned' }),
  ];
  const s = shapeControlChart('imr', points, [
    set(1, 1, { center: 1, ucl: 3.3, lcl: 0 }),
    set(2, 2, { center: 0.6, ucl: 2, lcl: 0 }),
  ]);
  it('limits step where a new set took effect, and are absent before the first', () => {
    expect(s.ucl).toEqual([null, 13, 13, 11]);
    expect(s.steps).toEqual([
      { x: 2, version: 1, setId: 1 },
      { x: 4, version: 2, setId: 2 },
    ]);
    expect(s.dispersionUcl).toEqual([null, 3.3, 3.3, 2]);
    expect(s.zones.plus2).toEqual([null, 12, 12, 10.5]);
  });
  it('marks the signal (with its rule) and the excluded point', () => {
    expect(s.markers).toEqual([
      { i: 2, x: 3, y: 14, kind: 'violation', label: 'we1' },
      { i: 3, x: 4, y: 9, kind: 'excluded', label: 'excluded' },
    ]);
  });
  it('a moving-range signal is marked on the MR chart, not on the statistic; a window starting inside a set has no step', () => {
    const w = shapeControlChart(
      'imr',
      [
        pt(7, 10, { center: 10, ucl: 13, lcl: 7, limitSetId: 1 }),
        pt(8, 12.9, { center: 10, ucl: 13, lcl: 7, limitSetId: 1, violations: ['dispersion-ucl'] }),
      ],
      [set(1, 1, null)],
    );
    expect(w.markers).toEqual([]);
    expect(w.steps).toEqual([]);
  });
  it('CUSUM plots C⁺ and −C⁻ against ±H', () => {
    const c = shapeControlChart(
      'cusum',
      [pt(1, 325, { center: 0, ucl: 4.2, lcl: -4.2, limitSetId: 1, extra: { cPlus: 1.5, cMinus: 0.25 } })],
      [set(1, 1, null)],
    );
    expect(c.value).toEqual([1.5]);
    expect(c.lower).toEqual([-0.25]);
    expect(c.ucl).toEqual([4.2]);
  });
});

describe('CSV', () => {
  it('one row per point, times with the site offset, units in the header', () => {
    const csv = controlChartCsv(
      [pt(3, 14, { violations: ['we1', 'we2'], center: 10, ucl: 13, lcl: 7, limitSetId: 1 })],
      'mm/s',
      'imr',
      'Europe/London',
    );
    const [header, row] = csv.trim().split('\r\n');
    expect(header).toContain('value_mm/s');
    expect(row).toBe('3,2026-12-01T09:03:00.000+00:00,14,14,,1,10,13,7,we1 we2,,,1');
  });
});

describe('y range and spec limits off scale (hand-computed)', () => {
  const judged = (vals: number[], c: number, u: number, l: number) =>
    shapeControlChart(
      'imr',
      vals.map((v, i) => pt(i + 1, v, { center: c, ucl: u, lcl: l, limitSetId: 1 })),
      [set(1, 1, null)],
    );
  it('a spec far outside the data and limits is reported off scale instead of flattening the chart', () => {
    const r = yRange(judged([109.0, 109.1, 109.05], 109.05, 109.09, 109.02), { lsl: 105, usl: 115, target: 110 });
    expect(r.shown).toEqual([]);
    expect(r.offScale).toEqual([
      { key: 'lsl', value: 105, side: 'below' },
      { key: 'usl', value: 115, side: 'above' },
    ]);
    // data and limits span 109.0 … 109.1 (0.1), padded by 5 %
    expect(r.min).toBeCloseTo(109.0 - 0.005, 9);
    expect(r.max).toBeCloseTo(109.1 + 0.005, 9);
  });
  it('a spec near the limits is drawn and widens the range', () => {
    const r = yRange(judged([9, 10, 11], 10, 13, 7), { lsl: 6, usl: 14 });
    expect(r.shown).toEqual(['lsl', 'usl']);
    expect(r.offScale).toEqual([]);
    expect(r.min).toBeCloseTo(6 - 0.4, 9);
    expect(r.max).toBeCloseTo(14 + 0.4, 9);
  });
});
