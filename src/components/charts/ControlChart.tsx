/**
 * The control-chart view of one characteristic: the statistic with its centre
 * line and control limits as they were in force (stepping where a new limit set took effect),
 * optional 1σ/2σ zone lines, spec limits dashed and labelled, signals as red triangles with the
 * rule id, excluded Phase I points hollow; the companion R/S/MR chart; a capability side panel;
 * click a point (or pick it from the signals table) for its raw readings and the dip runs / oven
 * loads it belongs to. Live: new points arrive over `subscribeLive(['points'])`. Exports PNG and CSV.
 */
import { useCallback, useEffect, useRef, useState } from 'react';
import { apiFetch, ApiError, subscribeLive } from '../../lib/client/api.ts';
import {
  CHART_LABELS,
  CHART_STATISTIC,
  violationLabel,
  type ChartData,
  type ChartPoint,
  type LimitSetView,
  type LivePointEvent,
} from '../../lib/shared/characteristics.ts';
import { controlChartCsv } from '../../lib/shared/control-chart.ts';
import { formatSiteTime, fromLocalInput } from '../../lib/shared/time.ts';
import type { SpcCapability } from '../../lib/shared/spc.ts';
import { fmtNum, SpcPlot } from './SpcPlot.tsx';
import { PALETTE } from '../../styles/palette.mjs';

interface Props {
  initial: ChartData;
  initialLast: number;
}

type Range = { kind: 'last'; last: number } | { kind: 'between'; from: string; to: string };

interface PointDetail {
  point: ChartPoint;
  members: number[];
  readings: { c?: number; t?: number; v?: number; n?: number; mean?: number; soakFromMs?: number; soakToMs?: number }[];
  channels: { id: number; name: string; unit: string }[];
  limitSet: LimitSetView | null;
  dipRuns: { id: number; dippedAt: string; withdrawalSpeedMmS: number | null }[];
  ovenLoads: { id: number; openedAt: string; closedAt: string | null; verdict: string | null }[];
}

const LAST_CHOICES = [50, 200, 1000, 5000];

function download(href: string, filename: string) {
  const a = document.createElement('a');
  a.href = href;
  a.download = filename;
  document.body.appendChild(a);
  a.click();
  a.remove();
}

