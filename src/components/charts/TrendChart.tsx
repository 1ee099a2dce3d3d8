/**
 * The channel trend: one or more channels on one time axis (one y axis per unit), any range
 * from a minute to two years, pan and zoom (buttons, keys, drag-select, Ctrl + wheel), min/max
 * band with the mean when the server buckets, raw points when zoomed in, the process window in
 * force shaded (window changes marked), and alarms and plant events as markers. Exports the
 * chart as PNG and the plotted data as CSV. Times in the site's zone, with the zone shown.
 */
import {
  Chart as ChartJS,
  Filler,
  Legend,
  LinearScale,
  LineController,
  LineElement,
  PointElement,
  Tooltip,
  type ChartData,
  type ChartOptions,
  type Plugin,
  type Scale,
  type TooltipItem,
} from 'chart.js';
import annotationPlugin from 'chartjs-plugin-annotation';
import { useCallback, useEffect, useMemo, useRef, useState } from 'react';
import { Chart } from 'react-chartjs-2';
import { apiFetch, ApiError } from '../../lib/client/api.ts';
import type { ReadingsResponse } from '../../lib/shared/telemetry.ts';
import {
  formatClock,
  formatRange,
  formatSiteTime,
  fromLocalInput,
  tickLabel,
  timeTicks,
  toLocalInput,
  zonesOver,
} from '../../lib/shared/time.ts';
import { thinLine } from '../../lib/domain/series/thin-line.ts';
import {
  clampToNow,
  EVENT_STYLE,
  INITIAL_MAX_POINTS,
  maxPointsFor,
  panRange,
  placeMarkers,
  presetRange,
  RANGE_PRESETS,
  shapeReadings,
  TREND_EVENT_KINDS,
  trendCsv,
  unitAxes,
  windowBands,
  windowChanges,
  zoomRange,
  type AnnotationsResponse,
  type ChartPoint,
  type Marker,
  type PlottedRow,
  type RangePresetKey,
  type ShapedSeries,
  type TrendEvent,
  type ViewRange,
} from '../../lib/shared/trend.ts';
import { PALETTE, PRIORITY_COLOUR } from '../../styles/palette.mjs';

// The time axis is a linear axis over epoch ms with our own ticks and labels in the site's zone
// (chart.js's time scale would need a date adapter and aligns ticks to the browser's zone).
ChartJS.register(LineController, LineElement, PointElement, LinearScale, Tooltip, Legend, Filler, annotationPlugin);

export interface TrendChannelOption {
  id: number;
  name: string;
  kind: string;
  unit: string;
  assetName: string;
}

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

interface SeriesState {
  status: 'ok' | 'error';
  shaped?: ShapedSeries;
  error?: string;
}

/** The window stretches and events of one channel (or why they could not be loaded). */
interface Note {
  a: AnnotationsResponse | null;
  error?: string;
}

interface View {
  range: ViewRange;
  live: boolean;
  preset: RangePresetKey | null;
}

/** Series styles: muted line colours with distinct dash patterns (colour is not the only difference). */
const STYLES = [
  { line: PALETTE.slateDeep, fill: 'rgba(45,58,66,0.16)', dash: [] as number[], name: 'solid' },
  { line: '#1d5f8a', fill: 'rgba(29,95,138,0.16)', dash: [7, 4], name: 'dashed' },
  { line: '#5b4f8a', fill: 'rgba(91,79,138,0.14)', dash: [2, 3], name: 'dotted' },
  { line: '#6b5a2e', fill: 'rgba(107,90,46,0.14)', dash: [10, 3, 2, 3], name: 'dash-dot' },
  { line: '#3f5f3f', fill: 'rgba(63,95,63,0.14)', dash: [14, 4], name: 'long dash' },
  { line: '#7a4a5a', fill: 'rgba(122,74,90,0.14)', dash: [4, 2], name: 'short dash' },
];
const MAX_CHANNELS = 6;
const EVENTS_AXIS_MAX = 24;
const SOURCE_WORDS = { raw: 'raw readings', minute: 'minute rollup', hour: 'hourly rollup' } as const;

