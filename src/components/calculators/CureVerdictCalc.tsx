/**
 * Cure-verdict calculator island: paste or import a temperature profile (minutes, °C — or an
 * exported trend with ISO times), enter the cure window, and see the verdict the oven-load
 * record would give (the server runs the same domain code), its reasons and a small chart.
 */
import { useId, useMemo, useState, type ChangeEvent, type SyntheticEvent } from 'react';
import { apiFetch, ApiError } from '../../lib/client/api.ts';
import { CURE_VERDICT_RULE } from '../../lib/domain/cure/cure-record.ts';
import { lttb } from '../../lib/domain/series/lttb.ts';
import { CURE_VERDICT_MAX_READINGS, type CureVerdictOutput } from '../../lib/shared/calc.ts';
import { VerdictBadge } from '../quality/marks.tsx';
import { num, Out, sig } from './CalcForm.tsx';

const SAMPLE = [
  '# minutes, °C (coldest thermocouple) — an example plan: ramp, 150-minute soak at 110 °C, cool',
  '0, 25',
  '30, 110',
  '180, 110',
  '210, 60',
].join('\n');

/** Window fields: name, label, unit, example value, hint. */
const WINDOW_FIELDS = [
  {
    name: 'minTempC',
    label: 'Minimum cure temperature',
    unit: '°C',
    initial: '100',
    hint: 'Equivalent minutes count only at or above it.',
  },
  { name: 'minEquivalentMinutes', label: 'Required equivalent minutes', unit: 'min at reference', initial: '150' },
  { name: 'referenceC', label: 'Reference temperature', unit: '°C', initial: '110' },
  {
    name: 'activationEnergyKJMol',
    label: 'Activation energy Ea',
    unit: 'kJ/mol',
    initial: '75',
    hint: 'From the lacquer maker or the lab’s validation (75 here is only an example).',
  },
  { name: 'maxPartTempC', label: 'Maximum part temperature', unit: '°C', initial: '125' },
  { name: 'maxRampCPerMin', label: 'Maximum ramp rate', unit: '°C/min', initial: '5' },
  { name: 'maxGapSeconds', label: 'Longest spacing that is not a data gap', unit: 's', initial: '120' },
  { name: 'minSoakMinutes', label: 'Minimum soak at or above the minimum (optional)', unit: 'min', initial: '' },
] as const;

export interface ProfileParse {
  readings: { minutes: number; tempC: number }[];
  /** Line-numbered problems (1-based); empty when every data line parsed. */
  problems: string[];
}

/**
 * Profile text → readings. Each data line holds a time and a temperature separated by a comma,
 * semicolon, tab or spaces; the time is elapsed minutes, or an ISO 8601 date-time (then minutes
 * are counted from the first line). Blank lines, `#` comments and a header line are skipped.
 */
export function parseProfile(text: string): ProfileParse {
  const readings: { minutes: number; tempC: number }[] = [];
  const problems: string[] = [];
  let t0: number | null = null;
  text.split(/\r?\n/).forEach((raw, i) => {
    const line = raw.trim();
    if (!line || line.startsWith('#')) return;
    const cells = line.includes(',') || line.includes(';') || line.includes('\t') ? line.split(/[,;\t]/) : line.split(/\s+/);
    const [a = '', b = ''] = cells.map((c) => c.trim().replace(/^"|"$/g, ''));
    const temp = Number(b.replace(',', '.'));
    let minutes = Number(a.replace(',', '.'));
    if (!Number.isFinite(minutes) && /\d{4}-\d{2}-\d{2}/.test(a)) {
      const ms = Date.parse(a);
      if (Number.isFinite(ms)) {
        t0 ??= ms;
        minutes = (ms - t0) / 60000;
      }
    }
    if (!Number.isFinite(minutes) || !Number.isFinite(temp)) {
      if (readings.length === 0 && problems.length === 0 && !/\d/.test(b)) return; // a header line
      problems.push(`line ${i + 1}: “${line.slice(0, 40)}” is not a time and a temperature`);
      return;
    }
    readings.push({ minutes, tempC: temp });
  });
  return { readings, problems };
}

/**
 * A plan given as corner points → readings every `stepMinutes` along the straight lines between
 * them (the corners kept), so that a plan is not judged as data gaps.
 */