export function ControlChart({ initial, initialLast }: Props) {
  const [data, setData] = useState<ChartData>(initial);
  const [range, setRange] = useState<Range>({ kind: 'last', last: initialLast });
  const [status, setStatus] = useState<'ok' | 'loading' | 'error'>('ok');
  const [error, setError] = useState<string | null>(null);
  const [zones, setZones] = useState(false);
  const [showSpec, setShowSpec] = useState(true);
  const [live, setLive] = useState<'connecting' | 'on' | 'off'>('connecting');
  const [picked, setPicked] = useState<ChartPoint | null>(null);
  const [detail, setDetail] = useState<PointDetail | null>(null);
  const [detailState, setDetailState] = useState<'idle' | 'loading' | 'error'>('idle');
  const [fromText, setFromText] = useState('');
  const [toText, setToText] = useState('');
  const mainRef = useRef<any>(undefined);
  const dispRef = useRef<any>(undefined);
  const c = data.characteristic;
  const tz = data.timeZone;
  const id = c.id;

  const load = useCallback(
    async (r: Range) => {
      setStatus('loading');
      setError(null);
      try {
        const q = r.kind === 'last' ? `last=${r.last}` : `from=${encodeURIComponent(r.from)}&to=${encodeURIComponent(r.to)}`;
        const d = await apiFetch<ChartData>(`/api/v1/characteristics/${id}/points?${q}`);
        setData(d);
        setStatus('ok');
      } catch (e) {
        setStatus('error');
        setError(e instanceof ApiError ? (e.detail ?? e.title) : 'The chart data could not be loaded.');
      }
    },
    [id],
  );

  // Live points (only while showing the latest points).
  useEffect(() => {
    if (range.kind !== 'last') {
      setLive('off');
      return;
    }
    setLive('connecting');
    let refetch = false;
    const stop = subscribeLive(['points'], (_kind, payload: LivePointEvent) => {
      setLive('on');
      if (payload.characteristicId !== id || !payload.point) return;
      const p = payload.point;
      setData((d) => {
        const last = d.points[d.points.length - 1];
        if (last && p.index <= last.index) return d;
        if (p.limitSetId !== null && !d.limitSets.some((s) => s.id === p.limitSetId)) refetch = true;
        const points = [...d.points, p].slice(-range.last);
        return { ...d, points, totalPoints: d.totalPoints + 1 };
      });
      if (refetch) {
        refetch = false;
        void load(range);
      }
    });
    const t = setTimeout(() => setLive((s) => (s === 'connecting' ? 'on' : s)), 1500);
    return () => {
      clearTimeout(t);
      stop();
    };
  }, [id, range, load]);

  const pick = useCallback(
    async (i: number) => {
      const p = data.points[i];
      if (!p) return;
      setPicked(p);
      setDetail(null);
      setDetailState('loading');
      try {
        setDetail(await apiFetch<PointDetail>(`/api/v1/characteristics/${id}/points/${p.id}`));
        setDetailState('idle');
      } catch {
        setDetailState('error');
      }
    },
    [data.points, id],
  );

  const stem = `${c.name.replace(/[^A-Za-z0-9]+/g, '-').toLowerCase()}`;
  const exportPng = (which: 'main' | 'disp') => {
    const chart = which === 'main' ? mainRef.current : dispRef.current;
    if (chart) download(chart.toBase64Image('image/png', 1), `${stem}${which === 'disp' ? '-spread' : ''}.png`);
  };
  const exportCsv = () => {
    const blob = new Blob([controlChartCsv(data.points, c.unit, c.chart, tz)], { type: 'text/csv;charset=utf-8' });
    const url = URL.createObjectURL(blob);
    download(url, `${stem}.csv`);
    setTimeout(() => URL.revokeObjectURL(url), 1000);
  };

  const signals = data.points
    .filter((p) => p.violations.length > 0)
    .slice(-30)
    .reverse();
  const excludedCount = data.points.filter((p) => p.excluded).length;
  const hasDispersion = CHART_STATISTIC[c.chart].dispersion !== null;
  const first = data.points[0];
  const last = data.points[data.points.length - 1];

  return (
    <div className="grid gap-4 xl:grid-cols-[minmax(0,1fr)_320px]">
      <div className="space-y-3">
        <div className="panel no-print flex flex-wrap items-end gap-3 py-3">
          <div>
            <label htmlFor="cc-last">Show</label>
            <select
              id="cc-last"
              value={range.kind === 'last' ? String(range.last) : 'range'}
              onChange={(e) => {
                if (e.target.value === 'range') return;
                const r: Range = { kind: 'last', last: Number(e.target.value) };
                setRange(r);
                void load(r);
              }}
              className="w-auto"
            >
              {LAST_CHOICES.map((n) => (
                <option key={n} value={n}>
                  latest {n} points
                </option>
              ))}
              {range.kind === 'between' && <option value="range">a period</option>}
            </select>
          </div>
          <form
            className="flex flex-wrap items-end gap-2"
            onSubmit={(e) => {
              e.preventDefault();
              const f = fromLocalInput(fromText, tz);
              const t = fromLocalInput(toText, tz);
              if (!Number.isFinite(f) || !Number.isFinite(t) || f >= t) {
                setError('Give a period whose end is after its start.');
                return;
              }
              const r: Range = { kind: 'between', from: new Date(f).toISOString(), to: new Date(t).toISOString() };
              setRange(r);
              void load(r);
            }}
          >
            <div>
              <label htmlFor="cc-from">From ({tz})</label>
              <input
                id="cc-from"
                type="datetime-local"
                value={fromText}
                onChange={(e) => setFromText(e.target.value)}
                className="w-auto"
              />
            </div>
            <div>
              <label htmlFor="cc-to">To</label>
              <input
                id="cc-to"
                type="datetime-local"
                value={toText}
                onChange={(e) => setToText(e.target.value)}
                className="w-auto"
              />
            </div>
            <button className="btn-quiet" type="submit">
              Show period
            </button>
          </form>
          <label className="flex items-center gap-1.5 font-normal text-ink">
            <input type="checkbox" className="w-auto" checked={zones} onChange={(e) => setZones(e.target.checked)} /> 1σ / 2σ zone
            lines
          </label>
          <label className="flex items-center gap-1.5 font-normal text-ink">
            <input type="checkbox" className="w-auto" checked={showSpec} onChange={(e) => setShowSpec(e.target.checked)} /> Spec
            limits
          </label>
          <div className="ml-auto flex gap-2">
            <button type="button" className="btn-quiet" onClick={() => exportPng('main')} disabled={data.points.length === 0}>
              PNG
            </button>
            <button type="button" className="btn-quiet" onClick={exportCsv} disabled={data.points.length === 0}>
              CSV
            </button>
          </div>
        </div>

        <div className="flex flex-wrap items-center gap-x-4 gap-y-1 text-sm text-ink-soft" aria-live="polite">
          <span>
            {data.points.length} of {data.totalPoints} points
            {first && last ? ` · ${formatSiteTime(first.tMs, tz)} – ${formatSiteTime(last.tMs, tz)}` : ''}
          </span>
          {status === 'loading' && <span role="status">Loading…</span>}
          <span>
            {range.kind === 'last'
              ? live === 'on'
                ? '● Live: new points appear as they close'
                : live === 'connecting'
                  ? '○ Connecting to live updates…'
                  : '○ Not live'
              : '○ A fixed period (not live)'}
          </span>
        </div>
        {error && (
          <p role="alert" className="rounded border-l-4 border-alert-high bg-alert-bg p-2 text-sm">
            <strong>✕ </strong>
            {error}
          </p>
        )}

        <section className="panel" aria-labelledby="cc-main-h">
          <h2 id="cc-main-h" className="mb-1 text-base">
            {c.chart === 'cusum' ? 'Cumulative sums C⁺ and −C⁻ against ±H' : CHART_STATISTIC[c.chart].value} ({c.unit}){' '}
            <span className="font-normal text-ink-soft">· {CHART_LABELS[c.chart]}</span>
          </h2>
          <Legend zones={zones} spec={showSpec && !!data.spec} excluded={excludedCount} />
          {data.points.length === 0 ? (
            <div className="empty mt-2" role="status">
              <p className="font-bold text-ink">No points yet.</p>
              <p>Points appear as subgroups close ({c.channels.map((ch) => ch.name).join(', ')}).</p>
            </div>
          ) : (
            <SpcPlot
              ref={mainRef}
              chart={c.chart}
              points={data.points}
              limitSets={data.limitSets}
              spec={showSpec ? data.spec : null}
              unit={c.unit}
              timeZone={tz}
              zones={zones}
              onPick={pick}
              label={`${c.name}: control chart of the last ${data.points.length} points`}
            />
          )}
          <p className="mt-1 text-xs text-ink-soft no-print">
            Click a point for its readings and the records it belongs to. Hover for values and rules.
          </p>
        </section>

        {hasDispersion && data.points.length > 0 && (
          <section className="panel" aria-labelledby="cc-disp-h">
            <div className="flex items-center justify-between">
              <h2 id="cc-disp-h" className="text-base">
                {CHART_STATISTIC[c.chart].dispersion} ({c.unit})
              </h2>
              <button type="button" className="btn-quiet no-print text-sm" onClick={() => exportPng('disp')}>
                PNG
              </button>
            </div>
            <SpcPlot
              ref={dispRef}
              chart={c.chart}
              points={data.points}
              limitSets={data.limitSets}
              spec={null}
              unit={c.unit}
              timeZone={tz}
              zones={false}
              dispersion
              onPick={pick}
              height={190}
              label={`${c.name}: ${CHART_STATISTIC[c.chart].dispersion} chart`}
            />
          </section>
        )}

        <section className="panel" aria-labelledby="cc-sig-h">
          <h2 id="cc-sig-h" className="mb-2 text-base">
            Signals in view {signals.length > 0 && <span className="font-normal text-ink-soft">(latest {signals.length})</span>}
          </h2>
          {signals.length === 0 ? (
            <p className="text-sm text-ink-soft">No rule fired on the points shown.</p>
          ) : (
            <table>
              <thead>
                <tr>
                  <th scope="col">Point</th>
                  <th scope="col">Closed</th>
                  <th scope="col" className="text-right">
                    Value ({c.unit})
                  </th>
                  <th scope="col">Rule</th>
                  <th scope="col">
                    <span className="sr-only">Details</span>
                  </th>
                </tr>
              </thead>
              <tbody>
                {signals.map((p) => (
                  <tr key={p.id}>
                    <td className="num">#{p.index}</td>
                    <td>{formatSiteTime(p.tMs, tz)}</td>
                    <td className="num text-right">{fmtNum(p.value)}</td>
                    <td>
                      <span aria-hidden="true" className="text-alert-high">
                        ▲{' '}
                      </span>
                      {p.violations.map((v) => violationLabel(v)).join('; ')}
                    </td>
                    <td>
                      <button
                        type="button"
                        className="btn-quiet px-2 py-0.5 text-xs"
                        onClick={() => void pick(data.points.indexOf(p))}
                      >
                        Details
                      </button>
                    </td>
                  </tr>
                ))}
              </tbody>
            </table>
          )}
        </section>
      </div>

      <aside className="space-y-4">
        {picked && (
          <PointPanel point={picked} detail={detail} state={detailState} unit={c.unit} tz={tz} onClose={() => setPicked(null)} />
        )}
        <CapabilityPanel
          cap={data.capability}
          basis={data.capabilityBasis}
          spec={data.spec}
          specNote={data.specNote}
          unit={c.unit}
        />
      </aside>
    </div>
  );
}