const widthWords = (ms: number) =>
  ms % 86_400_000 === 0
    ? `${ms / 86_400_000} d`
    : ms % 3_600_000 === 0
      ? `${ms / 3_600_000} h`
      : ms % 60_000 === 0
        ? `${ms / 60_000} min`
        : `${ms / 1000} s`;

/** Paints the canvas white behind everything, so the PNG export is not transparent. */
const whiteBackground: Plugin<'line'> = {
  id: 'whiteBackground',
  beforeDraw(chart) {
    const { ctx } = chart;
    ctx.save();
    ctx.globalCompositeOperation = 'destination-over';
    ctx.fillStyle = '#ffffff';
    ctx.fillRect(0, 0, chart.width, chart.height);
    ctx.restore();
  },
};

/** Marks the wrapper `data-drawn="true"` once a chart with loaded data has rendered (browser tests and the benchmark wait on it). */
const drawnFlag: Plugin<'line', { ready?: boolean; points?: number }> = {
  id: 'drawnFlag',
  afterRender(chart, _args, opts) {
    const el = chart.canvas.closest('[data-trend]');
    if (!el) return;
    el.setAttribute('data-drawn', opts.ready ? 'true' : 'false');
    el.setAttribute('data-points', String(opts.points ?? 0));
  },
};

