/**
 * Admin → Users: create people with a role and e-mail, change roles, deactivate and
 * reactivate (never delete: records keep their author), e-mail a one-time password link.
 */
import { useMemo, useState, type SubmitEvent } from 'react';
import { apiFetch } from '../../lib/client/api.ts';
import { CreateUserSchema, PASSWORD_MIN, RESET_LINK_MINUTES, type UserView } from '../../lib/shared/admin.ts';
import { ROLE_LABELS, ROLES, type Role } from '../../lib/shared/roles.ts';
import { formatSiteTime } from '../../lib/shared/site-time.ts';
import { downloadCsv, NoticeLine, problemText, SortTh, sortRows, useSort, type Notice } from './table.tsx';

interface Props {
  initial: UserView[];
  timeZone: string;
  currentUserId: number;
}

type Key = 'username' | 'displayName' | 'email' | 'role' | 'active' | 'lastSignInAt' | 'sessions';

const emptyForm = { username: '', displayName: '', email: '', role: 'operator' as Role, password: '' };

export default function UsersAdmin({ initial, timeZone, currentUserId }: Props) {
  const [users, setUsers] = useState(initial);
  const [filter, setFilter] = useState('');
  const [showInactive, setShowInactive] = useState(true);
  const [notice, setNotice] = useState<Notice>(null);
  const [busy, setBusy] = useState<string | null>(null);
  const [form, setForm] = useState(emptyForm);
  const [setPassword, setSetPassword] = useState(false);
  const [showForm, setShowForm] = useState(initial.length === 0);
  const [fieldErrors, setFieldErrors] = useState<Record<string, string>>({});
  const { sort, toggle } = useSort<Key>({ key: 'username', dir: 1 });

  const shown = useMemo(() => {
    const f = filter.trim().toLowerCase();
    const rows = users.filter(
      (u) =>
        (showInactive || u.active) &&
        (!f || [u.username, u.displayName, u.email ?? '', u.role].some((s) => s.toLowerCase().includes(f))),
    );
    return sortRows(rows, (u) => (sort.key === 'active' ? (u.active ? 1 : 0) : u[sort.key]), sort.dir);
  }, [users, filter, showInactive, sort]);

  const replace = (u: UserView) => setUsers((all) => all.map((x) => (x.id === u.id ? u : x)));

  async function create(e: SubmitEvent<HTMLFormElement>) {
    e.preventDefault();
    const body = { ...form, password: setPassword && form.password ? form.password : undefined };
    const parsed = CreateUserSchema.safeParse(body);
    if (!parsed.success) {
      setFieldErrors(Object.fromEntries(parsed.error.issues.map((i) => [String(i.path[0] ?? ''), i.message])));
      return;
    }
    setFieldErrors({});
    setBusy('create');
    try {
      const r = await apiFetch<{ user: UserView; invited: boolean }>('/api/v1/admin/users', { body: parsed.data });
      setUsers((all) => [...all, r.user]);
      setForm(emptyForm);
      setSetPassword(false);
      setShowForm(false);
      setNotice({
        kind: 'ok',
        text: r.invited
          ? `${r.user.username} created; a link to set a password went to ${r.user.email} (valid ${RESET_LINK_MINUTES} minutes).`
          : `${r.user.username} created with the password you set.`,
      });
    } catch (err) {
      const fe = (err as { errors?: { path: string; message: string }[] }).errors ?? [];
      setFieldErrors(Object.fromEntries(fe.map((f) => [f.path, f.message])));
      setNotice({ kind: 'error', text: problemText(err) });
    } finally {
      setBusy(null);
    }
  }

  async function patch(u: UserView, change: Partial<Pick<UserView, 'role' | 'active'>>, what: string) {
    setBusy(`u${u.id}`);
    try {
      replace(await apiFetch<UserView>(`/api/v1/admin/users/${u.id}`, { method: 'PATCH', body: change }));
      setNotice({ kind: 'ok', text: what });
    } catch (err) {
      setNotice({ kind: 'error', text: problemText(err) });
    } finally {
      setBusy(null);
    }
  }

  async function sendReset(u: UserView) {
    setBusy(`u${u.id}`);
    try {
      const r = await apiFetch<{ to: string; expiresInMinutes: number }>(`/api/v1/admin/users/${u.id}/password-reset`, {
        method: 'POST',
        body: {},
      });
      setNotice({ kind: 'ok', text: `A one-time link went to ${r.to}; it expires in ${r.expiresInMinutes} minutes.` });
    } catch (err) {
      setNotice({ kind: 'error', text: problemText(err) });
    } finally {
      setBusy(null);
    }
  }

  const field = (name: keyof typeof emptyForm, label: string, extra: Record<string, unknown> = {}) => (
    <div>
      <label htmlFor={`nu-${name}`}>{label}</label>
      <input
        id={`nu-${name}`}
        value={form[name]}
        onChange={(e) => setForm({ ...form, [name]: e.target.value })}
        aria-invalid={!!fieldErrors[name]}
        aria-describedby={fieldErrors[name] ? `nu-${name}-err` : undefined}
        {...extra}
      />
      {fieldErrors[name] && (
        <p id={`nu-${name}-err`} className="mt-1 text-sm text-alert-high">
          ✕ {fieldErrors[name]}
        </p>
      )}
    </div>
  );

  return (
    <div className="space-y-4">
      {showForm && (
        <section aria-labelledby="new-user-h" className="panel">
          <div className="flex items-baseline justify-between gap-3">
            <h2 id="new-user-h">New user</h2>
            <button type="button" className="text-sm underline" onClick={() => setShowForm(false)}>
              Close
            </button>
          </div>
          <form onSubmit={create} className="mt-3 grid gap-3 sm:grid-cols-2 lg:grid-cols-4" noValidate>
            {field('username', 'Username', { autoComplete: 'off', spellCheck: false })}
            {field('displayName', 'Full name')}
            {field('email', 'E-mail', { type: 'email' })}
            <div>
              <label htmlFor="nu-role">Role</label>
              <select id="nu-role" value={form.role} onChange={(e) => setForm({ ...form, role: e.target.value as Role })}>
                {ROLES.map((r) => (
                  <option key={r} value={r}>
                    {ROLE_LABELS[r]}
                  </option>
                ))}
              </select>
            </div>
            <fieldset className="space-y-1 sm:col-span-2">
              <legend className="mb-1 text-sm font-bold text-ink-soft">Password</legend>
              <label className="flex items-center gap-2 font-normal">
                <input type="radio" className="w-auto" name="pw" checked={!setPassword} onChange={() => setSetPassword(false)} />{' '}
                E-mail them a link to set it (valid {RESET_LINK_MINUTES} min)
              </label>
              <label className="flex items-center gap-2 font-normal">
                <input type="radio" className="w-auto" name="pw" checked={setPassword} onChange={() => setSetPassword(true)} />{' '}
                Set an initial password now
              </label>
            </fieldset>
            {setPassword ? (
              field('password', `Initial password (${PASSWORD_MIN}+ characters)`, {
                type: 'password',
                autoComplete: 'new-password',
              })
            ) : (
              <div />
            )}
            <div className="self-end">
              <button
                className="btn w-full justify-center"
                type="submit"
                disabled={busy === 'create'}
                aria-busy={busy === 'create'}
              >
                {busy === 'create' ? 'Creating…' : 'Create user'}
              </button>
            </div>
          </form>
        </section>
      )}
      <section aria-labelledby="users-h" className="min-w-0 space-y-3">
        <div className="flex flex-wrap items-end gap-3">
          <h2 id="users-h" className="mr-auto">
            People{' '}
            <span className="text-sm font-normal text-ink-soft">
              ({users.filter((u) => u.active).length} active, {users.filter((u) => !u.active).length} deactivated)
            </span>
          </h2>
          <div>
            <label htmlFor="u-filter">Filter</label>
            <input
              id="u-filter"
              type="search"
              value={filter}
              onChange={(e) => setFilter(e.target.value)}
              placeholder="name, e-mail, role"
              className="w-56"
            />
          </div>
          <label className="flex items-center gap-2 font-normal">
            <input
              type="checkbox"
              className="w-auto"
              checked={showInactive}
              onChange={(e) => setShowInactive(e.target.checked)}
            />{' '}
            Show deactivated
          </label>
          {!showForm && (
            <button type="button" className="btn" onClick={() => setShowForm(true)}>
              + New user
            </button>
          )}
          <button
            type="button"
            className="btn-quiet"
            onClick={() =>
              downloadCsv(
                'coatrail-users.csv',
                ['username', 'name', 'email', 'role', 'active', 'last_sign_in_utc', 'sessions'],
                shown.map((u) => [
                  u.username,
                  u.displayName,
                  u.email,
                  u.role,
                  u.active ? 'yes' : 'no',
                  u.lastSignInAt,
                  u.sessions,
                ]),
              )
            }
          >
            Export CSV
          </button>
        </div>
        <NoticeLine notice={notice} onClose={() => setNotice(null)} />
        <div className="overflow-x-auto rounded-md border border-slate-line bg-white">
          <table>
            <thead>
              <tr>
                <SortTh k="username" sort={sort} toggle={toggle}>
                  Username
                </SortTh>
                <SortTh k="displayName" sort={sort} toggle={toggle}>
                  Name
                </SortTh>
                <SortTh k="email" sort={sort} toggle={toggle}>
                  E-mail
                </SortTh>
                <SortTh k="role" sort={sort} toggle={toggle}>
                  Role
                </SortTh>
                <SortTh k="active" sort={sort} toggle={toggle}>
                  Status
                </SortTh>
                <SortTh k="lastSignInAt" sort={sort} toggle={toggle}>
                  Last sign-in
                </SortTh>
                <SortTh k="sessions" sort={sort} toggle={toggle}>
                  Sessions
                </SortTh>
                <th scope="col">Actions</th>
              </tr>
            </thead>
            <tbody>
              {shown.length === 0 && (
                <tr>
                  <td colSpan={8} className="text-ink-soft">
                    No user matches the filter.
                  </td>
                </tr>
              )}
              {shown.map((u) => {
                const self = u.id === currentUserId;
                const rowBusy = busy === `u${u.id}`;
                return (
                  <tr key={u.id} className={u.active ? '' : 'text-ink-faint'}>
                    <td className="font-mono">{u.username}</td>
                    <td className="whitespace-nowrap">{u.displayName}</td>
                    <td>{u.email ?? <span className="text-ink-faint">none</span>}</td>
                    <td>
                      <label className="sr-only" htmlFor={`role-${u.id}`}>
                        Role of {u.username}
                      </label>
                      <select
                        id={`role-${u.id}`}
                        className="w-auto py-1"
                        value={u.role}
                        disabled={self || rowBusy || !u.active}
                        title={self ? 'Another administrator changes your own role.' : undefined}
                        onChange={(e) => {
                          const role = e.target.value as Role;
                          if (
                            window.confirm(`Change ${u.username}'s role from ${ROLE_LABELS[u.role]} to ${ROLE_LABELS[role]}?`)
                          ) {
                            void patch(u, { role }, `${u.username} is now ${ROLE_LABELS[role]}.`);
                          }
                        }}
                      >
                        {ROLES.map((r) => (
                          <option key={r} value={r}>
                            {ROLE_LABELS[r]}
                          </option>
                        ))}
                      </select>
                    </td>
                    <td>
                      {u.active ? (
                        <span className="tag border-slate-line">Active</span>
                      ) : (
                        <span className="tag border-ink-faint">◌ Deactivated</span>
                      )}
                    </td>
                    <td className="num whitespace-nowrap">{u.lastSignInAt ? formatSiteTime(u.lastSignInAt, timeZone) : '—'}</td>
                    <td className="num text-right">{u.sessions}</td>
                    <td className="whitespace-nowrap">
                      <div className="flex gap-1.5">
                        {u.active && (
                          <button
                            type="button"
                            className="btn-quiet px-2 py-1 text-sm"
                            disabled={rowBusy || !u.email}
                            onClick={() => void sendReset(u)}
                            title={u.email ? undefined : 'Add an e-mail address first'}
                          >
                            Send reset link
                          </button>
                        )}
                        {!self &&
                          (u.active ? (
                            <button
                              type="button"
                              className="btn-quiet px-2 py-1 text-sm"
                              disabled={rowBusy}
                              onClick={() => {
                                if (
                                  window.confirm(
                                    `Deactivate ${u.username}? Their sessions end now; their records keep their name.`,
                                  )
                                ) {
                                  void patch(u, { active: false }, `${u.username} is deactivated and signed out everywhere.`);
                                }
                              }}
                            >
                              Deactivate
                            </button>
                          ) : (
                            <button
                              type="button"
                              className="btn-quiet px-2 py-1 text-sm"
                              disabled={rowBusy}
                              onClick={() => void patch(u, { active: true }, `${u.username} is active again.`)}
                            >
                              Reactivate
                            </button>
                          ))}
                      </div>
                    </td>
                  </tr>
                );
              })}
            </tbody>
          </table>
        </div>
        <p className="text-sm text-ink-soft">
          Users are never deleted: the records they made keep their name. Deactivating someone ends their sessions at once. Every
          change here is written to the audit trail.
        </p>
      </section>
    </div>
  );
}