function Legend({ zones, spec, excluded }: { zones: boolean; spec: boolean; excluded: number }) {
  return (
    <ul className="mb-1 flex flex-wrap gap-x-4 gap-y-1 text-xs text-ink-soft" aria-label="Legend">
      <li>
        <svg width="22" height="8" aria-hidden="true">
          <line x1="0" y1="4" x2="22" y2="4" stroke={PALETTE.lacquer} strokeWidth="2" />
        </svg>{' '}
        control limits (as in force)
      </li>
      <li>
        <svg width="22" height="8" aria-hidden="true">
          <line x1="0" y1="4" x2="22" y2="4" stroke={PALETTE.slateDeep} strokeWidth="1" />
        </svg>{' '}
        centre line
      </li>
      {spec && (
        <li>
          <svg width="22" height="8" aria-hidden="true">
            <line x1="0" y1="4" x2="22" y2="4" stroke={PALETTE.ink} strokeWidth="1.5" strokeDasharray="6 3" />
          </svg>{' '}
          spec limits (LSL / USL)
        </li>
      )}
      {zones && (
        <li>
          <svg width="22" height="8" aria-hidden="true">
            <line x1="0" y1="4" x2="22" y2="4" stroke="#9aa3a8" strokeWidth="1" strokeDasharray="2 3" />
          </svg>{' '}
          1σ / 2σ zones
        </li>
      )}
      <li>
        <svg width="12" height="10" aria-hidden="true">
          <polygon points="6,0 12,10 0,10" fill={PALETTE.alertHigh} />
        </svg>{' '}
        signal (rule id written beside it)
      </li>
      {excluded > 0 && (
        <li>
          <svg width="10" height="10" aria-hidden="true">
            <circle cx="5" cy="5" r="4" fill="#fff" stroke={PALETTE.inkSoft} strokeWidth="1.5" />
          </svg>{' '}
          excluded from the limits ({excluded})
        </li>
      )}
    </ul>
  );
}

