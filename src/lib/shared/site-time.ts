/**
 * Times shown in the site's time zone, always with the zone printed (e.g. "2026-12-02 14:05 GMT",
 * "2026-07-01 09:30 BST"), and durations in plain words. Pure (Intl only).
 */

const formatters = new Map<string, Intl.DateTimeFormat>();

function fmt(timeZone: string, seconds: boolean): Intl.DateTimeFormat {
  const key = `${timeZone}|${seconds}`;
  let f = formatters.get(key);
  if (!f) {
    f = new Intl.DateTimeFormat('en-GB', {
      timeZone,
      year: 'numeric',
      month: '2-digit',
      day: '2-digit',
      hour: '2-digit',
      minute: '2-digit',
      ...(seconds ? { second: '2-digit' } : {}),
      hourCycle: 'h23',
      timeZoneName: 'short',
    });
    formatters.set(key, f);
  }
  return f;
}

/** "YYYY-MM-DD HH:mm[:ss] ZONE" in `timeZone`; '—' for null/NaN. */
export function formatSiteTime(
  ms: number | string | Date | null | undefined,
  timeZone: string,
  opts: { seconds?: boolean } = {},
): string {
  if (ms === null || ms === undefined) return '—';
  const t = typeof ms === 'number' ? ms : new Date(ms).getTime();
  if (!Number.isFinite(t)) return '—';
  const parts = Object.fromEntries(
    fmt(timeZone, !!opts.seconds)
      .formatToParts(new Date(t))
      .map((p) => [p.type, p.value]),
  );
  const sec = opts.seconds ? `:${parts['second']}` : '';
  return `${parts['year']}-${parts['month']}-${parts['day']} ${parts['hour']}:${parts['minute']}${sec} ${parts['timeZoneName']}`;
}

/** "YYYY-MM-DD" of an instant in `timeZone`. */
export function siteDate(ms: number, timeZone: string): string {
  return formatSiteTime(ms, timeZone).slice(0, 10);
}

/** A duration in minutes as "3 h 05 min" / "42 min" / "35 s". */
export function formatMinutes(minutes: number | null | undefined): string {
  if (minutes === null || minutes === undefined || !Number.isFinite(minutes)) return '—';
  if (Math.abs(minutes) < 1) return `${Math.round(minutes * 60)} s`;
  const m = Math.round(minutes);
  if (Math.abs(m) < 60) return `${m} min`;
  const h = Math.trunc(m / 60);
  return `${h} h ${String(Math.abs(m % 60)).padStart(2, '0')} min`;
}

/** The ISO week key (e.g. "2026-W49") of an instant in `timeZone` (ISO 8601 week date). */
export function isoWeekKey(ms: number, timeZone: string): string {
  const [y, mo, d] = siteDate(ms, timeZone).split('-').map(Number) as [number, number, number];
  const date = new Date(Date.UTC(y, mo - 1, d));
  const dow = date.getUTCDay() || 7; // Monday = 1 … Sunday = 7
  date.setUTCDate(date.getUTCDate() + 4 - dow); // Thursday of the same ISO week
  const yearStart = Date.UTC(date.getUTCFullYear(), 0, 1);
  const week = Math.ceil(((date.getTime() - yearStart) / 86_400_000 + 1) / 7);
  return `${date.getUTCFullYear()}-W${String(week).padStart(2, '0')}`;
}
