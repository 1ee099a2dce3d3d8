/**
 * Assign an approved window (a lacquer × substrate recipe) to a line, oven or coater from a
 * time on; the assignment running until then ends at that time. Audited.
 */
import { useId, useState, type SyntheticEvent } from 'react';
import { apiFetch, ApiError } from '../../lib/client/api.ts';
import { WindowAssignSchema } from '../../lib/shared/windows.ts';

interface Props {
  assets: { id: number; label: string }[];
  windows: { id: number; label: string }[];
  defaultWindowId?: number | undefined;
}

export default function AssignForm({ assets, windows, defaultWindowId }: Props) {
  const id = useId();
  const [assetId, setAssetId] = useState('');
  const [windowId, setWindowId] = useState(defaultWindowId ? String(defaultWindowId) : '');
  const [from, setFrom] = useState('');
  const [note, setNote] = useState('');
  const [errors, setErrors] = useState<Record<string, string>>({});
  const [status, setStatus] = useState<{ kind: 'ok' | 'error'; text: string } | null>(null);
  const [busy, setBusy] = useState(false);

  async function submit(e: SyntheticEvent) {
    e.preventDefault();
    const body = {
      ...(assetId ? { assetId: Number(assetId) } : {}),
      ...(windowId ? { windowId: Number(windowId) } : {}),
      ...(from ? { from: new Date(from).toISOString() } : {}),
      ...(note.trim() ? { note: note.trim() } : {}),
    };
    const parsed = WindowAssignSchema.safeParse(body);
    if (!parsed.success) {
      setErrors(Object.fromEntries(parsed.error.issues.map((i) => [i.path.map(String).join('.'), i.message])));
      return;
    }
    setErrors({});
    setBusy(true);
    try {
      const r = await apiFetch<{ assetCode: string; windowName: string; windowVersion: number; validFrom: string }>(
        '/api/v1/windows/assignments',
        { body: parsed.data },
      );
      setStatus({ kind: 'ok', text: `${r.assetCode} runs ${r.windowName} from ${new Date(r.validFrom).toLocaleString()}.` });
      setTimeout(() => window.location.reload(), 900);
    } catch (err) {
      if (err instanceof ApiError) {
        setErrors(Object.fromEntries(err.errors.map((f) => [f.path, f.message])));
        setStatus({ kind: 'error', text: err.detail ?? err.title });
      } else setStatus({ kind: 'error', text: 'Network error; try again.' });
    } finally {
      setBusy(false);
    }
  }
  const e = (p: string) => (errors[p] ? <p className="mt-0.5 text-sm font-bold text-alert-high">✕ {errors[p]}</p> : null);
  return (
    <form onSubmit={submit} noValidate className="panel space-y-3">
      <h3 className="font-bold">Assign a window</h3>
      <div className="grid gap-3 md:grid-cols-2">
        <div>
          <label htmlFor={`${id}-asset`}>Line, oven or coater</label>
          <select id={`${id}-asset`} value={assetId} onChange={(ev) => setAssetId(ev.target.value)}>
            <option value="">Choose…</option>
            {assets.map((a) => (
              <option key={a.id} value={a.id}>
                {a.label}
              </option>
            ))}
          </select>
          {e('assetId')}
        </div>
        <div>
          <label htmlFor={`${id}-win`}>Window (approved)</label>
          <select id={`${id}-win`} value={windowId} onChange={(ev) => setWindowId(ev.target.value)}>
            <option value="">Choose…</option>
            {windows.map((w) => (
              <option key={w.id} value={w.id}>
                {w.label}
              </option>
            ))}
          </select>
          {e('windowId')}
        </div>
        <div>
          <label htmlFor={`${id}-from`}>From (your local time; empty = now)</label>
          <input id={`${id}-from`} type="datetime-local" value={from} onChange={(ev) => setFrom(ev.target.value)} />
          {e('from')}
        </div>
        <div>
          <label htmlFor={`${id}-note`}>Note (optional)</label>
          <input id={`${id}-note`} value={note} onChange={(ev) => setNote(ev.target.value)} />
        </div>
      </div>
      <div aria-live="polite">
        {status && (
          <p
            className={
              status.kind === 'error'
                ? 'rounded border-l-4 border-alert-high bg-alert-bg p-2 text-sm'
                : 'rounded border-l-4 border-lacquer bg-lacquer-light/60 p-2 text-sm'
            }
          >
            <strong>{status.kind === 'error' ? '✕ Not assigned.' : '✓ Assigned.'}</strong> {status.text}
          </p>
        )}
      </div>
      <button type="submit" className="btn" disabled={busy}>
        Assign
      </button>
    </form>
  );
}
