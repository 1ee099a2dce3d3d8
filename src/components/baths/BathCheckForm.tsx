/**
 * The fast bath-check form for the floor tablet: pick the tank, the cup and type its efflux
 * seconds (or a measured viscosity), bath temperature and solids. While typing it shows the
 * viscosity the cup's equation gives against the window band and the addition that returns the
 * solids to target (the same computation the server repeats — the server stores its own number).
 * After logging, the recommended addition can be logged in one tap, linked to the check.
 */
import { useId, useMemo, useState, type SyntheticEvent } from 'react';
import { computeBathCheck } from '../../lib/domain/film/bath-check.ts';
import { CUPS } from '../../lib/domain/film/viscosity-cups.ts';
import { apiFetch, ApiError } from '../../lib/client/api.ts';
import {
  BATH_CAUTION,
  BathCheckInputSchema,
  describeAddition,
  type BathCheckComputation,
  type BathCheckContext,
} from '../../lib/shared/baths.ts';
import type { ProcessWindowInForce } from '../../lib/shared/windows.ts';
import WindowBar from '../windows/WindowBar.tsx';

export interface TankOption {
  id: number;
  code: string;
  name: string;
  lineName: string | null;
  context: BathCheckContext;
  /** e.g. "FH-Siloxane 30 on CR-39-type 1.50 (example), version 1" */
  windowLabel: string | null;
  /** e.g. "Lot FHS30-L0411 (30.4 % solids), charged 2026-11-06" */
  chargeLabel: string | null;
  densityGCm3: number | null;
}

interface Props {
  tanks: TankOption[];
  canLog: boolean;
  defaultTankId?: number | undefined;
}

interface Recorded {
  check: { id: number; at: string; kinematicMm2S: number; tankCode: string };
  computation: BathCheckComputation;
  window: ProcessWindowInForce | null;
}

const CUP_FAMILIES: { family: string; label: string }[] = [
  { family: 'zahn', label: 'Zahn (ASTM D4212)' },
  { family: 'shell', label: 'Shell (ASTM D4212)' },
  { family: 'ford', label: 'Ford (ASTM D1200)' },
  { family: 'iso', label: 'ISO 2431' },
  { family: 'din', label: 'DIN 4 mm (DIN 53211)' },
];

const numberOrUndefined = (s: string): number | undefined => {
  const t = s.trim().replace(',', '.');
  if (t === '') return undefined;
  const n = Number(t);
  return Number.isFinite(n) ? n : NaN;
};

