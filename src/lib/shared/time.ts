/**
 * Time formatting for charts and live views, always in the site's time zone and always with
 * the zone printed ("14:05:09 GMT", "2026-07-01 09:30 BST"). Pure (Intl only), so the server
 * pages, the islands and the tests share one implementation. Full date-times come from
 * `site-time.ts` (re-exported here so chart code has one import).
 *
 * Zone names are the short names of the `en-GB` locale in the IANA zone database as the
 * JavaScript runtime ships it (ECMA-402 `timeZoneName: 'short'`): GMT/BST for Europe/London.
 */
export { formatSiteTime, siteDate, formatMinutes } from './site-time.ts';

const cache = new Map<string, Intl.DateTimeFormat>();

function partsFormatter(timeZone: string): Intl.DateTimeFormat {
  let f = cache.get(timeZone);
  if (!f) {
    f = new Intl.DateTimeFormat('en-GB', {
      timeZone,
      year: 'numeric',
      month: '2-digit',
      day: '2-digit',
      hour: '2-digit',
      minute: '2-digit',
      second: '2-digit',
      hourCycle: 'h23',
      timeZoneName: 'short',
      weekday: 'short',
    });
    cache.set(timeZone, f);
  }
  return f;
}

/** The wall-clock fields of an instant in `timeZone`. */
export interface WallTime {
  year: number;
  month: number;
  day: number;
  hour: number;
  minute: number;
  second: number;
  weekday: string;
  zone: string;
}

/** Wall-clock fields (year … second, weekday "Mon", zone "GMT") of epoch ms `ms` in `timeZone`. */
export function wallTime(ms: number, timeZone: string): WallTime {
  const p: Record<string, string> = {};
  for (const part of partsFormatter(timeZone).formatToParts(new Date(ms))) p[part.type] = part.value;
  return {
    year: Number(p['year']),
    month: Number(p['month']),
    day: Number(p['day']),
    hour: Number(p['hour']) % 24,
    minute: Number(p['minute']),
    second: Number(p['second']),
    weekday: p['weekday'] ?? '',
    zone: p['timeZoneName'] ?? timeZone,
  };
}

/** The zone's short name at that instant, e.g. "GMT" in December and "BST" in July for Europe/London. */
export function zoneAbbreviation(ms: number, timeZone: string): string {
  return wallTime(ms, timeZone).zone;
}

/** Offset of `timeZone` from UTC at that instant, minutes (Europe/London: 0 in winter, +60 in summer). */
export function zoneOffsetMinutes(ms: number, timeZone: string): number {
  const w = wallTime(ms, timeZone);
  const asUtc = Date.UTC(w.year, w.month - 1, w.day, w.hour, w.minute, w.second);
  const whole = Math.floor(ms / 1000) * 1000;
  return Math.round((asUtc - whole) / 60_000);
}

const pad = (n: number, w = 2) => String(Math.abs(n)).padStart(w, '0');

/**
 * ISO 8601 with the site's UTC offset (RFC 3339), milliseconds kept:
 * "2026-07-01T09:30:00.000+01:00". This is what CSV exports carry (unambiguous in any
 * spreadsheet, and shows the site's own wall time).
 */
export function isoInZone(ms: number, timeZone: string): string {
  const w = wallTime(ms, timeZone);
  const off = zoneOffsetMinutes(ms, timeZone);
  const millis = ((ms % 1000) + 1000) % 1000;
  const sign = off < 0 ? '-' : '+';
  return (
    `${w.year}-${pad(w.month)}-${pad(w.day)}T${pad(w.hour)}:${pad(w.minute)}:${pad(w.second)}.${pad(millis, 3)}` +
    `${sign}${pad(Math.trunc(Math.abs(off) / 60))}:${pad(Math.abs(off) % 60)}`
  );
}

/** "14:05 GMT", or "14:05:09 GMT" with seconds. */
export function formatClock(ms: number, timeZone: string, opts: { seconds?: boolean } = {}): string {
  const w = wallTime(ms, timeZone);
  return `${pad(w.hour)}:${pad(w.minute)}${opts.seconds ? `:${pad(w.second)}` : ''} ${w.zone}`;
}

const MONTHS = ['Jan', 'Feb', 'Mar', 'Apr', 'May', 'Jun', 'Jul', 'Aug', 'Sep', 'Oct', 'Nov', 'Dec'];

/**
 * A time-axis tick label sized to the visible span (the zone is printed once in the axis
 * title, not on every tick): up to 2 min "14:05:09"; up to 1.5 days "14:05"; up to 10 days
 * "Wed 02 14:00" (or "Wed 02" at midnight); beyond "02 Dec"; beyond 400 days "Dec 2026".
 */
