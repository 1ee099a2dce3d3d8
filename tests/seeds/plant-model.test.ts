/**
 * The demo plant's generators (seeds/plant-model.ts): deterministic, the story load where the
 * story needs it, and the physics-ish models doing what their comments say.
 */
import { describe, expect, it } from 'vitest';
import { equivalentMinutes, type ProfilePoint } from '../../src/lib/domain/cure/arrhenius.ts';
import {
  DAY_MS,
  HOUR_MS,
  MINUTE_MS,
  SOAK_BAND_C,
  STORY_SOAK_MINUTES,
  anchorOf,
  bathViscosityAt,
  buildPlantModel,
  demoBathEvents,
  demoDipStrokes,
  demoOvenCycles,
  demoStoryLoad,
  historySeries,
  isShift,
  localDayStart,
  localHour,
  ovenSampleAt,
  siteOffsetMs,
  type OvenCycle,
} from '../../seeds/plant-model.ts';

// A fixed "now" (a Wednesday, 2026-12-02 10:37 UTC) so that every run sees the same plant.
const NOW = Date.UTC(2026, 11, 2, 10, 37, 12);
// The example window of seeds/windows.ts: Ea 75 kJ/mol, reference 110 °C, at least 150 equivalent minutes.
const CURE = { activationEnergyKJMol: 75, referenceC: 110 };
const MIN_EQUIVALENT_MINUTES = 150;

/** The coldest zone every 30 s from ramp start to load end, as the history samples it. */
function coldestProfile(c: OvenCycle): ProfilePoint[] {
  const track = buildPlantModel(NOW).ovens[c.oven];
  const out: ProfilePoint[] = [];
  for (let t = c.rampStartMs; t <= c.loadEndMs; t += 30_000) {
    const z = ovenSampleAt(track, t).zonesC.filter((v): v is number => v !== null);
    if (z.length) out.push({ minutes: (t - c.rampStartMs) / MINUTE_MS, tempC: Math.min(...z) });
  }
  return out;
}

describe('site time (Europe/London)', () => {
  it('switches to summer time on the last Sundays of March and October at 01:00 UTC (EU Directive 2000/84/EC)', () => {
    // 2026: last Sunday of March is the 29th, of October the 25th.
    expect(siteOffsetMs(Date.UTC(2026, 2, 29, 0, 59))).toBe(0);
    expect(siteOffsetMs(Date.UTC(2026, 2, 29, 1, 0))).toBe(HOUR_MS);
    expect(siteOffsetMs(Date.UTC(2026, 9, 25, 0, 59))).toBe(HOUR_MS);
    expect(siteOffsetMs(Date.UTC(2026, 9, 25, 1, 0))).toBe(0);
    // Local midnight of 1 July 2026 is 23:00 UTC the day before.
    expect(localDayStart(Date.UTC(2026, 6, 1, 12))).toBe(Date.UTC(2026, 5, 30, 23));
    expect(localHour(Date.UTC(2026, 6, 1, 5, 30))).toBeCloseTo(6.5, 9);
  });
});

describe('determinism', () => {
  it('rebuilds the same lists for the same hour, also after another anchor was built in between', () => {
    const first = JSON.stringify([demoOvenCycles(NOW), demoDipStrokes(NOW), demoBathEvents(NOW)]);
    buildPlantModel(NOW + 5 * HOUR_MS); // evicts the cache
    const again = JSON.stringify([
      demoOvenCycles(NOW + 20 * MINUTE_MS),
      demoDipStrokes(NOW - 30 * MINUTE_MS),
      demoBathEvents(NOW),
    ]);
    expect(anchorOf(NOW + 20 * MINUTE_MS)).toBe(anchorOf(NOW - 30 * MINUTE_MS));
    expect(again).toBe(first);
  });

  it('samples the same values for the same channel and time', () => {
    const a = [...historySeries(buildPlantModel(NOW), NOW - HOUR_MS, NOW)];
    buildPlantModel(NOW + 5 * HOUR_MS);
    const b = [...historySeries(buildPlantModel(NOW), NOW - HOUR_MS, NOW)];
    expect(b).toEqual(a);
  });
});

