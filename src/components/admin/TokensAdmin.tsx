/**
 * Admin → API tokens for machine clients (lab systems): create a named token with a role
 * (the secret is shown this once), list with prefix, role, creation, last use, and revoke.
 */
import { useMemo, useState, type SubmitEvent } from 'react';
import { apiFetch } from '../../lib/client/api.ts';
import { CreateTokenSchema, type TokenView } from '../../lib/shared/admin.ts';
import { ROLE_LABELS, ROLES, type Role } from '../../lib/shared/roles.ts';
import { formatSiteTime } from '../../lib/shared/site-time.ts';
import { downloadCsv, NoticeLine, problemText, SortTh, sortRows, useSort, type Notice } from './table.tsx';

type Key = 'name' | 'role' | 'prefix' | 'createdAt' | 'createdBy' | 'lastUsedAt' | 'revokedAt';

export default function TokensAdmin({ initial, timeZone, origin }: { initial: TokenView[]; timeZone: string; origin: string }) {
  const [tokens, setTokens] = useState(initial);
  const [name, setName] = useState('');
  const [role, setRole] = useState<Role>('viewer');
  const [secret, setSecret] = useState<{ name: string; value: string } | null>(null);
  const [copied, setCopied] = useState(false);
  const [notice, setNotice] = useState<Notice>(null);
  const [busy, setBusy] = useState<string | null>(null);
  const [nameError, setNameError] = useState<string | null>(null);
  const [showRevoked, setShowRevoked] = useState(false);
  const { sort, toggle } = useSort<Key>({ key: 'createdAt', dir: -1 });

  const shown = useMemo(
    () =>
      sortRows(
        tokens.filter((t) => showRevoked || !t.revokedAt),
        (t) => t[sort.key],
        sort.dir,
      ),
    [tokens, sort, showRevoked],
  );

  async function create(e: SubmitEvent<HTMLFormElement>) {
    e.preventDefault();
    const parsed = CreateTokenSchema.safeParse({ name, role });
    if (!parsed.success) return setNameError(parsed.error.issues[0]?.message ?? 'Check the name.');
    setNameError(null);
    setBusy('create');
    try {
      const t = await apiFetch<TokenView & { secret: string }>('/api/v1/admin/tokens', { body: parsed.data });
      const { secret: value, ...view } = t;
      setTokens((all) => [view, ...all]);
      setSecret({ name: t.name, value });
      setCopied(false);
      setName('');
      setNotice(null);
    } catch (err) {
      setNotice({ kind: 'error', text: problemText(err) });
    } finally {
      setBusy(null);
    }
  }

  async function revoke(t: TokenView) {
    if (!window.confirm(`Revoke “${t.name}”? Clients using it get 401 from now on. This cannot be undone.`)) return;
    setBusy(`t${t.id}`);
    try {
      const v = await apiFetch<TokenView>(`/api/v1/admin/tokens/${t.id}/revoke`, { method: 'POST', body: {} });
      setTokens((all) => all.map((x) => (x.id === v.id ? v : x)));
      setNotice({ kind: 'ok', text: `“${t.name}” is revoked.` });
    } catch (err) {
      setNotice({ kind: 'error', text: problemText(err) });
    } finally {
      setBusy(null);
    }
  }

  return (
    <div className="grid gap-5 xl:grid-cols-[1fr_360px]">
      <section aria-labelledby="tok-h" className="min-w-0 space-y-3">
        <div className="flex flex-wrap items-end gap-3">
          <h2 id="tok-h" className="mr-auto">
            API tokens{' '}
            <span className="text-sm font-normal text-ink-soft">({tokens.filter((t) => !t.revokedAt).length} in use)</span>
          </h2>
          <label className="flex items-center gap-2 font-normal">
            <input type="checkbox" className="w-auto" checked={showRevoked} onChange={(e) => setShowRevoked(e.target.checked)} />{' '}
            Show revoked
          </label>
          <button
            type="button"
            className="btn-quiet"
            onClick={() =>
              downloadCsv(
                'coatrail-api-tokens.csv',
                ['name', 'role', 'prefix', 'created_utc', 'created_by', 'last_used_utc', 'revoked_utc'],
                shown.map((t) => [t.name, t.role, t.prefix, t.createdAt, t.createdBy, t.lastUsedAt, t.revokedAt]),
              )
            }
          >
            Export CSV
          </button>
        </div>
        {secret && (
          <div role="status" className="rounded-md border-2 border-lacquer bg-white p-4">
            <p className="font-bold">Token “{secret.name}” — copy it now. It is shown this once; Coatrail keeps only a hash.</p>
            <div className="mt-2 flex gap-2">
              <code className="num flex-1 select-all break-all rounded border border-slate-line bg-slate-panel/50 px-2 py-1.5">
                {secret.value}
              </code>
              <button
                type="button"
                className="btn-quiet"
                onClick={() => {
                  void navigator.clipboard?.writeText(secret.value).then(() => setCopied(true));
                }}
              >
                {copied ? 'Copied ✓' : 'Copy'}
              </button>
            </div>
            <p className="mt-2 text-sm text-ink-soft">
              Use it as{' '}
              <code className="num">
                curl -H "Authorization: Bearer {secret.value.slice(0, 8)}…" {origin}/api/v1/channels
              </code>
            </p>
            <button type="button" className="mt-2 text-sm underline" onClick={() => setSecret(null)}>
              I have stored it — hide
            </button>
          </div>
        )}
        <NoticeLine notice={notice} onClose={() => setNotice(null)} />
        <div className="overflow-x-auto rounded-md border border-slate-line bg-white">
          <table>
            <thead>
              <tr>
                <SortTh k="name" sort={sort} toggle={toggle}>
                  Name
                </SortTh>
                <SortTh k="role" sort={sort} toggle={toggle}>
                  Role
                </SortTh>
                <SortTh k="prefix" sort={sort} toggle={toggle}>
                  Starts with
                </SortTh>
                <SortTh k="createdAt" sort={sort} toggle={toggle}>
                  Created
                </SortTh>
                <SortTh k="createdBy" sort={sort} toggle={toggle}>
                  By
                </SortTh>
                <SortTh k="lastUsedAt" sort={sort} toggle={toggle}>
                  Last used
                </SortTh>
                <SortTh k="revokedAt" sort={sort} toggle={toggle}>
                  Status
                </SortTh>
                <th scope="col">Action</th>
              </tr>
            </thead>
            <tbody>
              {shown.length === 0 && (
                <tr>
                  <td colSpan={8} className="text-ink-soft">
                    No API tokens yet. Create one for each lab system that reads or writes Coatrail’s API.
                  </td>
                </tr>
              )}
              {shown.map((t) => (
                <tr key={t.id} className={t.revokedAt ? 'text-ink-faint' : ''}>
                  <td>{t.name}</td>
                  <td>{ROLE_LABELS[t.role]}</td>
                  <td className="num">{t.prefix}…</td>
                  <td className="num whitespace-nowrap">{formatSiteTime(t.createdAt, timeZone)}</td>
                  <td className="font-mono">{t.createdBy}</td>
                  <td className="num whitespace-nowrap">{t.lastUsedAt ? formatSiteTime(t.lastUsedAt, timeZone) : 'never'}</td>
                  <td className="whitespace-nowrap">
                    {t.revokedAt ? (
                      <span className="tag border-ink-faint">✕ Revoked {formatSiteTime(t.revokedAt, timeZone)}</span>
                    ) : (
                      <span className="tag border-slate-line">In use</span>
                    )}
                  </td>
                  <td>
                    {!t.revokedAt && (
                      <button
                        type="button"
                        className="btn-quiet px-2 py-1 text-sm"
                        disabled={busy === `t${t.id}`}
                        onClick={() => void revoke(t)}
                      >
                        Revoke
                      </button>
                    )}
                  </td>
                </tr>
              ))}
            </tbody>
          </table>
        </div>
        <p className="text-sm text-ink-soft">
          Last use is recorded at most once a minute. A token acts with its role; what it changes is audited under its name.
        </p>
      </section>
      <section aria-labelledby="new-tok-h" className="panel h-fit">
        <h2 id="new-tok-h">New token</h2>
        <form onSubmit={create} className="mt-3 space-y-3" noValidate>
          <div>
            <label htmlFor="tok-name">Name (which client uses it)</label>
            <input
              id="tok-name"
              value={name}
              onChange={(e) => setName(e.target.value)}
              aria-invalid={!!nameError}
              aria-describedby={nameError ? 'tok-name-err' : undefined}
            />
            {nameError && (
              <p id="tok-name-err" className="mt-1 text-sm text-alert-high">
                ✕ {nameError}
              </p>
            )}
          </div>
          <div>
            <label htmlFor="tok-role">Role</label>
            <select id="tok-role" value={role} onChange={(e) => setRole(e.target.value as Role)}>
              {ROLES.map((r) => (
                <option key={r} value={r}>
                  {ROLE_LABELS[r]}
                </option>
              ))}
            </select>
            <p className="mt-1 text-sm text-ink-soft">Give the least role that does the job; a token cannot sign records.</p>
          </div>
          <button className="btn w-full justify-center" type="submit" disabled={busy === 'create'} aria-busy={busy === 'create'}>
            {busy === 'create' ? 'Creating…' : 'Create token'}
          </button>
        </form>
      </section>
    </div>
  );
}
