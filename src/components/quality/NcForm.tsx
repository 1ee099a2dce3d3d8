/**
 * Write a nonconformance: tie failed test(s) to a suspected cause (the oven load, the bath
 * charge, both, or other) and to the holds already placed, with a description.
 */
import { useState, type SyntheticEvent } from 'react';
import { apiFetch, ApiError } from '../../lib/client/api.ts';
import { NcCreateSchema, SUSPECTED_CAUSES, SUSPECTED_CAUSE_LABELS } from '../../lib/shared/quality.ts';

export interface NcFormProps {
  jobNumber: string;
  tests: { id: number; label: string }[];
  loads: { id: number; label: string }[];
  charges: { id: number; label: string }[];
  holds: { id: number; label: string }[];
  defaultTitle: string;
  defaultCause: (typeof SUSPECTED_CAUSES)[number];
}

export default function NcForm({ jobNumber, tests, loads, charges, holds, defaultTitle, defaultCause }: NcFormProps) {
  const [title, setTitle] = useState(defaultTitle);
  const [description, setDescription] = useState('');
  const [cause, setCause] = useState(defaultCause);
  const [loadId, setLoadId] = useState<number | ''>(loads[0]?.id ?? '');
  const [chargeId, setChargeId] = useState<number | ''>(charges[0]?.id ?? '');
  const [testIds, setTestIds] = useState<Set<number>>(new Set(tests.map((t) => t.id)));
  const [holdIds, setHoldIds] = useState<Set<number>>(new Set(holds.map((h) => h.id)));
  const [error, setError] = useState<string | null>(null);
  const [busy, setBusy] = useState(false);
  const flip = (set: Set<number>, id: number) => {
    const next = new Set(set);
    if (next.has(id)) next.delete(id);
    else next.add(id);
    return next;
  };

  async function submit(e: SyntheticEvent) {
    e.preventDefault();
    const body = {
      title: title.trim(),
      description: description.trim(),
      suspectedCause: cause,
      ...(loadId !== '' && (cause === 'load' || cause === 'load-and-bath') ? { suspectedLoadId: loadId } : {}),
      ...(chargeId !== '' && (cause === 'bath' || cause === 'load-and-bath') ? { suspectedBathChargeId: chargeId } : {}),
      testIds: [...testIds],
      holdIds: [...holdIds],
    };
    const p = NcCreateSchema.safeParse(body);
    if (!p.success) return setError(p.error.issues.map((i) => i.message).join(' '));
    setBusy(true);
    setError(null);
    try {
      const nc = await apiFetch<{ id: number }>('/api/v1/nonconformances', { body: p.data });
      window.location.href = `/quality/nonconformances/${nc.id}`;
    } catch (err) {
      setError(err instanceof ApiError ? err.errors.map((f) => f.message).join(' ') || (err.detail ?? err.title) : 'Not saved.');
      setBusy(false);
    }
  }

  return (
    <form onSubmit={submit} className="space-y-4">
      <div className="panel grid gap-4 md:grid-cols-2">
        <div className="md:col-span-2">
          <label htmlFor="nc-title">Title</label>
          <input id="nc-title" value={title} onChange={(e) => setTitle(e.target.value)} maxLength={200} required />
        </div>
        <div className="md:col-span-2">
          <label htmlFor="nc-desc">What was found, and what is known so far</label>
          <textarea id="nc-desc" rows={4} value={description} onChange={(e) => setDescription(e.target.value)} maxLength={5000} />
        </div>
        <div>
          <label htmlFor="nc-cause">Suspected cause</label>
          <select id="nc-cause" value={cause} onChange={(e) => setCause(e.target.value as typeof cause)}>
            {SUSPECTED_CAUSES.map((c) => (
              <option key={c} value={c}>
                {SUSPECTED_CAUSE_LABELS[c]}
              </option>
            ))}
          </select>
        </div>
        {(cause === 'load' || cause === 'load-and-bath') && (
          <div>
            <label htmlFor="nc-load">Suspected oven load</label>
            <select id="nc-load" value={loadId} onChange={(e) => setLoadId(e.target.value ? Number(e.target.value) : '')}>
              {loads.length === 0 && <option value="">No load recorded for {jobNumber}</option>}
              {loads.map((l) => (
                <option key={l.id} value={l.id}>
                  {l.label}
                </option>
              ))}
            </select>
          </div>
        )}
        {(cause === 'bath' || cause === 'load-and-bath') && (
          <div>
            <label htmlFor="nc-charge">Suspected bath charge</label>
            <select id="nc-charge" value={chargeId} onChange={(e) => setChargeId(e.target.value ? Number(e.target.value) : '')}>
              {charges.length === 0 && <option value="">No bath charge recorded for {jobNumber}</option>}
              {charges.map((c) => (
                <option key={c.id} value={c.id}>
                  {c.label}
                </option>
              ))}
            </select>
          </div>
        )}
      </div>
      <div className="panel grid gap-4 md:grid-cols-2">
        <fieldset>
          <legend className="mb-1 font-bold">Failed tests</legend>
          {tests.length === 0 ? (
            <p className="text-sm text-ink-soft">No failed tests.</p>
          ) : (
            tests.map((t) => (
              <label key={t.id} className="flex items-center gap-2 font-normal">
                <input
                  type="checkbox"
                  className="w-auto"
                  checked={testIds.has(t.id)}
                  onChange={() => setTestIds(flip(testIds, t.id))}
                />{' '}
                {t.label}
              </label>
            ))
          )}
        </fieldset>
        <fieldset>
          <legend className="mb-1 font-bold">
            Holds to tie to it ({holdIds.size} of {holds.length})
          </legend>
          {holds.length === 0 ? (
            <p className="text-sm text-ink-soft">No active holds on this job or its load yet. Hold them from the trace first.</p>
          ) : (
            <>
              <div className="mb-1 flex gap-2 text-sm">
                <button type="button" className="btn-quiet" onClick={() => setHoldIds(new Set(holds.map((h) => h.id)))}>
                  All
                </button>
                <button type="button" className="btn-quiet" onClick={() => setHoldIds(new Set())}>
                  None
                </button>
              </div>
              <div className="max-h-64 overflow-auto">
                {holds.map((h) => (
                  <label key={h.id} className="mr-4 inline-flex items-center gap-1 font-normal num">
                    <input
                      type="checkbox"
                      className="w-auto"
                      checked={holdIds.has(h.id)}
                      onChange={() => setHoldIds(flip(holdIds, h.id))}
                    />{' '}
                    {h.label}
                  </label>
                ))}
              </div>
            </>
          )}
        </fieldset>
      </div>
      <button className="btn" disabled={busy}>
        {busy ? 'Saving…' : 'Write the nonconformance'}
      </button>
      {error && (
        <p role="alert" className="rounded border-l-4 border-alert-high bg-alert-bg p-2 text-sm">
          <strong>✕ Not saved. </strong>
          {error}
        </p>
      )}
    </form>
  );
}