function PointPanel({
  point,
  detail,
  state,
  unit,
  tz,
  onClose,
}: {
  point: ChartPoint;
  detail: PointDetail | null;
  state: 'idle' | 'loading' | 'error';
  unit: string;
  tz: string;
  onClose: () => void;
}) {
  const chName = new Map((detail?.channels ?? []).map((c) => [c.id, c.name]));
  return (
    <section className="panel" aria-labelledby="pp-h" aria-live="polite">
      <div className="flex items-start justify-between gap-2">
        <h2 id="pp-h" className="text-base">
          Point #{point.index}
        </h2>
        <button type="button" className="btn-quiet px-2 py-0.5 text-xs" onClick={onClose}>
          Close
        </button>
      </div>
      <dl className="mt-2 grid grid-cols-[auto_1fr] gap-x-3 gap-y-1 text-sm">
        <dt className="text-ink-soft">Closed</dt>
        <dd>{formatSiteTime(point.tMs, tz, { seconds: true })}</dd>
        <dt className="text-ink-soft">Value</dt>
        <dd className="num">
          {fmtNum(point.value, 6)} {unit}
        </dd>
        {point.limitSetId !== null && (
          <>
            <dt className="text-ink-soft">Judged against</dt>
            <dd className="num">
              CL {fmtNum(point.center, 6)} · UCL {fmtNum(point.ucl, 6)} · LCL {fmtNum(point.lcl, 6)}
              {detail?.limitSet ? ` (limits v${detail.limitSet.version})` : ''}
            </dd>
          </>
        )}
        {point.violations.length > 0 && (
          <>
            <dt className="text-ink-soft">Signals</dt>
            <dd>
              <ul>
                {point.violations.map((v) => (
                  <li key={v}>
                    <span className="text-alert-high" aria-hidden="true">
                      ▲{' '}
                    </span>
                    {violationLabel(v)}
                  </li>
                ))}
              </ul>
            </dd>
          </>
        )}
        {point.excluded && (
          <>
            <dt className="text-ink-soft">Excluded</dt>
            <dd>{point.exclusionReason}</dd>
          </>
        )}
      </dl>
      {state === 'loading' && (
        <p className="mt-2 text-sm text-ink-soft" role="status">
          Loading the readings…
        </p>
      )}
      {state === 'error' && (
        <p className="mt-2 text-sm" role="alert">
          ✕ The point’s readings could not be loaded.
        </p>
      )}
      {detail && (
        <>
          <h3 className="mt-3 text-sm font-bold">Subgroup ({detail.members.length})</h3>
          <p className="num text-sm">{detail.members.map((m) => fmtNum(m, 6)).join(' · ')}</p>
          <h3 className="mt-3 text-sm font-bold">Raw readings</h3>
          {detail.readings.length === 0 ? (
            <p className="text-sm text-ink-soft">None kept.</p>
          ) : detail.readings[0]?.t !== undefined ? (
            <table className="mt-1 text-xs">
              <thead>
                <tr>
                  <th scope="col">Time</th>
                  <th scope="col">Channel</th>
                  <th scope="col" className="text-right">
                    {unit}
                  </th>
                </tr>
              </thead>
              <tbody>
                {detail.readings.slice(0, 60).map((r, i) => (
                  <tr key={i}>
                    <td>{formatSiteTime(r.t, tz, { seconds: true })}</td>
                    <td>{chName.get(r.c ?? -1) ?? r.c}</td>
                    <td className="num text-right">{fmtNum(r.v, 6)}</td>
                  </tr>
                ))}
              </tbody>
            </table>
          ) : (
            <ul className="text-sm">
              {detail.readings.map((r, i) => (
                <li key={i}>
                  {r.n !== undefined && `${r.n} readings`}
                  {r.mean !== undefined && `, mean ${fmtNum(r.mean, 5)} ${unit}`}
                  {r.soakFromMs !== undefined &&
                    r.soakToMs !== undefined &&
                    ` over the soak ${formatSiteTime(r.soakFromMs, tz)} – ${formatSiteTime(r.soakToMs, tz)}`}
                  {r.v !== undefined && `${fmtNum(r.v, 6)} ${unit}`}
                </li>
              ))}
            </ul>
          )}
          <h3 className="mt-3 text-sm font-bold">Records</h3>
          {detail.dipRuns.length === 0 && detail.ovenLoads.length === 0 ? (
            <p className="text-sm text-ink-soft">No dip run or oven load recorded at this time.</p>
          ) : (
            <ul className="text-sm">
              {detail.dipRuns.map((d) => (
                <li key={`d${d.id}`}>
                  Dip run {d.id} · dipped {formatSiteTime(d.dippedAt, tz)}
                  {d.withdrawalSpeedMmS !== null ? ` · ${fmtNum(d.withdrawalSpeedMmS)} mm/s` : ''}
                </li>
              ))}
              {detail.ovenLoads.map((l) => (
                <li key={`l${l.id}`}>
                  <a href={`/loads/${l.id}`}>Oven load {l.id}</a> · {formatSiteTime(l.openedAt, tz)} –{' '}
                  {l.closedAt ? formatSiteTime(l.closedAt, tz) : 'open'}
                  {l.verdict ? ` · ${l.verdict}` : ''}
                </li>
              ))}
            </ul>
          )}
        </>
      )}
    </section>
  );
}

