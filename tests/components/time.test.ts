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
  fromLocalInput,
  isoInZone,
  tickLabel,
  toLocalInput,
  zoneAbbreviation,
  zoneOffsetMinutes,
  zonesOver,
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
    expect(formatRange(autumnChange - 3_600_000, autumnChange + 3_600_000, LDN)).toBe('2026-10-25 01:00 BST – 2026-10-25 02:00 GMT');
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
