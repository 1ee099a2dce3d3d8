// Site-time formatting for charts and the Floor. Zone rules: UK clocks go forward at 01:00 UTC
// on the last Sunday of March and back at 01:00 UTC on the last Sunday of October (Summer Time
// Act 1972 as amended; the IANA tz database, zone Europe/London). In 2026 those Sundays are
// 29 March and 25 October (hand-computed from 1 January 2026, a Thursday). US Eastern is
// UTC−5 in December; India is UTC+5:30 all year (IANA zones America/New_York, Asia/Kolkata).
import { describe, expect, it } from 'vitest';
import {
  formatAge,
  formatClock,
  formatRange,
  formatSiteTime,
  fromLocalInput,
  isoInZone,
  tickLabel,
  timeTicks,
  toLocalInput,
  zoneAbbreviation,
  zoneOffsetMinutes,
  zonesOver,
  siteDayBounds,
} from '../../src/lib/shared/time.ts';

const LDN = 'Europe/London';
const winter = Date.UTC(2026, 11, 2, 14, 5, 9); // 2026-12-02 14:05:09 UTC
const summer = Date.UTC(2026, 6, 1, 8, 30, 0, 250); // 2026-07-01 08:30:00.250 UTC
const springChange = Date.UTC(2026, 2, 29, 1, 0, 0);
const autumnChange = Date.UTC(2026, 9, 25, 1, 0, 0);

describe('zone names and offsets (Europe/London)', () => {
  it('GMT in winter, BST in summer', () => {
    expect(zoneAbbreviation(winter, LDN)).toBe('GMT');
    expect(zoneAbbreviation(summer, LDN)).toBe('BST');
  });
  it('changes exactly at 01:00 UTC on the last Sundays of March and October 2026', () => {
    expect(zoneOffsetMinutes(springChange - 1000, LDN)).toBe(0);
    expect(zoneOffsetMinutes(springChange, LDN)).toBe(60);
    expect(zoneOffsetMinutes(autumnChange - 1000, LDN)).toBe(60);
    expect(zoneOffsetMinutes(autumnChange, LDN)).toBe(0);
  });
  it('lists both names over a range that crosses the October change', () => {
    expect(zonesOver(autumnChange - 86_400_000, autumnChange + 86_400_000, LDN)).toBe('BST/GMT');
    expect(zonesOver(winter - 3_600_000, winter, LDN)).toBe('GMT');
  });
});

describe('isoInZone (RFC 3339 with the site offset)', () => {
  it.each([
    [winter, LDN, '2026-12-02T14:05:09.000+00:00'],
    [summer, LDN, '2026-07-01T09:30:00.250+01:00'],
    [winter, 'America/New_York', '2026-12-02T09:05:09.000-05:00'],
    [winter, 'Asia/Kolkata', '2026-12-02T19:35:09.000+05:30'],
  ])('%i in %s → %s', (ms, tz, iso) => {
    expect(isoInZone(ms, tz)).toBe(iso);
    expect(Date.parse(iso)).toBe(ms); // the text names the same instant
  });
});

describe('clock, range and tick labels', () => {
  it('prints the zone with the clock time', () => {
    expect(formatClock(winter, LDN)).toBe('14:05 GMT');
    expect(formatClock(summer, LDN, { seconds: true })).toBe('09:30:00 BST');
  });
  it('prints the date once when both ends share it', () => {
    expect(formatRange(winter - 3_600_000, winter, LDN)).toBe('2026-12-02 13:05 – 14:05 GMT');
    expect(formatRange(autumnChange - 3_600_000, autumnChange + 3_600_000, LDN)).toBe(
      '2026-10-25 01:00 BST – 2026-10-25 02:00 GMT',
    );
  });
  it.each([
    [60_000, '14:05:09'],
    [3_600_000, '14:05'],
    [7 * 86_400_000, 'Wed 02 14:05'],
    [30 * 86_400_000, '02 Dec'],
    [500 * 86_400_000, 'Dec 2026'],
  ])('span %i ms → %s', (span, label) => {
    expect(tickLabel(winter, LDN, span)).toBe(label);
  });
});

describe('formatAge', () => {
  it.each([
    [-5000, '0 s'],
    [4_999, '4 s'],
    [125_000, '2 min 05 s'],
    [(3 * 60 + 10) * 60_000, '3 h 10 min'],
    [(2 * 24 + 4) * 3_600_000 + 59_000, '2 d 4 h'],
  ])('%i ms → %s', (ms, text) => {
    expect(formatAge(ms)).toBe(text);
  });
});

