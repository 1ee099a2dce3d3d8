/**
 * Create a new draft version of a lacquer × substrate window, or edit a draft. Every limit has
 * its unit beside it; ranges need both ends (the target is optional); the same schema as the
 * endpoint checks the limits (high above low, target inside) and marks the field at fault.
 */
import { useId, useState, type SyntheticEvent } from 'react';
import { apiFetch, ApiError } from '../../lib/client/api.ts';
import {
  LIMIT_FIELDS,
  ProcessWindowLimitsSchema,
  WindowDraftCreateSchema,
  WindowDraftUpdateSchema,
  type ProcessWindowLimits,
} from '../../lib/shared/windows.ts';

interface Props {
  mode: 'create' | 'edit';
  /** Edit: the draft's id. */
  windowId?: number;
  lacquers: { id: number; name: string }[];
  materials: { id: number; name: string }[];
  initial: { lacquerId?: number; materialId?: number; name?: string; note?: string; limits?: Partial<ProcessWindowLimits> };
}

type Flat = Record<string, string>;

function flatten(limits: Partial<ProcessWindowLimits> | undefined): Flat {
  const out: Flat = {};
  for (const [k, v] of Object.entries(limits ?? {})) {
    if (typeof v === 'number') out[k] = String(v);
    else if (v && typeof v === 'object')
      for (const [k2, v2] of Object.entries(v)) if (typeof v2 === 'number') out[`${k}.${k2}`] = String(v2);
  }
  return out;
}

const num = (s: string | undefined) => (s === undefined || s.trim() === '' ? undefined : Number(s.trim().replace(',', '.')));

function build(flat: Flat): Record<string, unknown> {
  const limits: Record<string, unknown> = {};
  for (const f of LIMIT_FIELDS) {
    if (f.kind === 'range') {
      const min = num(flat[`${f.key}.min`]);
      const max = num(flat[`${f.key}.max`]);
      const target = f.target ? num(flat[`${f.key}.target`]) : undefined;
      if (min === undefined && max === undefined && target === undefined) continue;
      limits[f.key] = {
        ...(min !== undefined ? { min } : {}),
        ...(max !== undefined ? { max } : {}),
        ...(target !== undefined ? { target } : {}),
      };
    } else {
      const v = num(flat[f.key]);
      if (v !== undefined) limits[f.key] = v;
    }
  }
  return limits;
}

