/**
 * The oven trend around a load: zone air temperatures, the setpoint (a step line), door
 * openings (shaded), the load's start and end, the recipe's minimum cure temperature and the
 * highest part temperature (dashed lines), the soak span and data gaps. Times on the axis and
 * in tooltips are in the site's zone, with the zone printed. Prints with the page.
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
} from 'chart.js';
import annotationPlugin from 'chartjs-plugin-annotation';
import { useMemo } from 'react';
import { Chart } from 'react-chartjs-2';
import { formatSiteTime } from '../../lib/shared/site-time.ts';
import { tickLabel } from '../../lib/shared/time.ts';
import type { TrendSeries } from '../../lib/shared/trace-views.ts';
import { PALETTE } from '../../styles/palette.mjs';

ChartJS.register(LineController, LineElement, PointElement, LinearScale, Tooltip, Legend, Filler, annotationPlugin);

export interface OvenTrendProps {
  series: TrendSeries[];
  timeZone: string;
  openedAtMs: number;
  closedAtMs: number | null;
  minTempC?: number | null;
  maxPartTempC?: number | null;
  soak?: { startMs: number; endMs: number } | null;
  gaps?: { startMs: number; endMs: number }[];
  title: string;
  height?: number;
}

const ZONE_COLOURS = [PALETTE.ink, PALETTE.inkSoft, PALETTE.inkFaint, PALETTE.slateDeep];

export default function OvenTrend({
  series,
  timeZone,
  openedAtMs,
  closedAtMs,
  minTempC,
  maxPartTempC,
  soak,
  gaps = [],
  title,
  height = 320,
}: OvenTrendProps) {
  const temps = series.filter((s) => s.kind !== 'door');
  const door = series.find((s) => s.kind === 'door');
  const all = temps.flatMap((s) => s.points);
  const xMin = Math.min(openedAtMs, ...all.map((p) => p.x));
  const xMax = Math.max(closedAtMs ?? openedAtMs, ...all.map((p) => p.x));
  const span = xMax - xMin;

  const doorIntervals = useMemo(() => {
    const out: { from: number; to: number }[] = [];
    let from: number | null = null;
    for (const p of door?.points ?? []) {
      if (p.y >= 0.5 && from === null) from = p.x;
      if (p.y < 0.5 && from !== null) {
        out.push({ from, to: p.x });
        from = null;
      }
    }
    if (from !== null) out.push({ from, to: xMax });
    return out;
  }, [door, xMax]);

  const data: ChartData<'line', { x: number; y: number }[]> = {
    datasets: temps.map((s, i) => ({
      label: `${s.label} (${s.unit})`,
      data: s.points,
      borderColor: s.kind === 'setpoint' ? PALETTE.lacquer : ZONE_COLOURS[i % ZONE_COLOURS.length],
      borderDash: s.kind === 'setpoint' ? [6, 4] : [],
      borderWidth: s.kind === 'setpoint' ? 1.5 : 1.8,
      stepped: s.kind === 'setpoint' ? ('before' as const) : false,
      pointRadius: 0,
      spanGaps: false,
      tension: 0,
    })),
  };

  const annotations: Record<string, object> = {};
  doorIntervals.forEach((d, i) => {
    annotations[`door${i}`] = {
      type: 'box',
      xMin: d.from,
      xMax: d.to,
      backgroundColor: 'rgba(194,106,0,0.15)',
      borderWidth: 0,
      label: { display: i < 12, content: 'door', position: 'start', font: { size: 10 }, color: '#7a4300' },
    };
  });
  gaps.forEach((g, i) => {
    annotations[`gap${i}`] = {
      type: 'box',
      xMin: g.startMs,
      xMax: g.endMs,
      backgroundColor: 'rgba(138,109,0,0.18)',
      borderColor: PALETTE.alertLow,
      borderWidth: 1,
      borderDash: [2, 2],
      label: { display: true, content: 'no data', color: '#5c4900', font: { size: 10 } },
    };
  });
  if (soak)
    annotations['soak'] = {
      type: 'box',
      xMin: soak.startMs,
      xMax: soak.endMs,
      backgroundColor: 'rgba(47,111,115,0.06)',
      borderWidth: 0,
      label: {
        display: true,
        content: 'soak',
        position: { x: 'center', y: 'end' },
        color: PALETTE.lacquerDark,
        font: { size: 10 },
      },
    };
  annotations['opened'] = {
    type: 'line',
    xMin: openedAtMs,
    xMax: openedAtMs,
    borderColor: PALETTE.slateDeep,
    borderWidth: 1.5,
    label: { display: true, content: 'load opened', position: 'start', font: { size: 10 } },
  };
  if (closedAtMs)
    annotations['closed'] = {
      type: 'line',
      xMin: closedAtMs,
      xMax: closedAtMs,
      borderColor: PALETTE.slateDeep,
      borderWidth: 1.5,
      label: { display: true, content: 'load closed', position: 'start', font: { size: 10 } },
    };
  if (minTempC != null)
    annotations['min'] = {
      type: 'line',
      yMin: minTempC,
      yMax: minTempC,
      borderColor: PALETTE.inkSoft,
      borderDash: [3, 3],
      borderWidth: 1,
      label: {
        display: true,
        content: `minimum cure ${minTempC} °C`,
        position: 'end',
        font: { size: 10 },
        backgroundColor: 'rgba(244,243,239,0.9)',
        color: PALETTE.ink,
      },
    };
  if (maxPartTempC != null)
    annotations['max'] = {
      type: 'line',
      yMin: maxPartTempC,
      yMax: maxPartTempC,
      borderColor: PALETTE.alertMed,
      borderDash: [3, 3],
      borderWidth: 1,
      label: {
        display: true,
        content: `highest part ${maxPartTempC} °C`,
        position: 'end',
        font: { size: 10 },
        backgroundColor: 'rgba(244,243,239,0.9)',
        color: '#7a4300',
      },
    };

  const options: ChartOptions<'line'> = {
    animation: false,
    responsive: true,
    maintainAspectRatio: false,
    parsing: false,
    normalized: true,
    interaction: { mode: 'nearest', axis: 'x', intersect: false },
    scales: {
      x: {
        type: 'linear',
        min: xMin,
        max: xMax,
        ticks: { maxTicksLimit: 10, callback: (v) => tickLabel(Number(v), timeZone, span) },
        grid: { color: PALETTE.slatePanel },
      },
      y: {
        title: { display: true, text: '°C' },
        grid: { color: PALETTE.slatePanel },
        suggestedMax: maxPartTempC != null ? maxPartTempC + 5 : undefined,
      },
    },
    plugins: {
      legend: { position: 'bottom', labels: { boxWidth: 18, font: { size: 11 } } },
      tooltip: {
        callbacks: {
          title: (items) => formatSiteTime(items[0]?.parsed.x ?? 0, timeZone, { seconds: true }),
          label: (i) => `${i.dataset.label}: ${Number(i.parsed.y).toFixed(1)}`,
        },
      },
      annotation: { annotations },
    },
  };

  const summary = `${title}: ${temps.map((s) => s.label).join(', ')} from ${formatSiteTime(xMin, timeZone)} to ${formatSiteTime(xMax, timeZone)}; ${doorIntervals.length} door opening(s)${gaps.length ? `, ${gaps.length} data gap(s)` : ''}.`;
  if (all.length === 0) {
    return (
      <div className="empty" role="status">
        No oven readings were stored for this period ({formatSiteTime(xMin, timeZone)} – {formatSiteTime(xMax, timeZone)}).
      </div>
    );
  }
  return (
    <figure className="oven-trend">
      <div style={{ height }} role="img" aria-label={summary}>
        <Chart type="line" data={data} options={options} />
      </div>
      <figcaption className="mt-1 text-xs text-ink-soft">{summary}</figcaption>
    </figure>
  );
}
