/**
 * Engineer forms for the bath supplies: a lacquer, a received lot and a bath charge. Each
 * validates with the shared schema the endpoint uses and shows field messages beside the field.
 */
import { useId, useState, type SyntheticEvent, type ReactNode } from 'react';
import type { z } from 'zod';
import { apiFetch, ApiError } from '../../lib/client/api.ts';
import { ChargeCreateSchema, LacquerCreateSchema, LotCreateSchema } from '../../lib/shared/baths.ts';

type Values = Record<string, string>;

interface FieldSpec {
  name: string;
  label: string;
  type?: 'text' | 'number' | 'date' | 'datetime-local' | 'select';
  options?: { value: string; label: string }[];
  hint?: string;
}

function useSubmit(schema: z.ZodType, path: string, toBody: (v: Values) => Record<string, unknown>, onDone: (r: any) => string) {
  const [errors, setErrors] = useState<Record<string, string>>({});
  const [status, setStatus] = useState<{ kind: 'ok' | 'error'; text: string } | null>(null);
  const [busy, setBusy] = useState(false);
  async function submit(values: Values) {
    const parsed = schema.safeParse(toBody(values));
    if (!parsed.success) {
      setErrors(Object.fromEntries(parsed.error.issues.map((i) => [i.path.map(String).join('.'), i.message])));
      setStatus({ kind: 'error', text: 'Check the marked fields.' });
      return false;
    }
    setErrors({});
    setBusy(true);
    try {
      const r = await apiFetch(path, { body: parsed.data });
      setStatus({ kind: 'ok', text: onDone(r) });
      return true;
    } catch (err) {
      if (err instanceof ApiError) {
        setErrors(Object.fromEntries(err.errors.map((f) => [f.path, f.message])));
        setStatus({ kind: 'error', text: err.detail ?? err.title });
      } else setStatus({ kind: 'error', text: 'Network error; try again.' });
      return false;
    } finally {
      setBusy(false);
    }
  }
  return { errors, status, busy, submit };
}

function Form({
  title,
  fields,
  initial,
  hook,
  children,
}: {
  title: string;
  fields: FieldSpec[];
  initial: Values;
  hook: ReturnType<typeof useSubmit>;
  children?: ReactNode;
}) {
  const id = useId();
  const [values, setValues] = useState<Values>(initial);
  async function onSubmit(e: SyntheticEvent) {
    e.preventDefault();
    if (await hook.submit(values)) setTimeout(() => window.location.reload(), 900);
  }
  return (
    <form onSubmit={onSubmit} noValidate className="panel space-y-3">
      <h3 className="font-bold">{title}</h3>
      <div className="grid gap-3 sm:grid-cols-2">
        {fields.map((f) => (
          <div key={f.name}>
            <label htmlFor={`${id}-${f.name}`}>{f.label}</label>
            {f.type === 'select' ? (
              <select
                id={`${id}-${f.name}`}
                value={values[f.name] ?? ''}
                onChange={(e) => setValues({ ...values, [f.name]: e.target.value })}
                aria-invalid={!!hook.errors[f.name]}
              >
                <option value="">Choose…</option>
                {f.options?.map((o) => (
                  <option key={o.value} value={o.value}>
                    {o.label}
                  </option>
                ))}
              </select>
            ) : (
              <input
                id={`${id}-${f.name}`}
                type={f.type === 'number' ? 'text' : (f.type ?? 'text')}
                inputMode={f.type === 'number' ? 'decimal' : undefined}
                value={values[f.name] ?? ''}
                onChange={(e) => setValues({ ...values, [f.name]: e.target.value })}
                aria-invalid={!!hook.errors[f.name]}
              />
            )}
            {f.hint && <p className="mt-0.5 text-xs text-ink-soft">{f.hint}</p>}
            {hook.errors[f.name] && (
              <p className="mt-1 text-sm font-bold text-alert-high">
                <span aria-hidden="true">✕ </span>
                {hook.errors[f.name]}
              </p>
            )}
          </div>
        ))}
      </div>
      {children}
      <div aria-live="polite">
        {hook.status && (
          <p
            className={
              hook.status.kind === 'error'
                ? 'rounded border-l-4 border-alert-high bg-alert-bg p-2 text-sm'
                : 'rounded border-l-4 border-lacquer bg-lacquer-light/60 p-2 text-sm'
            }
          >
            <strong>{hook.status.kind === 'error' ? '✕ Not saved.' : '✓ Saved.'}</strong> {hook.status.text}
          </p>
        )}
      </div>
      <button type="submit" className="btn" disabled={hook.busy}>
        {hook.busy ? 'Saving…' : 'Save'}
      </button>
    </form>
  );
}

