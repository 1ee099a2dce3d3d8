// Data shaping for the channel trend and the Floor (src/lib/shared/trend.ts). Every expected
// value below is hand-computed from the inputs beside it.
import { describe, expect, it } from 'vitest';
import { parseCsv } from '../../src/lib/shared/csv-table.ts';
import type { ReadingsResponse } from '../../src/lib/shared/telemetry.ts';
import { AnnotationsQuerySchema } from '../../src/lib/shared/trend-query.ts';
import {
  centredOn,
  clampToNow,
  gapThresholdMs,
  maxPointsFor,
  medianSpacing,
  panRange,
  parseTrendQuery,
  placeMarkers,
  placeOnBand,
  shapeReadings,
  stepsFromSamples,
  trendCsv,
  unitAxes,
  windowBands,
  windowChanges,
  windowRangeFor,
  withGaps,
  zoomRange,
  type TrendEvent,
  type WindowSegment,
} from '../../src/lib/shared/trend.ts';
import type { ProcessWindowLimits } from '../../src/lib/shared/windows.ts';

const S = 1000;
const MIN = 60 * S;
const H = 60 * MIN;

const limits = (visc: { min: number; max: number; target?: number }): ProcessWindowLimits => ({
  viscosityMm2S: visc,
  withdrawalSpeedMmS: { min: 1.5, max: 2.5, target: 2 },
  minCureTempC: 110,
  maxPartTempC: 130,
  minEquivalentMinutes: 120,
  referenceC: 115,
  activationEnergyKJMol: 75,
});

describe('windowRangeFor: the window field each channel kind is held to', () => {
  const l = limits({ min: 8, max: 11, target: 9.5 });
  it('takes the viscosity window for a viscosity channel', () => {
    expect(windowRangeFor('viscosity', l)).toEqual({
      min: 8,
      max: 11,
      target: 9.5,
      lowApplies: 'always',
      label: 'Bath viscosity window',
    });
  });
  it('holds oven air between minimum cure temperature (in soak only) and maximum part temperature', () => {
    expect(windowRangeFor('air-temperature', l)).toMatchObject({ min: 110, max: 130, lowApplies: 'soak' });
  });
  it('gives no window for kinds the recipe does not cover, fields it lacks, or no recipe', () => {
    expect(windowRangeFor('door', l)).toBeNull();
    expect(windowRangeFor('bath-temperature', l)).toBeNull();
    expect(windowRangeFor('viscosity', null)).toBeNull();
  });
});

describe('placeOnBand: a value against its window (window in the middle half of the bar)', () => {
  const w = { min: 10, max: 12, lowApplies: 'always' as const, label: 'w' };
  const ch = { min: 0, max: 60 };
  it('window 10–12 → scale 9–13 (half a window width either side); 13 is high at the right end', () => {
    expect(placeOnBand(13, w, ch)).toEqual({
      state: 'high',
      at: 1,
      offScale: null,
      windowFrom: 0.25,
      windowTo: 0.75,
      targetAt: null,
      scaleMin: 9,
      scaleMax: 13,
    });
  });
  it('a value exactly on the high limit is inside', () => {
    expect(placeOnBand(12, w, ch)).toMatchObject({ state: 'normal', at: 0.75 });
  });
  it('a value below the scale is low and pinned to the left end', () => {
    expect(placeOnBand(8, w, ch)).toMatchObject({ state: 'low', at: 0, offScale: 'below' });
  });
  it('target 11 sits at (11 − 9) / 4 = 0.5', () => {
    expect(placeOnBand(10.5, { ...w, target: 11 }, ch).targetAt).toBe(0.5);
  });
  it('a cold oven is not "low" unless a load soaks', () => {
    const air = { min: 110, max: 130, lowApplies: 'soak' as const, label: 'air' };
    expect(placeOnBand(25, air, ch).state).toBe('normal');
    expect(placeOnBand(25, air, ch, { inSoak: true }).state).toBe('low');
  });
  it("an idle controller's low setpoint is not low unless a load is in the oven", () => {
    const sp = { min: 105, max: 115, lowApplies: 'load' as const, label: 'sp' };
    expect(placeOnBand(25, sp, ch).state).toBe('normal');
    expect(placeOnBand(25, sp, ch, { inLoad: true }).state).toBe('low');
    expect(placeOnBand(120, sp, ch).state).toBe('high');
  });
  it('without a window the bar is the channel range and there is no judgement', () => {
    expect(placeOnBand(125, null, { min: 0, max: 500 })).toMatchObject({ state: 'no-window', at: 0.25, windowFrom: null });
  });
});

