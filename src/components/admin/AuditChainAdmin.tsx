/** Admin → Sign-in locks → Audit trail integrity: the last hash-chain verification and "Verify now". */
import { useState } from 'react';
import { apiFetch } from '../../lib/client/api.ts';
import type { AuditChainStatus, AuditVerificationView } from '../../lib/shared/api/audit-chain.ts';
import { formatSiteTime } from '../../lib/shared/site-time.ts';
import { NoticeLine, problemText, type Notice } from './table.tsx';

export default function AuditChainAdmin({ initial, timeZone }: { initial: AuditVerificationView | null; timeZone: string }) {
  const [last, setLast] = useState(initial);
  const [busy, setBusy] = useState(false);
  const [notice, setNotice] = useState<Notice>(null);

  async function verify() {
    setBusy(true);
    try {
      const r = await apiFetch<AuditChainStatus>('/api/v1/admin/audit-chain', { method: 'POST', body: {} });
      setLast(r.last);
      setNotice(null);
    } catch (err) {
      setNotice({ kind: 'error', text: problemText(err) });
    } finally {
      setBusy(false);
    }
  }

  return (
    <section aria-labelledby="chain-h" className="panel mt-5 space-y-2 text-sm">
      <div className="flex flex-wrap items-end gap-3">
        <h2 id="chain-h" className="mr-auto">
          Audit trail integrity
        </h2>
        <button type="button" className="btn" onClick={() => void verify()} disabled={busy} aria-busy={busy}>
          {busy ? 'Verifying…' : 'Verify now'}
        </button>
      </div>
      <p className="text-ink-soft">
        Every audit row carries a SHA-256 hash of its content and of the row before it. Verifying walks the whole chain and names
        the first row that was altered, removed or written around the database&rsquo;s checks.
      </p>
      <NoticeLine notice={notice} onClose={() => setNotice(null)} />
      {last === null ? (
        <p data-testid="chain-status">Not verified yet.</p>
      ) : (
        <p data-testid="chain-status" role="status">
          <strong className={last.ok ? 'text-ok' : 'text-alert-high'}>
            {last.ok ? 'Chain intact' : `Broken at row ${last.brokenId ?? '?'}`}
          </strong>
          {' · '}
          {last.rowsChecked} rows checked · {formatSiteTime(last.at, timeZone)} by {last.by}
          {last.problem ? <span className="block break-words text-ink-soft">{last.problem}</span> : null}
        </p>
      )}
    </section>
  );
}
