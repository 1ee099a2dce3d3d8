/**
 * The lab's acceptance settings (quality): the worst cross-cut class accepted dry and after
 * boiling, the lowest Bayer ratio, the cured-thickness range and the defects accepted per type.
 * Tests already recorded keep the settings they were judged by.
 */
import { useState, type SyntheticEvent } from 'react';
import { apiFetch, ApiError } from '../../lib/client/api.ts';
import { AcceptanceSchema, DEFECT_LABELS, DEFECT_TYPES, type Acceptance, type DefectType } from '../../lib/shared/quality.ts';

const CLASSES = [0, 1, 2, 3, 4, 5] as const;

export default function AcceptanceForm({ initial, canEdit }: { initial: Acceptance; canEdit: boolean }) {
  const [a, setA] = useState<Acceptance>(initial);
  const [msg, setMsg] = useState<{ kind: 'ok' | 'error'; text: string } | null>(null);
  const [busy, setBusy] = useState(false);

  async function save(e: SyntheticEvent) {
    e.preventDefault();
    const p = AcceptanceSchema.safeParse(a);
    if (!p.success) return setMsg({ kind: 'error', text: p.error.issues.map((i) => i.message).join(' ') });
    setBusy(true);
    try {
      setA(await apiFetch<Acceptance>('/api/v1/quality/acceptance', { method: 'PUT', body: p.data }));
      setMsg({ kind: 'ok', text: 'Saved. New tests are judged by these settings.' });
    } catch (err) {
      setMsg({
        kind: 'error',
        text:
          err instanceof ApiError
            ? err.errors.map((f) => `${f.path}: ${f.message}`).join(' ') || (err.detail ?? err.title)
            : 'Not saved.',
      });
    } finally {
      setBusy(false);
    }
  }
  const n = (s: string) => (s.trim() === '' ? Number.NaN : Number(s));
  return (
    <form onSubmit={save} className="space-y-4">
      <fieldset disabled={!canEdit} className="panel grid gap-4 md:grid-cols-2">
        <legend className="sr-only">Acceptance</legend>
        <div>
          <label htmlFor="a-cc">Worst cross-cut class accepted (dry)</label>
          <select id="a-cc" value={a.crosscutMaxIso} onChange={(e) => setA({ ...a, crosscutMaxIso: Number(e.target.value) })}>
            {CLASSES.map((c) => (
              <option key={c} value={c}>
                ISO 2409 class {c} / ASTM D3359 {5 - c}B
              </option>
            ))}
          </select>
        </div>
        <div>
          <label htmlFor="a-boil">Worst cross-cut class accepted after boiling</label>
          <select id="a-boil" value={a.boilMaxIso} onChange={(e) => setA({ ...a, boilMaxIso: Number(e.target.value) })}>
            {CLASSES.map((c) => (
              <option key={c} value={c}>
                ISO 2409 class {c} / ASTM D3359 {5 - c}B
              </option>
            ))}
          </select>
        </div>
        <div>
          <label htmlFor="a-bayer">Lowest Bayer ratio accepted (ASTM F735; 1 = uncoated CR-39)</label>
          <input
            id="a-bayer"
            type="number"
            step="0.1"
            min={0}
            value={Number.isFinite(a.minBayerRatio) ? a.minBayerRatio : ''}
            onChange={(e) => setA({ ...a, minBayerRatio: n(e.target.value) })}
            className="w-32 font-mono"
          />
        </div>
        <div className="flex gap-3">
          <div>
            <label htmlFor="a-tmin">Thinnest coat (µm)</label>
            <input
              id="a-tmin"
              type="number"
              step="0.1"
              value={Number.isFinite(a.thicknessUm.min) ? a.thicknessUm.min : ''}
              onChange={(e) => setA({ ...a, thicknessUm: { ...a.thicknessUm, min: n(e.target.value) } })}
              className="w-28 font-mono"
            />
          </div>
          <div>
            <label htmlFor="a-tmax">Thickest coat (µm)</label>
            <input
              id="a-tmax"
              type="number"
              step="0.1"
              value={Number.isFinite(a.thicknessUm.max) ? a.thicknessUm.max : ''}
              onChange={(e) => setA({ ...a, thicknessUm: { ...a.thicknessUm, max: n(e.target.value) } })}
              className="w-28 font-mono"
            />
          </div>
        </div>
        <fieldset className="md:col-span-2">
          <legend className="mb-1 text-sm font-bold text-ink-soft">Cosmetic defects accepted per lens, by type</legend>
          <div className="grid gap-3 sm:grid-cols-3 lg:grid-cols-4">
            {DEFECT_TYPES.map((d: DefectType) => (
              <div key={d}>
                <label htmlFor={`a-d-${d}`}>{DEFECT_LABELS[d]}</label>
                <input
                  id={`a-d-${d}`}
                  type="number"
                  min={0}
                  step={1}
                  value={a.cosmeticMaxPerType[d] ?? 0}
                  onChange={(e) =>
                    setA({
                      ...a,
                      cosmeticMaxPerType: { ...a.cosmeticMaxPerType, [d]: Math.max(0, Math.trunc(Number(e.target.value) || 0)) },
                    })
                  }
                  className="w-24 font-mono"
                />
              </div>
            ))}
          </div>
        </fieldset>
      </fieldset>
      {canEdit ? (
        <button className="btn" disabled={busy}>
          {busy ? 'Saving…' : 'Save the acceptance settings'}
        </button>
      ) : (
        <p className="text-sm text-ink-soft">Only the quality role changes these settings.</p>
      )}
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