describe('gaps', () => {
  it('median spacing of 0, 1, 3, 6 s is 2 s; of 0, 1, 3, 6, 10 s is 2.5 s', () => {
    expect(medianSpacing([0, 1, 3, 6].map((s) => s * S))).toBe(2 * S);
    expect(medianSpacing([0, 1, 3, 6, 10].map((s) => s * S))).toBe(2.5 * S);
  });
  it('raw: 3 × median, at least 1.5 s', () => {
    expect(gapThresholdMs([0, 5 * S, 10 * S], null)).toBe(15 * S);
    expect(gapThresholdMs([0, 100, 200], null)).toBe(1500);
  });
  it('buckets of 1 Hz data: 1.5 bucket widths; buckets of sparse data: 3 × estimated sample spacing', () => {
    // 1-min buckets, 60 readings each: max(90 s, 3 × 60 s / 60) = 90 s
    expect(gapThresholdMs([0, MIN, 2 * MIN], MIN, [60, 60, 60])).toBe(90 * S);
    // 5-s buckets, 1 reading each, 5 s apart: max(7.5 s, 3 × 5 s / 1) = 15 s
    expect(gapThresholdMs([0, 5 * S, 10 * S], 5 * S, [1, 1, 1])).toBe(15 * S);
  });
  it('inserts a null at the midpoint of a long spacing', () => {
    expect(
      withGaps(
        [
          { x: 0, y: 1 },
          { x: 10, y: 2 },
          { x: 40, y: 3 },
        ],
        15,
      ),
    ).toEqual([
      { x: 0, y: 1 },
      { x: 10, y: 2 },
      { x: 25, y: null },
      { x: 40, y: 3 },
    ]);
  });
});

describe('shapeReadings: endpoint answer → chart series', () => {
  it('raw: sorts, and breaks the line after 3 × the 5 s median spacing', () => {
    const resp: ReadingsResponse = {
      channelId: 1,
      unit: 'mm²/s',
      from: 0,
      to: 60 * S,
      mode: 'raw',
      bucketMs: null,
      points: [
        { t: 10 * S, v: 9.3 },
        { t: 0, v: 9.1 },
        { t: 5 * S, v: 9.2 },
        { t: 40 * S, v: 9.4, q: 1 },
      ],
    };
    const s = shapeReadings(resp);
    expect(s.mode).toBe('raw');
    expect(s.gapMs).toBe(15 * S); // spacings 5, 5, 30 s → median 5 s → 15 s
    expect(s.line).toEqual([
      { x: 0, y: 9.1 },
      { x: 5 * S, y: 9.2 },
      { x: 10 * S, y: 9.3 },
      { x: 25 * S, y: null },
      { x: 40 * S, y: 9.4 },
    ]);
    expect(s.rows).toEqual([
      { x: 0, value: 9.1 },
      { x: 5 * S, value: 9.2 },
      { x: 10 * S, value: 9.3 },
      { x: 40 * S, value: 9.4, quality: 1 },
    ]);
    expect(s.min).toEqual([]);
  });
  it('bucketed: mean line and min/max band at bucket middles; one missing minute breaks all three', () => {
    const b = (m: number, min: number, mean: number, max: number) => ({ t: m * MIN, min, max, mean, n: 60 });
    const resp: ReadingsResponse = {
      channelId: 1,
      unit: '°C',
      from: 0,
      to: 6 * MIN,
      mode: 'bucketed',
      bucketMs: MIN,
      source: 'minute',
      buckets: [b(0, 1, 2, 3), b(1, 2, 3, 4), b(2, 3, 4, 5), b(3, 4, 5, 6), b(5, 6, 7, 8)],
    };
    const s = shapeReadings(resp);
    // middles 30, 90, 150, 210, 330 s; spacings 60, 60, 60, 120 → median 60 s; threshold max(90 s, 3 s) = 90 s
    expect(s.gapMs).toBe(90 * S);
    expect(s.line.map((p) => [p.x / S, p.y])).toEqual([
      [30, 2],
      [90, 3],
      [150, 4],
      [210, 5],
      [270, null],
      [330, 7],
    ]);
    expect(s.min.map((p) => p.y)).toEqual([1, 2, 3, 4, null, 6]);
    expect(s.max.map((p) => p.y)).toEqual([3, 4, 5, 6, null, 8]);
    expect(s.rows[4]).toEqual({ x: 330 * S, min: 6, mean: 7, max: 8, n: 60, bucketStartMs: 5 * MIN, bucketEndMs: 6 * MIN });
  });
});