export function fillPlan(corners: readonly { minutes: number; tempC: number }[], stepMinutes: number) {
  const out: { minutes: number; tempC: number }[] = [];
  corners.forEach((c, i) => {
    const next = corners[i + 1];
    out.push(c);
    if (!next) return;
    const span = next.minutes - c.minutes;
    const n = Math.ceil(span / stepMinutes);
    for (let k = 1; k < n; k++) {
      const f = k / n;
      out.push({ minutes: c.minutes + f * span, tempC: c.tempC + f * (next.tempC - c.tempC) });
    }
  });
  return out;
}

const fmt = (v: number) => (v === 0 ? '0' : sig(v));

function ProfileChart({
  readings,
  minTempC,
  maxPartTempC,
}: {
  readings: { minutes: number; tempC: number }[];
  minTempC: number | undefined;
  maxPartTempC: number | undefined;
}) {
  const pts = useMemo(
    () =>
      lttb(
        readings.map((r) => ({ x: r.minutes, y: r.tempC })),
        600,
      ),
    [readings],
  );
  if (pts.length < 2) return null;
  const W = 600;
  const H = 200;
  const pad = { l: 40, r: 10, t: 10, b: 24 };
  const xs = pts.map((p) => p.x);
  const ys = [
    ...pts.map((p) => p.y),
    ...(minTempC !== undefined ? [minTempC] : []),
    ...(maxPartTempC !== undefined ? [maxPartTempC] : []),
  ];
  const x0 = Math.min(...xs);
  const x1 = Math.max(...xs, x0 + 1);
  const y0 = Math.floor(Math.min(...ys) / 10) * 10;
  const y1 = Math.ceil(Math.max(...ys) / 10) * 10 + 5;
  const sx = (x: number) => pad.l + ((x - x0) / (x1 - x0)) * (W - pad.l - pad.r);
  const sy = (y: number) => H - pad.b - ((y - y0) / (y1 - y0)) * (H - pad.t - pad.b);
  const line = (y: number, label: string, dash: string) => (
    <g>
      <line
        x1={pad.l}
        x2={W - pad.r}
        y1={sy(y)}
        y2={sy(y)}
        stroke="currentColor"
        strokeDasharray={dash}
        strokeWidth="1"
        opacity="0.7"
      />
      <text x={W - pad.r - 2} y={sy(y) - 3} textAnchor="end" fontSize="10" fill="currentColor">
        {label}
      </text>
    </g>
  );
  return (
    <figure className="mt-3" data-testid="cure-verdict-chart">
      <svg
        viewBox={`0 0 ${W} ${H}`}
        className="w-full text-ink-soft"
        role="img"
        aria-label="Temperature profile against the cure window"
      >
        <line x1={pad.l} x2={pad.l} y1={pad.t} y2={H - pad.b} stroke="currentColor" />
        <line x1={pad.l} x2={W - pad.r} y1={H - pad.b} y2={H - pad.b} stroke="currentColor" />
        <text x={pad.l - 4} y={sy(y1) + 8} textAnchor="end" fontSize="10" fill="currentColor">
          {y1}
        </text>
        <text x={pad.l - 4} y={sy(y0)} textAnchor="end" fontSize="10" fill="currentColor">
          {y0} °C
        </text>
        <text x={pad.l} y={H - 6} fontSize="10" fill="currentColor">
          {fmt(x0)} min
        </text>
        <text x={W - pad.r} y={H - 6} textAnchor="end" fontSize="10" fill="currentColor">
          {fmt(x1)} min
        </text>
        {minTempC !== undefined && line(minTempC, `minimum ${minTempC} °C`, '4 3')}
        {maxPartTempC !== undefined && line(maxPartTempC, `maximum ${maxPartTempC} °C`, '1 3')}
        <polyline
          fill="none"
          stroke="#1f3b57"
          strokeWidth="1.6"
          points={pts.map((p) => `${sx(p.x).toFixed(1)},${sy(p.y).toFixed(1)}`).join(' ')}
        />
      </svg>
      <figcaption className="text-xs text-ink-soft">
        The profile as entered{readings.length > pts.length ? ` (drawn with ${pts.length} of ${readings.length} points)` : ''};
        dashed: the window’s minimum; dotted: the maximum part temperature.
      </figcaption>
    </figure>
  );
}