export function TrendChart({ channels, initialIds, initialRange, initialLive, initialPreset, at, timeZone: tz }: Props) {
  const byId = useMemo(() => new Map(channels.map((c) => [c.id, c])), [channels]);
  const [ids, setIds] = useState<number[]>(() => initialIds.filter((id) => byId.has(id)).slice(0, MAX_CHANNELS));
  const [view, setView] = useState<View>({ range: initialRange, live: initialLive, preset: initialPreset });
  const [series, setSeries] = useState<ReadonlyMap<number, SeriesState>>(new Map());
  const [notes, setNotes] = useState<ReadonlyMap<number, Note>>(new Map());
  const [loading, setLoading] = useState<{ done: number; total: number } | null>({ done: 0, total: ids.length });
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
  const firstLoad = useRef(true);
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

  // Fetch readings (the chart draws as soon as they arrive) and, beside them, the window and events.
  useEffect(() => {
    const ac = new AbortController();
    const quiet = silent.current;
    silent.current = false;
    const first = firstLoad.current;
    firstLoad.current = false;
    const from = Math.round(fromMs);
    const to = Math.round(toMs);
    // The first load asks exactly what the page preloaded; later ones about one point per pixel (≤ 2 000).
    const maxPoints = first ? INITIAL_MAX_POINTS : maxPointsFor((boxRef.current?.clientWidth ?? 1000) - 120);
    const message = (e: unknown) =>
      e instanceof ApiError ? `${e.title}${e.detail ? `: ${e.detail}` : ''}` : e instanceof Error ? e.message : String(e);
    const run = async () => {
      if (!quiet) setLoading({ done: 0, total: ids.length });
      void Promise.all(
        ids.map(async (id): Promise<[number, Note]> => {
          try {
            return [
              id,
              {
                a: await apiFetch<AnnotationsResponse>(`/api/v1/channels/${id}/annotations?from=${from}&to=${to}`, {
                  signal: ac.signal,
                }),
              },
            ];
          } catch (e) {
            return [id, { a: null, error: message(e) }];
          }
        }),
      ).then((r) => {
        if (!ac.signal.aborted) setNotes(new Map(r));
      });
      let done = 0;
      const results = await Promise.all(
        ids.map(async (id): Promise<[number, SeriesState]> => {
          try {
            const resp = await apiFetch<ReadingsResponse>(
              `/api/v1/channels/${id}/readings?from=${from}&to=${to}&maxPoints=${maxPoints}`,
              { signal: ac.signal },
            );
            return [id, { status: 'ok', shaped: shapeReadings(resp) }];
          } catch (e) {
            return [id, { status: 'error', error: message(e) }];
          } finally {
            done++;
            if (!quiet && !ac.signal.aborted) setLoading({ done, total: ids.length });
          }
        }),
      );
      if (ac.signal.aborted) return;
      setSeries(new Map(results));
      setLoading(null);
    };
    const timer = setTimeout(() => void run(), first ? 0 : 80);
    return () => {
      clearTimeout(timer);
      ac.abort();
    };
  }, [ids, fromMs, toMs, reloadKey]);

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

  const { data, totalPoints } = useMemo(() => {
    const datasets: any[] = [];
    let totalPoints = 0;
    loaded.forEach(({ ch, st }, i) => {
      const s = st?.shaped;
      if (!s) return;
      const style = STYLES[i % STYLES.length]!;
      const yAxisID = axisOf(ch.unit);
      const rows = new Map<number, PlottedRow>(s.rows.map((r) => [r.x, r]));
      const common = { yAxisID, spanGaps: false, parsing: false, normalized: true, _ch: ch, _rows: rows, _mode: s.mode };
      if (s.mode === 'bucketed') {
        datasets.push({
          ...common,
          label: `${ch.name} max`,
          data: s.max,
          borderWidth: 0,
          pointRadius: 0,
          fill: '+1',
          backgroundColor: style.fill,
          _role: 'band',
        });
        datasets.push({
          ...common,
          label: `${ch.name} min`,
          data: s.min,
          borderWidth: 0,
          pointRadius: 0,
          fill: false,
          _role: 'band',
        });
        datasets.push({
          ...common,
          label: `${ch.name} (${ch.unit}) — mean, min–max band per ${widthWords(s.bucketMs ?? 0)}`,
          data: s.line,
          borderColor: style.line,
          backgroundColor: style.line,
          borderDash: style.dash,
          borderWidth: 1.6,
          pointRadius: 0,
          pointStyle: 'line',
          _role: 'line',
        });
        totalPoints += s.rows.length;
      } else {
        const line = thinLine(s.line, Math.max(200, widthPx * 1.5));
        const dots = s.rows.length <= 240;
        datasets.push({
          ...common,
          label: `${ch.name} (${ch.unit}) — readings`,
          data: line,
          borderColor: style.line,
          backgroundColor: style.line,
          borderDash: style.dash,
          borderWidth: 1.6,
          pointRadius: dots ? 2.2 : 0,
          pointHoverRadius: 4,
          pointStyle: dots ? 'circle' : 'line',
          stepped: ch.kind === 'door' ? 'before' : false,
          _role: 'line',
        });
        totalPoints += s.rows.length;
      }
    });
    if (showEvents) {
      for (const kind of TREND_EVENT_KINDS) {
        const ms = markers.filter((m) => m.kind === kind);
        if (ms.length === 0) continue;
        const st = EVENT_STYLE[kind];
        datasets.push({
          label: st.many.charAt(0).toUpperCase() + st.many.slice(1),
          data: ms.map((m) => ({ x: m.x, y: m.lane + 0.7, _m: m })),
          yAxisID: 'events',
          showLine: false,
          parsing: false,
          pointStyle: st.shape,
          pointRadius: (c: any) => (c.raw?._m?.count > 1 ? 8 : 6.5),
          pointHoverRadius: 9,
          pointBackgroundColor: (c: any) =>
            kind === 'alarm' ? PRIORITY_COLOUR[(c.raw?._m as Marker | undefined)?.priority ?? 'low'] : PALETTE.inkSoft,
          pointBorderColor: PALETTE.ink,
          borderColor: kind === 'alarm' ? PRIORITY_COLOUR.high : PALETTE.inkSoft,
          backgroundColor: kind === 'alarm' ? PRIORITY_COLOUR.high : PALETTE.inkSoft,
          pointBorderWidth: 1,
          _role: 'marker',
        });
      }
    }
    return { data: { datasets } as ChartData<'line', ChartPoint[]>, totalPoints };
  }, [loaded, axisOf, showEvents, markers, widthPx]);

  const options = useMemo((): ChartOptions<'line'> => {
    const annotations: Record<string, any> = {};
    if (showWindow) {
      loaded.forEach(({ id, ch }, i) => {
        const bands = bandsByChannel.get(id) ?? [];
        const style = STYLES[i % STYLES.length]!;
        const yScaleID = axisOf(ch.unit);
        bands.forEach((b, k) => {
          const base = {
            xScaleID: 'x',
            yScaleID,
            xMin: Math.max(b.fromMs, fromMs),
            xMax: Math.min(b.toMs, toMs),
            drawTime: 'beforeDatasetsDraw',
          };
          annotations[`w${id}-${k}`] = {
            ...base,
            type: 'box',
            yMin: b.min,
            yMax: b.max,
            // Only the first channel's window is shaded; the others are drawn as limit lines in their series' style.
            backgroundColor: i === 0 ? 'rgba(47,111,115,0.07)' : 'rgba(0,0,0,0)',
            borderWidth: 0,
            label: {
              display: k === 0 && i < 3,
              content: `${ch.name}: window ${b.label} ${b.min}–${b.max} ${ch.unit}${b.lowApplies === 'soak' ? ' (low limit in soak only)' : b.lowApplies === 'load' ? ' (low limit while loaded)' : ''}`,
              position: { x: 'start', y: 'start' },
              color: i === 0 ? PALETTE.lacquerDark : style.line,
              font: { size: 11 },
              padding: 3,
            },
          };
          for (const [key, y, dash] of [
            ['lo', b.min, [6, 4]],
            ['hi', b.max, [6, 4]],
            ...(b.target !== null ? [['tg', b.target, [1, 3]] as const] : []),
          ] as const) {
            annotations[`w${id}-${k}-${key}`] = {
              ...base,
              type: 'line',
              yMin: y,
              yMax: y,
              borderColor: i === 0 ? PALETTE.lacquer : style.line,
              borderWidth: i === 0 ? 1 : 1.4,
              borderDash: dash,
            };
          }
        });
        windowChanges(bands).forEach((c, k) => {
          if (c.tMs <= fromMs || c.tMs >= toMs) return;
          annotations[`wc${id}-${k}`] = {
            type: 'line',
            xScaleID: 'x',
            xMin: c.tMs,
            xMax: c.tMs,
            borderColor: PALETTE.lacquer,
            borderWidth: 1.5,
            borderDash: [3, 3],
            label: {
              display: true,
              content: c.label,
              position: 'end',
              backgroundColor: 'rgba(31,78,81,0.85)',
              font: { size: 10 },
            },
          };
        });
      });
    }
    if (at !== null && at >= fromMs && at <= toMs) {
      annotations['at'] = {
        type: 'line',
        xScaleID: 'x',
        xMin: at,
        xMax: at,
        borderColor: PALETTE.ink,
        borderWidth: 2,
        label: {
          display: true,
          content: `Linked time ${formatClock(at, tz, { seconds: true })}`,
          position: 'start',
          backgroundColor: PALETTE.ink,
          font: { size: 11 },
        },
      };
    }
    // Extents of the shaded windows per axis, so a window is visible even when the data sits inside it.
    const bandExtent = new Map<string, [number, number]>();
    if (showWindow) {
      loaded.forEach(({ id, ch }) => {
        for (const b of bandsByChannel.get(id) ?? []) {
          const a = axisOf(ch.unit);
          const cur = bandExtent.get(a);
          bandExtent.set(a, cur ? [Math.min(cur[0], b.min), Math.max(cur[1], b.max)] : [b.min, b.max]);
        }
      });
    }
    const hasMarkers = showEvents && markers.length > 0;
    const scales: Record<string, any> = {
      x: {
        type: 'linear',
        min: fromMs,
        max: toMs,
        ticks: {
          callback: (v: string | number) => tickLabel(Number(v), tz, span),
          maxRotation: 0,
          autoSkipPadding: 18,
          color: PALETTE.inkSoft,
        },
        // Round ticks on the site's wall clock (chart.js would align them to the browser's zone).
        afterBuildTicks: (scale: Scale) => {
          scale.ticks = timeTicks(fromMs, toMs, tz, Math.max(3, Math.floor((scale.width || widthPx) / 110))).map((value) => ({
            value,
          }));
        },
        title: { display: true, text: `Time (${tz}, ${zonesOver(fromMs, toMs, tz)})`, color: PALETTE.inkSoft },
        grid: { color: '#ebebe6' },
      },
      events: { type: 'linear', axis: 'y', display: false, min: 0, max: EVENTS_AXIS_MAX },
    };
    axes.forEach((a, i) => {
      scales[a.id] = {
        type: 'linear',
        position: a.position,
        title: { display: true, text: a.unit, color: PALETTE.ink, font: { weight: 'bold' } },
        ticks: { color: PALETTE.inkSoft },
        grid: { drawOnChartArea: i === 0, color: '#ebebe6' },
        afterDataLimits: (scale: Scale) => {
          const ext = bandExtent.get(a.id);
          let lo = Number.isFinite(scale.min) ? scale.min : (ext?.[0] ?? 0);
          let hi = Number.isFinite(scale.max) ? scale.max : (ext?.[1] ?? 1);
          if (ext) {
            lo = Math.min(lo, ext[0]);
            hi = Math.max(hi, ext[1]);
          }
          const r = hi - lo || Math.abs(hi) * 0.1 || 1;
          scale.min = lo - r * (hasMarkers ? 0.26 : 0.05);
          scale.max = hi + r * 0.06;
        },
      };
    });
    return {
      animation: false,
      responsive: true,
      maintainAspectRatio: false,
      interaction: { mode: 'nearest', axis: 'xy', intersect: false },
      scales,
      plugins: {
        legend: {
          position: 'bottom',
          labels: {
            usePointStyle: true,
            filter: (item: { datasetIndex?: number }, d: ChartData) =>
              (d.datasets[item.datasetIndex ?? 0] as any)?._role !== 'band',
            color: PALETTE.ink,
            boxHeight: 8,
          },
        },
        tooltip: {
          filter: (item: TooltipItem<'line'>) => (item.dataset as any)._role !== 'band',
          callbacks: {
            title: (items: TooltipItem<'line'>[]) => {
              const x = (items[0]?.raw as ChartPoint | undefined)?.x;
              return x === undefined ? '' : formatSiteTime(x, tz, { seconds: span <= 2 * 86_400_000 });
            },
            label: (item: TooltipItem<'line'>) => tooltipLines(item, tz),
          },
        },
        annotation: { annotations },
        drawnFlag: { ready: !loading && anyData, points: totalPoints },
      } as any,
    };
  }, [
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
  ]);

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

function tooltipLines(item: TooltipItem<'line'>, tz: string): string | string[] {
  const ds = item.dataset as any;
  const raw = item.raw as ChartPoint & { _m?: Marker };
  if (ds._role === 'marker' && raw._m) {
    const m = raw._m;
    const lines = m.events
      .slice(0, 6)
      .map((e) => `${formatClock(e.tMs, tz, { seconds: true })} ${e.label}${e.detail ? ` (${e.detail})` : ''}`);
    if (m.count > 6) lines.push(`… and ${m.count - 6} more — zoom in to see them`);
    return m.count > 1 ? [m.label, ...lines] : lines;
  }
  const ch = ds._ch as TrendChannelOption;
  const row = (ds._rows as Map<number, PlottedRow>).get(raw.x);
  if (!row) return `${ch.name}: ${raw.y} ${ch.unit}`;
  if (ds._mode === 'raw')
    return `${ch.name}: ${row.value} ${ch.unit}${row.quality ? ` (quality ${row.quality === 1 ? 'uncertain' : 'bad'})` : ''}`;
  const f = (v: number | undefined) => (v === undefined ? '—' : Number(v.toPrecision(6)));
  return `${ch.name}: mean ${f(row.mean)} ${ch.unit} (min ${f(row.min)}, max ${f(row.max)}; ${row.n} readings from ${formatClock(row.bucketStartMs ?? raw.x, tz)})`;
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