describe('oven cycles', () => {
  const cycles = demoOvenCycles(NOW, { days: 12 });

  it('are complete, ordered and inside the history', () => {
    expect(cycles.length).toBeGreaterThan(12 * 3); // at least two loads a working day per oven
    for (const c of cycles) {
      expect(c.loadStartMs).toBeGreaterThanOrEqual(anchorOf(NOW) - 12 * DAY_MS);
      expect(c.loadEndMs).toBeLessThanOrEqual(anchorOf(NOW));
      expect(
        c.loadStartMs < c.rampStartMs &&
          c.rampStartMs < c.soakStartMs &&
          c.soakStartMs < c.soakEndMs &&
          c.soakEndMs < c.loadEndMs,
      ).toBe(true);
      expect(isShift(c.loadStartMs)).toBe(true);
      for (const o of c.doorOpenings)
        expect(o.startMs >= c.loadStartMs && o.endMs <= c.loadEndMs && o.startMs < o.endMs).toBe(true);
    }
    for (const oven of ['oven-a', 'oven-b', 'oven-c']) {
      const mine = cycles.filter((c) => c.oven === oven);
      for (let i = 1; i < mine.length; i++) expect(mine[i]!.loadStartMs).toBeGreaterThan(mine[i - 1]!.loadEndMs);
    }
  });

  it('include a door opened mid-soak and a thermocouple dropout of 20–40 min', () => {
    const door = cycles.find((c) => c.kind === 'door-opened')!;
    const drop = cycles.find((c) => c.kind === 'tc-dropout')!;
    expect(
      door.doorOpenings.some((o) => o.reason === 'mid-soak' && o.startMs > door.soakStartMs && o.endMs < door.soakEndMs),
    ).toBe(true);
    const d = drop.dropouts[0]!;
    expect((d.endMs - d.startMs) / MINUTE_MS).toBeGreaterThanOrEqual(20);
    expect((d.endMs - d.startMs) / MINUTE_MS).toBeLessThanOrEqual(40);
    const zone = d.zone.endsWith('z1') ? 0 : 1;
    const mid = ovenSampleAt(buildPlantModel(NOW).ovens[drop.oven], (d.startMs + d.endMs) / 2);
    expect(mid.zonesC[zone]).toBeNull();
    expect(mid.zonesC[1 - zone]).not.toBeNull();
  });

  it('dip about 8 °C when the door opens mid-soak and recover within about 10 minutes', () => {
    const door = cycles.find((c) => c.kind === 'door-opened')!;
    const o = door.doorOpenings.find((x) => x.reason === 'mid-soak')!;
    const track = buildPlantModel(NOW).ovens[door.oven];
    const before = ovenSampleAt(track, o.startMs - 30_000).zonesC[0]!;
    const atClose = ovenSampleAt(track, o.endMs).zonesC[0]!;
    const tenAfter = ovenSampleAt(track, o.endMs + 10 * MINUTE_MS).zonesC[0]!;
    // Hand-computed from the model: 0.35·(110 − 21)·(1 − e^(−t/506 s)) for a 100–180 s opening = 5.8–9.8 °C.
    expect(before - atClose).toBeGreaterThan(5);
    expect(before - atClose).toBeLessThan(11);
    // e^(−10/3.3) ≈ 0.05 of the dip left after 10 minutes.
    expect(Math.abs(before - tenAfter)).toBeLessThan(1.2);
  });

  it('soak at the setpoint, zone 2 about 1.5 °C colder than zone 1', () => {
    const c = cycles.find((x) => x.kind === 'normal')!;
    const track = buildPlantModel(NOW).ovens[c.oven];
    const t = c.soakStartMs + 90 * MINUTE_MS;
    const s = ovenSampleAt(track, t);
    expect(s.setpointC).toBe(110);
    expect(s.zonesC[0]!).toBeCloseTo(110, 0);
    expect(s.zonesC[0]! - s.zonesC[1]!).toBeGreaterThan(0.7);
    expect(s.zonesC[0]! - s.zonesC[1]!).toBeLessThan(2.3);
    // The soak starts when the colder zone enters the ±5 °C band.
    expect(ovenSampleAt(track, c.soakStartMs + 60_000).zonesC[1]!).toBeGreaterThan(110 - SOAK_BAND_C - 0.5);
    expect(ovenSampleAt(track, c.soakStartMs - 120_000).zonesC[1]!).toBeLessThan(110 - SOAK_BAND_C);
  });
});

