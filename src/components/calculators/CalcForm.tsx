/**
 * The form engine every calculator island uses: labelled inputs with their units, a Calculate
 * button, the server's answer (the API computes; the browser only formats), and the server's
 * field messages beside the field they concern.
 */
import { useId, useState, type ReactNode, type SyntheticEvent } from 'react';
import { apiFetch, ApiError } from '../../lib/client/api.ts';

export interface Field {
  name: string;
  label: string;
  unit?: string;
  type?: 'number' | 'text' | 'select' | 'textarea';
  options?: { value: string; label: string }[];
  initial?: string;
  hint?: string;
  rows?: number;
}

export type Values = Record<string, string>;

/** Parse a typed number ("" → undefined; a comma decimal is accepted). */
export const num = (s: string | undefined): number | undefined => {
  if (s === undefined || s.trim() === '') return undefined;
  return Number(s.trim().replace(',', '.'));
};

/** `{k: v}` when v is defined, else `{}`. */
export const opt = (k: string, v: unknown): Record<string, unknown> => (v === undefined ? {} : { [k]: v });

/** Lines of numbers ("a, b" or "a b" or "a;b") → rows; blank and # lines skipped. */
export function numberRows(text: string): number[][] {
  return text
    .split(/\r?\n/)
    .map((l) => l.trim())
    .filter((l) => l && !l.startsWith('#'))
    .map((l) =>
      l
        .split(/[,;\t ]+/)
        .filter(Boolean)
        .map((c) => Number(c.replace(',', '.'))),
    );
}

interface Props<R> {
  endpoint: string;
  fields: Field[];
  build: (v: Values) => unknown;
  render: (result: R, values: Values) => ReactNode;
  submitLabel?: string;
}

export default function CalcForm<R>({ endpoint, fields, build, render, submitLabel = 'Calculate' }: Props<R>) {
  const id = useId();
  const [values, setValues] = useState<Values>(() => Object.fromEntries(fields.map((f) => [f.name, f.initial ?? ''])));
  const [result, setResult] = useState<{ r: R; v: Values } | null>(null);
  const [errors, setErrors] = useState<Record<string, string>>({});
  const [problem, setProblem] = useState<string | null>(null);
  const [busy, setBusy] = useState(false);

  async function submit(e: SyntheticEvent) {
    e.preventDefault();
    setBusy(true);
    setProblem(null);
    setErrors({});
    try {
      const r = await apiFetch<R>(endpoint, { body: build(values) });
      setResult({ r, v: values });
    } catch (err) {
      setResult(null);
      if (err instanceof ApiError) {
        const byField: Record<string, string> = {};
        for (const f of err.errors) {
          const head = fields.find((x) => f.path === x.name || f.path.startsWith(`${x.name}.`))?.name ?? '(form)';
          byField[head] = byField[head]
            ? `${byField[head]} ${f.message}`
            : f.path.includes('.')
              ? `${f.path}: ${f.message}`
              : f.message;
        }
        setErrors(byField);
        setProblem(err.detail ?? err.title);
      } else setProblem('The calculation could not be run (network error).');
    } finally {
      setBusy(false);
    }
  }

  return (
    <div className="grid gap-6 lg:grid-cols-2">
      <form onSubmit={submit} noValidate className="space-y-3">
        {fields.map((f) => {
          const fid = `${id}-${f.name}`;
          const label = (
            <label htmlFor={fid}>
              {f.label}
              {f.unit ? <span className="font-normal text-ink-soft"> ({f.unit})</span> : null}
            </label>
          );
          const common = {
            id: fid,
            value: values[f.name] ?? '',
            'aria-invalid': !!errors[f.name],
            'aria-describedby': errors[f.name] ? `${fid}-err` : f.hint ? `${fid}-hint` : undefined,
          };
          return (
            <div key={f.name}>
              {label}
              {f.type === 'select' ? (
                <select {...common} onChange={(e) => setValues({ ...values, [f.name]: e.target.value })}>
                  {f.options?.map((o) => (
                    <option key={o.value} value={o.value}>
                      {o.label}
                    </option>
                  ))}
                </select>
              ) : f.type === 'textarea' ? (
                <textarea
                  {...common}
                  className="num"
                  rows={f.rows ?? 6}
                  onChange={(e) => setValues({ ...values, [f.name]: e.target.value })}
                />
              ) : (
                <input
                  {...common}
                  inputMode={f.type === 'text' ? undefined : 'decimal'}
                  className="num"
                  onChange={(e) => setValues({ ...values, [f.name]: e.target.value })}
                />
              )}
              {f.hint && !errors[f.name] && (
                <p id={`${fid}-hint`} className="mt-0.5 text-xs text-ink-soft">
                  {f.hint}
                </p>
              )}
              {errors[f.name] && (
                <p id={`${fid}-err`} className="mt-0.5 text-sm font-bold text-alert-high">
                  <span aria-hidden="true">✕ </span>
                  {errors[f.name]}
                </p>
              )}
            </div>
          );
        })}
        <button type="submit" className="btn" disabled={busy} aria-busy={busy}>
          {busy ? 'Calculating…' : submitLabel}
        </button>
      </form>
      <section aria-live="polite" aria-label="Result" className="panel bg-slate-panel/40">
        <h2 className="mb-2">Result</h2>
        {problem ? (
          <p role="alert" className="rounded border-l-4 border-alert-high bg-alert-bg p-2">
            <strong>✕ No result.</strong> {problem}
            {errors['(form)'] ? ` ${errors['(form)']}` : ''}
          </p>
        ) : result ? (
          render(result.r, result.v)
        ) : (
          <p className="text-ink-soft">Enter the inputs and press {submitLabel}.</p>
        )}
      </section>
    </div>
  );
}

/** A result line: label, value with unit. */
export function Out({ label, value, unit, strong }: { label: string; value: ReactNode; unit?: string; strong?: boolean }) {
  return (
    <div className="flex items-baseline justify-between gap-4 border-b border-slate-line py-1">
      <dt className="text-ink-soft">{label}</dt>
      <dd className={`num ${strong ? 'text-lg font-bold' : ''}`}>
        {value}
        {unit ? ` ${unit}` : ''}
      </dd>
    </div>
  );
}

/** Plain-words warnings from a model (outside its validity, etc.). */
export function Warnings({ items }: { items?: string[] | undefined }) {
  if (!items?.length) return null;
  return (
    <ul className="mt-2 space-y-1">
      {items.map((w) => (
        <li key={w} className="caution">
          <span aria-hidden="true">▲ </span>
          {w}
        </li>
      ))}
    </ul>
  );
}

/** Significant figures without trailing exponent noise. */
export const sig = (v: number, n = 4) =>
  Math.abs(v) >= 1e-3 && Math.abs(v) < 1e6 ? Number(v.toPrecision(n)).toString() : v.toExponential(n - 1);