describe('datetime-local input in the site zone', () => {
  it('round-trips an ordinary summer time', () => {
    expect(toLocalInput(summer, LDN)).toBe('2026-07-01T09:30');
    expect(fromLocalInput('2026-07-01T09:30', LDN)).toBe(Date.UTC(2026, 6, 1, 8, 30));
  });
  it('reads a time in the skipped spring hour forward by the gap (01:30 → 02:30 BST)', () => {
    expect(fromLocalInput('2026-03-29T01:30', LDN)).toBe(Date.UTC(2026, 2, 29, 1, 30));
  });
  it('reads a time in the repeated autumn hour as the earlier instant (01:30 BST)', () => {
    expect(fromLocalInput('2026-10-25T01:30', LDN)).toBe(Date.UTC(2026, 9, 25, 0, 30));
  });
  it('refuses unreadable text', () => {
    expect(fromLocalInput('yesterday', LDN)).toBeNaN();
  });
});

describe('timeTicks: round ticks on the site wall clock', () => {
  it('24 h from 10:24 GMT, at most 10 ticks → every 3 h (2.4 h rounds up the ladder) from 12:00', () => {
    const from = Date.UTC(2026, 11, 1, 10, 24);
    const ticks = timeTicks(from, from + 86_400_000, LDN, 10);
    expect(ticks.map((t) => formatClock(t, LDN))).toEqual([
      '12:00 GMT',
      '15:00 GMT',
      '18:00 GMT',
      '21:00 GMT',
      '00:00 GMT',
      '03:00 GMT',
      '06:00 GMT',
      '09:00 GMT',
    ]);
  });
  it('aligns to the BST wall clock in summer (an hour from 08:10 UTC = 09:10 BST, 10-min steps from 09:20 BST)', () => {
    const from = Date.UTC(2026, 6, 1, 8, 10);
    const ticks = timeTicks(from, from + 3_600_000, LDN, 6);
    // 60 min / 6 = 10 min per tick
    expect(ticks.map((t) => formatClock(t, LDN))).toEqual([
      '09:10 BST',
      '09:20 BST',
      '09:30 BST',
      '09:40 BST',
      '09:50 BST',
      '10:00 BST',
      '10:10 BST',
    ]);
  });
  it('7 days → daily ticks at local midnight', () => {
    const from = Date.UTC(2026, 10, 25, 10, 24); // Wed 25 Nov
    const ticks = timeTicks(from, from + 7 * 86_400_000, LDN, 8);
    expect(ticks.map((t) => tickLabel(t, LDN, 7 * 86_400_000))).toEqual([
      'Thu 26',
      'Fri 27',
      'Sat 28',
      'Sun 29',
      'Mon 30',
      'Tue 01',
      'Wed 02',
    ]);
  });
  it('30 days with at most 6 ticks → Mondays (7-day steps)', () => {
    const from = Date.UTC(2026, 10, 2, 12); // Mon 2 Nov 2026
    const ticks = timeTicks(from, from + 30 * 86_400_000, LDN, 6);
    expect(ticks.map((t) => tickLabel(t, LDN, 30 * 86_400_000))).toEqual(['09 Nov', '16 Nov', '23 Nov', '30 Nov']);
  });
  it('a year with at most 6 ticks → every 2 months (365 / 60.88 = 5.995) on the 1st of odd months', () => {
    const from = Date.UTC(2026, 0, 15);
    const ticks = timeTicks(from, from + 365 * 86_400_000, LDN, 6);
    expect(ticks.map((t) => formatSiteTime(t, LDN))).toEqual([
      '2026-03-01 00:00 GMT',
      '2026-05-01 00:00 BST',
      '2026-07-01 00:00 BST',
      '2026-09-01 00:00 BST',
      '2026-11-01 00:00 GMT',
      '2027-01-01 00:00 GMT',
    ]);
  });
});

describe('siteDayBounds (site-local day filters)', () => {
  it('covers a 25-hour day at the autumn clock change exactly (Europe/London, 25 Oct 2026; hand-computed)', () => {
    // 00:00 BST (UTC+1) on the 25th is 23:00 UTC on the 24th; the next midnight is 00:00 GMT on the 26th.
    expect(siteDayBounds('2026-10-25', '2026-10-25', 'Europe/London')).toEqual({
      from: '2026-10-24T23:00:00.000Z',
      to: '2026-10-26T00:00:00.000Z',
    });
  });
  it('covers a 23-hour day at the spring clock change (29 Mar 2026; hand-computed)', () => {
    expect(siteDayBounds('2026-03-29', '2026-03-29', 'Europe/London')).toEqual({
      from: '2026-03-29T00:00:00.000Z',
      to: '2026-03-29T23:00:00.000Z',
    });
  });
  it('passes absent and non-date values through for the schema to judge', () => {
    expect(siteDayBounds(undefined, 'yesterday', 'Europe/London')).toEqual({ from: undefined, to: 'yesterday' });
  });
});
