/**
 * Record a quality test: cross-cut (optionally after boil cycles), Bayer abrasion, coating
 * thickness (measured, or from a reflectance spectrum file — the server finds the fringes) or a
 * cosmetic inspection by defect type. The cross-cut class and the pass/fail against the lab's
 * acceptance are shown while typing (the same domain functions the server uses); the server's
 * judgement is the one stored. Files (photos, reports) can be attached once the test is saved.
 */
import { useState, type SyntheticEvent } from 'react';
import { apiFetch, ApiError } from '../../lib/client/api.ts';
import { judgeTest, type TestMeasurement } from '../../lib/domain/quality/acceptance.ts';
import { parseJobList } from '../../lib/shared/jobs.ts';
import { DEFECT_LABELS, DEFECT_TYPES, TestCreateSchema, type Acceptance, type DefectType } from '../../lib/shared/quality.ts';
import { fromLocalInput, toLocalInput } from '../../lib/shared/time.ts';
import FileUpload from './FileUpload.tsx';
import { ResultBadge } from './marks.tsx';

type Kind = 'crosscut' | 'abrasion' | 'thickness' | 'cosmetic';
interface Saved {
  id: number;
  jobNumber: string;
  result: 'pass' | 'fail';
  summary: string;
  reasons: string[];
}

const num = (s: string): number | undefined => (s.trim() === '' || !Number.isFinite(Number(s)) ? undefined : Number(s));

