/**
 * The drawing of a control chart and its companion R/S/MR chart (chart.js with the annotation
 * plugin), shared by the live control-chart view and the limit study. Calm base: the statistic in
 * slate, limits in the lacquer teal, spec limits dashed and labelled; colour only for signals,
 * always with a shape (triangle) and the rule id as text. Excluded Phase I points are hollow and
 * labelled "excluded".
 */
import {
  Chart as ChartJS,
  LinearScale,
  LineController,
  LineElement,
  PointElement,
  Tooltip,
  type ChartData,
  type ChartOptions,
  type Plugin,
  type PointStyle,
  type TooltipItem,
} from 'chart.js';
import annotationPlugin, { type AnnotationOptions } from 'chartjs-plugin-annotation';
import { forwardRef, useMemo } from 'react';
import { Chart } from 'react-chartjs-2';
import {
  CHART_STATISTIC,
  type ChartPoint,
  type CharacteristicChart,
  type LimitSetView,
  type SpecLimits,
} from '../../lib/shared/characteristics.ts';
import { dispersionSignals, locationSignals, pointTooltip, shapeControlChart, yRange } from '../../lib/shared/control-chart.ts';
import { tickLabel, zonesOver } from '../../lib/shared/time.ts';
import { PALETTE } from '../../styles/palette.mjs';

ChartJS.register(LineController, LineElement, PointElement, LinearScale, Tooltip, annotationPlugin);

/**
 * After each render, marks the plot `data-drawn="true"` and `data-drawn-zones` with whether the
 * 1σ / 2σ zone lines were drawn (browser tests wait on these before a screenshot).
 */
const drawnFlag: Plugin<'line'> = {
  id: 'spcDrawnFlag',
  afterRender(chart) {
    const el = chart.canvas.closest('[data-spc-plot]');
    if (!el) return;
    el.setAttribute('data-drawn', 'true');
    el.setAttribute('data-drawn-zones', String(chart.data.datasets.some((d) => d.label === '+1σ')));
  },
};

export const COLORS = {
  stat: PALETTE.inkSoft,
  center: PALETTE.slateDeep,
  limit: PALETTE.lacquer,
  zone: '#9aa3a8',
  spec: PALETTE.ink,
  signal: PALETTE.alertHigh,
  hollow: '#ffffff',
  step: PALETTE.inkFaint,
};

export const fmtNum = (x: number | null | undefined, digits = 4): string =>
  x === null || x === undefined || !Number.isFinite(x) ? '—' : Number(x.toPrecision(digits)).toString();

export interface SpcPlotProps {
  chart: CharacteristicChart;
  points: ChartPoint[];
  limitSets: LimitSetView[];
  spec: SpecLimits | null;
  unit: string;
  timeZone: string;
  zones: boolean;
  /** Draw the companion dispersion chart instead of the statistic. */
  dispersion?: boolean;
  /** A point was clicked (index into `points`). */
  onPick?: (i: number) => void;
  height?: number;
  /** Accessible description of the chart. */
  label: string;
}

type LineChart = ChartJS<'line', { x: number; y: number | null }[]>;

