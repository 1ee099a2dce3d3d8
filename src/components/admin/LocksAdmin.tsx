/** Admin → Sign-in locks: users and addresses with recent failed sign-ins; lift a lock (audited). */
import { useState } from 'react';
import { apiFetch } from '../../lib/client/api.ts';
import type { LockView } from '../../lib/shared/admin.ts';
import { formatSiteTime } from '../../lib/shared/site-time.ts';
import { NoticeLine, problemText, SortTh, sortRows, useSort, type Notice } from './table.tsx';

type Key = 'subject' | 'kind' | 'failures' | 'lastFailureAt' | 'lockedUntil';

export default function LocksAdmin({ initial, timeZone }: { initial: LockView[]; timeZone: string }) {
  const [locks, setLocks] = useState(initial);
  const [notice, setNotice] = useState<Notice>(null);
  const [busy, setBusy] = useState<string | null>(null);
  const [loading, setLoading] = useState(false);
  const { sort, toggle } = useSort<Key>({ key: 'lockedUntil', dir: -1 });
  const shown = sortRows(locks, (l) => l[sort.key], sort.dir);

  async function refresh() {
    setLoading(true);
    try {
      setLocks(await apiFetch<LockView[]>('/api/v1/admin/security/locks'));
    } catch (err) {
      setNotice({ kind: 'error', text: problemText(err) });
    } finally {
      setLoading(false);
    }
  }

  async function unlock(l: LockView) {
    const what = l.kind === 'user' ? `the user “${l.subject}”` : `the address ${l.subject}`;
    if (!window.confirm(`Lift the sign-in lock on ${what} and forget its ${l.failures} failed attempts?`)) return;
    setBusy(l.key);
    try {
      await apiFetch('/api/v1/admin/security/unlock', { body: { key: l.key } });
      setLocks((all) => all.filter((x) => x.key !== l.key));
      setNotice({ kind: 'ok', text: `Sign-in is open again for ${what}. The unlock is in the audit trail.` });
    } catch (err) {
      setNotice({ kind: 'error', text: problemText(err) });
    } finally {
      setBusy(null);
    }
  }

  const lockedCount = locks.filter((l) => l.locked).length;
  return (
    <section aria-labelledby="locks-h" className="space-y-3">
      <div className="flex flex-wrap items-end gap-3">
        <h2 id="locks-h" className="mr-auto">
          Failed sign-ins, last 24 h{' '}
          <span className="text-sm font-normal text-ink-soft">
            ({lockedCount} locked, {locks.length - lockedCount} counting)
          </span>
        </h2>
        <button type="button" className="btn-quiet" onClick={() => void refresh()} disabled={loading} aria-busy={loading}>
          {loading ? 'Refreshing…' : 'Refresh'}
        </button>
      </div>
      <NoticeLine notice={notice} onClose={() => setNotice(null)} />
      <div className="overflow-x-auto rounded-md border border-slate-line bg-white">
        <table>
          <thead>
            <tr>
              <SortTh k="subject" sort={sort} toggle={toggle}>
                User or address
              </SortTh>
              <SortTh k="kind" sort={sort} toggle={toggle}>
                Kind
              </SortTh>
              <SortTh k="failures" sort={sort} toggle={toggle}>
                Failed attempts
              </SortTh>
              <SortTh k="lastFailureAt" sort={sort} toggle={toggle}>
                Last failure
              </SortTh>
              <SortTh k="lockedUntil" sort={sort} toggle={toggle}>
                State
              </SortTh>
              <th scope="col">Action</th>
            </tr>
          </thead>
          <tbody>
            {shown.length === 0 && (
              <tr>
                <td colSpan={6} className="text-ink-soft">
                  No failed sign-ins in the last 24 hours.
                </td>
              </tr>
            )}
            {shown.map((l) => (
              <tr key={l.key} className={l.locked ? 'bg-alert-bg/60' : ''}>
                <td className="font-mono">{l.subject}</td>
                <td>{l.kind === 'user' ? 'User' : 'Address'}</td>
                <td className="num text-right">{l.failures}</td>
                <td className="num whitespace-nowrap">{formatSiteTime(l.lastFailureAt, timeZone, { seconds: true })}</td>
                <td className="whitespace-nowrap">
                  {l.locked ? (
                    <span className="tag border-alert-high text-alert-high">
                      ■ Locked until {formatSiteTime(l.lockedUntil, timeZone)}
                    </span>
                  ) : (
                    <span className="text-ink-soft">counting</span>
                  )}
                </td>
                <td>
                  <button
                    type="button"
                    className="btn-quiet px-2 py-1 text-sm"
                    disabled={busy === l.key}
                    onClick={() => void unlock(l)}
                  >
                    {l.locked ? 'Unlock' : 'Reset count'}
                  </button>
                </td>
              </tr>
            ))}
          </tbody>
        </table>
      </div>
    </section>
  );
}