describe('window steps', () => {
  it('stepsFromSamples: the latest sample before the view gives the start; equal neighbours merge; samples at/after the end are ignored', () => {
    const steps = stepsFromSamples(
      [
        { tMs: -50, value: 'Z' },
        { tMs: 10, value: 'A' },
        { tMs: 20, value: 'A' },
        { tMs: 30, value: 'B' },
        { tMs: 50, value: 'C' },
      ],
      0,
      50,
      (a, b) => a === b,
    );
    expect(steps).toEqual([
      { fromMs: 0, toMs: 10, value: 'Z' },
      { fromMs: 10, toMs: 30, value: 'A' },
      { fromMs: 30, toMs: 50, value: 'B' },
    ]);
  });
  it('windowBands: a new version with the same viscosity limits does not redraw; changed limits start a new band; no window → no band', () => {
    const seg = (
      fromMs: number,
      toMs: number,
      version: number | null,
      visc?: { min: number; max: number; target?: number },
    ): WindowSegment => ({
      fromMs,
      toMs,
      window:
        version === null
          ? null
          : { id: version, version, name: 'HC-300 on CR-39', limits: limits(visc!), effectiveFrom: '2026-11-01T00:00:00Z' },
    });
    const bands = windowBands(
      [
        seg(0, 10, null),
        seg(10, 20, 1, { min: 8, max: 11 }),
        seg(20, 30, 2, { min: 8, max: 11 }),
        seg(30, 40, 3, { min: 8.5, max: 11, target: 9.5 }),
      ],
      'viscosity',
    );
    expect(bands).toEqual([
      {
        fromMs: 10,
        toMs: 30,
        min: 8,
        max: 11,
        target: null,
        lowApplies: 'always',
        label: 'HC-300 on CR-39 v1',
        windowId: 1,
        version: 1,
      },
      {
        fromMs: 30,
        toMs: 40,
        min: 8.5,
        max: 11,
        target: 9.5,
        lowApplies: 'always',
        label: 'HC-300 on CR-39 v3',
        windowId: 3,
        version: 3,
      },
    ]);
    expect(windowChanges(bands)).toEqual([{ tMs: 30, label: 'Window HC-300 on CR-39 v3 from here: 8.5–11' }]);
    expect(windowBands([seg(0, 10, 1, { min: 8, max: 11 })], 'door')).toEqual([]);
  });
});

describe('placeMarkers: events on the time axis', () => {
  const ev = (tMs: number, kind: TrendEvent['kind'], label: string, priority?: TrendEvent['priority']): TrendEvent => ({
    tMs,
    kind,
    label,
    ...(priority ? { priority } : {}),
  });
  // Range 0–1000 ms in 10 slots of 100 ms.
  const markers = placeMarkers(
    [
      ev(20, 'door-open', 'Door opened'),
      ev(10, 'door-open', 'Door opened'),
      ev(150, 'door-open', 'Door opened (2 min)'),
      ev(15, 'alarm', 'Viscosity low', 'low'),
      ev(30, 'alarm', 'Viscosity high', 'high'),
      ev(1000, 'load-end', 'Load 7 closed'),
      ev(1001, 'load-end', 'outside'),
      ev(-1, 'alarm', 'outside'),
    ],
    0,
    1000,
    10,
  );
  it('groups one kind per slot at its earliest event, drops events outside the range, keeps the end instant', () => {
    expect(markers.map((m) => [m.x, m.lane, m.kind, m.count, m.label])).toEqual([
      [10, 2, 'door-open', 2, '2 door openings'],
      [15, 0, 'alarm', 2, '2 alarms'],
      [150, 2, 'door-open', 1, 'Door opened (2 min)'],
      [1000, 3, 'load-end', 1, 'Load 7 closed'],
    ]);
  });
  it('a grouped alarm marker carries the highest priority among its alarms', () => {
    expect(markers[1]!.priority).toBe('high');
    expect(markers[1]!.events.map((e) => e.label)).toEqual(['Viscosity low', 'Viscosity high']);
  });
  it('an empty or reversed range has no markers', () => {
    expect(placeMarkers([ev(5, 'alarm', 'a')], 10, 10)).toEqual([]);
  });
});

describe('unitAxes', () => {
  it('one axis per unit in order of first appearance, alternating sides', () => {
    expect(unitAxes(['°C', 'mm²/s', '°C', '%'])).toEqual([
      { unit: '°C', id: 'y0', position: 'left' },
      { unit: 'mm²/s', id: 'y1', position: 'right' },
      { unit: '%', id: 'y2', position: 'left' },
    ]);
  });
});

