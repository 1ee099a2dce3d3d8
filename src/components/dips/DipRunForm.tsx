/**
 * Record a rack dipped on a line: the line, the dip time, the rack code and the jobs on it —
 * scanned (a barcode scanner types the code and Enter: one job per line) or typed. Jobs can
 * also come from a CSV file in two steps: the server checks the file and shows the good rows
 * and the bad ones with their line numbers; only when the user confirms are the good rows kept
 * (and their job numbers put on the rack). The server links the bath charge and the last bath
 * check at the dip time and measures the stroke's mean withdrawal speed from stored readings.
 */
import { useState, type SyntheticEvent } from 'react';
import { apiFetch, ApiError } from '../../lib/client/api.ts';
import { DipRunCreateSchema, MAX_JOBS_PER_SCAN, parseJobList, type JobCsvRow } from '../../lib/shared/jobs.ts';
import { fromLocalInput, toLocalInput } from '../../lib/shared/time.ts';

interface Preview {
  good: JobCsvRow[];
  bad: { line: number; errors: string[] }[];
  sha256: string;
  existing: string[];
}
interface Created {
  id: number;
  withdrawalSpeedMmS: number | null;
  strokeSamples: number | null;
  bathChargeId: number | null;
  lastCheckId: number | null;
  jobs: { jobNumber: string }[];
}

