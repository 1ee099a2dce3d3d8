/**
 * The operator's alarm queue: alarms waiting for acknowledgement first, then by priority and
 * newest, updated live from the server's event stream without a reload. Acknowledge one or
 * several alarms with a required comment; engineers shelve, unshelve, take out of service and
 * return to service. Acknowledged and unacknowledged alarms differ by shape and words, not
 * only colour (● filled = needs acknowledgement, ○ hollow = acknowledged, ◌ dotted = cleared
 * but not acknowledged). New high and medium alarms sound a short beep (mute toggle, kept in
 * this browser). Each alarm's channel is one click away, with a sparkline around the alarm.
 */
import { useEffect, useMemo, useRef, useState, type SubmitEvent } from 'react';
import { ApiError, apiFetch } from '../../lib/client/api.ts';
import { STATE_LABELS } from '../../lib/domain/alarms/state.ts';
import { can, type Role } from '../../lib/shared/roles.ts';
import { SHELVE_MINUTES_MAX, type AlarmPriority, type AlarmState } from '../../lib/shared/alarms.ts';
import { EVENT_LABELS, SOURCE_KIND_LABELS, type AlarmEventView, type AlarmView } from '../../lib/shared/alarm-views.ts';
import {
  QUEUE_VIEWS,
  VIEW_LABELS,
  inView,
  mergeAlarm,
  sortQueue,
  type QueueSort,
  type QueueView,
} from '../../lib/shared/alarm-queue.ts';
import { formatAge, formatSiteTime } from '../../lib/shared/time.ts';
import { AlarmSpark as Spark } from './AlarmSpark.tsx';
import { useAlarmSound } from './useAlarmSound.ts';
import { useAlarmStream } from './useAlarmStream.ts';

interface Props {
  initial: AlarmView[];
  role: Role;
  timeZone: string;
  focusId: number | null;
  nowMs: number;
}

const PRIORITY_SHAPE: Record<AlarmPriority, string> = { high: '▲', medium: '◆', low: '■' };
const PRIORITY_CLASS: Record<AlarmPriority, string> = {
  high: 'text-alert-high border-alert-high',
  medium: 'text-alert-med border-alert-med',
  low: 'text-alert-low border-alert-low',
};
const STATE_ICON: Record<AlarmState, string> = {
  unacked: '●',
  acked: '○',
  'rtn-unacked': '◌',
  normal: '–',
  shelved: '‖',
  suppressed: '⊘',
  'out-of-service': '⊗',
};

type Form =
  | { kind: 'ack'; ids: number[] }
  | { kind: 'shelve'; id: number }
  | { kind: 'oos'; id: number }
  | { kind: 'rts'; id: number };