const n = (s: string | undefined) => (s === undefined || s.trim() === '' ? undefined : Number(s.trim().replace(',', '.')));
const opt = (k: string, v: unknown) => (v === undefined || v === '' ? {} : { [k]: v });

export function LacquerForm() {
  const hook = useSubmit(
    LacquerCreateSchema,
    '/api/v1/lacquers',
    (v) => ({
      name: v['name'] ?? '',
      maker: v['maker'] ?? '',
      ...opt('solidsPct', n(v['solidsPct'])),
      ...opt('densityGCm3', n(v['densityGCm3'])),
      ...opt('activationEnergyKJMol', n(v['activationEnergyKJMol'])),
      ...opt('note', v['note']?.trim()),
    }),
    (r) => `Lacquer ${r.name} added.`,
  );
  return (
    <Form
      title="Add a lacquer"
      hook={hook}
      initial={{}}
      fields={[
        { name: 'name', label: 'Name' },
        { name: 'maker', label: 'Maker' },
        {
          name: 'solidsPct',
          label: 'Nominal solids (wt %)',
          type: 'number',
          hint: 'The bath is held at this solids content (additions aim for it).',
        },
        { name: 'densityGCm3', label: 'Density (g/cm³)', type: 'number' },
        {
          name: 'activationEnergyKJMol',
          label: 'Activation energy (kJ/mol)',
          type: 'number',
          hint: 'From the lacquer maker’s data or the lab’s validation.',
        },
        { name: 'note', label: 'Note (optional)' },
      ]}
    />
  );
}

export function LotForm({ lacquers }: { lacquers: { id: number; name: string }[] }) {
  const hook = useSubmit(
    LotCreateSchema,
    '/api/v1/lots',
    (v) => ({
      ...opt('lacquerId', n(v['lacquerId'])),
      lotCode: v['lotCode']?.trim() ?? '',
      receivedOn: v['receivedOn'] ?? '',
      expiresOn: v['expiresOn'] ?? '',
      ...opt('solidsPct', n(v['solidsPct'])),
      ...opt('note', v['note']?.trim()),
    }),
    (r) => `Lot ${r.lotCode} recorded.`,
  );
  return (
    <Form
      title="Record a received lot"
      hook={hook}
      initial={{ receivedOn: new Date().toISOString().slice(0, 10) }}
      fields={[
        {
          name: 'lacquerId',
          label: 'Lacquer',
          type: 'select',
          options: lacquers.map((l) => ({ value: String(l.id), label: l.name })),
        },
        { name: 'lotCode', label: 'Maker’s lot number' },
        { name: 'receivedOn', label: 'Received on', type: 'date' },
        { name: 'expiresOn', label: 'Expires on', type: 'date' },
        { name: 'solidsPct', label: 'Lot solids (wt %, certificate)', type: 'number' },
        { name: 'note', label: 'Note (optional)' },
      ]}
    />
  );
}

export function ChargeForm({ tanks, lots }: { tanks: { id: number; name: string }[]; lots: { id: number; label: string }[] }) {
  const hook = useSubmit(
    ChargeCreateSchema,
    '/api/v1/baths/charges',
    (v) => ({
      ...opt('tankAssetId', n(v['tankAssetId'])),
      ...opt('lotId', n(v['lotId'])),
      ...opt('chargedAt', v['chargedAt'] ? new Date(v['chargedAt']).toISOString() : undefined),
      ...opt('massKg', n(v['massKg'])),
      ...opt('potLifeDays', n(v['potLifeDays'])),
      ...opt('note', v['note']?.trim()),
    }),
    (r) => `Charge of ${r.tankCode} from lot ${r.lotCode} recorded.`,
  );
  return (
    <Form
      title="Record a bath charge"
      hook={hook}
      initial={{}}
      fields={[
        {
          name: 'tankAssetId',
          label: 'Tank',
          type: 'select',
          options: tanks.map((t) => ({ value: String(t.id), label: t.name })),
        },
        { name: 'lotId', label: 'Lot', type: 'select', options: lots.map((l) => ({ value: String(l.id), label: l.label })) },
        { name: 'chargedAt', label: 'Charged at (your local time; empty = now)', type: 'datetime-local' },
        { name: 'massKg', label: 'Charged mass (kg)', type: 'number' },
        { name: 'potLifeDays', label: 'Pot life (days, from the lacquer maker’s data)', type: 'number' },
        { name: 'note', label: 'Note (optional)' },
      ]}
    >
      <p className="caution">
        <strong>Caution.</strong> Lacquers and their solvents are flammable and harmful. Charge baths following the material’s
        safety data sheet, with ventilation, and under local fire codes.
      </p>
    </Form>
  );
}