describe('trendCsv: exactly the plotted series, units on every row, ISO times with the site offset', () => {
  it('writes raw readings and buckets', () => {
    const t0 = Date.UTC(2026, 6, 1, 8, 30, 0); // 09:30 BST
    const csv = trendCsv(
      [
        {
          name: 'Line 1 bath viscosity',
          unit: 'mm²/s',
          shaped: { mode: 'raw', bucketMs: null, source: 'raw', rows: [{ x: t0, value: 9.52 }] },
        },
        {
          name: 'Oven A zone 1 air',
          unit: '°C',
          shaped: {
            mode: 'bucketed',
            bucketMs: H,
            source: 'hour',
            rows: [{ x: t0 + H / 2, min: 108, mean: 110.25, max: 112, n: 3600, bucketStartMs: t0, bucketEndMs: t0 + H }],
          },
        },
      ],
      'Europe/London',
    );
    expect(csv).toBe(
      'channel,unit,time,zone,kind,value,min,mean,max,samples,bucket_start,bucket_end\r\n' +
        'Line 1 bath viscosity,mm²/s,2026-07-01T09:30:00.000+01:00,Europe/London BST,reading,9.52,,,,,,\r\n' +
        'Oven A zone 1 air,°C,2026-07-01T10:00:00.000+01:00,Europe/London BST,bucket 1 h (hourly rollup),,108,110.25,112,3600,2026-07-01T09:30:00.000+01:00,2026-07-01T10:30:00.000+01:00\r\n',
    );
    expect(parseCsv(csv)).toHaveLength(3);
  });
});

describe('view range: pan, zoom, presets and the page query', () => {
  it('zooms in by half about the middle and about a given instant', () => {
    expect(zoomRange({ fromMs: 0, toMs: H }, 0.5)).toEqual({ fromMs: 15 * MIN, toMs: 45 * MIN });
    expect(zoomRange({ fromMs: 0, toMs: H }, 0.5, 0)).toEqual({ fromMs: 0, toMs: 30 * MIN });
    expect(zoomRange({ fromMs: 0, toMs: H }, 2, 45 * MIN)).toEqual({ fromMs: -45 * MIN, toMs: 75 * MIN });
  });
  it('never zooms below 1 minute', () => {
    expect(zoomRange({ fromMs: 0, toMs: MIN }, 0.5)).toEqual({ fromMs: 0, toMs: MIN });
  });
  it('pans by a fraction of the span and stops at now', () => {
    expect(panRange({ fromMs: 0, toMs: H }, -0.5)).toEqual({ fromMs: -30 * MIN, toMs: 30 * MIN });
    expect(clampToNow({ fromMs: 30 * MIN, toMs: 90 * MIN }, H)).toEqual({ fromMs: 0, toMs: H });
  });
  it('centres an hour on an instant', () => {
    expect(centredOn(2 * H, H)).toEqual({ fromMs: 2 * H - 30 * MIN, toMs: 2 * H + 30 * MIN });
  });
  it('asks for about one point per pixel, 100 to 2000', () => {
    expect([maxPointsFor(50), maxPointsFor(1180.4), maxPointsFor(4000)]).toEqual([100, 1180, 2000]);
  });
  it('parses ?at, ?from&to, ?range and ?add', () => {
    const now = 100 * H;
    expect(parseTrendQuery(new URLSearchParams('at=360000000&add=3,x,7'), now)).toEqual({
      range: { fromMs: 100 * H - 30 * MIN, toMs: 100 * H + 30 * MIN },
      live: false,
      preset: null,
      at: 100 * H,
      add: [3, 7],
    });
    expect(parseTrendQuery(new URLSearchParams('from=1000&to=5000'), now).range).toEqual({ fromMs: 1000, toMs: 5000 });
    expect(parseTrendQuery(new URLSearchParams('range=8h'), now)).toMatchObject({
      range: { fromMs: 92 * H, toMs: now },
      live: true,
      preset: '8h',
    });
    expect(parseTrendQuery(new URLSearchParams('range=nonsense&from=9&to=3'), now)).toMatchObject({
      range: { fromMs: 99 * H, toMs: now },
      preset: '1h',
    });
  });
});

describe('AnnotationsQuerySchema', () => {
  it('takes epoch ms and refuses a reversed range with a field path', () => {
    expect(AnnotationsQuerySchema.parse({ from: '1796205600000', to: '1796209200000' })).toEqual({
      from: 1796205600000,
      to: 1796209200000,
    });
    const bad = AnnotationsQuerySchema.safeParse({ from: '1796209200000', to: '1796205600000' });
    expect(bad.success).toBe(false);
    expect(bad.error?.issues[0]?.path).toEqual(['from']);
    expect(AnnotationsQuerySchema.safeParse({ from: 'yesterday' }).success).toBe(false);
  });
});