export default function AlarmQueue({ initial, role, timeZone, focusId, nowMs }: Props) {
  const [view, setView] = useState<QueueView>('open');
  const [sort, setSort] = useState<QueueSort>('priority');
  const [priorities, setPriorities] = useState<Set<AlarmPriority>>(new Set(['high', 'medium', 'low']));
  const [selected, setSelected] = useState<Set<number>>(new Set());
  const [form, setForm] = useState<Form | null>(null);
  const [now, setNow] = useState(nowMs);
  const [notice, setNotice] = useState<string | null>(null);
  const [expanded, setExpanded] = useState<number | null>(focusId);
  const { muted, toggleMute, soundBlocked, beep, unlockAudio } = useAlarmSound();
  const { alarms, setAlarms, live, loading, loadError } = useAlarmStream({ initial, view, focusId, beep, setNotice });
  const mayAck = can(role, 'alarm.ack');
  const mayShelve = can(role, 'alarm.shelve');
  const mayService = can(role, 'alarm.configure');

  // Clock for ages.
  useEffect(() => {
    const t = setInterval(() => setNow(Date.now()), 5_000);
    return () => clearInterval(t);
  }, []);

  useEffect(() => {
    if (focusId === null) return;
    const el = document.getElementById(`alarm-${focusId}`);
    el?.scrollIntoView({ block: 'center' });
    el?.focus();
  }, [focusId, alarms.size]);

  const rows = useMemo(
    () =>
      sortQueue(
        [...alarms.values()].filter((a) => (inView(a, view) || a.id === focusId) && priorities.has(a.priority)),
        sort,
      ),
    [alarms, view, sort, priorities, focusId],
  );
  const counts = useMemo(() => {
    const c = { open: 0, held: 0, recent: alarms.size, waiting: 0 };
    for (const a of alarms.values()) {
      if (inView(a, 'open')) c.open++;
      if (inView(a, 'held')) c.held++;
      if (a.state === 'unacked' || a.state === 'rtn-unacked') c.waiting++;
    }
    return c;
  }, [alarms]);
  const ackable = rows.filter((a) => a.state === 'unacked' || a.state === 'rtn-unacked');
  const selectedAckable = ackable.filter((a) => selected.has(a.id)).map((a) => a.id);

  const toggleSelected = (id: number) =>
    setSelected((s) => {
      const n = new Set(s);
      if (n.has(id)) n.delete(id);
      else n.add(id);
      return n;
    });
  const selectAll = (on: boolean) => setSelected(on ? new Set(ackable.map((a) => a.id)) : new Set());

  const done = (updated: AlarmView[], message: string) => {
    setAlarms((m) => updated.reduce((acc, a) => mergeAlarm(acc, a), m));
    setSelected((s) => {
      const n = new Set(s);
      updated.forEach((a) => n.delete(a.id));
      return n;
    });
    setForm(null);
    setNotice(message);
  };

  return (
    <div className="space-y-3" onPointerDown={unlockAudio}>
      <div className="flex flex-wrap items-center gap-x-4 gap-y-2">
        <div role="tablist" aria-label="Which alarms" className="flex flex-wrap gap-1">
          {QUEUE_VIEWS.map((v) => (
            <button
              key={v}
              role="tab"
              type="button"
              aria-selected={view === v}
              className={view === v ? 'btn' : 'btn-quiet'}
              onClick={() => {
                setView(v);
                setSelected(new Set());
              }}
            >
              {VIEW_LABELS[v]}
              <span className="num text-xs">({v === 'open' ? counts.open : v === 'held' ? counts.held : counts.recent})</span>
            </button>
          ))}
        </div>
        <fieldset className="flex flex-wrap items-center gap-3 text-sm">
          <legend className="sr-only">Priorities shown</legend>
          {(['high', 'medium', 'low'] as const).map((p) => (
            <label key={p} className="mb-0 flex items-center gap-1 font-normal text-ink">
              <input
                type="checkbox"
                className="w-auto"
                checked={priorities.has(p)}
                onChange={(e) =>
                  setPriorities((s) => {
                    const n = new Set(s);
                    if (e.target.checked) n.add(p);
                    else n.delete(p);
                    return n;
                  })
                }
              />
              <span aria-hidden="true" className={PRIORITY_CLASS[p].split(' ')[0]}>
                {PRIORITY_SHAPE[p]}
              </span>{' '}
              {p[0]!.toUpperCase() + p.slice(1)}
            </label>
          ))}
        </fieldset>
        <label className="mb-0 flex items-center gap-2 text-sm font-normal text-ink">
          Order
          <select className="w-auto py-1" value={sort} onChange={(e) => setSort(e.target.value as QueueSort)}>
            <option value="priority">Waiting first, then priority, newest</option>
            <option value="newest">Newest first</option>
          </select>
        </label>
        <div className="ml-auto flex flex-wrap items-center gap-3 text-sm">
          <span aria-live="polite" className="text-ink-soft">
            {loading
              ? 'Refreshing…'
              : live.lastMs
                ? `Live — last change ${formatAge(now - live.lastMs)} ago`
                : 'Live — waiting for changes'}
          </span>
          <button
            type="button"
            className="btn-quiet"
            aria-pressed={muted}
            onClick={toggleMute}
            title={
              soundBlocked && !muted
                ? 'The browser holds sound until you click or press a key on this page'
                : 'Sound for new high and medium alarms'
            }
          >
            <SpeakerIcon muted={muted} /> {muted ? 'Sound off' : soundBlocked ? 'Sound on — click to allow' : 'Sound on'}
          </button>
        </div>
      </div>
      {loadError && (
        <p className="caution" role="alert">
          Could not refresh the alarm list: {loadError}. Live changes still arrive; the list retries every minute.
        </p>
      )}
      {notice && (
        <p className="rounded border border-slate-line bg-white px-3 py-2 text-sm" role="status">
          {notice}{' '}
          <button type="button" className="underline" onClick={() => setNotice(null)}>
            Dismiss
          </button>
        </p>
      )}

      {mayAck && view !== 'held' && ackable.length > 0 && (
        <div className="flex flex-wrap items-center gap-3 text-sm">
          <label className="mb-0 flex items-center gap-2 font-normal text-ink">
            <input
              type="checkbox"
              className="w-auto"
              checked={selectedAckable.length > 0 && selectedAckable.length === ackable.length}
              onChange={(e) => selectAll(e.target.checked)}
            />
            Select all waiting ({ackable.length})
          </label>
          <button
            type="button"
            className="btn"
            disabled={selectedAckable.length === 0}
            onClick={() => setForm({ kind: 'ack', ids: selectedAckable })}
          >
            Acknowledge selected ({selectedAckable.length})
          </button>
        </div>
      )}
      {form?.kind === 'ack' && form.ids.length > 1 && (
        <ActionForm form={form} alarms={alarms} onCancel={() => setForm(null)} onDone={done} />
      )}

      {rows.length === 0 ? (
        <div className="empty" role="status">
          <p className="font-bold text-ink">
            {view === 'open'
              ? 'No alarms need attention.'
              : view === 'held'
                ? 'No alarms are shelved or out of service.'
                : 'No recent alarms.'}
          </p>
          {priorities.size < 3 && <p className="mt-1 text-sm">Some priorities are hidden by the filter above.</p>}
        </div>
      ) : (
        <div className="overflow-x-auto">
          <table aria-label={`Alarms: ${VIEW_LABELS[view]}`}>
            <thead>
              <tr>
                {mayAck && (
                  <th className="w-8">
                    <span className="sr-only">Select</span>
                  </th>
                )}
                <th>State</th>
                <th>Priority</th>
                <th>Source</th>
                <th>Alarm</th>
                <th>Raised</th>
                <th>Around the alarm</th>
                <th>
                  <span className="sr-only">Actions</span>
                </th>
              </tr>
            </thead>
            <tbody>
              {rows.map((a) => (
                <AlarmRow
                  key={a.id}
                  a={a}
                  now={now}
                  timeZone={timeZone}
                  focused={a.id === focusId}
                  selectable={mayAck}
                  selected={selected.has(a.id)}
                  onSelect={() => toggleSelected(a.id)}
                  mayAck={mayAck}
                  mayShelve={mayShelve}
                  mayService={mayService}
                  form={form && ('id' in form ? form.id === a.id : form.ids.length === 1 && form.ids[0] === a.id) ? form : null}
                  setForm={setForm}
                  alarms={alarms}
                  onDone={done}
                  expanded={expanded === a.id}
                  onExpand={() => setExpanded((e) => (e === a.id ? null : a.id))}
                  onUnshelve={async () => {
                    try {
                      const r = await apiFetch<AlarmView>(`/api/v1/alarms/${a.id}/unshelve`, { body: {} });
                      done([r], `Alarm ${a.id} unshelved.`);
                    } catch (e) {
                      setNotice(e instanceof Error ? e.message : String(e));
                    }
                  }}
                />
              ))}
            </tbody>
          </table>
        </div>
      )}
      <p className="text-xs text-ink-soft">
        Legend: <span aria-hidden="true">●</span> needs acknowledgement · <span aria-hidden="true">○</span> acknowledged, still
        active · <span aria-hidden="true">◌</span> cleared, not yet acknowledged · <span aria-hidden="true">‖</span> shelved ·{' '}
        <span aria-hidden="true">⊗</span> out of service. Priority: ▲ high, ◆ medium, ■ low. Times in {timeZone}.
      </p>
    </div>
  );
}