export function CureVerdictCalc() {
  const id = useId();
  const [profile, setProfile] = useState(SAMPLE);
  const [win, setWin] = useState<Record<string, string>>(() => Object.fromEntries(WINDOW_FIELDS.map((f) => [f.name, f.initial])));
  const [result, setResult] = useState<{ r: CureVerdictOutput; readings: ProfileParse['readings'] } | null>(null);
  const [errors, setErrors] = useState<Record<string, string>>({});
  const [problem, setProblem] = useState<string | null>(null);
  const [busy, setBusy] = useState(false);
  const [fileNote, setFileNote] = useState<string | null>(null);
  const [isPlan, setIsPlan] = useState(true);

  async function importFile(e: ChangeEvent<HTMLInputElement>) {
    const file = e.target.files?.[0];
    if (!file) return;
    const text = await file.text();
    setProfile(text);
    setIsPlan(false);
    setFileNote(`${file.name}: ${parseProfile(text).readings.length.toLocaleString('en-GB')} readings read.`);
  }

  async function submit(e: SyntheticEvent) {
    e.preventDefault();
    setProblem(null);
    setErrors({});
    const parsed = parseProfile(profile);
    if (parsed.problems.length > 0) {
      setResult(null);
      setErrors({
        readings:
          parsed.problems.slice(0, 3).join('; ') +
          (parsed.problems.length > 3 ? ` (and ${parsed.problems.length - 3} more)` : ''),
      });
      setProblem('Some profile lines could not be read.');
      return;
    }
    const window: Record<string, number> = {};
    for (const f of WINDOW_FIELDS) {
      const v = num(win[f.name]);
      if (v !== undefined) window[f.name] = v;
    }
    const gapS = window['maxGapSeconds'];
    const readings =
      isPlan && gapS !== undefined && gapS > 0 && parsed.readings.every((r, i, a) => i === 0 || r.minutes >= a[i - 1]!.minutes)
        ? fillPlan(parsed.readings, Math.min(0.5, gapS / 120))
        : parsed.readings;
    if (readings.length > CURE_VERDICT_MAX_READINGS) {
      setResult(null);
      setErrors({
        readings: `at most ${CURE_VERDICT_MAX_READINGS.toLocaleString('en-GB')} readings (this profile has ${readings.length.toLocaleString('en-GB')})`,
      });
      setProblem('The profile is too long for the calculator.');
      return;
    }
    setBusy(true);
    try {
      const r = await apiFetch<CureVerdictOutput>('/api/v1/calc/cure-verdict', { body: { readings, window } });
      setResult({ r, readings });
    } catch (err) {
      setResult(null);
      if (err instanceof ApiError) {
        const byField: Record<string, string> = {};
        for (const fe of err.errors) {
          const key = fe.path.startsWith('window.')
            ? fe.path.slice('window.'.length).split('.')[0]!
            : fe.path.startsWith('readings')
              ? 'readings'
              : '(form)';
          const where = key === 'readings' && fe.path.includes('.') ? `reading ${Number(fe.path.split('.')[1]) + 1}: ` : '';
          byField[key] = `${byField[key] ? `${byField[key]} ` : ''}${where}${fe.message}`;
        }
        setErrors(byField);
        setProblem(err.detail ?? err.title);
      } else setProblem('The calculation could not be run (network error).');
    } finally {
      setBusy(false);
    }
  }

  const err = (name: string, fid: string) =>
    errors[name] ? (
      <p id={`${fid}-err`} className="mt-0.5 text-sm font-bold text-alert-high">
        <span aria-hidden="true">✕ </span>
        {errors[name]}
      </p>
    ) : null;

  return (
    <div className="grid gap-6 lg:grid-cols-2">
      <form onSubmit={submit} noValidate className="space-y-3" aria-label="Profile and cure window">
        <div>
          <label htmlFor={`${id}-profile`}>
            Temperature profile, one reading per line: minutes (or ISO time), temperature
            <span className="font-normal text-ink-soft"> (min, °C; coldest thermocouple)</span>
          </label>
          <textarea
            id={`${id}-profile`}
            name="readings"
            className="num"
            rows={10}
            value={profile}
            aria-invalid={!!errors['readings']}
            aria-describedby={errors['readings'] ? `${id}-profile-err` : `${id}-profile-hint`}
            onChange={(e) => setProfile(e.target.value)}
          />
          {!errors['readings'] && (
            <p id={`${id}-profile-hint`} className="mt-0.5 text-xs text-ink-soft">
              Paste from a spreadsheet or import a CSV; at most {CURE_VERDICT_MAX_READINGS.toLocaleString('en-GB')} readings.
            </p>
          )}
          {err('readings', `${id}-profile`)}
          <label className="mt-2 flex items-center gap-2 text-sm font-normal">
            <input type="checkbox" checked={isPlan} onChange={(e) => setIsPlan(e.target.checked)} />
            These are the corner points of a plan: fill in a reading every 30 s along the straight lines between them (leave
            unticked for recorded readings, whose spacing is checked for data gaps)
          </label>
          <label htmlFor={`${id}-file`} className="mt-2 block text-sm">
            Import a CSV file
          </label>
          <input id={`${id}-file`} type="file" accept=".csv,.txt,text/csv,text/plain" onChange={importFile} />
          {fileNote && <p className="text-xs text-ink-soft">{fileNote}</p>}
        </div>
        <fieldset className="grid gap-3 sm:grid-cols-2">
          <legend className="font-bold">Cure window</legend>
          {WINDOW_FIELDS.map((f) => {
            const fid = `${id}-${f.name}`;
            return (
              <div key={f.name}>
                <label htmlFor={fid}>
                  {f.label}
                  <span className="font-normal text-ink-soft"> ({f.unit})</span>
                </label>
                <input
                  id={fid}
                  name={f.name}
                  inputMode="decimal"
                  className="num"
                  value={win[f.name] ?? ''}
                  aria-invalid={!!errors[f.name]}
                  aria-describedby={errors[f.name] ? `${fid}-err` : 'hint' in f ? `${fid}-hint` : undefined}
                  onChange={(e) => setWin({ ...win, [f.name]: e.target.value })}
                />
                {'hint' in f && !errors[f.name] && (
                  <p id={`${fid}-hint`} className="mt-0.5 text-xs text-ink-soft">
                    {f.hint}
                  </p>
                )}
                {err(f.name, fid)}
              </div>
            );
          })}
        </fieldset>
        <button type="submit" className="btn" disabled={busy} aria-busy={busy}>
          {busy ? 'Judging…' : 'Judge the cure'}
        </button>
      </form>
      <section aria-live="polite" aria-label="Result" className="panel bg-slate-panel/40">
        <h2 className="mb-2">Verdict</h2>
        {problem ? (
          <p role="alert" className="rounded border-l-4 border-alert-high bg-alert-bg p-2">
            <strong>✕ No verdict.</strong> {problem}
            {errors['(form)'] ? ` ${errors['(form)']}` : ''}
          </p>
        ) : result ? (
          <div data-testid="cure-verdict-result">
            <p className="mb-2">
              <VerdictBadge verdict={result.r.verdict} large />
            </p>
            <ul className="mb-2 list-disc pl-5 text-sm">
              {result.r.reasons.map((r) => (
                <li key={r}>{r}</li>
              ))}
            </ul>
            <dl>
              <Out
                label={`Equivalent minutes at ${win['referenceC']} °C`}
                value={fmt(result.r.equivalentMinutes)}
                unit="min"
                strong
              />
              <Out label={`Time at or above ${win['minTempC']} °C`} value={fmt(result.r.minutesAtOrAbove)} unit="min" />
              <Out label="Peak" value={result.r.peakC === null ? '—' : fmt(result.r.peakC)} unit="°C" />
            </dl>
            <ProfileChart readings={result.readings} minTempC={num(win['minTempC'])} maxPartTempC={num(win['maxPartTempC'])} />
          </div>
        ) : (
          <p className="text-ink-soft">Enter a profile and the window and press Judge the cure.</p>
        )}
        <details className="mt-3 text-xs text-ink-soft">
          <summary>How the verdict is reached</summary>
          <ol className="mt-1 list-decimal pl-5">
            {CURE_VERDICT_RULE.map((r) => (
              <li key={r}>{r}</li>
            ))}
          </ol>
        </details>
      </section>
    </div>
  );
}