/** Expected ppm: three significant figures, "< 0.001" for the vanishingly small (normal-tail) values. */
export function fmtPpm(v: number | null | undefined): string {
  if (v === null || v === undefined || !Number.isFinite(v)) return '—';
  if (v === 0) return '0';
  if (v < 0.001) return '< 0.001';
  return fmtNum(v, 3);
}

/** Capability summary: indices with intervals, ppm, normality and autocorrelation in plain words. */
export function CapabilityPanel({
  cap,
  basis,
  spec,
  specNote,
  unit,
}: {
  cap: SpcCapability | null;
  basis: string | null;
  spec: ChartData['spec'];
  specNote: string | null;
  unit: string;
}) {
  const row = (label: string, v: number | null, extra?: string, text?: string) => (
    <tr>
      <th scope="row" className="bg-transparent font-normal">
        {label}
      </th>
      <td className="num whitespace-nowrap text-right">{text ?? fmtNum(v, 3)}</td>
      <td className="text-xs text-ink-soft">{extra ?? ''}</td>
    </tr>
  );
  return (
    <section className="panel" aria-labelledby="cap-h">
      <h2 id="cap-h" className="text-base">
        Capability
      </h2>
      {spec ? (
        <p className="text-sm text-ink-soft">
          Spec: {spec.lsl !== undefined ? `LSL ${fmtNum(spec.lsl)}` : 'no LSL'} ·{' '}
          {spec.usl !== undefined ? `USL ${fmtNum(spec.usl)}` : 'no USL'}
          {spec.target !== undefined ? ` · target ${fmtNum(spec.target)}` : ''} {unit}
        </p>
      ) : null}
      {specNote && <p className="text-xs text-ink-soft">{specNote}</p>}
      {!cap ? (
        <p className="mt-2 text-sm text-ink-soft">
          {spec ? (basis ?? 'Not enough points.') : 'Set a specification to see capability.'}
        </p>
      ) : (
        <>
          <table className="mt-2">
            <tbody>
              {row(
                'Cp',
                cap.cp,
                cap.cpInterval
                  ? `${Math.round(cap.cpInterval.confidence * 100)} %: ${fmtNum(cap.cpInterval.lower, 3)}–${fmtNum(cap.cpInterval.upper, 3)}`
                  : undefined,
              )}
              {row(
                'Cpk',
                cap.cpk,
                cap.cpkInterval
                  ? `${Math.round(cap.cpkInterval.confidence * 100)} %: ${fmtNum(cap.cpkInterval.lower, 3)}–${fmtNum(cap.cpkInterval.upper, 3)}`
                  : undefined,
              )}
              {row('Pp', cap.pp)}
              {row('Ppk', cap.ppk)}
              {row('Cpm', cap.cpm)}
              {row('ppm out of spec (within)', null, undefined, fmtPpm(cap.ppmWithin?.total))}
              {row('ppm out of spec (overall)', null, undefined, fmtPpm(cap.ppmOverall?.total))}
            </tbody>
          </table>
          <p className="mt-2 text-sm">
            Mean {fmtNum(cap.mean)} {unit} · σ within {fmtNum(cap.sigmaWithin, 3)} · σ overall {fmtNum(cap.sigmaOverall, 3)}{' '}
            {unit}
          </p>
          <p className="mt-2 text-sm">
            {cap.normality === null
              ? 'Normality: too few observations to check.'
              : cap.normality.normalAt5Percent
                ? `Normality: no evidence against a normal distribution (Anderson–Darling p = ${fmtNum(cap.normality.pValue, 2)}).`
                : `⚠ Normality: the data do not look normal (Anderson–Darling p = ${fmtNum(cap.normality.pValue, 2)}); the ppm estimates assume a normal distribution and may be wrong.`}
          </p>
          {cap.autocorrelation?.warning ? (
            <p className="caution mt-2">
              <strong>⚠ Correlated points.</strong> {cap.autocorrelation.warning}
            </p>
          ) : cap.autocorrelation ? (
            <p className="mt-2 text-sm text-ink-soft">
              Successive points look independent (lag-1 r = {fmtNum(cap.autocorrelation.lag1, 2)}).
            </p>
          ) : null}
          {basis && <p className="mt-2 text-xs text-ink-soft">Based on {basis}</p>}
        </>
      )}
    </section>
  );
}
