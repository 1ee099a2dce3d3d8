/**
 * Upload an oven temperature-uniformity survey: a CSV with a time column (ISO 8601 `time`,
 * `elapsed_s` or `elapsed_min`) and one column per survey thermocouple (°C). The server checks
 * the file (bad lines are named), finds the stabilised soak (automatically: every sensor within
 * setpoint − 2 °C, then 10 minutes; or from the minute you give), and computes the hottest and
 * coldest deviation and the uniformity class from the configured class table. Preview first,
 * then save.
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
import annotationPlugin from 'chartjs-plugin-annotation';
import { useState, type SyntheticEvent } from 'react';
import { Chart } from 'react-chartjs-2';
import { apiFetch, ApiError } from '../../lib/client/api.ts';
import { SurveyInputSchema } from '../../lib/shared/surveys.ts';
import type { SurveyComputation } from '../../lib/shared/trace-views.ts';
import { fromLocalInput } from '../../lib/shared/time.ts';
import { PALETTE } from '../../styles/palette.mjs';

ChartJS.register(LineController, LineElement, PointElement, LinearScale, CategoryScale, Tooltip, Legend, annotationPlugin);

const GREYS = [
  PALETTE.ink,
  PALETTE.inkSoft,
  PALETTE.inkFaint,
  PALETTE.slateDeep,
  '#5f6b73',
  '#39444b',
  '#8a949b',
  PALETTE.lacquer,
  PALETTE.lacquerDark,
];

export default function SurveyUpload({ ovens, timeZone }: { ovens: { id: number; name: string }[]; timeZone: string }) {
  const [ovenId, setOvenId] = useState(ovens[0]?.id ?? 0);
  const [setpoint, setSetpoint] = useState('110');
  const [file, setFile] = useState<{ name: string; text: string } | null>(null);
  const [auto, setAuto] = useState(true);
  const [fromMin, setFromMin] = useState('');
  const [date, setDate] = useState('');
  const [note, setNote] = useState('');
  const [corr, setCorr] = useState<Record<string, string>>({});
  const [result, setResult] = useState<SurveyComputation | null>(null);
  const [busy, setBusy] = useState<string | null>(null);
  const [errors, setErrors] = useState<string[]>([]);
  const [saved, setSaved] = useState<number | null>(null);

  function body() {
    const corrections = Object.fromEntries(
      Object.entries(corr)
        .filter(([, v]) => v.trim() !== '' && Number.isFinite(Number(v)))
        .map(([k, v]) => [k, Number(v)]),
    );
    const when = date ? fromLocalInput(`${date}T09:00`, timeZone) : Number.NaN;
    return {
      ovenAssetId: ovenId,
      setpointC: Number(setpoint),
      csv: file?.text ?? '',
      fileName: file?.name ?? 'survey.csv',
      ...(auto || fromMin.trim() === '' ? {} : { stabilisedFromMinutes: Number(fromMin) }),
      ...(Number.isFinite(when) ? { surveyedAt: new Date(when).toISOString() } : {}),
      corrections,
      ...(note.trim() ? { note: note.trim() } : {}),
    };
  }

  async function send(e: SyntheticEvent | null, save: boolean) {
    e?.preventDefault();
    setErrors([]);
    const p = SurveyInputSchema.safeParse(body());
    if (!p.success) return setErrors(p.error.issues.map((i) => i.message));
    setBusy(save ? 'save' : 'preview');
    try {
      if (save) {
        const r = await apiFetch<{ id: number }>('/api/v1/surveys', { body: p.data });
        setSaved(r.id);
        setTimeout(() => (window.location.href = `/ovens/surveys/${r.id}`), 800);
      } else {
        setResult(await apiFetch<SurveyComputation>('/api/v1/surveys/preview', { body: p.data }));
      }
    } catch (err) {
      setResult(null);
      setErrors(
        err instanceof ApiError
          ? err.errors.length
            ? err.errors.map((f) => f.message)
            : [err.detail ?? err.title]
          : ['Something went wrong.'],
      );
    } finally {
      setBusy(null);
    }
  }

  const chart =
    result &&
    (() => {
      const data: ChartData<'line', { x: number; y: number }[]> = {
        datasets: result.series.map((s, i) => ({
          label: s.name,
          data: s.points,
          borderColor: GREYS[i % GREYS.length],
          borderWidth: 1.2,
          pointRadius: 0,
        })),
      };
      const tol = result.result.classToleranceC;
      const options: ChartOptions<'line'> = {
        animation: false,
        maintainAspectRatio: false,
        parsing: false,
        scales: {
          x: { type: 'linear', title: { display: true, text: 'minutes from the start' } },
          y: { title: { display: true, text: '°C' } },
        },
        plugins: {
          legend: { position: 'bottom', labels: { boxWidth: 12, font: { size: 10 } } },
          annotation: {
            annotations: {
              stable: {
                type: 'box',
                xMin: result.stabilisedFromMinutes,
                xMax: result.durationMinutes,
                backgroundColor: 'rgba(47,111,115,0.07)',
                borderWidth: 0,
                label: { display: true, content: 'stabilised soak', position: 'start', font: { size: 10 } },
              },
              sp: {
                type: 'line',
                yMin: result.setpointC,
                yMax: result.setpointC,
                borderColor: PALETTE.lacquer,
                borderDash: [5, 4],
                borderWidth: 1,
                label: { display: true, content: `setpoint ${result.setpointC} °C`, position: 'end', font: { size: 10 } },
              },
              ...(tol !== null
                ? {
                    hi: {
                      type: 'line',
                      yMin: result.setpointC + tol,
                      yMax: result.setpointC + tol,
                      borderColor: PALETTE.inkFaint,
                      borderDash: [2, 3],
                      borderWidth: 1,
                    },
                    lo: {
                      type: 'line',
                      yMin: result.setpointC - tol,
                      yMax: result.setpointC - tol,
                      borderColor: PALETTE.inkFaint,
                      borderDash: [2, 3],
                      borderWidth: 1,
                    },
                  }
                : {}),
            },
          },
        },
      };
      return (
        <div
          style={{ height: 260 }}
          role="img"
          aria-label={`Survey sensors over time; stabilised from minute ${result.stabilisedFromMinutes.toFixed(1)}`}
        >
          <Chart type="line" data={data} options={options} />
        </div>
      );
    })();

  const fmt = (x: number) => `${x >= 0 ? '+' : '−'}${Math.abs(x).toFixed(2)} °C`;
  return (
    <form onSubmit={(e) => send(e, false)} className="panel space-y-3" aria-labelledby="up-h">
      <h2 id="up-h">Upload a survey</h2>
      <div className="grid gap-3 md:grid-cols-4">
        <div>
          <label htmlFor="s-oven">Oven</label>
          <select id="s-oven" value={ovenId} onChange={(e) => setOvenId(Number(e.target.value))}>
            {ovens.map((o) => (
              <option key={o.id} value={o.id}>
                {o.name}
              </option>
            ))}
          </select>
        </div>
        <div>
          <label htmlFor="s-sp">Setpoint (°C)</label>
          <input
            id="s-sp"
            type="number"
            step="any"
            value={setpoint}
            onChange={(e) => setSetpoint(e.target.value)}
            className="font-mono"
          />
        </div>
        <div className="md:col-span-2">
          <label htmlFor="s-file">Survey CSV (time, then one column per sensor in °C; at most 5 MB)</label>
          <input
            id="s-file"
            type="file"
            accept=".csv,.txt,text/csv,text/plain"
            onChange={async (e) => {
              const f = e.target.files?.[0];
              setResult(null);
              setFile(f ? { name: f.name, text: await f.text() } : null);
            }}
          />
        </div>
        <fieldset className="md:col-span-2">
          <legend className="mb-1 text-sm font-bold text-ink-soft">Stabilised soak starts</legend>
          <label className="flex items-center gap-2 font-normal">
            <input type="radio" className="w-auto" checked={auto} onChange={() => setAuto(true)} /> Automatically: every sensor
            within setpoint − 2 °C, then 10 min
          </label>
          <label className="flex items-center gap-2 font-normal">
            <input type="radio" className="w-auto" checked={!auto} onChange={() => setAuto(false)} /> At minute{' '}
            <input
              type="number"
              min={0}
              step="any"
              value={fromMin}
              onChange={(e) => {
                setAuto(false);
                setFromMin(e.target.value);
              }}
              className="w-24 font-mono"
              aria-label="Minute the stabilised soak starts"
            />{' '}
            from the start of the file
          </label>
        </fieldset>
        <div>
          <label htmlFor="s-date">Survey date (only for elapsed-time files)</label>
          <input id="s-date" type="date" value={date} onChange={(e) => setDate(e.target.value)} />
        </div>
        <div>
          <label htmlFor="s-note">Note</label>
          <input id="s-note" value={note} onChange={(e) => setNote(e.target.value)} maxLength={2000} />
        </div>
      </div>
      {result && result.sensors.length > 0 && (
        <details>
          <summary className="cursor-pointer text-sm font-bold">
            Sensor calibration corrections (°C, added to every reading)
          </summary>
          <div className="mt-2 grid gap-2 sm:grid-cols-4 lg:grid-cols-6">
            {result.sensors.map((s) => (
              <div key={s.name}>
                <label htmlFor={`c-${s.name}`}>{s.name}</label>
                <input
                  id={`c-${s.name}`}
                  type="number"
                  step="any"
                  value={corr[s.name] ?? ''}
                  onChange={(e) => setCorr({ ...corr, [s.name]: e.target.value })}
                  className="w-24 font-mono"
                  placeholder="0"
                />
              </div>
            ))}
          </div>
        </details>
      )}
      <div className="flex flex-wrap gap-2">
        <button className="btn-quiet" disabled={!file || busy !== null}>
          {busy === 'preview' ? 'Computing…' : '1 · Check and compute'}
        </button>
        <button type="button" className="btn" disabled={!result || busy !== null} onClick={() => send(null, true)}>
          {busy === 'save' ? 'Saving…' : '2 · Save the survey'}
        </button>
      </div>
      {errors.length > 0 && (
        <div role="alert" className="rounded border-l-4 border-alert-high bg-alert-bg p-2 text-sm">
          <strong>✕ The survey was not accepted.</strong>
          <ul className="list-disc pl-5">
            {errors.slice(0, 20).map((e) => (
              <li key={e}>{e}</li>
            ))}
          </ul>
        </div>
      )}
      {saved && (
        <p role="status" className="rounded border-l-4 border-lacquer bg-lacquer-light/60 p-2 text-sm">
          <strong>✓ Saved</strong> as survey {saved}.
        </p>
      )}
      {result && (
        <div className="space-y-2" aria-live="polite">
          <p className="text-base">
            Hottest {fmt(result.result.hottestDeviationC)} ({result.result.hottestSensor}), coldest{' '}
            {fmt(result.result.coldestDeviationC)} ({result.result.coldestSensor}) →{' '}
            {result.result.uniformityClass !== null ? (
              <strong>
                class {result.result.uniformityClass} (±{result.result.classToleranceC} °C)
              </strong>
            ) : (
              <strong className="text-alert-high">▲ outside every class</strong>
            )}{' '}
            of {result.classTableName}.
          </p>
          <p className="text-xs text-ink-soft">
            {result.rows} rows over {result.durationMinutes.toFixed(0)} min; stabilised from minute{' '}
            {result.stabilisedFromMinutes.toFixed(1)} ({result.stabilisedAuto ? 'automatic' : 'chosen'}).
          </p>
          {chart}
        </div>
      )}
    </form>
  );
}
