/**
 * The channel trend: one or more channels on one time axis (one y axis per unit), any range
 * from a minute to two years, pan and zoom (buttons, keys, drag-select, Ctrl + wheel), min/max
 * band with the mean when the server buckets, raw points when zoomed in, the process window in
 * force shaded (window changes marked), and alarms and plant events as markers. Exports the
 * chart as PNG and the plotted data as CSV. Times in the site's zone, with the zone shown.
 */
import { Chart as ChartJS, Filler, Legend, LinearScale, LineController, LineElement, PointElement, Tooltip } from 'chart.js';
import annotationPlugin from 'chartjs-plugin-annotation';
import { useCallback, useEffect, useMemo, useRef, useState } from 'react';
import { Chart } from 'react-chartjs-2';
import { formatRange, fromLocalInput, toLocalInput } from '../../lib/shared/time.ts';
import {
  clampToNow,
  panRange,
  placeMarkers,
  presetRange,
  RANGE_PRESETS,
  trendCsv,
  unitAxes,
  windowBands,
  zoomRange,
  type ChartPoint,
  type Marker,
  type RangePresetKey,
  type TrendEvent,
  type ViewRange,
} from '../../lib/shared/trend.ts';
import {
  drawnFlag,
  MAX_CHANNELS,
  SOURCE_WORDS,
  STYLES,
  trendDatasets,
  trendOptions,
  whiteBackground,
  widthWords,
  type TrendChannelOption,
} from './trend-chart-config.ts';
import { useTrendData } from './useTrendData.ts';

export type { TrendChannelOption };

// The time axis is a linear axis over epoch ms with our own ticks and labels in the site's zone
// (chart.js's time scale would need a date adapter and aligns ticks to the browser's zone).
ChartJS.register(LineController, LineElement, PointElement, LinearScale, Tooltip, Legend, Filler, annotationPlugin);

interface Props {
  channels: TrendChannelOption[];
  initialIds: number[];
  initialRange: ViewRange;
  initialLive: boolean;
  initialPreset: RangePresetKey | null;
  /** `?at=`: an instant to mark (the alarm queue links here). */
  at: number | null;
  timeZone: string;
}

interface View {
  range: ViewRange;
  live: boolean;
  preset: RangePresetKey | null;
}

