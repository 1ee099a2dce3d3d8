/** Survey settings (engineer): the interval after which an oven's survey is overdue, and the uniformity class table. */
import { useState, type SyntheticEvent } from 'react';
import { apiFetch, ApiError } from '../../lib/client/api.ts';
import { SurveySettingsSchema, type SurveySettings } from '../../lib/shared/surveys.ts';

export default function SurveySettingsForm({ initial }: { initial: SurveySettings }) {
  const [s, setS] = useState(initial);
  const [msg, setMsg] = useState<{ kind: 'ok' | 'error'; text: string } | null>(null);
  async function save(e: SyntheticEvent) {
    e.preventDefault();
    const p = SurveySettingsSchema.safeParse(s);
    if (!p.success)
      return setMsg({ kind: 'error', text: p.error.issues.map((i) => `${i.path.join('.')}: ${i.message}`).join(' ') });
    try {
      setS(await apiFetch<SurveySettings>('/api/v1/surveys/settings', { method: 'PUT', body: p.data }));
      setMsg({ kind: 'ok', text: 'Saved.' });
    } catch (err) {
      setMsg({
        kind: 'error',
        text: err instanceof ApiError ? err.errors.map((f) => f.message).join(' ') || (err.detail ?? err.title) : 'Not saved.',
      });
    }
  }
  return (
    <form onSubmit={save} className="space-y-3">
      <div className="flex flex-wrap gap-4">
        <div>
          <label htmlFor="ss-int">Survey interval (days)</label>
          <input
            id="ss-int"
            type="number"
            min={1}
            max={730}
            value={s.intervalDays}
            onChange={(e) => setS({ ...s, intervalDays: Math.trunc(Number(e.target.value)) })}
            className="w-28 font-mono"
          />
        </div>
        <div className="min-w-[16rem] flex-1">
          <label htmlFor="ss-name">Class table name</label>
          <input
            id="ss-name"
            value={s.classTableName}
            onChange={(e) => setS({ ...s, classTableName: e.target.value })}
            maxLength={100}
          />
        </div>
      </div>
      <table className="w-auto">
        <thead>
          <tr>
            <th>Class</th>
            <th>± tolerance (°C)</th>
            <th>
              <span className="sr-only">Remove</span>
            </th>
          </tr>
        </thead>
        <tbody>
          {s.classTable.map((r, i) => (
            <tr key={i}>
              <td>
                <input
                  aria-label={`Class of row ${i + 1}`}
                  type="number"
                  min={1}
                  value={r.class}
                  onChange={(e) =>
                    setS({
                      ...s,
                      classTable: s.classTable.map((x, j) => (j === i ? { ...x, class: Math.trunc(Number(e.target.value)) } : x)),
                    })
                  }
                  className="w-20 font-mono"
                />
              </td>
              <td>
                <input
                  aria-label={`Tolerance of row ${i + 1}`}
                  type="number"
                  step="any"
                  min={0}
                  value={r.toleranceC}
                  onChange={(e) =>
                    setS({
                      ...s,
                      classTable: s.classTable.map((x, j) => (j === i ? { ...x, toleranceC: Number(e.target.value) } : x)),
                    })
                  }
                  className="w-24 font-mono"
                />
              </td>
              <td>
                <button
                  type="button"
                  className="btn-quiet"
                  onClick={() => setS({ ...s, classTable: s.classTable.filter((_, j) => j !== i) })}
                >
                  Remove
                </button>
              </td>
            </tr>
          ))}
        </tbody>
      </table>
      <div className="flex gap-2">
        <button
          type="button"
          className="btn-quiet"
          onClick={() =>
            setS({
              ...s,
              classTable: [
                ...s.classTable,
                { class: (s.classTable.at(-1)?.class ?? 0) + 1, toleranceC: (s.classTable.at(-1)?.toleranceC ?? 0) + 5 },
              ],
            })
          }
        >
          Add a class
        </button>
        <button className="btn">Save the survey settings</button>
      </div>
      {msg && (
        <p
          role={msg.kind === 'error' ? 'alert' : 'status'}
          className={
            msg.kind === 'error'
              ? 'rounded border-l-4 border-alert-high bg-alert-bg p-2 text-sm'
              : 'rounded border-l-4 border-lacquer bg-lacquer-light/60 p-2 text-sm'
          }
        >
          <strong>{msg.kind === 'error' ? '✕ ' : '✓ '}</strong>
          {msg.text}
        </p>
      )}
    </form>
  );
}