export function tickLabel(ms: number, timeZone: string, spanMs: number): string {
  const w = wallTime(ms, timeZone);
  const mon = MONTHS[w.month - 1] ?? '';
  if (spanMs <= 2 * 60_000) return `${pad(w.hour)}:${pad(w.minute)}:${pad(w.second)}`;
  if (spanMs <= 36 * 3_600_000) return `${pad(w.hour)}:${pad(w.minute)}`;
  if (spanMs <= 10 * 86_400_000)
    return w.hour === 0 && w.minute === 0
      ? `${w.weekday} ${pad(w.day)}`
      : `${w.weekday} ${pad(w.day)} ${pad(w.hour)}:${pad(w.minute)}`;
  if (spanMs <= 400 * 86_400_000) return `${pad(w.day)} ${mon}`;
  return `${mon} ${w.year}`;
}

/**
 * The zone names in force over a range, e.g. "GMT" or "GMT/BST" when a clock change falls
 * inside (checked at both ends and every 6 hours between, enough for real-world zone rules).
 */
export function zonesOver(fromMs: number, toMs: number, timeZone: string): string {
  const names: string[] = [];
  const step = Math.max(6 * 3_600_000, Math.ceil((toMs - fromMs) / 2000));
  for (let t = fromMs; ; t += step) {
    const z = zoneAbbreviation(Math.min(t, toMs), timeZone);
    if (!names.includes(z)) names.push(z);
    if (t >= toMs) break;
  }
  return names.join('/');
}

/** "2026-12-02 13:05 – 14:05 GMT" (the date once when both ends share it). */
export function formatRange(fromMs: number, toMs: number, timeZone: string): string {
  const a = wallTime(fromMs, timeZone);
  const b = wallTime(toMs, timeZone);
  const date = (w: WallTime) => `${w.year}-${pad(w.month)}-${pad(w.day)}`;
  const hm = (w: WallTime) => `${pad(w.hour)}:${pad(w.minute)}`;
  if (date(a) === date(b) && a.zone === b.zone) return `${date(a)} ${hm(a)} – ${hm(b)} ${b.zone}`;
  return `${date(a)} ${hm(a)} ${a.zone} – ${date(b)} ${hm(b)} ${b.zone}`;
}

/**
 * How long ago, in plain words: "4 s", "2 min 05 s", "3 h 10 min", "2 d 4 h". Negative or
 * non-finite ages (clock skew) read "0 s".
 */
export function formatAge(ageMs: number): string {
  const s = Number.isFinite(ageMs) && ageMs > 0 ? Math.floor(ageMs / 1000) : 0;
  if (s < 60) return `${s} s`;
  if (s < 3600) return `${Math.floor(s / 60)} min ${pad(s % 60)} s`;
  if (s < 86_400) return `${Math.floor(s / 3600)} h ${pad(Math.floor((s % 3600) / 60))} min`;
  return `${Math.floor(s / 86_400)} d ${Math.floor((s % 86_400) / 3600)} h`;
}

/** The value of an `<input type="datetime-local">` ("YYYY-MM-DDTHH:mm") for an instant, in `timeZone`. */
export function toLocalInput(ms: number, timeZone: string): string {
  const w = wallTime(ms, timeZone);
  return `${w.year}-${pad(w.month)}-${pad(w.day)}T${pad(w.hour)}:${pad(w.minute)}`;
}

/**
 * The instant of a wall-clock time in `timeZone` ("YYYY-MM-DDTHH:mm[:ss]", as a datetime-local
 * input gives it). In the hour skipped by a spring clock change the result is shifted forward by
 * the gap; in the repeated autumn hour the earlier instant is taken. NaN for unreadable text.
 */
export function fromLocalInput(text: string, timeZone: string): number {
  const m = /^(\d{4})-(\d{2})-(\d{2})[T ](\d{2}):(\d{2})(?::(\d{2}))?$/.exec(text.trim());
  if (!m) return Number.NaN;
  const [y, mo, d, h, mi, s] = m.slice(1).map((x) => Number(x ?? 0)) as [number, number, number, number, number, number];
  const asUtc = Date.UTC(y, mo - 1, d, h, mi, s);
  // Candidate offsets: the zone's offsets a day either side and at the guess itself.
  const before = zoneOffsetMinutes(asUtc - 86_400_000, timeZone);
  const offsets = [before, zoneOffsetMinutes(asUtc, timeZone), zoneOffsetMinutes(asUtc + 86_400_000, timeZone)];
  const matches = offsets
    .map((o) => asUtc - o * 60_000)
    .filter((t) => {
      const w = wallTime(t, timeZone);
      return Date.UTC(w.year, w.month - 1, w.day, w.hour, w.minute, w.second) === asUtc;
    });
  // None matches inside a skipped hour: read it with the offset before the change (shifts forward).
  return matches.length ? Math.min(...matches) : asUtc - before * 60_000;
}

