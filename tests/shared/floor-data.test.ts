// Pure helpers of the Floor island (src/lib/shared/floor.ts); expectations hand-computed.
import { describe, expect, it } from 'vitest';
import { appendSpark, applyLatest, formatValue, shortChannelName, sparkPaths } from '../../src/lib/shared/floor.ts';

describe('shortChannelName', () => {
  it.each([
    ['Line 1 bath viscosity', 'Dip line 1', 'Bath viscosity'],
    ['Oven A zone 1 air', 'Cure oven A', 'Zone 1 air'],
    ['Oven A setpoint', 'Cure oven A', 'Setpoint'],
    ['UV lamp irradiance', 'UV spin coater 1', 'UV lamp irradiance'],
    ['Spin speed', 'UV spin coater 1', 'Spin speed'],
    ['Line 12 room humidity', 'Dip line 1', 'Line 12 room humidity'],
  ])('%s on %s → %s', (name, tile, short) => {
    expect(shortChannelName(name, tile)).toBe(short);
  });
});

describe('appendSpark', () => {
  const pts = [
    { x: 0, y: 1 },
    { x: 10, y: 2 },
    { x: 20, y: 3 },
  ];
  it('appends a newer point and drops points older than the window before it', () => {
    // window 15 ms before x = 30 → cut at 15: keeps 20 and the new point
    expect(appendSpark(pts, { x: 30, y: 4 }, 15)).toEqual([
      { x: 20, y: 3 },
      { x: 30, y: 4 },
    ]);
  });
  it('ignores a point that is not newer than the last', () => {
    expect(appendSpark(pts, { x: 20, y: 9 }, 100)).toBe(pts);
  });
});

describe('applyLatest', () => {
  const latest = new Map([[1, { tMs: 100, value: 9.5 }]]);
  it('takes the newest per channel and never goes back in time', () => {
    const next = applyLatest(latest, [
      { channelId: 1, tMs: 90, value: 1 },
      { channelId: 1, tMs: 120, value: 9.7 },
      { channelId: 1, tMs: 110, value: 9.6 },
      { channelId: 2, tMs: 50, value: 20 },
    ]);
    expect(next.get(1)).toEqual({ tMs: 120, value: 9.7 });
    expect(next.get(2)).toEqual({ tMs: 50, value: 20 });
    expect(latest.get(1)).toEqual({ tMs: 100, value: 9.5 }); // input untouched
  });
  it('returns the same map when nothing is newer', () => {
    expect(applyLatest(latest, [{ channelId: 1, tMs: 100, value: 3 }])).toBe(latest);
  });
});

describe('sparkPaths', () => {
  it('maps time to x and value to y (top = high) and splits at gaps', () => {
    // box 100 × 10, time 0–100, values 0–10
    expect(
      sparkPaths(
        [
          { x: 0, y: 0 },
          { x: 50, y: 5 },
          { x: 60, y: null },
          { x: 100, y: 12 },
        ],
        0,
        100,
        0,
        10,
        100,
        10,
      ),
    ).toEqual(['0.0,10.0 50.0,5.0', '100.0,0.0']);
  });
});

describe('formatValue', () => {
  it.each([
    [9.5234, 'mm²/s', 'viscosity', 3, '9.52 mm²/s'], // window 8–11: span 3 → 2 decimals
    [112.46, '°C', 'air-temperature', 20, '112.5 °C'], // span 20 → 1 decimal
    [1512.4, 'rpm', 'spin-speed', 6000, '1512 rpm'], // span 6000 → 0 decimals
    [2.0456, 'mm/s', 'withdrawal-speed', 0.5, '2.046 mm/s'], // span 0.5 → 3 decimals
    [1, 'open=1', 'door', 1, 'Open'],
    [0, 'open=1', 'door', 1, 'Closed'],
  ])('%f %s (%s, span %f) → %s', (v, unit, kind, span, text) => {
    expect(formatValue(v, unit, kind, span)).toBe(text);
  });
});
