/**
 * The control-limit study (Phase I): pick a baseline period, see the trial chart with the points
 * the Phase I iteration suggests excluding, exclude points with a reason (an assignable cause),
 * recompute, save the study as a draft limit set, and approve it with an electronic signature.
 * Nothing is applied silently: suggestions stay suggestions until the engineer excludes them.
 */
import { useMemo, useState } from 'react';
import { apiFetch, ApiError } from '../../lib/client/api.ts';
import {
  CHART_STATISTIC,
  type Characteristic,
  type ChartPoint,
  type LimitSetView,
  type StudyResult,
} from '../../lib/shared/characteristics.ts';
import { formatSiteTime, fromLocalInput, toLocalInput } from '../../lib/shared/time.ts';
import SignDialog from '../shell/SignDialog.tsx';
import { CapabilityPanel } from './ControlChart.tsx';
import { fmtNum, SpcPlot } from './SpcPlot.tsx';

interface Props {
  characteristic: Characteristic;
  timeZone: string;
  initialFromMs: number;
  initialToMs: number;
  drafts: LimitSetView[];
  canApprove: boolean;
}

interface Row {
  index: number;
  reason: string;
}

export function LimitStudy({
  characteristic: c,
  timeZone: tz,
  initialFromMs,
  initialToMs,
  drafts: initialDrafts,
  canApprove,
}: Props) {
  const [fromText, setFromText] = useState(toLocalInput(initialFromMs, tz));
  const [toText, setToText] = useState(toLocalInput(initialToMs, tz));
  const [result, setResult] = useState<StudyResult | null>(null);
  const [state, setState] = useState<'idle' | 'running' | 'saving'>('idle');
  const [error, setError] = useState<{ text: string; fields: Record<string, string> } | null>(null);
  const [exclusions, setExclusions] = useState<Row[]>([]);
  const [note, setNote] = useState('');
  const [effectiveText, setEffectiveText] = useState('');
  const [drafts, setDrafts] = useState<LimitSetView[]>(initialDrafts);
  const [signing, setSigning] = useState<LimitSetView | null>(null);
  const [zones, setZones] = useState(false);
  const [allSuggestions, setAllSuggestions] = useState(false);

  const period = () => {
    const f = fromLocalInput(fromText, tz);
    const t = fromLocalInput(toText, tz);
    return {
      baselineFrom: Number.isFinite(f) ? new Date(f).toISOString() : fromText,
      baselineTo: Number.isFinite(t) ? new Date(t + 59_999).toISOString() : toText,
    };
  };
  const payload = (rows: Row[]) => ({ ...period(), exclusions: rows.map((r) => ({ index: r.index, reason: r.reason })) });

  const fail = (e: unknown) => {
    if (e instanceof ApiError) {
      const fields: Record<string, string> = {};
      for (const f of e.errors) fields[f.path] ??= f.message;
      setError({ text: e.errors.length ? e.errors.map((f) => f.message).join(' ') : (e.detail ?? e.title), fields });
    } else setError({ text: 'The study could not be run.', fields: {} });
  };

  const run = async (rows: Row[]) => {
    setState('running');
    setError(null);
    try {
      setResult(await apiFetch<StudyResult>(`/api/v1/characteristics/${c.id}/study`, { body: payload(rows) }));
    } catch (e) {
      fail(e);
    } finally {
      setState('idle');
    }
  };

  const points: ChartPoint[] = useMemo(
    () =>
      result
        ? result.points.map((p) => ({
            ...p,
            violations: p.trialViolations,
            excluded: p.excludedInStudy,
            exclusionReason: exclusions.find((x) => x.index === baselineIndex(result, p))?.reason ?? null,
            limitSetId: -1,
          }))
        : [],
    [result, exclusions],
  );
  const trialSet: LimitSetView[] = useMemo(
    () =>
      result
        ? [
            {
              id: -1,
              characteristicId: c.id,
              version: 0,
              status: 'draft',
              chart: c.chart,
              center: result.limits.center,
              ucl: result.limits.ucl,
              lcl: result.limits.lcl,
              dispersion: result.dispersion,
              sigma: result.sigma,
              n: result.n,
              params: result.params,
              baselineFrom: result.baselineFrom,
              baselineTo: result.baselineTo,
              baselineFirstIndex: null,
              baselineLastIndex: null,
              baselinePoints: result.points.length,
              excluded: result.exclusions,
              suggested: result.suggested,
              capability: result.capability,
              note: '',
              effectiveFrom: null,
              effectiveFromMs: null,
              approvedSignature: null,
              approvedAt: null,
              seeded: false,
              createdAt: '',
            },
          ]
        : [],
    [result, c],
  );

  const toggleExclusion = (index: number, reason = '') => {
    setExclusions((rows) =>
      rows.some((r) => r.index === index)
        ? rows.filter((r) => r.index !== index)
        : [...rows, { index, reason }].sort((a, b) => a.index - b.index),
    );
  };
  const useSuggestions = () => {
    if (!result) return;
    const rows = [...exclusions];
    for (const s of result.suggested) if (!rows.some((r) => r.index === s.index)) rows.push({ index: s.index, reason: '' });
    setExclusions(rows.sort((a, b) => a.index - b.index));
  };

  async function saveDraft(): Promise<LimitSetView | null> {
    setState('saving');
    setError(null);
    try {
      const d = await apiFetch<LimitSetView>(`/api/v1/characteristics/${c.id}/limit-sets`, {
        body: { ...payload(exclusions), note },
      });
      setDrafts((x) => [d, ...x]);
      return d;
    } catch (e) {
      fail(e);
      return null;
    } finally {
      setState('idle');
    }
  }

  async function discard(d: LimitSetView) {
    try {
      await apiFetch(`/api/v1/characteristics/${c.id}/limit-sets/${d.id}`, { method: 'DELETE' });
      setDrafts((x) => x.filter((y) => y.id !== d.id));
    } catch (e) {
      fail(e);
    }
  }

  const pointAt = (index: number) => result?.points[index - 1];
  const excludedSet = new Set(exclusions.map((e) => e.index));
  const stale =
    result && (result.exclusions.length !== exclusions.length || result.exclusions.some((e) => !excludedSet.has(e.index)));

  return (
    <div className="space-y-4">
      <form
        className="panel flex flex-wrap items-end gap-3"
        onSubmit={(e) => {
          e.preventDefault();
          setExclusions([]);
          void run([]);
        }}
      >
        <div>
          <label htmlFor="st-from">Baseline from ({tz})</label>
          <input
            id="st-from"
            type="datetime-local"
            className="w-auto"
            value={fromText}
            onChange={(e) => setFromText(e.target.value)}
          />
          {error?.fields['baselineFrom'] && <p className="mt-1 text-sm text-alert-high">✕ {error.fields['baselineFrom']}</p>}
        </div>
        <div>
          <label htmlFor="st-to">to</label>
          <input id="st-to" type="datetime-local" className="w-auto" value={toText} onChange={(e) => setToText(e.target.value)} />
          {error?.fields['baselineTo'] && <p className="mt-1 text-sm text-alert-high">✕ {error.fields['baselineTo']}</p>}
        </div>
        <button className="btn" type="submit" disabled={state !== 'idle'} aria-busy={state === 'running'}>
          {state === 'running' ? 'Computing…' : 'Run study'}
        </button>
        <p className="basis-full text-xs text-ink-soft">
          Use a period when the process ran as it should: 20–25 subgroups at least (Montgomery §6.2.1); more is better.
        </p>
      </form>

      {error && (
        <p role="alert" className="rounded border-l-4 border-alert-high bg-alert-bg p-2 text-sm">
          <strong>✕ </strong>
          {error.text}
        </p>
      )}
      {state === 'running' && (
        <p role="status" className="text-sm text-ink-soft">
          Computing trial limits…
        </p>
      )}

      {result && (
        <div className="grid gap-4 xl:grid-cols-[minmax(0,1fr)_320px]">
          <div className="space-y-4">
            <section className="panel" aria-labelledby="st-chart-h">
              <div className="flex flex-wrap items-baseline justify-between gap-2">
                <h2 id="st-chart-h" className="text-base">
                  Trial chart: {result.points.length} baseline points, {result.includedPoints} set the limits
                </h2>
                <label className="flex items-center gap-1.5 font-normal text-ink">
                  <input type="checkbox" className="w-auto" checked={zones} onChange={(e) => setZones(e.target.checked)} /> 1σ /
                  2σ zones
                </label>
              </div>
              <p className="text-sm">
                Trial limits: centre <span className="num">{fmtNum(result.limits.center)}</span> · UCL{' '}
                <span className="num">{fmtNum(result.limits.ucl)}</span> · LCL{' '}
                <span className="num">{fmtNum(result.limits.lcl)}</span> {c.unit} · σ within{' '}
                <span className="num">{fmtNum(result.sigma)}</span> {c.unit}
                {result.dispersion && (
                  <>
                    {' '}
                    · {CHART_STATISTIC[c.chart].dispersion} centre <span className="num">{fmtNum(result.dispersion.center)}</span>
                    , UCL <span className="num">{fmtNum(result.dispersion.ucl)}</span>
                  </>
                )}
              </p>
              {stale && <p className="caution mt-2">The exclusions changed: recompute to see the limits without them.</p>}
              {result.notes.map((n) => (
                <p key={n} className="mt-1 text-sm text-ink-soft">
                  {n}
                </p>
              ))}
              <SpcPlot
                chart={c.chart}
                points={points}
                limitSets={trialSet}
                spec={result.spec}
                unit={c.unit}
                timeZone={tz}
                zones={zones}
                onPick={(i) => {
                  const p = result.points[i];
                  if (p) toggleExclusion(baselineIndex(result, p));
                }}
                label="Trial control chart of the baseline"
              />
              <p className="text-xs text-ink-soft">Click a point to exclude it (or include it again); give the reason below.</p>
              {CHART_STATISTIC[c.chart].dispersion && (
                <SpcPlot
                  chart={c.chart}
                  points={points}
                  limitSets={trialSet}
                  spec={null}
                  unit={c.unit}
                  timeZone={tz}
                  zones={false}
                  dispersion
                  height={170}
                  label="Trial dispersion chart"
                />
              )}
            </section>

            <section className="panel" aria-labelledby="st-sugg-h">
              <h2 id="st-sugg-h" className="text-base">
                Suggested exclusions ({result.suggested.length})
              </h2>
              <p className="text-sm text-ink-soft">
                Points beyond the trial limits, found by recomputing the limits without them until none remain. They are only
                suggestions: exclude a point when you know its assignable cause.
              </p>
              {result.suggested.length === 0 ? (
                <p className="mt-2 text-sm">None: every baseline point is within its trial limits.</p>
              ) : (
                <>
                  <button type="button" className="btn-quiet mt-2" onClick={useSuggestions}>
                    Exclude all suggested (then give reasons)
                  </button>
                  <table className="mt-2">
                    <thead>
                      <tr>
                        <th scope="col">Baseline point</th>
                        <th scope="col">Closed</th>
                        <th scope="col">Round</th>
                        <th scope="col">Why suggested</th>
                        <th scope="col">Excluded</th>
                      </tr>
                    </thead>
                    <tbody>
                      {(allSuggestions ? result.suggested : result.suggested.slice(0, 20)).map((s) => {
                        const p = pointAt(s.index);
                        return (
                          <tr key={s.index}>
                            <td className="num">
                              {s.index}
                              {p ? <span className="text-ink-soft"> (#{p.index})</span> : null}
                            </td>
                            <td>{p ? formatSiteTime(p.tMs, tz) : ''}</td>
                            <td className="num">{s.iteration}</td>
                            <td className="text-sm">{s.reason}</td>
                            <td>
                              <input
                                type="checkbox"
                                className="w-auto"
                                aria-label={`Exclude point ${s.index}`}
                                checked={excludedSet.has(s.index)}
                                onChange={() => toggleExclusion(s.index)}
                              />
                            </td>
                          </tr>
                        );
                      })}
                    </tbody>
                  </table>
                  {result.suggested.length > 20 && (
                    <button
                      type="button"
                      className="btn-quiet mt-2"
                      onClick={() => setAllSuggestions((v) => !v)}
                      aria-expanded={allSuggestions}
                    >
                      {allSuggestions ? 'Show the first 20 only' : `Show all ${result.suggested.length}`}
                    </button>
                  )}
                  {result.suggested.length > result.points.length / 4 && (
                    <p className="caution mt-2">
                      The iteration suggests excluding {result.suggested.length} of {result.points.length} points: the baseline is
                      not in statistical control (for example, it drifts). Excluding that many leaves limits that describe only
                      part of the process; look for the cause, pick another period, or chart it differently.
                    </p>
                  )}
                </>
              )}
            </section>

            <section className="panel space-y-2" aria-labelledby="st-ex-h">
              <h2 id="st-ex-h" className="text-base">
                Excluded points and reasons ({exclusions.length})
              </h2>
              {exclusions.length === 0 ? (
                <p className="text-sm text-ink-soft">None. Every baseline point sets the limits.</p>
              ) : (
                <ul className="space-y-2">
                  {exclusions.map((r, i) => {
                    const p = pointAt(r.index);
                    const fieldErr = error?.fields[`exclusions.${i}.reason`];
                    return (
                      <li key={r.index} className="flex flex-wrap items-end gap-2">
                        <div className="w-44 text-sm">
                          <strong>Point {r.index}</strong>
                          {p ? <span className="text-ink-soft"> (chart #{p.index})</span> : null}
                          <br />
                          <span className="text-ink-soft">
                            {p ? `${fmtNum(p.value)} ${c.unit}, ${formatSiteTime(p.tMs, tz)}` : ''}
                          </span>
                        </div>
                        <div className="min-w-64 flex-1">
                          <label htmlFor={`ex-${r.index}`}>Assignable cause</label>
                          <input
                            id={`ex-${r.index}`}
                            value={r.reason}
                            maxLength={500}
                            placeholder="e.g. rack caught on the lift; viscometer cleaned"
                            onChange={(e) =>
                              setExclusions((rows) =>
                                rows.map((x) => (x.index === r.index ? { ...x, reason: e.target.value } : x)),
                              )
                            }
                          />
                          {fieldErr && <p className="mt-1 text-sm text-alert-high">✕ {fieldErr}</p>}
                        </div>
                        <button type="button" className="btn-quiet" onClick={() => toggleExclusion(r.index)}>
                          Include again
                        </button>
                      </li>
                    );
                  })}
                </ul>
              )}
              <div className="flex flex-wrap gap-2">
                <button type="button" className="btn-quiet" onClick={() => void run(exclusions)} disabled={state !== 'idle'}>
                  Recompute with these exclusions
                </button>
              </div>
              <div>
                <label htmlFor="st-note">Note for the record (optional)</label>
                <textarea id="st-note" rows={2} value={note} onChange={(e) => setNote(e.target.value)} maxLength={2000} />
              </div>
              <div className="flex flex-wrap items-end gap-3">
                <button
                  type="button"
                  className="btn"
                  disabled={state !== 'idle' || !!stale}
                  onClick={async () => {
                    const d = await saveDraft();
                    if (d && canApprove) setSigning(d);
                  }}
                >
                  {canApprove ? 'Save and approve…' : 'Save as draft'}
                </button>
                {canApprove && (
                  <button
                    type="button"
                    className="btn-quiet"
                    disabled={state !== 'idle' || !!stale}
                    onClick={() => void saveDraft()}
                  >
                    Save as draft only
                  </button>
                )}
                {stale && <span className="text-sm text-ink-soft">Recompute first.</span>}
              </div>
            </section>
          </div>
          <aside>
            <CapabilityPanel
              cap={result.capability}
              basis={result.capability ? `the ${result.includedPoints} included baseline points.` : null}
              spec={result.spec}
              specNote={null}
              unit={c.unit}
            />
          </aside>
        </div>
      )}

      <section className="panel" aria-labelledby="st-drafts-h">
        <h2 id="st-drafts-h" className="mb-2 text-base">
          Drafts awaiting approval
        </h2>
        {drafts.length === 0 ? (
          <p className="text-sm text-ink-soft">None.</p>
        ) : (
          <table>
            <thead>
              <tr>
                <th scope="col">Version</th>
                <th scope="col" className="text-right">
                  Centre
                </th>
                <th scope="col" className="text-right">
                  UCL
                </th>
                <th scope="col" className="text-right">
                  LCL
                </th>
                <th scope="col">Baseline</th>
                <th scope="col">Excluded</th>
                <th scope="col">
                  <span className="sr-only">Actions</span>
                </th>
              </tr>
            </thead>
            <tbody>
              {drafts.map((d) => (
                <tr key={d.id}>
                  <td className="num">v{d.version}</td>
                  <td className="num text-right">{fmtNum(d.center)}</td>
                  <td className="num text-right">{fmtNum(d.ucl)}</td>
                  <td className="num text-right">{fmtNum(d.lcl)}</td>
                  <td className="text-sm">
                    {d.baselinePoints} points, {formatSiteTime(d.baselineFrom, tz)} – {formatSiteTime(d.baselineTo, tz)}
                  </td>
                  <td className="num">{d.excluded.length}</td>
                  <td className="flex gap-2">
                    {canApprove && (
                      <button type="button" className="btn px-2 py-0.5 text-sm" onClick={() => setSigning(d)}>
                        Approve…
                      </button>
                    )}
                    <button type="button" className="btn-quiet px-2 py-0.5 text-sm" onClick={() => void discard(d)}>
                      Discard
                    </button>
                  </td>
                </tr>
              ))}
            </tbody>
          </table>
        )}
      </section>

      {signing && (
        <SignDialog
          title={`Approve control limits v${signing.version} for ${c.name}`}
          meaningOptions={['approved']}
          signLabel="Approve limits"
          onCancel={() => setSigning(null)}
          onSign={async (password, meaning) => {
            const eff = effectiveText ? fromLocalInput(effectiveText, tz) : NaN;
            await apiFetch(`/api/v1/characteristics/${c.id}/limit-sets/${signing.id}/approve`, {
              body: { password, meaning, ...(Number.isFinite(eff) ? { effectiveFrom: new Date(eff).toISOString() } : {}) },
            });
            window.location.href = `/charts/control/${c.id}`;
          }}
        >
          <p>
            Centre {fmtNum(signing.center)} · UCL {fmtNum(signing.ucl)} · LCL {fmtNum(signing.lcl)} {c.unit}
            {signing.sigma !== null && <> · σ {fmtNum(signing.sigma)}</>}
          </p>
          <p>
            Baseline: {signing.baselinePoints} points ({formatSiteTime(signing.baselineFrom, tz)} –{' '}
            {formatSiteTime(signing.baselineTo, tz)}), {signing.excluded.length} excluded.
          </p>
          <label htmlFor="st-eff" className="mt-2">
            Takes effect ({tz}; empty: now)
          </label>
          <input id="st-eff" type="datetime-local" value={effectiveText} onChange={(e) => setEffectiveText(e.target.value)} />
          <p className="mt-1 text-xs">
            New points are judged against these limits from then on; points already judged keep their limits.
          </p>
        </SignDialog>
      )}
    </div>
  );
}

/** 1-based position of a point within the study's baseline. */
function baselineIndex(result: StudyResult, p: { index: number }): number {
  const first = result.points[0]?.index ?? 1;
  return p.index - first + 1;
}
