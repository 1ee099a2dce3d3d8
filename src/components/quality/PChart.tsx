/**
 * Adhesion failure rate per week as a p chart (fraction of cross-cut and boil tests failing;
 * limits p̄ ± 3√(p̄(1 − p̄)/nᵢ) per week, Montgomery, *Introduction to SQC*, ch. 7), computed on
 * the server by the SPC library. A week beyond its limits is drawn as a triangle with words in
 * the table below; the chart has a text alternative (the table).
 */
import {
  CategoryScale,
  Chart as ChartJS,
  Legend,
  LinearScale,
  LineController,
  LineElement,
  PointElement,
  Tooltip,
  type ChartData,
  type ChartOptions,
} from 'chart.js';
import { Chart } from 'react-chartjs-2';
import type { AdhesionChart } from '../../lib/shared/trace-views.ts';
import { PALETTE } from '../../styles/palette.mjs';

ChartJS.register(LineController, LineElement, PointElement, LinearScale, CategoryScale, Tooltip, Legend);

const pct = (x: number) => `${(x * 100).toFixed(1)} %`;

export default function PChart({ chart }: { chart: AdhesionChart }) {
  const ev = chart.evaluation;
  if (!ev) {
    return (
      <div className="empty" role="status">
        {chart.message ?? 'No adhesion tests yet.'}{' '}
        {chart.weeks.length ? `(${chart.weeks.length} week(s) with tests so far.)` : ''}
      </div>
    );
  }
  const labels = chart.weeks.map((w) => w.week);
  const signal = ev.points.map((p) => p.violations.length > 0);
  const data: ChartData<'line', (number | null)[], string> = {
    labels,
    datasets: [
      {
        label: 'Fraction failing',
        data: ev.points.map((p) => p.value),
        borderColor: PALETTE.ink,
        backgroundColor: ev.points.map((_, i) => (signal[i] ? PALETTE.alertHigh : PALETTE.ink)),
        pointStyle: ev.points.map((_, i) => (signal[i] ? 'triangle' : 'circle')),
        pointRadius: ev.points.map((_, i) => (signal[i] ? 7 : 3)),
        borderWidth: 1.5,
      },
      {
        label: 'UCL',
        data: ev.points.map((p) => p.ucl),
        borderColor: PALETTE.inkSoft,
        borderDash: [5, 4],
        borderWidth: 1,
        pointRadius: 0,
        stepped: 'middle',
      },
      { label: 'Centre p̄', data: ev.points.map((p) => p.center), borderColor: PALETTE.lacquer, borderWidth: 1, pointRadius: 0 },
      {
        label: 'LCL',
        data: ev.points.map((p) => p.lcl),
        borderColor: PALETTE.inkSoft,
        borderDash: [5, 4],
        borderWidth: 1,
        pointRadius: 0,
        stepped: 'middle',
      },
    ],
  };
  const options: ChartOptions<'line'> = {
    animation: false,
    responsive: true,
    maintainAspectRatio: false,
    scales: {
      y: {
        min: 0,
        ticks: { callback: (v) => pct(Number(v)) },
        title: { display: true, text: 'fraction of adhesion tests failing' },
      },
    },
    plugins: {
      legend: { position: 'bottom', labels: { boxWidth: 16, font: { size: 11 } } },
      tooltip: {
        callbacks: {
          label: (i) =>
            `${i.dataset.label}: ${pct(Number(i.parsed.y))}${i.datasetIndex === 0 ? ` (${chart.weeks[i.dataIndex]?.failed} of ${chart.weeks[i.dataIndex]?.tests})` : ''}`,
        },
      },
    },
  };
  return (
    <div>
      <div
        style={{ height: 240 }}
        role="img"
        aria-label={`p chart of adhesion failures per week, centre ${pct(ev.limits.center)}; ${signal.filter(Boolean).length} week(s) beyond the limits. The table below has the values.`}
      >
        <Chart type="line" data={data} options={options} />
      </div>
      <details className="mt-2 text-sm">
        <summary className="cursor-pointer">Values per week</summary>
        <table className="mt-1">
          <thead>
            <tr>
              <th>Week</th>
              <th className="text-right">Tests</th>
              <th className="text-right">Failed</th>
              <th className="text-right">p</th>
              <th className="text-right">UCL</th>
              <th>Signal</th>
            </tr>
          </thead>
          <tbody>
            {chart.weeks.map((w, i) => {
              const p = ev.points[i];
              return (
                <tr key={w.week}>
                  <td className="num">{w.week}</td>
                  <td className="num text-right">{w.tests}</td>
                  <td className="num text-right">{w.failed}</td>
                  <td className="num text-right">{p ? pct(p.value) : '—'}</td>
                  <td className="num text-right">{p ? pct(p.ucl) : '—'}</td>
                  <td>{p && p.violations.length ? <strong className="text-alert-high">▲ beyond the limit</strong> : ''}</td>
                </tr>
              );
            })}
          </tbody>
        </table>
      </details>
    </div>
  );
}