export function TrendChart({ channels, initialIds, initialRange, initialLive, initialPreset, at, timeZone: tz }: Props) {
  const byId = useMemo(() => new Map(channels.map((c) => [c.id, c])), [channels]);
  const [ids, setIds] = useState<number[]>(() => initialIds.filter((id) => byId.has(id)).slice(0, MAX_CHANNELS));
  const [view, setView] = useState<View>({ range: initialRange, live: initialLive, preset: initialPreset });
  const [reloadKey, setReloadKey] = useState(0);
  const [showEvents, setShowEvents] = useState(true);
  const [showWindow, setShowWindow] = useState(true);
  const [widthPx, setWidthPx] = useState(1000);
  const [picker, setPicker] = useState('');
  const [custom, setCustom] = useState(() => ({
    from: toLocalInput(initialRange.fromMs, tz),
    to: toLocalInput(initialRange.toMs, tz),
  }));
  const [customError, setCustomError] = useState<string | null>(null);
  const [sel, setSel] = useState<{ x0: number; x1: number } | null>(null);
  const chartRef = useRef<ChartJS<'line', ChartPoint[]> | null>(null);
  const boxRef = useRef<HTMLDivElement | null>(null);
  const silent = useRef(false);
  const { fromMs, toMs } = view.range;
  const span = toMs - fromMs;

  // Plot width: markers, thinning and tick count follow it; the next fetch asks for about one point per pixel.
  useEffect(() => {
    const el = boxRef.current;
    if (!el) return;
    const ro = new ResizeObserver(() => setWidthPx(Math.round(el.clientWidth / 50) * 50 || 1000));
    ro.observe(el);
    return () => ro.disconnect();
  }, []);

  // Readings (the chart draws as soon as they arrive) and, beside them, the window and events.
  const { series, notes, loading } = useTrendData({ ids, fromMs, toMs, reloadKey, boxRef, silent });

  // A live view (a preset ending now) follows the clock.
  useEffect(() => {
    if (!view.live || !view.preset) return;
    const every = span <= 86_400_000 ? 15_000 : 60_000;
    const t = setInterval(() => {
      silent.current = true;
      setView((v) => (v.live && v.preset ? { ...v, range: presetRange(v.preset, Date.now()) } : v));
    }, every);
    return () => clearInterval(t);
  }, [view.live, view.preset, span]);

  // Keep the address shareable.
  useEffect(() => {
    if (ids.length === 0) return;
    const p = new URLSearchParams();
    if (view.live && view.preset) p.set('range', view.preset);
    else {
      p.set('from', String(Math.round(fromMs)));
      p.set('to', String(Math.round(toMs)));
    }
    if (ids.length > 1) p.set('add', ids.slice(1).join(','));
    window.history.replaceState(null, '', `/charts/channel/${ids[0]}?${p.toString()}`);
    setCustom({ from: toLocalInput(fromMs, tz), to: toLocalInput(toMs, tz) });
  }, [ids, view, fromMs, toMs, tz]);

  const go = useCallback((r: ViewRange) => setView({ range: clampToNow(r, Date.now() + 60_000), live: false, preset: null }), []);
  const goPreset = (key: RangePresetKey) => setView({ range: presetRange(key, Date.now()), live: true, preset: key });

  // ---- chart data
  const axes = useMemo(() => unitAxes(ids.map((id) => byId.get(id)?.unit ?? '')), [ids, byId]);
  const axisOf = useCallback((unit: string) => axes.find((a) => a.unit === unit)?.id ?? 'y0', [axes]);
  const loaded = useMemo(
    () => ids.map((id) => ({ id, ch: byId.get(id)!, st: series.get(id) })).filter((x) => x.ch),
    [ids, byId, series],
  );
  const anyData = loaded.some((x) => (x.st?.shaped?.rows.length ?? 0) > 0);

  const markers: Marker[] = useMemo(() => {
    const seen = new Set<string>();
    const all: TrendEvent[] = [];
    for (const n of notes.values()) {
      for (const e of n.a?.events ?? []) {
        const k = `${e.tMs}|${e.kind}|${e.label}`;
        if (!seen.has(k)) {
          seen.add(k);
          all.push(e);
        }
      }
    }
    return placeMarkers(all, fromMs, toMs, Math.max(20, Math.round(widthPx / 9)));
  }, [notes, fromMs, toMs, widthPx]);

  const bandsByChannel = useMemo(
    () => new Map(loaded.map(({ id, ch }) => [id, notes.get(id)?.a ? windowBands(notes.get(id)!.a!.windows, ch.kind) : []])),
    [notes, loaded],
  );

  const { data, totalPoints } = useMemo(
    () => trendDatasets({ loaded, axisOf, showEvents, markers, widthPx }),
    [loaded, axisOf, showEvents, markers, widthPx],
  );

  const options = useMemo(
    () =>
      trendOptions({
        axes,
        axisOf,
        loaded,
        span,
        bandsByChannel,
        showWindow,
        showEvents,
        markers,
        fromMs,
        toMs,
        at,
        tz,
        loading,
        anyData,
        totalPoints,
        widthPx,
      }),
    [
      axes,
      axisOf,
      loaded,
      span,
      bandsByChannel,
      showWindow,
      showEvents,
      markers,
      fromMs,
      toMs,
      at,
      tz,
      loading,
      anyData,
      totalPoints,
      widthPx,
    ],
  );

  // ---- pan / zoom by pointer, wheel and keys
  const plotX = (clientX: number) => {
    const chart = chartRef.current;
    if (!chart) return null;
    const rect = chart.canvas.getBoundingClientRect();
    const x = clientX - rect.left;
    const { left, right } = chart.chartArea;
    return {
      x: Math.min(right, Math.max(left, x)),
      inside: x >= left && x <= right,
      ms: (px: number) => chart.scales['x']!.getValueForPixel(px) ?? fromMs,
    };
  };
  const onPointerDown = (e: React.PointerEvent) => {
    if (e.button !== 0) return;
    const p = plotX(e.clientX);
    if (!p?.inside) return;
    (e.currentTarget as HTMLElement).setPointerCapture(e.pointerId);
    setSel({ x0: p.x, x1: p.x });
  };
  const onPointerMove = (e: React.PointerEvent) => {
    if (!sel) return;
    const p = plotX(e.clientX);
    if (p) setSel({ ...sel, x1: p.x });
  };
  const onPointerUp = () => {
    if (!sel) return;
    const p = plotX(0);
    setSel(null);
    if (!p || Math.abs(sel.x1 - sel.x0) < 6) return;
    const a = p.ms(Math.min(sel.x0, sel.x1));
    const b = p.ms(Math.max(sel.x0, sel.x1));
    go({ fromMs: Math.round(a), toMs: Math.round(Math.max(b, a + 60_000)) });
  };
  useEffect(() => {
    const el = boxRef.current;
    if (!el) return;
    const onWheel = (e: WheelEvent) => {
      if (!e.ctrlKey) return;
      const p = plotX(e.clientX);
      if (!p?.inside) return;
      e.preventDefault();
      setView((v) => ({
        range: clampToNow(zoomRange(v.range, e.deltaY < 0 ? 0.7 : 1 / 0.7, p.ms(p.x)), Date.now() + 60_000),
        live: false,
        preset: null,
      }));
    };
    el.addEventListener('wheel', onWheel, { passive: false });
    return () => el.removeEventListener('wheel', onWheel);
  });
  const onKeyDown = (e: React.KeyboardEvent) => {
    const r = view.range;
    if (e.key === 'ArrowLeft') go(panRange(r, -0.25));
    else if (e.key === 'ArrowRight') go(panRange(r, 0.25));
    else if (e.key === '+' || e.key === '=') go(zoomRange(r, 0.5));
    else if (e.key === '-' || e.key === '_') go(zoomRange(r, 2));
    else return;
    e.preventDefault();
  };

  // ---- export
  const exportPng = () => {
    const chart = chartRef.current;
    if (!chart) return;
    download(chart.toBase64Image('image/png', 1), `${fileStem()}.png`);
  };
  const exportCsv = () => {
    const csv = trendCsv(
      loaded.flatMap(({ ch, st }) => (st?.shaped ? [{ name: ch.name, unit: ch.unit, shaped: st.shaped }] : [])),
      tz,
    );
    download(URL.createObjectURL(new Blob(['\ufeff', csv], { type: 'text/csv;charset=utf-8' })), `${fileStem()}.csv`);
  };
  const fileStem = () => {
    const names = loaded.map(({ ch }) => ch.name.toLowerCase().replace(/[^a-z0-9]+/g, '-')).join('+');
    return `coatrail-trend-${names}-${toLocalInput(fromMs, tz).replace(/[:T]/g, '')}-${toLocalInput(toMs, tz).replace(/[:T]/g, '')}`;
  };

  const applyCustom = (e: React.SyntheticEvent) => {
    e.preventDefault();
    const a = fromLocalInput(custom.from, tz);
    const b = fromLocalInput(custom.to, tz);
    if (!Number.isFinite(a) || !Number.isFinite(b)) return setCustomError('Enter both times.');
    if (!(b > a)) return setCustomError('"To" must be after "From".');
    setCustomError(null);
    setView({ range: { fromMs: a, toMs: b }, live: false, preset: null });
  };

  const available = channels.filter((c) => !ids.includes(c.id));
  const groups = [...new Set(available.map((c) => c.assetName))];
  const errors = loaded.filter((x) => x.st?.status === 'error');

  return (
    <div className="space-y-3">
      <div className="panel space-y-3 p-3">
        <div className="flex flex-wrap items-center gap-2" role="group" aria-label="Time range">
          {RANGE_PRESETS.map((p) => (
            <button
              key={p.key}
              type="button"
              className={view.live && view.preset === p.key ? 'btn' : 'btn-quiet'}
              aria-pressed={view.live && view.preset === p.key}
              onClick={() => goPreset(p.key)}
            >
              {p.label}
            </button>
          ))}
          <span className="mx-1 h-6 w-px bg-slate-line" aria-hidden="true" />
          <button
            type="button"
            className="btn-quiet"
            onClick={() => go(panRange(view.range, -0.5))}
            title="Earlier by half the view (← key)"
          >
            ← Earlier
          </button>
          <button
            type="button"
            className="btn-quiet"
            onClick={() => go(panRange(view.range, 0.5))}
            disabled={toMs >= Date.now()}
            title="Later by half the view (→ key)"
          >
            Later →
          </button>
          <button
            type="button"
            className="btn-quiet"
            onClick={() => go(zoomRange(view.range, 0.5))}
            title="Zoom in (+ key; or drag across the chart)"
          >
            Zoom in
          </button>
          <button type="button" className="btn-quiet" onClick={() => go(zoomRange(view.range, 2))} title="Zoom out (− key)">
            Zoom out
          </button>
        </div>
        <form className="flex flex-wrap items-end gap-2" onSubmit={applyCustom} aria-label="Custom range">
          <div>
            <label htmlFor="trend-from">From ({tz})</label>
            <input
              id="trend-from"
              type="datetime-local"
              className="w-auto"
              value={custom.from}
              onChange={(e) => setCustom({ ...custom, from: e.target.value })}
            />
          </div>
          <div>
            <label htmlFor="trend-to">To ({tz})</label>
            <input
              id="trend-to"
              type="datetime-local"
              className="w-auto"
              value={custom.to}
              onChange={(e) => setCustom({ ...custom, to: e.target.value })}
            />
          </div>
          <button type="submit" className="btn-quiet">
            Show range
          </button>
          {customError && (
            <span role="alert" className="text-sm font-bold text-alert-high">
              ▲ {customError}
            </span>
          )}
          <span className="ml-auto flex flex-wrap items-center gap-2">
            <button type="button" className="btn-quiet" onClick={exportPng} disabled={!!loading || !anyData}>
              Download PNG
            </button>
            <button type="button" className="btn-quiet" onClick={exportCsv} disabled={!!loading || !anyData}>
              Download CSV
            </button>
          </span>
        </form>
        <div className="flex flex-wrap items-end gap-2">
          <ul className="flex flex-wrap gap-2" aria-label="Channels on this chart">
            {loaded.map(({ id, ch }, i) => (
              <li key={id} className="flex items-center gap-1 rounded border border-slate-line bg-paper px-2 py-1 text-sm">
                <svg width="26" height="8" aria-hidden="true">
                  <line
                    x1="0"
                    y1="4"
                    x2="26"
                    y2="4"
                    stroke={STYLES[i % STYLES.length]!.line}
                    strokeWidth="2"
                    strokeDasharray={STYLES[i % STYLES.length]!.dash.join(' ')}
                  />
                </svg>
                <span>
                  <span className="font-bold">{ch.name}</span>{' '}
                  <span className="text-ink-soft">
                    ({ch.unit}, {STYLES[i % STYLES.length]!.name})
                  </span>
                </span>
                {ids.length > 1 && (
                  <button
                    type="button"
                    className="ml-1 rounded px-1 font-bold text-ink-soft hover:bg-slate-panel"
                    aria-label={`Remove ${ch.name}`}
                    onClick={() => setIds(ids.filter((x) => x !== id))}
                  >
                    ×
                  </button>
                )}
              </li>
            ))}
          </ul>
          {ids.length < MAX_CHANNELS && available.length > 0 && (
            <form
              className="flex items-end gap-2"
              onSubmit={(e) => {
                e.preventDefault();
                const id = Number(picker);
                if (id && !ids.includes(id)) setIds([...ids, id]);
                setPicker('');
              }}
            >
              <div>
                <label htmlFor="trend-add">Add a channel</label>
                <select id="trend-add" className="w-auto" value={picker} onChange={(e) => setPicker(e.target.value)}>
                  <option value="">Choose…</option>
                  {groups.map((g) => (
                    <optgroup key={g} label={g}>
                      {available
                        .filter((c) => c.assetName === g)
                        .map((c) => (
                          <option key={c.id} value={c.id}>
                            {c.name} ({c.unit})
                          </option>
                        ))}
                    </optgroup>
                  ))}
                </select>
              </div>
              <button type="submit" className="btn-quiet" disabled={!picker}>
                Add
              </button>
            </form>
          )}
          <span className="ml-auto flex flex-wrap gap-4 text-sm">
            <label className="mb-0 flex items-center gap-1.5 font-normal text-ink">
              <input type="checkbox" className="w-auto" checked={showWindow} onChange={(e) => setShowWindow(e.target.checked)} />{' '}
              Process window
            </label>
            <label className="mb-0 flex items-center gap-1.5 font-normal text-ink">
              <input type="checkbox" className="w-auto" checked={showEvents} onChange={(e) => setShowEvents(e.target.checked)} />{' '}
              Alarms and events
            </label>
          </span>
        </div>
      </div>

      <div className="panel p-3">
        <p className="mb-2 text-sm text-ink-soft">
          <span className="font-bold text-ink">{formatRange(fromMs, toMs, tz)}</span>
          {view.live ? ' · following live' : ''} · drag across the chart to zoom in; ← → keys move, + − zoom; Ctrl + wheel zooms
          at the pointer.
        </p>
        <div
          ref={boxRef}
          data-trend
          data-drawn="false"
          className="relative h-[480px] select-none focus-visible:outline focus-visible:outline-2"
          tabIndex={0}
          aria-label={`Trend chart, ${formatRange(fromMs, toMs, tz)}. Arrow keys move the view, plus and minus zoom.`}
          onKeyDown={onKeyDown}
          onPointerDown={onPointerDown}
          onPointerMove={onPointerMove}
          onPointerUp={onPointerUp}
          onPointerCancel={() => setSel(null)}
        >
          <Chart type="line" ref={chartRef as any} data={data} options={options} plugins={[whiteBackground, drawnFlag]} />
          {sel && (
            <div
              className="pointer-events-none absolute bottom-8 top-2 border border-lacquer bg-lacquer/15"
              style={{ left: Math.min(sel.x0, sel.x1), width: Math.abs(sel.x1 - sel.x0) }}
              aria-hidden="true"
            />
          )}
          {loading && (
            <div className="absolute inset-0 flex items-center justify-center bg-white/70" role="status">
              <div className="rounded border border-slate-line bg-white px-4 py-3 text-sm shadow-sm">
                Loading readings… {loading.done} of {loading.total} channel{loading.total === 1 ? '' : 's'}
                <div className="mt-2 h-1.5 w-48 rounded bg-slate-panel">
                  <div
                    className="h-1.5 rounded bg-lacquer"
                    style={{ width: `${(100 * loading.done) / Math.max(1, loading.total)}%` }}
                  />
                </div>
              </div>
            </div>
          )}
          {!loading && !anyData && errors.length === 0 && (
            <div className="absolute inset-0 flex items-center justify-center" role="status">
              <div className="empty max-w-md text-center">
                <p className="font-bold text-ink">No readings in {formatRange(fromMs, toMs, tz)}.</p>
                <p className="mt-1 text-sm">The device may have been offline, or the channel is new.</p>
                <div className="mt-3 flex justify-center gap-2">
                  <button type="button" className="btn-quiet" onClick={() => go(zoomRange(view.range, 4))}>
                    Zoom out
                  </button>
                  <button type="button" className="btn-quiet" onClick={() => goPreset('24h')}>
                    Last 24 h
                  </button>
                </div>
              </div>
            </div>
          )}
        </div>
        {errors.length > 0 && (
          <div className="mt-2 rounded border-l-4 border-alert-high bg-alert-bg p-3 text-sm" role="alert">
            {errors.map(({ id, ch, st }) => (
              <p key={id}>
                <span className="font-bold">▲ Could not load {ch.name}:</span> {st?.error}
              </p>
            ))}
            <button type="button" className="btn-quiet mt-2" onClick={() => setReloadKey((k) => k + 1)}>
              Try again
            </button>
          </div>
        )}
        <ul className="mt-2 space-y-0.5 text-xs text-ink-soft" aria-label="What is plotted">
          {loaded.map(({ id, ch, st }) => (
            <li key={id}>
              <span className="font-bold text-ink-soft">{ch.name}:</span>{' '}
              {!st
                ? 'loading…'
                : st.status === 'error'
                  ? 'not loaded'
                  : st.shaped!.rows.length === 0
                    ? 'no readings in this range'
                    : st.shaped!.mode === 'raw'
                      ? `${st.shaped!.rows.length} raw readings`
                      : `${st.shaped!.rows.length} buckets of ${widthWords(st.shaped!.bucketMs ?? 0)} from the ${SOURCE_WORDS[st.shaped!.source]} (line = mean, band = min–max)`}
              {notes.get(id)?.error ? ` · window and events not loaded (${notes.get(id)!.error})` : ''}
              {notes.get(id)?.a?.truncated ? ' · more events than shown: zoom in to see them all' : ''}
            </li>
          ))}
          <li>
            Shaded: the process window in force at the time (dashed limits, dotted target). Markers: ▲ alarms (colour by
            priority), ● solvent and ▬ lacquer additions, ■ filter changes, ◆ door openings, ✕ load start, ★ load end; a larger
            marker stands for several events — hover for the list.
          </li>
        </ul>
      </div>
    </div>
  );
}

function download(href: string, filename: string) {
  const a = document.createElement('a');
  a.href = href;
  a.download = filename;
  document.body.appendChild(a);
  a.click();
  a.remove();
  if (href.startsWith('blob:')) setTimeout(() => URL.revokeObjectURL(href), 10_000);
}