describe('the story load', () => {
  const story = demoStoryLoad(NOW);

  it('runs on oven-b about 9 days before now, in the 12-day test history, and is the only under-cured load', () => {
    expect(story.oven).toBe('oven-b');
    expect(story.kind).toBe('under-cured');
    const daysBack = (NOW - story.loadStartMs) / DAY_MS;
    expect(daysBack).toBeGreaterThan(8);
    expect(daysBack).toBeLessThan(11);
    const cycles = demoOvenCycles(NOW, { days: 12 });
    expect(cycles.filter((c) => c.kind === 'under-cured')).toEqual([story]);
    expect((story.soakEndMs - story.soakStartMs) / MINUTE_MS).toBe(STORY_SOAK_MINUTES);
    expect(story.doorOpenings.at(-1)!.startMs).toBeGreaterThan(story.soakEndMs);
  });

  it('gets far fewer Arrhenius equivalent minutes than a normal load, below the window minimum', () => {
    const normal = demoOvenCycles(NOW, { days: 12 }).find((c) => c.oven === 'oven-b' && c.kind === 'normal')!;
    const eqStory = equivalentMinutes(coldestProfile(story), CURE);
    const eqNormal = equivalentMinutes(coldestProfile(normal), CURE);
    // Hand-computed: the colder zone soaks at 108.5 °C, factor exp(−(75 000/8.314)·(1/381.65 − 1/383.15)) = 0.912;
    // 70 min × 0.912 = 63.8 and 180 min × 0.912 = 164.2 equivalent minutes, plus the ramp's and cool-down's tails.
    expect(eqStory).toBeGreaterThan(63.8);
    expect(eqStory).toBeLessThan(85);
    expect(eqNormal).toBeGreaterThan(164.2);
    expect(eqNormal).toBeLessThan(195);
    expect(eqStory).toBeLessThan(MIN_EQUIVALENT_MINUTES);
    expect(eqNormal).toBeGreaterThan(MIN_EQUIVALENT_MINUTES);
  });
});

describe('dip lines', () => {
  const strokes = demoDipStrokes(NOW, { days: 12 });

  it('stroke about every 4 minutes during shifts only, at the line targets with σ ≈ 0.02 mm/s', () => {
    for (const line of ['dip-1', 'dip-2'] as const) {
      const mine = strokes.filter((s) => s.line === line);
      expect(mine.every((s) => isShift(s.tMs))).toBe(true);
      const gaps = mine
        .slice(1)
        .map((s, i) => s.tMs - mine[i]!.tMs)
        .filter((g) => g < 20 * MINUTE_MS);
      const meanGapMin = gaps.reduce((a, b) => a + b, 0) / gaps.length / MINUTE_MS;
      expect(meanGapMin).toBeGreaterThan(3.8);
      expect(meanGapMin).toBeLessThan(4.2);
      const target = 2.0; // both example windows: 1.8–2.2 mm/s, target 2.0 (seeds/windows.ts)
      const speeds = mine.map((s) => s.speedMmS);
      const median = [...speeds].sort((a, b) => a - b)[Math.floor(speeds.length / 2)]!;
      expect(Math.abs(median - target)).toBeLessThan(0.01);
      // Successive differences: σ_diff = √2·σ, robust to the rare slow drift.
      const diffs = mine.slice(1).map((s, i) => s.speedMmS - mine[i]!.speedMmS);
      const sigma = Math.sqrt(diffs.reduce((a, d) => a + d * d, 0) / diffs.length / 2);
      expect(sigma).toBeGreaterThan(0.017);
      expect(sigma).toBeLessThan(0.023);
    }
  });
});