const SEC = 1000;
const MIN = 60 * SEC;
const HR = 60 * MIN;
const DAY = 24 * HR;
/** Tick steps below a day (ms), then whole days; months beyond. */
const TICK_STEPS = [
  SEC,
  2 * SEC,
  5 * SEC,
  10 * SEC,
  15 * SEC,
  30 * SEC,
  MIN,
  2 * MIN,
  5 * MIN,
  10 * MIN,
  15 * MIN,
  30 * MIN,
  HR,
  2 * HR,
  3 * HR,
  6 * HR,
  12 * HR,
  DAY,
  2 * DAY,
  7 * DAY,
];
const MONTH_STEPS = [1, 2, 3, 6, 12];

/** Midnight (00:00 wall time) of the site-zone day that holds `ms`. */
function localMidnight(ms: number, timeZone: string): number {
  const w = wallTime(ms, timeZone);
  return fromLocalInput(`${w.year}-${pad(w.month)}-${pad(w.day)}T00:00`, timeZone);
}

/**
 * Round time-axis ticks in the site's zone for `[fromMs, toMs]`: the smallest step of
 * 1 s … 30 s, 1 min … 30 min, 1 h, 2 h, 3 h, 6 h, 12 h, 1 d, 2 d, 7 d (weeks start on Monday),
 * 1, 2, 3, 6 or 12 months that gives at most `maxTicks` ticks, aligned to the site's wall
 * clock (so 3-hour ticks fall on 00:00, 03:00 … local time, days on local midnight).
 */
export function timeTicks(fromMs: number, toMs: number, timeZone: string, maxTicks = 10): number[] {
  const span = toMs - fromMs;
  if (!(span > 0) || !(maxTicks >= 1)) return [];
  const step = TICK_STEPS.find((s) => span / s <= maxTicks);
  const out: number[] = [];
  if (step !== undefined && step < DAY) {
    // Align to multiples of the step in wall-clock time (offset taken at the start of the range).
    const off = zoneOffsetMinutes(fromMs, timeZone) * MIN;
    for (let t = Math.ceil((fromMs + off) / step) * step - off; t <= toMs; t += step) out.push(t);
    return out;
  }
  if (step !== undefined) {
    const days = step / DAY;
    let t = localMidnight(fromMs, timeZone);
    if (t < fromMs) t = localMidnight(t + 36 * HR, timeZone);
    for (let guard = 0; t <= toMs && guard < 800; guard++) {
      const w = wallTime(t, timeZone);
      const dayNumber = Math.floor(Date.UTC(w.year, w.month - 1, w.day) / DAY);
      // Weeks start on Monday (1970-01-05 was a Monday: day 4 of the epoch).
      const keep = days === 7 ? (dayNumber - 4) % 7 === 0 : dayNumber % days === 0;
      if (keep) out.push(t);
      t = localMidnight(t + 36 * HR, timeZone);
    }
    return out;
  }
  const months =
    MONTH_STEPS.find((m) => span / (m * 30.44 * DAY) <= maxTicks) ?? Math.ceil(span / (maxTicks * 365.25 * DAY)) * 12;
  const w0 = wallTime(fromMs, timeZone);
  for (let k = 0, y = w0.year, m = w0.month; k < 2400; k++) {
    const t = fromLocalInput(`${y}-${pad(m)}-01T00:00`, timeZone);
    if (t > toMs) break;
    if (t >= fromMs && (y * 12 + m - 1) % months === 0) out.push(t);
    m++;
    if (m > 12) {
      m = 1;
      y++;
    }
  }
  return out;
}

/**
 * A date filter given as site-local days (`YYYY-MM-DD`) → ISO instants: `from` is 00:00 of the
 * first day and `to` is 00:00 of the day after the last, both in the site's zone, so a day of
 * 23 or 25 hours (a clock change) is covered exactly. Anything else passes through unchanged
 * for the caller's schema to judge.
 */
export function siteDayBounds(
  from: string | undefined,
  to: string | undefined,
  timeZone: string,
): { from: string | undefined; to: string | undefined } {
  const midnight = (d: string | undefined, addDays: number): string | undefined => {
    const m = d ? /^(\d{4})-(\d{2})-(\d{2})$/.exec(d) : null;
    if (!m) return d;
    const next = new Date(Date.UTC(Number(m[1]), Number(m[2]) - 1, Number(m[3]) + addDays));
    const ms = fromLocalInput(`${next.toISOString().slice(0, 10)}T00:00`, timeZone);
    return Number.isFinite(ms) ? new Date(ms).toISOString() : d;
  };
  return { from: midnight(from, 0), to: midnight(to, 1) };
}