export default function DipRunForm({ lines, timeZone }: { lines: { id: number; name: string }[]; timeZone: string }) {
  const [lineId, setLineId] = useState(lines[0]?.id ?? 0);
  const [at, setAt] = useState(toLocalInput(Date.now(), timeZone));
  const [rack, setRack] = useState('');
  const [scan, setScan] = useState('');
  const [note, setNote] = useState('');
  const [csv, setCsv] = useState<{ name: string; text: string } | null>(null);
  const [preview, setPreview] = useState<Preview | null>(null);
  const [busy, setBusy] = useState<string | null>(null);
  const [msg, setMsg] = useState<{ kind: 'ok' | 'error'; text: string } | null>(null);
  const [created, setCreated] = useState<Created | null>(null);
  const parsed = parseJobList(scan);

  const errText = (err: unknown) =>
    err instanceof ApiError ? err.errors.map((f) => f.message).join(' ') || (err.detail ?? err.title) : 'Something went wrong.';

  async function checkCsv() {
    if (!csv) return setMsg({ kind: 'error', text: 'Choose a CSV file first.' });
    setBusy('preview');
    setMsg(null);
    try {
      setPreview(await apiFetch<Preview>('/api/v1/jobs/import/preview', { body: { csv: csv.text } }));
    } catch (err) {
      setPreview(null);
      setMsg({ kind: 'error', text: errText(err) });
    } finally {
      setBusy(null);
    }
  }

  async function keepGood() {
    if (!csv || !preview) return;
    setBusy('commit');
    try {
      const r = await apiFetch<{ imported: number; created: number; jobNumbers: string[] }>('/api/v1/jobs/import/commit', {
        body: { csv: csv.text, sha256: preview.sha256 },
      });
      const merged = [...new Set([...parsed.jobNumbers, ...r.jobNumbers])];
      setScan(merged.join('\n'));
      const racks = [...new Set(preview.good.map((g) => g.rackCode).filter(Boolean))];
      if (!rack && racks.length === 1) setRack(racks[0]!);
      setMsg({
        kind: 'ok',
        text: `${r.imported} job(s) kept (${r.created} new); ${preview.bad.length} bad row(s) skipped. Their numbers are in the job list below — record the dip to put them on the rack.`,
      });
      setPreview(null);
      setCsv(null);
    } catch (err) {
      setMsg({ kind: 'error', text: errText(err) });
    } finally {
      setBusy(null);
    }
  }

  async function submit(e: SyntheticEvent) {
    e.preventDefault();
    setMsg(null);
    if (parsed.invalid.length)
      return setMsg({
        kind: 'error',
        text: `Not job numbers: ${parsed.invalid.map((x) => `line ${x.line} “${x.value}”`).join(', ')}.`,
      });
    const when = fromLocalInput(at, timeZone);
    const body = {
      lineAssetId: lineId,
      ...(Number.isFinite(when) ? { dippedAt: new Date(when).toISOString() } : {}),
      ...(rack.trim() ? { rackCode: rack.trim() } : {}),
      jobNumbers: parsed.jobNumbers,
      ...(note.trim() ? { note: note.trim() } : {}),
    };
    const p = DipRunCreateSchema.safeParse(body);
    if (!p.success) return setMsg({ kind: 'error', text: p.error.issues.map((i) => i.message).join(' ') });
    setBusy('save');
    try {
      const r = await apiFetch<Created>('/api/v1/dip-runs', { body: p.data });
      setCreated(r);
      setScan('');
      setRack('');
      setNote('');
      setTimeout(() => window.location.reload(), 2500);
    } catch (err) {
      setMsg({ kind: 'error', text: errText(err) });
    } finally {
      setBusy(null);
    }
  }

  return (
    <div className="grid gap-4 xl:grid-cols-2">
      <form onSubmit={submit} className="panel space-y-3" aria-labelledby="dip-h">
        <h2 id="dip-h">Record a dip</h2>
        <div className="grid gap-3 sm:grid-cols-3">
          <div>
            <label htmlFor="d-line">Line</label>
            <select id="d-line" value={lineId} onChange={(e) => setLineId(Number(e.target.value))}>
              {lines.map((l) => (
                <option key={l.id} value={l.id}>
                  {l.name}
                </option>
              ))}
            </select>
          </div>
          <div>
            <label htmlFor="d-at">Dipped at ({timeZone})</label>
            <input id="d-at" type="datetime-local" value={at} onChange={(e) => setAt(e.target.value)} />
          </div>
          <div>
            <label htmlFor="d-rack">Rack / tray code</label>
            <input id="d-rack" value={rack} onChange={(e) => setRack(e.target.value)} className="font-mono" autoComplete="off" />
          </div>
        </div>
        <div>
          <label htmlFor="d-jobs">Jobs on the rack — scan each ticket (one per line) or type numbers separated by commas</label>
          <textarea
            id="d-jobs"
            rows={6}
            value={scan}
            onChange={(e) => setScan(e.target.value)}
            className="font-mono"
            autoComplete="off"
            spellCheck={false}
          />
          <p className="text-xs text-ink-soft" aria-live="polite">
            {parsed.jobNumbers.length} job(s)
            {parsed.duplicates.length ? `, ${parsed.duplicates.length} scanned twice (kept once)` : ''}
            {parsed.invalid.length
              ? `, ${parsed.invalid.length} not valid: ${parsed.invalid
                  .slice(0, 3)
                  .map((x) => `line ${x.line}`)
                  .join(', ')}`
              : ''}
            {parsed.jobNumbers.length > MAX_JOBS_PER_SCAN ? ` — at most ${MAX_JOBS_PER_SCAN}` : ''}.
          </p>
        </div>
        <div>
          <label htmlFor="d-note">Note (optional)</label>
          <input id="d-note" value={note} onChange={(e) => setNote(e.target.value)} maxLength={1000} />
        </div>
        <button className="btn" disabled={busy !== null}>
          {busy === 'save' ? 'Recording…' : 'Record the dip'}
        </button>
        {created && (
          <div role="status" className="rounded border-l-4 border-lacquer bg-lacquer-light/60 p-2 text-sm">
            <strong>✓ Dip run {created.id} recorded</strong> with {created.jobs.length} job(s).{' '}
            {created.withdrawalSpeedMmS !== null
              ? `Withdrawal speed ${created.withdrawalSpeedMmS.toFixed(3)} mm/s (${created.strokeSamples} reading(s) in the stroke).`
              : 'No withdrawal stroke found in the stored readings around that time.'}{' '}
            {created.bathChargeId ? `Bath charge ${created.bathChargeId}` : 'No bath charge'} and{' '}
            {created.lastCheckId ? `bath check ${created.lastCheckId}` : 'no earlier bath check'} linked.
          </div>
        )}
      </form>

      <section className="panel space-y-3" aria-labelledby="csv-h">
        <h2 id="csv-h">Jobs from a CSV file</h2>
        <p className="text-sm text-ink-soft">
          A header row naming <code>job_number</code>, optionally <code>customer_ref</code>, <code>lens_material</code>,{' '}
          <code>rack</code>. Step 1 checks the file (nothing is stored); step 2 keeps only the good rows.
        </p>
        <div>
          <label htmlFor="d-csv">CSV file</label>
          <input
            id="d-csv"
            type="file"
            accept=".csv,text/csv,text/plain"
            onChange={async (e) => {
              const f = e.target.files?.[0];
              setPreview(null);
              setCsv(f ? { name: f.name, text: await f.text() } : null);
            }}
          />
        </div>
        <button type="button" className="btn-quiet" disabled={!csv || busy !== null} onClick={checkCsv}>
          {busy === 'preview' ? 'Checking…' : '1 · Check the file'}
        </button>
        {preview && (
          <div className="space-y-2">
            <p className="text-sm">
              <strong>{preview.good.length}</strong> good row(s)
              {preview.existing.length ? ` (${preview.existing.length} already known)` : ''},{' '}
              <strong className={preview.bad.length ? 'text-alert-high' : ''}>{preview.bad.length}</strong> bad row(s).
            </p>
            {preview.bad.length > 0 && (
              <div className="max-h-48 overflow-auto rounded border border-alert-high">
                <table>
                  <thead>
                    <tr>
                      <th>Line</th>
                      <th>Why it is refused</th>
                    </tr>
                  </thead>
                  <tbody>
                    {preview.bad.map((b) => (
                      <tr key={b.line}>
                        <td className="num">✕ {b.line}</td>
                        <td className="text-sm">{b.errors.join('; ')}</td>
                      </tr>
                    ))}
                  </tbody>
                </table>
              </div>
            )}
            {preview.good.length > 0 && (
              <div className="max-h-48 overflow-auto rounded border border-slate-line">
                <table>
                  <thead>
                    <tr>
                      <th>Line</th>
                      <th>Job</th>
                      <th>Customer ref</th>
                      <th>Material</th>
                      <th>Rack</th>
                    </tr>
                  </thead>
                  <tbody>
                    {preview.good.map((g) => (
                      <tr key={g.line}>
                        <td className="num">{g.line}</td>
                        <td className="num">{g.jobNumber}</td>
                        <td>{g.customerRef ?? ''}</td>
                        <td>{g.lensMaterial ?? ''}</td>
                        <td className="num">{g.rackCode ?? ''}</td>
                      </tr>
                    ))}
                  </tbody>
                </table>
              </div>
            )}
            <div className="flex flex-wrap gap-2">
              <button type="button" className="btn" disabled={preview.good.length === 0 || busy !== null} onClick={keepGood}>
                {busy === 'commit'
                  ? 'Keeping…'
                  : `2 · Keep the ${preview.good.length} good row(s)${preview.bad.length ? `, skip ${preview.bad.length}` : ''}`}
              </button>
              <button type="button" className="btn-quiet" onClick={() => setPreview(null)}>
                Cancel
              </button>
            </div>
          </div>
        )}
      </section>
      {msg && (
        <p
          role={msg.kind === 'error' ? 'alert' : 'status'}
          className={`xl:col-span-2 ${msg.kind === 'error' ? 'rounded border-l-4 border-alert-high bg-alert-bg p-2 text-sm' : 'rounded border-l-4 border-lacquer bg-lacquer-light/60 p-2 text-sm'}`}
        >
          <strong>{msg.kind === 'error' ? '✕ ' : '✓ '}</strong>
          {msg.text}
        </p>
      )}
    </div>
  );
}