export default function TestForm({
  acceptance,
  timeZone,
  initialJob,
}: {
  acceptance: Acceptance;
  timeZone: string;
  initialJob: string;
}) {
  const [job, setJob] = useState(initialJob);
  const [kind, setKind] = useState<Kind>('crosscut');
  const [testedAt, setTestedAt] = useState(toLocalInput(Date.now(), timeZone));
  const [pct, setPct] = useState('');
  const [boil, setBoil] = useState('0');
  const [refGain, setRefGain] = useState('');
  const [testGain, setTestGain] = useState('');
  const [method, setMethod] = useState<'measured' | 'spectrum'>('measured');
  const [um, setUm] = useState('');
  const [index, setIndex] = useState('1.5');
  const [spectrum, setSpectrum] = useState<{ name: string; text: string } | null>(null);
  const [defects, setDefects] = useState<Record<DefectType, string>>(
    Object.fromEntries(DEFECT_TYPES.map((d) => [d, '0'])) as Record<DefectType, string>,
  );
  const [note, setNote] = useState('');
  const [errors, setErrors] = useState<{ path: string; message: string }[]>([]);
  const [busy, setBusy] = useState(false);
  const [saved, setSaved] = useState<Saved | null>(null);

  const jobNumber = parseJobList(job).jobNumbers[0] ?? job.trim();
  const boilN = Math.max(0, Math.trunc(num(boil) ?? 0));

  function body(): Record<string, unknown> {
    const at = fromLocalInput(testedAt, timeZone);
    const base = {
      jobNumber,
      ...(Number.isFinite(at) ? { testedAt: new Date(at).toISOString() } : {}),
      ...(note.trim() ? { note: note.trim() } : {}),
    };
    if (kind === 'crosscut')
      return boilN > 0
        ? { kind: 'boil', ...base, percentRemoved: num(pct), boilCycles: boilN }
        : { kind: 'crosscut', ...base, percentRemoved: num(pct) };
    if (kind === 'abrasion') return { kind, ...base, referenceHazeGainPct: num(refGain), testHazeGainPct: num(testGain) };
    if (kind === 'thickness')
      return method === 'measured'
        ? { kind, ...base, method, thicknessUm: num(um) }
        : { kind, ...base, method, spectrumCsv: spectrum?.text, refractiveIndex: num(index) };
    return {
      kind,
      ...base,
      defects: DEFECT_TYPES.map((type) => ({ type, count: Math.max(0, Math.trunc(num(defects[type]) ?? 0)) })).filter(
        (d) => d.count > 0,
      ),
    };
  }

  // Preview with the same domain function the server uses (the server's result is the one stored).
  let preview: ReturnType<typeof judgeTest> | null = null;
  try {
    const p = TestCreateSchema.safeParse(body());
    if (p.success && !(p.data.kind === 'thickness' && p.data.method === 'spectrum')) {
      const d = p.data;
      const m: TestMeasurement =
        d.kind === 'crosscut'
          ? { kind: 'crosscut', percentRemoved: d.percentRemoved }
          : d.kind === 'boil'
            ? { kind: 'boil', percentRemoved: d.percentRemoved, boilCycles: d.boilCycles }
            : d.kind === 'abrasion'
              ? { kind: 'abrasion', referenceHazeGainPct: d.referenceHazeGainPct, testHazeGainPct: d.testHazeGainPct }
              : d.kind === 'thickness'
                ? { kind: 'thickness', thicknessUm: d.thicknessUm as number }
                : { kind: 'cosmetic', defects: d.defects };
      preview = judgeTest(m, acceptance);
    }
  } catch {
    preview = null;
  }

  async function submit(e: SyntheticEvent) {
    e.preventDefault();
    setErrors([]);
    const parsed = TestCreateSchema.safeParse(body());
    if (!parsed.success) return setErrors(parsed.error.issues.map((i) => ({ path: i.path.join('.'), message: i.message })));
    setBusy(true);
    try {
      setSaved(await apiFetch<Saved>('/api/v1/quality/tests', { body: parsed.data }));
    } catch (err) {
      setErrors(
        err instanceof ApiError
          ? err.errors.length
            ? err.errors
            : [{ path: '', message: err.detail ?? err.title }]
          : [{ path: '', message: 'The test was not saved.' }],
      );
    } finally {
      setBusy(false);
    }
  }

  const err = (path: string) => errors.find((e) => e.path === path || e.path.startsWith(`${path}.`))?.message;
  // Called as a function (not a component) so inputs keep their focus between renders.
  const field = ({
    id,
    label,
    value,
    set,
    unit,
    path,
    step = 'any',
  }: {
    id: string;
    label: string;
    value: string;
    set: (v: string) => void;
    unit: string;
    path: string;
    step?: string;
  }) => (
    <div>
      <label htmlFor={id}>
        {label} <span className="font-normal text-ink-soft">({unit})</span>
      </label>
      <input
        id={id}
        inputMode="decimal"
        type="number"
        step={step}
        value={value}
        onChange={(e) => set(e.target.value)}
        className="w-40 font-mono"
        aria-invalid={!!err(path)}
        aria-describedby={err(path) ? `${id}-err` : undefined}
      />
      {err(path) && (
        <p id={`${id}-err`} className="text-sm text-alert-high">
          ✕ {err(path)}
        </p>
      )}
    </div>
  );

  if (saved) {
    return (
      <div className="space-y-3">
        <div className="panel space-y-2" role="status">
          <h2>
            Saved: test {saved.id} on job {saved.jobNumber}
          </h2>
          <p className="text-lg">
            <ResultBadge result={saved.result} /> {saved.summary}
          </p>
          <ul className="list-disc pl-5 text-sm">
            {saved.reasons.map((r) => (
              <li key={r}>{r}</li>
            ))}
          </ul>
          <div className="flex flex-wrap gap-2">
            <a className="btn" href={`/quality/trace/${encodeURIComponent(saved.jobNumber)}`}>
              Trace this job →
            </a>
            <a className="btn-quiet" href={`/quality/tests/${saved.id}`}>
              Open the test
            </a>
            <button
              type="button"
              className="btn-quiet"
              onClick={() => {
                setSaved(null);
                setJob('');
                setPct('');
              }}
            >
              Record another test
            </button>
          </div>
        </div>
        <div className="panel">
          <FileUpload testId={saved.id} />
        </div>
      </div>
    );
  }

  return (
    <form onSubmit={submit} className="space-y-4" noValidate>
      <div className="panel grid gap-4 md:grid-cols-3">
        <div>
          <label htmlFor="t-job">Job number (scan the ticket or type)</label>
          <input
            id="t-job"
            value={job}
            onChange={(e) => setJob(e.target.value)}
            className="font-mono"
            autoComplete="off"
            autoFocus
            aria-invalid={!!err('jobNumber')}
          />
          {err('jobNumber') && <p className="text-sm text-alert-high">✕ {err('jobNumber')}</p>}
        </div>
        <div>
          <label htmlFor="t-at">Tested at ({timeZone})</label>
          <input id="t-at" type="datetime-local" value={testedAt} onChange={(e) => setTestedAt(e.target.value)} />
          {err('testedAt') && <p className="text-sm text-alert-high">✕ {err('testedAt')}</p>}
        </div>
        <fieldset>
          <legend className="mb-1 text-sm font-bold text-ink-soft">Test</legend>
          <div className="flex flex-wrap gap-x-4 gap-y-1">
            {(
              [
                ['crosscut', 'Cross-cut (± boil)'],
                ['abrasion', 'Bayer abrasion'],
                ['thickness', 'Thickness'],
                ['cosmetic', 'Cosmetic'],
              ] as const
            ).map(([k, l]) => (
              <label key={k} className="flex items-center gap-1 font-normal">
                <input type="radio" name="kind" className="w-auto" checked={kind === k} onChange={() => setKind(k)} /> {l}
              </label>
            ))}
          </div>
        </fieldset>
      </div>

      <div className="panel space-y-3">
        {kind === 'crosscut' && (
          <>
            <p className="text-sm text-ink-soft">
              Cut the lattice, tape and pull, then estimate the percentage of the lattice area that came off. The class follows
              ISO 2409 (0–5) and ASTM D3359 method B (5B–0B).
            </p>
            <div className="flex flex-wrap gap-6">
              {field({ id: 't-pct', label: 'Lattice area removed', unit: '%', value: pct, set: setPct, path: 'percentRemoved' })}
              {field({
                id: 't-boil',
                label: 'Boil cycles before the cut (0 = dry)',
                unit: 'cycles',
                value: boil,
                set: setBoil,
                path: 'boilCycles',
                step: '1',
              })}
            </div>
          </>
        )}
        {kind === 'abrasion' && (
          <>
            <p className="text-sm text-ink-soft">
              ASTM F735 oscillating sand: Bayer ratio = haze gain of the uncoated CR-39 reference ÷ haze gain of the test lens.
            </p>
            <div className="flex flex-wrap gap-6">
              {field({
                id: 't-ref',
                label: 'Reference haze gain',
                unit: '%',
                value: refGain,
                set: setRefGain,
                path: 'referenceHazeGainPct',
              })}
              {field({
                id: 't-test',
                label: 'Test lens haze gain',
                unit: '%',
                value: testGain,
                set: setTestGain,
                path: 'testHazeGainPct',
              })}
            </div>
          </>
        )}
        {kind === 'thickness' && (
          <>
            <fieldset className="flex gap-4">
              <legend className="sr-only">How the thickness was found</legend>
              <label className="flex items-center gap-1 font-normal">
                <input type="radio" className="w-auto" checked={method === 'measured'} onChange={() => setMethod('measured')} />{' '}
                Measured
              </label>
              <label className="flex items-center gap-1 font-normal">
                <input type="radio" className="w-auto" checked={method === 'spectrum'} onChange={() => setMethod('spectrum')} />{' '}
                From a reflectance spectrum
              </label>
            </fieldset>
            {method === 'measured' ? (
              field({ id: 't-um', label: 'Cured coat thickness', unit: 'µm', value: um, set: setUm, path: 'thicknessUm' })
            ) : (
              <div className="flex flex-wrap items-start gap-6">
                <div>
                  <label htmlFor="t-spec">Spectrum file (CSV: wavelength_nm, reflectance)</label>
                  <input
                    id="t-spec"
                    type="file"
                    accept=".csv,.txt,text/csv,text/plain"
                    onChange={async (e) => {
                      const f = e.target.files?.[0];
                      setSpectrum(f ? { name: f.name, text: await f.text() } : null);
                    }}
                  />
                  {err('spectrumCsv') && <p className="text-sm text-alert-high">✕ {err('spectrumCsv')}</p>}
                  {spectrum && (
                    <p className="text-xs text-ink-soft">
                      {spectrum.name}: {spectrum.text.split(/\r?\n/).filter(Boolean).length} lines
                    </p>
                  )}
                </div>
                {field({
                  id: 't-n',
                  label: 'Coat refractive index',
                  unit: 'n',
                  value: index,
                  set: setIndex,
                  path: 'refractiveIndex',
                })}
                <p className="max-w-md text-xs text-ink-soft">
                  Adjacent reflectance maxima λ1 &gt; λ2 give d = λ1·λ2 / (2n(λ1 − λ2)) (thin-film optics, Macleod). An
                  index-matched coat shows almost no fringes; the server says so rather than guess.
                </p>
              </div>
            )}
          </>
        )}
        {kind === 'cosmetic' && (
          <>
            <p className="text-sm text-ink-soft">Count the defects of each type on the lens (0 where none).</p>
            <div className="grid gap-3 sm:grid-cols-3 lg:grid-cols-4">
              {DEFECT_TYPES.map((d) => (
                <div key={d}>
                  <label htmlFor={`t-d-${d}`}>{DEFECT_LABELS[d]}</label>
                  <input
                    id={`t-d-${d}`}
                    type="number"
                    min={0}
                    step={1}
                    value={defects[d]}
                    onChange={(e) => setDefects({ ...defects, [d]: e.target.value })}
                    className="w-24 font-mono"
                  />
                </div>
              ))}
            </div>
          </>
        )}
        <div>
          <label htmlFor="t-note">Note (optional)</label>
          <input id="t-note" value={note} onChange={(e) => setNote(e.target.value)} maxLength={2000} />
        </div>
      </div>

      <div className="flex flex-wrap items-center gap-4">
        <button className="btn" disabled={busy}>
          {busy ? 'Saving…' : 'Save the test'}
        </button>
        <span aria-live="polite" className="text-sm">
          {preview ? (
            <>
              Against the acceptance: <ResultBadge result={preview.result} /> {preview.summary}
            </>
          ) : (
            <span className="text-ink-soft">Fill in the measurement to see the class and the result.</span>
          )}
        </span>
      </div>
      {errors.some(
        (e) =>
          ![
            'jobNumber',
            'testedAt',
            'percentRemoved',
            'boilCycles',
            'referenceHazeGainPct',
            'testHazeGainPct',
            'thicknessUm',
            'spectrumCsv',
            'refractiveIndex',
          ].includes(e.path),
      ) && (
        <p role="alert" className="rounded border-l-4 border-alert-high bg-alert-bg p-2 text-sm">
          <strong>✕ Not saved. </strong>
          {errors.map((e) => e.message).join(' ')}
        </p>
      )}
    </form>
  );
}