describe('baths', () => {
  const events = demoBathEvents(NOW, { days: 21 });

  it('top up solvent by mass balance once viscosity has crept past ~12.3 mm²/s, back near 8.8 mm²/s', () => {
    const solvent = events.filter((e) => e.kind === 'solvent-addition');
    expect(solvent.length).toBeGreaterThanOrEqual(4);
    expect(solvent.some((e) => e.viscosityBeforeMm2S > 12.5)).toBe(true); // past the window high
    for (const e of solvent) {
      expect(e.viscosityBeforeMm2S).toBeGreaterThan(12.1);
      expect(e.viscosityAfterMm2S).toBeLessThan(9.6);
      // Solids are conserved (hand-check of the mass balance): s_after = s_before·M/(M + m).
      const massBefore = e.bathMassAfterKg - e.massKg!;
      expect(e.solidsAfterPct).toBeCloseTo((e.solidsBeforePct * massBefore) / e.bathMassAfterKg, 1);
    }
    expect(events.some((e) => e.kind === 'filter-change' && e.massKg === null)).toBe(true);
    expect(events.some((e) => e.kind === 'fresh-lacquer-addition' && e.massKg! > 0)).toBe(true);
  });

  it('creeps about +0.07 mm²/s per running hour between additions', () => {
    // dν/dt = ν·k·ds/dt with ds/dt = s·(0.05 kg/h)/M; at ν 10.5 mm²/s, s 0.31, M 35 kg, k = ln(12.5/8.8)/0.022 = 15.95:
    // 10.5 · 15.95 · 0.31 · 0.05/35 ≈ 0.074 mm²/s per hour (hand-computed); ±30 % day-to-day evaporation.
    const model = buildPlantModel(NOW);
    let checked = 0;
    for (let d = 1; d <= 12; d++) {
      const from = localDayStart(NOW - d * DAY_MS) + 9 * HOUR_MS;
      const to = from + 8 * HOUR_MS;
      if (!isShift(from) || events.some((e) => e.line === 'dip-1' && e.tMs >= from && e.tMs <= to)) continue;
      const perHour = (bathViscosityAt(model.baths['dip-1'], to) - bathViscosityAt(model.baths['dip-1'], from)) / 8;
      expect(perHour).toBeGreaterThan(0.04);
      expect(perHour).toBeLessThan(0.12);
      checked++;
    }
    expect(checked).toBeGreaterThan(2);
  });
});

describe('sampled history', () => {
  it('samples ovens every 30 s, bath and room every 60 s, viscosity every 10 min', () => {
    const model = buildPlantModel(NOW);
    // A night hour: no loads, no door or setpoint edges, no strokes.
    const from = localDayStart(NOW) + 2 * HOUR_MS;
    const series = [...historySeries(model, from, from + HOUR_MS)];
    const count = (asset: string, channel: string) => series.find((s) => s.asset === asset && s.channel === channel)!.tMs.length;
    expect(count('oven-a-z1', 'air-temp')).toBe(120);
    expect(count('oven-a', 'setpoint')).toBe(120);
    expect(count('dip-1-hc', 'bath-temp')).toBe(60);
    expect(count('dip-2', 'room-rh')).toBe(60);
    expect(count('dip-1-hc', 'viscosity')).toBe(6);
    expect(count('dip-1-hc', 'withdrawal-speed')).toBe(0);
    expect(count('uv-1', 'irradiance')).toBe(0); // the lamp is off at night
    for (const s of series) for (let i = 1; i < s.tMs.length; i++) expect(s.tMs[i]!).toBeGreaterThan(s.tMs[i - 1]!);
  });
});
