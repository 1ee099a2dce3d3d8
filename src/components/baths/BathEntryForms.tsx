/**
 * Additions (solvent, fresh lacquer) and filter changes, logged on their own (an addition that
 * follows a check's recommendation is logged from the check form instead, linked to it).
 */
import { useId, useState, type SyntheticEvent } from 'react';
import { apiFetch, ApiError } from '../../lib/client/api.ts';
import { BATH_CAUTION, BathAdditionEntrySchema, FilterChangeSchema } from '../../lib/shared/baths.ts';

interface Props {
  tanks: { id: number; name: string }[];
  canLog: boolean;
}

type Status = { kind: 'ok' | 'error'; text: string } | null;

const num = (s: string) => (s.trim() === '' ? undefined : Number(s.trim().replace(',', '.')));

function StatusLine({ status }: { status: Status }) {
  if (!status) return <div aria-live="polite" />;
  return (
    <p
      role={status.kind === 'error' ? 'alert' : 'status'}
      className={
        status.kind === 'error'
          ? 'rounded border-l-4 border-alert-high bg-alert-bg p-2 text-sm'
          : 'rounded border-l-4 border-lacquer bg-lacquer-light/60 p-2 text-sm'
      }
    >
      <strong>{status.kind === 'error' ? '✕ Not logged.' : '✓ Logged.'}</strong> {status.text}
    </p>
  );
}

export default function BathEntryForms({ tanks, canLog }: Props) {
  const id = useId();
  const [tankId, setTankId] = useState(tanks[0]?.id ?? 0);
  const [kind, setKind] = useState<'solvent' | 'fresh-lacquer'>('solvent');
  const [massKg, setMassKg] = useState('');
  const [addNote, setAddNote] = useState('');
  const [filterType, setFilterType] = useState('');
  const [rating, setRating] = useState('');
  const [filterNote, setFilterNote] = useState('');
  const [addStatus, setAddStatus] = useState<Status>(null);
  const [filterStatus, setFilterStatus] = useState<Status>(null);
  const [busy, setBusy] = useState(false);

  async function send(
    path: string,
    schema: typeof BathAdditionEntrySchema | typeof FilterChangeSchema,
    body: Record<string, unknown>,
    set: (s: Status) => void,
    done: () => void,
  ) {
    const parsed = schema.safeParse(body);
    if (!parsed.success) {
      set({ kind: 'error', text: parsed.error.issues.map((i) => i.message).join(' ') });
      return;
    }
    setBusy(true);
    try {
      await apiFetch(path, { body: parsed.data });
      done();
    } catch (err) {
      set({ kind: 'error', text: err instanceof ApiError ? (err.detail ?? err.title) : 'Network error; try again.' });
    } finally {
      setBusy(false);
    }
  }

  function addition(e: SyntheticEvent) {
    e.preventDefault();
    const m = num(massKg);
    void send(
      '/api/v1/baths/additions',
      BathAdditionEntrySchema,
      {
        tankAssetId: tankId,
        kind,
        ...(m !== undefined ? { massKg: m } : {}),
        ...(addNote.trim() ? { note: addNote.trim() } : {}),
      },
      setAddStatus,
      () => {
        setAddStatus({
          kind: 'ok',
          text: `${m} kg of ${kind === 'solvent' ? 'solvent' : 'fresh lacquer'} on ${tanks.find((t) => t.id === tankId)?.name}.`,
        });
        setMassKg('');
        setAddNote('');
      },
    );
  }

  function filter(e: SyntheticEvent) {
    e.preventDefault();
    const r = num(rating);
    void send(
      '/api/v1/baths/filter-changes',
      FilterChangeSchema,
      {
        tankAssetId: tankId,
        filterType: filterType.trim(),
        ...(r !== undefined ? { ratingUm: r } : {}),
        ...(filterNote.trim() ? { note: filterNote.trim() } : {}),
      },
      setFilterStatus,
      () => {
        setFilterStatus({ kind: 'ok', text: `Filter change on ${tanks.find((t) => t.id === tankId)?.name}.` });
        setFilterNote('');
      },
    );
  }

  if (!canLog) return <p className="text-sm text-ink-soft">Your role can read the bath log but not write to it.</p>;

  return (
    <div className="space-y-4">
      <div className="max-w-sm">
        <label htmlFor={`${id}-tank`}>Tank</label>
        <select id={`${id}-tank`} className="py-2.5 text-lg" value={tankId} onChange={(e) => setTankId(Number(e.target.value))}>
          {tanks.map((t) => (
            <option key={t.id} value={t.id}>
              {t.name}
            </option>
          ))}
        </select>
      </div>
      <div className="grid gap-4 lg:grid-cols-2">
        <form onSubmit={addition} noValidate className="panel space-y-3">
          <h3 className="font-bold">Addition</h3>
          <div className="flex gap-2" role="radiogroup" aria-label="What was added">
            {(['solvent', 'fresh-lacquer'] as const).map((k) => (
              <button
                key={k}
                type="button"
                role="radio"
                aria-checked={kind === k}
                className={kind === k ? 'btn' : 'btn-quiet'}
                onClick={() => setKind(k)}
              >
                {k === 'solvent' ? 'Solvent' : 'Fresh lacquer'}
              </button>
            ))}
          </div>
          <div>
            <label htmlFor={`${id}-mass`}>Mass added (kg)</label>
            <input
              id={`${id}-mass`}
              className="py-2.5 text-lg"
              inputMode="decimal"
              value={massKg}
              onChange={(e) => setMassKg(e.target.value)}
            />
          </div>
          <div>
            <label htmlFor={`${id}-anote`}>Note (optional)</label>
            <input id={`${id}-anote`} value={addNote} onChange={(e) => setAddNote(e.target.value)} />
          </div>
          <p className="caution">
            <strong>Caution.</strong> {BATH_CAUTION}
          </p>
          <StatusLine status={addStatus} />
          <button type="submit" className="btn py-2.5" disabled={busy}>
            Log addition
          </button>
        </form>
        <form onSubmit={filter} noValidate className="panel space-y-3">
          <h3 className="font-bold">Filter change</h3>
          <div>
            <label htmlFor={`${id}-ftype`}>Filter type</label>
            <input
              id={`${id}-ftype`}
              className="py-2.5 text-lg"
              value={filterType}
              onChange={(e) => setFilterType(e.target.value)}
              placeholder="e.g. pleated cartridge"
            />
          </div>
          <div>
            <label htmlFor={`${id}-rating`}>Rating (µm, optional)</label>
            <input
              id={`${id}-rating`}
              className="py-2.5 text-lg"
              inputMode="decimal"
              value={rating}
              onChange={(e) => setRating(e.target.value)}
            />
          </div>
          <div>
            <label htmlFor={`${id}-fnote`}>Note (optional)</label>
            <input id={`${id}-fnote`} value={filterNote} onChange={(e) => setFilterNote(e.target.value)} />
          </div>
          <StatusLine status={filterStatus} />
          <button type="submit" className="btn py-2.5" disabled={busy}>
            Log filter change
          </button>
        </form>
      </div>
    </div>
  );
}