/** One control chart (the statistic, or with `dispersion` the R/S/MR chart). */
export const SpcPlot = forwardRef<LineChart | undefined, SpcPlotProps>(function SpcPlot(props, ref) {
  const { chart, points, limitSets, spec, unit, timeZone, zones, dispersion = false, onPick, height = 340, label } = props;
  const shaped = useMemo(() => shapeControlChart(chart, points, limitSets), [chart, points, limitSets]);
  const spanMs = points.length > 1 ? points[points.length - 1]!.tMs - points[0]!.tMs : 3_600_000;
  const timeOf = useMemo(() => new Map(points.map((p) => [p.index, p.tMs])), [points]);
  const dense = points.length > 400;
  const range = useMemo(() => (dispersion || chart === 'cusum' ? null : yRange(shaped, spec)), [shaped, spec, dispersion, chart]);

  const data = useMemo<ChartData<'line', { x: number; y: number | null }[]>>(() => {
    const xy = (ys: readonly (number | null)[]) => shaped.x.map((x, i) => ({ x, y: ys[i] ?? null }));
    const line = (lbl: string, ys: readonly (number | null)[], color: string, width: number, dash: number[] = []) => ({
      label: lbl,
      data: xy(ys),
      borderColor: color,
      borderWidth: width,
      borderDash: dash,
      pointRadius: 0,
      pointHitRadius: 0,
      stepped: 'middle' as const,
      spanGaps: false,
      fill: false,
    });
    if (dispersion) {
      const sig = points.map((p) => dispersionSignals(p.violations).length > 0);
      return {
        datasets: [
          {
            label: CHART_STATISTIC[chart].dispersion ?? 'Spread',
            data: xy(shaped.dispersion),
            borderColor: COLORS.stat,
            borderWidth: 1,
            pointRadius: sig.map((s) => (s ? 6 : dense ? 1.2 : 2.2)),
            pointStyle: sig.map((s) => (s ? 'triangle' : 'circle')) as PointStyle[],
            pointBackgroundColor: sig.map((s) => (s ? COLORS.signal : COLORS.stat)),
            pointBorderColor: sig.map((s) => (s ? COLORS.signal : COLORS.stat)),
            spanGaps: true,
          },
          line('Centre', shaped.dispersionCenter, COLORS.center, 1),
          line('UCL', shaped.dispersionUcl, COLORS.limit, 1.5),
          line('LCL', shaped.dispersionLcl, COLORS.limit, 1.5),
        ],
      };
    }
    const kind = points.map((p) => (locationSignals(p.violations).length > 0 ? 'v' : p.excluded ? 'e' : 'n'));
    const sets = [
      {
        label: chart === 'cusum' ? 'C⁺ (upper sum)' : CHART_STATISTIC[chart].value,
        data: xy(shaped.value),
        borderColor: COLORS.stat,
        borderWidth: 1.2,
        pointRadius: kind.map((k) => (k === 'v' ? 6.5 : k === 'e' ? 4 : dense ? 1.4 : 2.6)),
        pointHoverRadius: 7,
        pointStyle: kind.map((k) => (k === 'v' ? 'triangle' : 'circle')) as PointStyle[],
        pointBackgroundColor: kind.map((k) => (k === 'v' ? COLORS.signal : k === 'e' ? COLORS.hollow : COLORS.stat)),
        pointBorderColor: kind.map((k) => (k === 'v' ? COLORS.signal : COLORS.stat)),
        pointBorderWidth: kind.map((k) => (k === 'e' ? 1.5 : 1)),
        spanGaps: true,
      },
      ...(shaped.lower
        ? [
            {
              label: '−C⁻ (lower sum)',
              data: xy(shaped.lower),
              borderColor: COLORS.stat,
              borderWidth: 1,
              borderDash: [4, 2],
              pointRadius: dense ? 1 : 2,
              pointBackgroundColor: COLORS.stat,
              spanGaps: true,
            },
          ]
        : []),
      line('Centre line', shaped.center, COLORS.center, 1),
      line('UCL', shaped.ucl, COLORS.limit, 1.6),
      line('LCL', shaped.lcl, COLORS.limit, 1.6),
      ...(zones && chart !== 'cusum'
        ? [
            line('+2σ', shaped.zones.plus2, COLORS.zone, 1, [2, 3]),
            line('+1σ', shaped.zones.plus1, COLORS.zone, 1, [2, 3]),
            line('−1σ', shaped.zones.minus1, COLORS.zone, 1, [2, 3]),
            line('−2σ', shaped.zones.minus2, COLORS.zone, 1, [2, 3]),
          ]
        : []),
    ];
    return { datasets: sets };
  }, [shaped, points, chart, zones, dispersion, dense]);

  const annotations = useMemo(() => {
    const a: Record<string, AnnotationOptions> = {};
    if (!dispersion) {
      if (spec && chart !== 'cusum') {
        const specLine = (key: string, y: number, text: string, dash: number[]) => {
          a[key] = {
            type: 'line',
            yMin: y,
            yMax: y,
            borderColor: COLORS.spec,
            borderWidth: 1.2,
            borderDash: dash,
            label: {
              display: true,
              content: `${text} ${fmtNum(y)} ${unit}`,
              position: 'start',
              backgroundColor: 'rgba(244,243,239,0.9)',
              color: COLORS.spec,
              font: { size: 11, weight: 'bold' },
              padding: 2,
              yAdjust: -9,
            },
          };
        };
        if (spec.usl !== undefined && range?.shown.includes('usl')) specLine('usl', spec.usl, 'USL', [7, 4]);
        if (spec.lsl !== undefined && range?.shown.includes('lsl')) specLine('lsl', spec.lsl, 'LSL', [7, 4]);
        if (spec.target !== undefined && range?.shown.includes('target')) specLine('target', spec.target, 'Target', [2, 4]);
      }
      // Label the signals and exclusions without piling text up: at most one label per few points.
      const gap = Math.max(2, Math.ceil(shaped.x.length / 45));
      const recent: typeof shaped.markers = [];
      let lastX = Number.POSITIVE_INFINITY;
      for (let k = shaped.markers.length - 1; k >= 0 && recent.length < 40; k--) {
        const m = shaped.markers[k]!;
        if (lastX - m.x < gap) {
          // Crowded: a signal's label wins over an "excluded" one.
          const kept = recent[recent.length - 1];
          if (kept && kept.kind === 'excluded' && m.kind === 'violation') recent[recent.length - 1] = m;
          continue;
        }
        recent.push(m);
        lastX = m.x;
      }
      for (const m of recent) {
        a[`m${m.i}`] = {
          type: 'label',
          xValue: m.x,
          yValue: m.y,
          yAdjust: m.kind === 'violation' ? -14 : 13,
          content: m.label,
          color: m.kind === 'violation' ? COLORS.signal : COLORS.stat,
          font: { size: 10, weight: m.kind === 'violation' ? 'bold' : 'normal' },
          padding: 1,
        };
      }
      // The last centre / limit values, labelled at the right edge.
      const lastI = shaped.x.length - 1;
      const lastUcl = shaped.ucl[lastI];
      const lastLcl = shaped.lcl[lastI];
      const lastCl = shaped.center[lastI];
      const edge = (key: string, y: number | null | undefined, text: string) => {
        if (y === null || y === undefined) return;
        const content = text.endsWith('—') ? text.slice(0, -2) : `${text} ${fmtNum(y, 6)}`;
        a[key] = {
          type: 'label',
          xValue: shaped.x[lastI]!,
          yValue: y,
          xAdjust: 4,
          position: { x: 'start', y: 'center' },
          content,
          color: COLORS.limit,
          font: { size: 10 },
          padding: 1,
        };
      };
      if (lastI >= 0 && chart !== 'cusum') {
        // Labels closer than ~14 px would overlap: then one label names all three.
        const pxPerUnit = range ? (height - 70) / (range.max - range.min || 1) : Infinity;
        const crowded =
          lastUcl !== null &&
          lastUcl !== undefined &&
          lastCl !== null &&
          lastCl !== undefined &&
          (lastUcl - lastCl) * pxPerUnit < 14;
        if (crowded) edge('ec', lastCl, `CL ${fmtNum(lastCl, 6)} · UCL ${fmtNum(lastUcl, 6)} · LCL ${fmtNum(lastLcl, 6)} —`);
        else {
          edge('eu', lastUcl, 'UCL');
          edge('el', lastLcl, 'LCL');
          edge('ec', lastCl, 'CL');
        }
      } else if (lastI >= 0) {
        edge('eu', lastUcl, 'H');
        edge('el', lastLcl, '−H');
      }
    }
    for (const s of shaped.steps) {
      a[`s${s.setId}`] = {
        type: 'line',
        xMin: s.x - 0.5,
        xMax: s.x - 0.5,
        borderColor: COLORS.step,
        borderWidth: 1,
        borderDash: [1, 3],
        label: {
          display: !dispersion,
          content: s.version === 0 ? 'trial limits' : `limits v${s.version}`,
          position: 'end',
          color: COLORS.step,
          backgroundColor: 'rgba(244,243,239,0.85)',
          font: { size: 10 },
          padding: 2,
        },
      };
    }
    return a;
  }, [shaped, spec, unit, chart, dispersion, range, height]);

  const options = useMemo<ChartOptions<'line'>>(() => {
    const first = points[0]?.tMs ?? 0;
    const last = points[points.length - 1]?.tMs ?? 0;
    return {
      responsive: true,
      maintainAspectRatio: false,
      animation: false,
      parsing: false,
      normalized: true,
      interaction: { mode: 'nearest', intersect: false, axis: 'x' },
      layout: { padding: { right: 64 } },
      onClick: (_e, elements) => {
        const el = elements.find((x) => x.datasetIndex === 0);
        if (el && onPick) onPick(el.index);
      },
      scales: {
        x: {
          type: 'linear',
          min: shaped.x[0] !== undefined ? shaped.x[0] - 0.5 : undefined,
          max: shaped.x.length ? shaped.x[shaped.x.length - 1]! + 0.5 : undefined,
          title: {
            display: !dispersion,
            text: points.length ? `Subgroup order · times in ${zonesOver(first, last, timeZone)}` : 'Subgroup order',
          },
          ticks: {
            maxTicksLimit: 8,
            includeBounds: false,
            callback: (v) => {
              const n = Math.round(Number(v));
              const t = timeOf.get(n);
              return t === undefined ? `#${n}` : [`#${n}`, tickLabel(t, timeZone, spanMs)];
            },
          },
          grid: { color: '#e3e4e0' },
        },
        y: {
          title: {
            display: true,
            text: `${dispersion ? (CHART_STATISTIC[chart].dispersion ?? 'Spread') : chart === 'cusum' ? 'Cumulative sum' : CHART_STATISTIC[chart].value} (${unit})`,
          },
          grid: { color: '#e3e4e0' },
          ...(dispersion ? { min: 0, grace: '6%' } : range ? { min: range.min, max: range.max } : { grace: '6%' }),
        },
      },
      plugins: {
        legend: { display: false },
        annotation: { annotations, clip: false },
        tooltip: {
          filter: (item: TooltipItem<'line'>) => item.datasetIndex === 0,
          callbacks: {
            title: () => '',
            label: (item: TooltipItem<'line'>) => {
              const p = points[item.dataIndex];
              return p ? pointTooltip(p, unit, chart, timeZone, (x) => fmtNum(x, 6)) : '';
            },
          },
        },
      },
    };
  }, [annotations, points, shaped, timeZone, spanMs, timeOf, unit, chart, dispersion, range, onPick]);

  const off = range?.offScale ?? [];
  return (
    <>
      {off.length > 0 && (
        <p className="text-xs text-ink-soft">
          Off the scale (so the points stay readable):{' '}
          {off
            .map((o) => `${o.key.toUpperCase()} ${fmtNum(o.value)} ${unit} ${o.side === 'above' ? '↑ above' : '↓ below'}`)
            .join(' · ')}
        </p>
      )}
      <div
        style={{ height }}
        className="relative"
        data-spc-plot={dispersion ? 'dispersion' : 'statistic'}
        data-points={points.length}
        data-limit-points={shaped.ucl.filter((u) => u !== null).length}
        data-signals={shaped.markers.filter((m) => m.kind === 'violation').length}
        data-excluded={shaped.markers.filter((m) => m.kind === 'excluded').length}
      >
        <Chart ref={ref as never} type="line" data={data} options={options} plugins={[drawnFlag]} aria-label={label} role="img" />
      </div>
    </>
  );
});