function SpeakerIcon({ muted }: { muted: boolean }) {
  return (
    <svg width="16" height="16" viewBox="0 0 16 16" aria-hidden="true" className="inline-block">
      <path d="M2 6h3l4-3v10l-4-3H2z" fill="currentColor" />
      {muted ? (
        <path d="M11 5.5l4 5M15 5.5l-4 5" stroke="currentColor" strokeWidth="1.6" />
      ) : (
        <path d="M11 5.5c1.2 1.4 1.2 3.6 0 5M13 4c2 2.3 2 5.7 0 8" stroke="currentColor" strokeWidth="1.4" fill="none" />
      )}
    </svg>
  );
}

interface RowProps {
  a: AlarmView;
  now: number;
  timeZone: string;
  focused: boolean;
  selectable: boolean;
  selected: boolean;
  onSelect(): void;
  mayAck: boolean;
  mayShelve: boolean;
  mayService: boolean;
  form: Form | null;
  setForm(f: Form | null): void;
  alarms: ReadonlyMap<number, AlarmView>;
  onDone(updated: AlarmView[], message: string): void;
  expanded: boolean;
  onExpand(): void;
  onUnshelve(): Promise<void>;
}

function AlarmRow(p: RowProps) {
  const { a } = p;
  const waiting = a.state === 'unacked' || a.state === 'rtn-unacked';
  const held = a.state === 'shelved' || a.state === 'out-of-service' || a.state === 'suppressed';
  const label =
    a.state === 'shelved' && a.shelvedUntilMs !== null
      ? `Shelved until ${formatSiteTime(a.shelvedUntilMs, p.timeZone)}`
      : STATE_LABELS[a.state];
  const cols = p.selectable ? 8 : 7;
  const chartHref = a.channelId !== null ? `/charts/channel/${a.channelId}?at=${a.lastActivatedAtMs}` : null;
  return (
    <>
      <tr
        id={`alarm-${a.id}`}
        tabIndex={-1}
        data-state={a.state}
        className={[
          waiting ? 'bg-white font-bold' : '',
          p.focused ? 'outline outline-2 outline-lacquer' : '',
          a.state === 'normal' ? 'text-ink-soft' : '',
        ].join(' ')}
      >
        {p.selectable && (
          <td className={waiting ? `border-l-4 ${PRIORITY_CLASS[a.priority].split(' ')[1]}` : 'border-l-4 border-l-transparent'}>
            {waiting && (
              <input
                type="checkbox"
                className="w-auto"
                checked={p.selected}
                onChange={p.onSelect}
                aria-label={`Select alarm ${a.id}: ${a.sourceLabel}`}
              />
            )}
          </td>
        )}
        <td className="whitespace-nowrap">
          <span
            aria-hidden="true"
            className={`mr-1 text-base ${waiting ? PRIORITY_CLASS[a.priority].split(' ')[0] : 'text-ink-soft'}`}
          >
            {STATE_ICON[a.state]}
          </span>
          <span className={waiting ? 'font-bold' : 'font-normal'}>{label}</span>
          {a.ackedBy && a.state === 'acked' && <div className="text-xs font-normal text-ink-soft">by {a.ackedBy}</div>}
        </td>
        <td className="whitespace-nowrap">
          <span className={`tag ${PRIORITY_CLASS[a.priority]}`}>
            <span aria-hidden="true">{PRIORITY_SHAPE[a.priority]}</span> {a.priority.toUpperCase()}
          </span>
        </td>
        <td>
          <div>{a.sourceLabel}</div>
          <div className="text-xs font-normal text-ink-soft">{SOURCE_KIND_LABELS[a.sourceKind]}</div>
        </td>
        <td>
          <div>{a.message}</div>
          {a.activationCount > 1 && (
            <div className="text-xs font-normal text-ink-soft">
              Activated {a.activationCount} times on this alarm{a.activationCount >= 3 ? ' — may be chattering' : ''}
            </div>
          )}
        </td>
        <td className="whitespace-nowrap font-normal">
          <div className="num text-xs">{formatSiteTime(a.lastActivatedAtMs, p.timeZone, { seconds: true })}</div>
          <div className="text-xs text-ink-soft">{formatAge(p.now - a.lastActivatedAtMs)} ago</div>
        </td>
        <td>
          {a.channelId !== null && chartHref ? (
            <a href={chartHref} className="block no-underline" title="Open the channel's chart at the alarm time">
              <Spark a={a} />
              <span className="text-xs underline">Chart at alarm time</span>
            </a>
          ) : (
            <span className="text-xs font-normal text-ink-soft">No channel</span>
          )}
        </td>
        <td className="whitespace-nowrap font-normal">
          <div className="flex flex-wrap justify-end gap-1">
            {p.mayAck && waiting && (
              <button type="button" className="btn" onClick={() => p.setForm({ kind: 'ack', ids: [a.id] })}>
                Acknowledge
              </button>
            )}
            {p.mayShelve && !held && a.state !== 'normal' && (
              <button type="button" className="btn-quiet" onClick={() => p.setForm({ kind: 'shelve', id: a.id })}>
                Shelve
              </button>
            )}
            {p.mayShelve && a.state === 'shelved' && (
              <button type="button" className="btn-quiet" onClick={() => void p.onUnshelve()}>
                Unshelve
              </button>
            )}
            {p.mayService && a.state !== 'out-of-service' && a.state !== 'normal' && (
              <button type="button" className="btn-quiet" onClick={() => p.setForm({ kind: 'oos', id: a.id })}>
                Out of service
              </button>
            )}
            {p.mayService && a.state === 'out-of-service' && (
              <button type="button" className="btn-quiet" onClick={() => p.setForm({ kind: 'rts', id: a.id })}>
                Return to service
              </button>
            )}
            <button type="button" className="btn-quiet" aria-expanded={p.expanded} onClick={p.onExpand}>
              History
            </button>
          </div>
        </td>
      </tr>
      {p.form && (
        <tr>
          <td colSpan={cols} className="bg-slate-panel">
            <ActionForm form={p.form} alarms={p.alarms} onCancel={() => p.setForm(null)} onDone={p.onDone} />
          </td>
        </tr>
      )}
      {p.expanded && (
        <tr>
          <td colSpan={cols} className="bg-paper">
            <History id={a.id} timeZone={p.timeZone} updatedAtMs={a.updatedAtMs} />
          </td>
        </tr>
      )}
    </>
  );
}