export default function BathCheckForm({ tanks, canLog, defaultTankId }: Props) {
  const id = useId();
  const [tankId, setTankId] = useState<number>(defaultTankId ?? tanks[0]?.id ?? 0);
  const [mode, setMode] = useState<'cup' | 'measured'>('cup');
  const [cup, setCup] = useState<string>('zahn-1');
  const [seconds, setSeconds] = useState('');
  const [measured, setMeasured] = useState('');
  const [temp, setTemp] = useState('');
  const [solids, setSolids] = useState('');
  const [mass, setMass] = useState('');
  const [note, setNote] = useState('');
  const [busy, setBusy] = useState(false);
  const [errors, setErrors] = useState<Record<string, string>>({});
  const [failure, setFailure] = useState<string | null>(null);
  const [recorded, setRecorded] = useState<Recorded | null>(null);
  const [additionKg, setAdditionKg] = useState('');
  const [additionDone, setAdditionDone] = useState<string | null>(null);

  const tank = tanks.find((t) => t.id === tankId) ?? null;
  const limits = tank?.context.limits ?? null;

  const body = useMemo(() => {
    const b: Record<string, unknown> = { tankAssetId: tankId };
    if (mode === 'cup') {
      b['cup'] = cup;
      const s = numberOrUndefined(seconds);
      if (s !== undefined) b['effluxSeconds'] = s;
    } else {
      const m = numberOrUndefined(measured);
      if (m !== undefined) b['measuredMm2S'] = m;
    }
    const t = numberOrUndefined(temp);
    if (t !== undefined) b['bathTempC'] = t;
    const so = numberOrUndefined(solids);
    if (so !== undefined) b['solidsPct'] = so;
    const ma = numberOrUndefined(mass);
    if (ma !== undefined) b['bathMassKg'] = ma;
    if (note.trim()) b['note'] = note.trim();
    return b;
  }, [tankId, mode, cup, seconds, measured, temp, solids, mass, note]);

  const parsed = BathCheckInputSchema.safeParse(body);
  const live: BathCheckComputation | null = useMemo(() => {
    if (!tank || !parsed.success) return null;
    const density = tank.densityGCm3 ?? undefined;
    return computeBathCheck(
      { ...parsed.data, ...(density !== undefined && parsed.data.densityGCm3 === undefined ? { densityGCm3: density } : {}) },
      tank.context,
    );
  }, [tank, parsed.success, parsed.data]);

  const fieldErrors: Record<string, string> = { ...errors };
  if (!parsed.success) {
    for (const issue of parsed.error.issues) {
      const p = issue.path.map(String).join('.');
      // Do not nag about an empty reading before anything is typed.
      if ((p === 'effluxSeconds' || p === 'measuredMm2S') && seconds === '' && measured === '') continue;
      fieldErrors[p] ??= issue.message;
    }
  }
  const outOfRange = live !== null && !live.viscosity.ok;
  const ready = parsed.success && !outOfRange && canLog && !busy;

  async function submit(e: SyntheticEvent) {
    e.preventDefault();
    if (!ready) return;
    setBusy(true);
    setFailure(null);
    setErrors({});
    setAdditionDone(null);
    try {
      const r = await apiFetch<Recorded>('/api/v1/baths/checks', { body: parsed.data });
      setRecorded(r);
      const a = r.computation.addition;
      setAdditionKg(a && a.ok && a.kind !== 'none' ? a.massKg.toFixed(2) : '');
      setSeconds('');
      setMeasured('');
    } catch (err) {
      if (err instanceof ApiError) {
        setErrors(Object.fromEntries(err.errors.map((f) => [f.path, f.message])));
        setFailure(err.detail ?? err.title);
      } else setFailure('The check was not logged (network error). Try again.');
    } finally {
      setBusy(false);
    }
  }

  async function logAddition() {
    if (!recorded) return;
    const a = recorded.computation.addition;
    const kg = numberOrUndefined(additionKg);
    if (!a || !a.ok || a.kind === 'none' || kg === undefined || !(kg > 0)) return;
    setBusy(true);
    try {
      const r = await apiFetch<{ id: number; massKg: number; kind: string }>('/api/v1/baths/additions', {
        body: {
          tankAssetId: tankId,
          kind: a.kind === 'solvent' ? 'solvent' : 'fresh-lacquer',
          massKg: kg,
          checkId: recorded.check.id,
        },
      });
      setAdditionDone(`Addition logged: ${r.massKg} kg of ${r.kind === 'solvent' ? 'solvent' : 'fresh lacquer'}.`);
    } catch (err) {
      setAdditionDone(null);
      setFailure(err instanceof ApiError ? (err.detail ?? err.title) : 'The addition was not logged.');
    } finally {
      setBusy(false);
    }
  }

  if (tanks.length === 0) {
    return <p className="empty">No hard-coat tanks are set up yet.</p>;
  }

  const big = 'text-lg py-2.5';
  const err = (path: string) =>
    fieldErrors[path] ? (
      <p id={`${id}-${path}-err`} className="mt-1 text-sm font-bold text-alert-high">
        <span aria-hidden="true">✕ </span>
        {fieldErrors[path]}
      </p>
    ) : null;
  const selectedCup = CUPS.find((c) => c.id === cup);

  return (
    <form onSubmit={submit} noValidate className="space-y-4" aria-describedby={`${id}-caution`}>
      <fieldset>
        <legend className="mb-1 text-sm font-bold text-ink-soft">Tank</legend>
        <div className="flex flex-wrap gap-2">
          {tanks.map((t) => (
            <button
              key={t.id}
              type="button"
              aria-pressed={t.id === tankId}
              onClick={() => {
                setTankId(t.id);
                setRecorded(null);
              }}
              className={t.id === tankId ? 'btn px-4 py-3 text-base' : 'btn-quiet px-4 py-3 text-base'}
            >
              {t.name}
            </button>
          ))}
        </div>
        {tank && (
          <p className="mt-1 text-sm text-ink-soft">
            {tank.chargeLabel ?? 'No charge on record for this tank.'} ·{' '}
            {tank.windowLabel ? `Window: ${tank.windowLabel}` : 'No process window in force.'}
          </p>
        )}
      </fieldset>

      <fieldset>
        <legend className="mb-1 text-sm font-bold text-ink-soft">Reading</legend>
        <div className="flex gap-2" role="radiogroup" aria-label="How the viscosity was measured">
          <button
            type="button"
            role="radio"
            aria-checked={mode === 'cup'}
            onClick={() => setMode('cup')}
            className={mode === 'cup' ? 'btn' : 'btn-quiet'}
          >
            Cup and seconds
          </button>
          <button
            type="button"
            role="radio"
            aria-checked={mode === 'measured'}
            onClick={() => setMode('measured')}
            className={mode === 'measured' ? 'btn' : 'btn-quiet'}
          >
            Measured viscosity
          </button>
        </div>
        {mode === 'cup' ? (
          <div className="mt-3 grid gap-3 sm:grid-cols-2">
            <div>
              <label htmlFor={`${id}-cup`}>Cup</label>
              <select id={`${id}-cup`} className={big} value={cup} onChange={(e) => setCup(e.target.value)}>
                {CUP_FAMILIES.map((fam) => (
                  <optgroup key={fam.family} label={fam.label}>
                    {CUPS.filter((c) => c.family === fam.family).map((c) => (
                      <option key={c.id} value={c.id}>
                        {c.id} ({c.validSeconds.min}–{c.validSeconds.max} s)
                      </option>
                    ))}
                  </optgroup>
                ))}
              </select>
              {selectedCup && (
                <p className="mt-1 text-xs text-ink-soft">
                  Valid {selectedCup.validSeconds.min}–{selectedCup.validSeconds.max} s · {selectedCup.source}
                  {selectedCup.provenance === 'from memory' ? ' · constants not checked against the standard’s text' : ''}
                </p>
              )}
              {err('cup')}
            </div>
            <div>
              <label htmlFor={`${id}-sec`}>Efflux time (s)</label>
              <input
                id={`${id}-sec`}
                className={big}
                inputMode="decimal"
                autoComplete="off"
                value={seconds}
                onChange={(e) => setSeconds(e.target.value)}
                aria-invalid={!!fieldErrors['effluxSeconds']}
                aria-describedby={fieldErrors['effluxSeconds'] ? `${id}-effluxSeconds-err` : undefined}
              />
              {err('effluxSeconds')}
            </div>
          </div>
        ) : (
          <div className="mt-3 max-w-xs">
            <label htmlFor={`${id}-meas`}>Kinematic viscosity (mm²/s)</label>
            <input
              id={`${id}-meas`}
              className={big}
              inputMode="decimal"
              value={measured}
              onChange={(e) => setMeasured(e.target.value)}
              aria-invalid={!!fieldErrors['measuredMm2S']}
            />
            {err('measuredMm2S')}
          </div>
        )}
      </fieldset>

      <div className="grid gap-3 sm:grid-cols-3">
        <div>
          <label htmlFor={`${id}-temp`}>Bath temperature (°C)</label>
          <input
            id={`${id}-temp`}
            className={big}
            inputMode="decimal"
            value={temp}
            onChange={(e) => setTemp(e.target.value)}
            aria-invalid={!!fieldErrors['bathTempC']}
          />
          {err('bathTempC')}
        </div>
        <div>
          <label htmlFor={`${id}-solids`}>Solids (wt %)</label>
          <input
            id={`${id}-solids`}
            className={big}
            inputMode="decimal"
            value={solids}
            onChange={(e) => setSolids(e.target.value)}
            aria-invalid={!!fieldErrors['solidsPct']}
          />
          {err('solidsPct')}
        </div>
        <div>
          <label htmlFor={`${id}-mass`}>Bath mass (kg, if weighed)</label>
          <input
            id={`${id}-mass`}
            className={big}
            inputMode="decimal"
            placeholder={
              tank?.context.estimatedBathMassKg != null ? `${tank.context.estimatedBathMassKg} kg if not weighed` : 'not weighed'
            }
            value={mass}
            onChange={(e) => setMass(e.target.value)}
            aria-invalid={!!fieldErrors['bathMassKg']}
          />
          {err('bathMassKg')}
        </div>
      </div>
      <div>
        <label htmlFor={`${id}-note`}>Note (optional)</label>
        <input id={`${id}-note`} value={note} onChange={(e) => setNote(e.target.value)} maxLength={2000} />
      </div>

      <section aria-live="polite" className="panel space-y-3 bg-slate-panel/40">
        <h3 className="font-bold">This reading</h3>
        {!live ? (
          <p className="text-ink-soft">
            Type the efflux seconds (or a measured viscosity) to see the viscosity against the window.
          </p>
        ) : !live.viscosity.ok ? (
          <p role="alert" className="rounded border-l-4 border-alert-high bg-alert-bg p-3 font-bold">
            <span aria-hidden="true">✕ </span>
            {live.viscosity.message}
          </p>
        ) : (
          <>
            {limits?.viscosityMm2S ? (
              <WindowBar
                size="lg"
                label="Bath viscosity"
                value={live.viscosity.kinematicMm2S}
                min={limits.viscosityMm2S.min}
                max={limits.viscosityMm2S.max}
                target={limits.viscosityMm2S.target}
                unit="mm²/s"
                digits={2}
              />
            ) : (
              <p>
                <span className="num text-lg font-bold">{live.viscosity.kinematicMm2S.toFixed(2)} mm²/s</span>{' '}
                <span className="text-ink-soft">(no viscosity window in force)</span>
              </p>
            )}
            <p className="text-xs text-ink-soft">
              {live.viscosity.method === 'cup'
                ? `From ${cup} at ${seconds} s · ${live.viscosity.source}`
                : 'Measured kinematic viscosity'}
              {live.viscosity.dynamicMPaS !== undefined ? ` · dynamic ${live.viscosity.dynamicMPaS.toFixed(2)} mPa·s` : ''}
            </p>
          </>
        )}
        {limits?.bathTempC && parsed.success && parsed.data.bathTempC !== undefined && (
          <WindowBar
            label="Bath temperature"
            value={parsed.data.bathTempC}
            min={limits.bathTempC.min}
            max={limits.bathTempC.max}
            target={limits.bathTempC.target}
            unit="°C"
          />
        )}
        <div>
          <h4 className="text-sm font-bold text-ink-soft">Addition to bring solids back to target</h4>
          {live?.addition ? (
            <p className={live.addition.ok ? 'text-lg font-bold' : 'text-ink-soft'}>{describeAddition(live.addition)}</p>
          ) : (
            <p className="text-ink-soft">
              {live?.additionNote ?? 'Enter the solids to get the solvent or fresh-lacquer addition (mass balance).'}
            </p>
          )}
          {tank?.context.targetSolidsPct != null && (
            <p className="text-xs text-ink-soft">
              Target {tank.context.targetSolidsPct} % solids (the lacquer’s nominal); fresh lacquer of the charged lot at{' '}
              {tank.context.lotSolidsPct ?? '—'} %. Without a weighed mass the bath is taken at its charged mass
              {tank.context.estimatedBathMassKg !== null ? ` (${tank.context.estimatedBathMassKg} kg)` : ''}.
            </p>
          )}
        </div>
        <p id={`${id}-caution`} className="caution">
          <strong>Caution.</strong> {BATH_CAUTION}
        </p>
      </section>

      {failure && (
        <p role="alert" className="rounded border-l-4 border-alert-high bg-alert-bg p-2 text-sm">
          <strong>✕ Not logged.</strong> {failure}
        </p>
      )}
      {!canLog && <p className="text-sm text-ink-soft">Your role can read the bath log but not write to it.</p>}
      <button type="submit" className="btn px-6 py-3 text-lg" disabled={!ready} aria-busy={busy}>
        {busy ? 'Logging…' : 'Log check'}
      </button>

      {recorded && (
        <section role="status" className="panel space-y-2 border-lacquer">
          <p>
            <strong>✓ Check logged</strong> on {recorded.check.tankCode}: the server computed and stored{' '}
            <span className="num font-bold">{recorded.check.kinematicMm2S.toFixed(2)} mm²/s</span>
            {recorded.computation.band === 'high'
              ? ' — above the window.'
              : recorded.computation.band === 'low'
                ? ' — below the window.'
                : recorded.computation.band === 'in'
                  ? ' — inside the window.'
                  : '.'}
          </p>
          {recorded.computation.addition?.ok && recorded.computation.addition.kind !== 'none' && (
            <div className="flex flex-wrap items-end gap-2">
              <div>
                <label htmlFor={`${id}-add`}>
                  {recorded.computation.addition.kind === 'solvent' ? 'Solvent added (kg)' : 'Fresh lacquer added (kg)'}
                </label>
                <input
                  id={`${id}-add`}
                  className={`${big} w-40`}
                  inputMode="decimal"
                  value={additionKg}
                  onChange={(e) => setAdditionKg(e.target.value)}
                />
              </div>
              <button type="button" className="btn py-3" onClick={logAddition} disabled={busy || !!additionDone}>
                Log this addition
              </button>
            </div>
          )}
          {additionDone && <p className="font-bold">✓ {additionDone}</p>}
          <button type="button" className="btn-quiet text-sm" onClick={() => window.location.reload()}>
            Refresh the overview
          </button>
        </section>
      )}
    </form>
  );
}