export default function WindowEditor({ mode, windowId, lacquers, materials, initial }: Props) {
  const id = useId();
  const [lacquerId, setLacquerId] = useState(initial.lacquerId ? String(initial.lacquerId) : '');
  const [materialId, setMaterialId] = useState(initial.materialId ? String(initial.materialId) : '');
  const [name, setName] = useState(initial.name ?? '');
  const [note, setNote] = useState(initial.note ?? '');
  const [flat, setFlat] = useState<Flat>(flatten(initial.limits));
  const [errors, setErrors] = useState<Record<string, string>>({});
  const [status, setStatus] = useState<string | null>(null);
  const [busy, setBusy] = useState(false);

  const set = (k: string, v: string) => setFlat((f) => ({ ...f, [k]: v }));

  async function submit(e: SyntheticEvent) {
    e.preventDefault();
    const limits = build(flat);
    const body =
      mode === 'create'
        ? {
            lacquerId: num(lacquerId),
            materialId: num(materialId),
            name: name.trim(),
            limits,
            ...(note.trim() ? { note: note.trim() } : {}),
          }
        : { name: name.trim(), limits, ...(note.trim() ? { note: note.trim() } : {}) };
    const parsed = (mode === 'create' ? WindowDraftCreateSchema : WindowDraftUpdateSchema).safeParse(body);
    if (!parsed.success) {
      setErrors(Object.fromEntries(parsed.error.issues.map((i) => [i.path.map(String).join('.'), i.message])));
      setStatus('Check the marked fields.');
      return;
    }
    setErrors({});
    setBusy(true);
    try {
      const r = await apiFetch<{ id: number }>(mode === 'create' ? '/api/v1/windows' : `/api/v1/windows/${windowId}`, {
        method: mode === 'create' ? 'POST' : 'PATCH',
        body: parsed.data,
      });
      window.location.href = `/windows/${r.id}`;
    } catch (err) {
      if (err instanceof ApiError) {
        setErrors(Object.fromEntries(err.errors.map((f) => [f.path, f.message])));
        setStatus(err.detail ?? err.title);
      } else setStatus('Network error; try again.');
    } finally {
      setBusy(false);
    }
  }

  const e = (path: string) =>
    errors[path] ? (
      <p className="mt-0.5 text-sm font-bold text-alert-high">
        <span aria-hidden="true">✕ </span>
        {errors[path]}
      </p>
    ) : null;
  const input = (key: string, label: string) => (
    <div>
      <label htmlFor={`${id}-${key}`} className="text-xs">
        {label}
      </label>
      <input
        id={`${id}-${key}`}
        inputMode="decimal"
        className="num"
        value={flat[key] ?? ''}
        onChange={(ev) => set(key, ev.target.value)}
        aria-invalid={!!errors[`limits.${key}`]}
      />
      {e(`limits.${key}`)}
    </div>
  );
  // Checks the limits alone as the user types (the object-level errors show on submit).
  const liveLimits = ProcessWindowLimitsSchema.safeParse(build(flat));

  return (
    <form onSubmit={submit} noValidate className="space-y-4">
      {mode === 'create' && (
        <div className="grid gap-3 sm:grid-cols-2">
          <div>
            <label htmlFor={`${id}-lac`}>Lacquer</label>
            <select id={`${id}-lac`} value={lacquerId} onChange={(ev) => setLacquerId(ev.target.value)}>
              <option value="">Choose…</option>
              {lacquers.map((l) => (
                <option key={l.id} value={l.id}>
                  {l.name}
                </option>
              ))}
            </select>
            {e('lacquerId')}
          </div>
          <div>
            <label htmlFor={`${id}-mat`}>Substrate</label>
            <select id={`${id}-mat`} value={materialId} onChange={(ev) => setMaterialId(ev.target.value)}>
              <option value="">Choose…</option>
              {materials.map((m) => (
                <option key={m.id} value={m.id}>
                  {m.name}
                </option>
              ))}
            </select>
            {e('materialId')}
          </div>
        </div>
      )}
      <div>
        <label htmlFor={`${id}-name`}>Window name</label>
        <input id={`${id}-name`} value={name} onChange={(ev) => setName(ev.target.value)} />
        {e('name')}
      </div>
      <table className="max-w-4xl">
        <caption className="sr-only">Limits</caption>
        <thead>
          <tr>
            <th scope="col">Limit</th>
            <th scope="col">Unit</th>
            <th scope="col">Low / value</th>
            <th scope="col">Target</th>
            <th scope="col">High</th>
          </tr>
        </thead>
        <tbody>
          {LIMIT_FIELDS.map((f) => (
            <tr key={f.key}>
              <th scope="row" className="bg-transparent font-normal text-ink">
                {f.label}
                {f.kind === 'value' && f.required ? ' *' : ''}
              </th>
              <td className="text-ink-soft">{f.unit}</td>
              {f.kind === 'range' ? (
                <>
                  <td>{input(`${f.key}.min`, 'low')}</td>
                  <td>{f.target ? input(`${f.key}.target`, 'target') : <span className="text-ink-faint">—</span>}</td>
                  <td>
                    {input(`${f.key}.max`, 'high')}
                    {e(`limits.${f.key}`)}
                  </td>
                </>
              ) : (
                <>
                  <td>{input(f.key, 'value')}</td>
                  <td />
                  <td />
                </>
              )}
            </tr>
          ))}
        </tbody>
      </table>
      <p className="text-xs text-ink-soft">
        * required. A range needs both its low and high; leave all three empty to leave it out.{' '}
        {liveLimits.success ? 'The limits are consistent.' : ''}
      </p>
      <div>
        <label htmlFor={`${id}-note`}>Note (source of the values, e.g. the lacquer maker’s data sheet revision)</label>
        <textarea id={`${id}-note`} rows={2} value={note} onChange={(ev) => setNote(ev.target.value)} />
      </div>
      <div aria-live="polite">
        {status && (
          <p role="alert" className="rounded border-l-4 border-alert-high bg-alert-bg p-2 text-sm">
            <strong>✕ Not saved.</strong> {status}
          </p>
        )}
      </div>
      <button type="submit" className="btn" disabled={busy}>
        {busy ? 'Saving…' : mode === 'create' ? 'Create draft' : 'Save draft'}
      </button>
    </form>
  );
}