function History({ id, timeZone, updatedAtMs }: { id: number; timeZone: string; updatedAtMs: number }) {
  const [events, setEvents] = useState<AlarmEventView[] | null>(null);
  const [error, setError] = useState<string | null>(null);
  useEffect(() => {
    apiFetch<AlarmView & { events: AlarmEventView[] }>(`/api/v1/alarms/${id}`)
      .then((r) => setEvents(r.events))
      .catch((e: Error) => setError(e.message));
  }, [id, updatedAtMs]);
  if (error) return <p className="text-sm text-alert-high">Could not load the history: {error}</p>;
  if (!events) return <p className="text-sm text-ink-soft">Loading the history…</p>;
  return (
    <ol className="space-y-0.5 text-sm font-normal" aria-label={`History of alarm ${id}`}>
      {events.map((e) => (
        <li key={e.id}>
          <span className="num text-xs">{formatSiteTime(e.atMs, timeZone, { seconds: true })}</span> —{' '}
          {EVENT_LABELS[e.event] ?? e.event}
          {e.userName ? ` by ${e.userName}` : ''} → {STATE_LABELS[e.toState]}
          {e.comment ? <span className="text-ink-soft">: “{e.comment}”</span> : null}
        </li>
      ))}
    </ol>
  );
}

function ActionForm({
  form,
  alarms,
  onCancel,
  onDone,
}: {
  form: Form;
  alarms: ReadonlyMap<number, AlarmView>;
  onCancel(): void;
  onDone(updated: AlarmView[], message: string): void;
}) {
  const [text, setText] = useState('');
  const [minutes, setMinutes] = useState(60);
  const [busy, setBusy] = useState(false);
  const [errors, setErrors] = useState<Record<string, string>>({});
  const [error, setError] = useState<string | null>(null);
  const first = useRef<HTMLTextAreaElement>(null);
  useEffect(() => first.current?.focus(), []);

  const ids = form.kind === 'ack' ? form.ids : [form.id];
  const names = ids.map((id) => alarms.get(id)?.sourceLabel ?? `alarm ${id}`);
  const title =
    form.kind === 'ack'
      ? ids.length === 1
        ? `Acknowledge: ${names[0]}`
        : `Acknowledge ${ids.length} alarms`
      : form.kind === 'shelve'
        ? `Shelve: ${names[0]}`
        : form.kind === 'oos'
          ? `Take out of service: ${names[0]}`
          : `Return to service: ${names[0]}`;
  const textLabel = form.kind === 'ack' ? 'Comment (required): what did you see or do?' : 'Reason (required)';
  const textField = form.kind === 'ack' ? 'comment' : 'reason';

  async function submit(e: SubmitEvent<HTMLFormElement>) {
    e.preventDefault();
    setBusy(true);
    setErrors({});
    setError(null);
    try {
      if (form.kind === 'ack' && ids.length > 1) {
        const r = await apiFetch<{ acknowledged: AlarmView[]; refused: { id: number; reason: string }[] }>('/api/v1/alarms/ack', {
          body: { ids, comment: text },
        });
        const refused = r.refused.map((x) => `${alarms.get(x.id)?.sourceLabel ?? x.id}: ${x.reason}`).join('; ');
        onDone(r.acknowledged, `${r.acknowledged.length} acknowledged.${refused ? ` Not acknowledged — ${refused}.` : ''}`);
        return;
      }
      const id = ids[0]!;
      const [path, body, verb] =
        form.kind === 'ack'
          ? ['ack', { comment: text }, 'acknowledged']
          : form.kind === 'shelve'
            ? ['shelve', { minutes, reason: text }, `shelved for ${minutes} min`]
            : form.kind === 'oos'
              ? ['out-of-service', { reason: text }, 'taken out of service']
              : ['return-to-service', { reason: text }, 'returned to service'];
      const r = await apiFetch<AlarmView>(`/api/v1/alarms/${id}/${path}`, { body });
      onDone([r], `${names[0]} ${verb}.`);
    } catch (err) {
      if (err instanceof ApiError && err.errors.length > 0) {
        setErrors(Object.fromEntries(err.errors.map((x) => [x.path, x.message])));
      } else {
        setError(err instanceof Error ? err.message : String(err));
      }
    } finally {
      setBusy(false);
    }
  }

  return (
    <form onSubmit={submit} className="space-y-2 py-1" aria-label={title} noValidate>
      <p className="font-bold">{title}</p>
      {ids.length > 1 && <p className="text-sm text-ink-soft">{names.join(' · ')}</p>}
      {form.kind === 'shelve' && (
        <div className="max-w-xs">
          <label htmlFor="shelve-minutes">Shelve for (minutes, 1–{SHELVE_MINUTES_MAX})</label>
          <input
            id="shelve-minutes"
            type="number"
            min={1}
            max={SHELVE_MINUTES_MAX}
            step={1}
            value={minutes}
            onChange={(e) => setMinutes(Number(e.target.value))}
            aria-invalid={!!errors['minutes']}
            aria-describedby={errors['minutes'] ? 'shelve-minutes-err' : undefined}
          />
          {errors['minutes'] && (
            <p id="shelve-minutes-err" className="text-sm text-alert-high">
              {errors['minutes']}
            </p>
          )}
          <p className="text-xs text-ink-soft">The alarm comes back by itself when the shelf ends.</p>
        </div>
      )}
      <div className="max-w-2xl">
        <label htmlFor={`action-text-${ids.join('-')}`}>{textLabel}</label>
        <textarea
          id={`action-text-${ids.join('-')}`}
          ref={first}
          rows={2}
          required
          maxLength={500}
          value={text}
          onChange={(e) => setText(e.target.value)}
          aria-invalid={!!errors[textField]}
          aria-describedby={errors[textField] ? `action-text-err-${ids.join('-')}` : undefined}
        />
        {errors[textField] && (
          <p id={`action-text-err-${ids.join('-')}`} className="text-sm text-alert-high" role="alert">
            {errors[textField]}
          </p>
        )}
        {errors['ids'] && <p className="text-sm text-alert-high">{errors['ids']}</p>}
      </div>
      {error && (
        <p className="text-sm text-alert-high" role="alert">
          {error}
        </p>
      )}
      <div className="flex gap-2">
        <button type="submit" className="btn" disabled={busy}>
          {busy
            ? 'Saving…'
            : form.kind === 'ack'
              ? 'Acknowledge'
              : form.kind === 'shelve'
                ? 'Shelve'
                : form.kind === 'oos'
                  ? 'Take out of service'
                  : 'Return to service'}
        </button>
        <button type="button" className="btn-quiet" onClick={onCancel} disabled={busy}>
          Cancel
        </button>
      </div>
    </form>
  );
}
