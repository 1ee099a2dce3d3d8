/**
 * Alarm settings for engineers: per-channel limit alarms (absolute limits or offsets from the
 * process window's target, deadband, on/off delays, priority, "only while running", wording)
 * and stale-data seconds, and the escalation rules per priority with the on-shift engineer's
 * address. Channels without settings of their own fall back to the process window in force.
 * Every save is validated by the same schemas as the API and audited there.
 */
import { useMemo, useState, type SubmitEvent, type ReactElement } from 'react';
import { ApiError, apiFetch } from '../../lib/client/api.ts';
import { ALARM_PRIORITIES, PRIORITY_MEANINGS, type AlarmPriority, type EscalationRule } from '../../lib/shared/alarms.ts';
import {
  AlarmConfigInputSchema,
  EscalationSettingsSchema,
  type AlarmConfigInput,
  type ChannelAlarmConfigView,
  type CharacteristicAlarmConfigView,
  type EscalationSettings,
} from '../../lib/shared/alarm-views.ts';
import { csvField } from '../../lib/shared/csv-table.ts';
import { formatSiteTime } from '../../lib/shared/time.ts';

interface Props {
  channels: ChannelAlarmConfigView[];
  characteristics: CharacteristicAlarmConfigView[];
  escalation: EscalationSettings;
  timeZone: string;
  /** The window fallback's settings, for the explanation (from the worker's constants). */
  fallback: { deadbandPercent: number; onDelaySeconds: number; priority: AlarmPriority };
}

/** Channel kinds the process window covers (the worker's fallback). */
const WINDOW_KINDS: Record<string, string> = {
  viscosity: 'viscosity',
  'withdrawal-speed': 'withdrawal speed',
  'bath-temperature': 'bath temperature',
  'room-humidity': 'room humidity',
};

const NOTIFY_OPTIONS = [
  ['on-shift-engineer', 'On-shift engineer (address below)'],
  ['role-engineer', 'Every engineer'],
  ['role-operator', 'Every operator'],
  ['role-quality', 'Every quality user'],
  ['role-admin', 'Every administrator'],
  ['role-viewer', 'Every viewer (e.g. lab manager)'],
] as const;

type SortKey = 'asset' | 'channel' | 'source';

function describeLimits(c: ChannelAlarmConfigView): string {
  const cfg = c.config;
  if (!cfg || (cfg.high == null && cfg.low == null)) {
    return WINDOW_KINDS[c.channelKind] ? 'Process window in force' : '—';
  }
  const u = c.unit;
  if (c.channelKind === 'door') return cfg.high != null ? 'door open' : 'door closed';
  if (cfg.limitsMode === 'target-offset') {
    return `target ${cfg.low != null ? `${cfg.low >= 0 ? '+' : ''}${cfg.low}` : '…'} / ${cfg.high != null ? `+${cfg.high}` : '…'} ${u}`;
  }
  if (cfg.low != null && cfg.high != null) return `${cfg.low} – ${cfg.high} ${u}`;
  return cfg.high != null ? `above ${cfg.high} ${u}` : `below ${cfg.low} ${u}`;
}

function sourceOf(c: ChannelAlarmConfigView): string {
  if (c.config && !c.config.enabled) return 'Off';
  if (c.config && (c.config.high != null || c.config.low != null)) return 'Own settings';
  if (WINDOW_KINDS[c.channelKind]) return 'Window fallback';
  return c.config?.staleSeconds ? 'Stale only' : 'None';
}

/** One CSV cell: RFC 4180 quoting and formula neutralisation (names are engineer-controlled). */
function csvCell(s: string | number | null | undefined): string {
  return csvField(s);
}

export default function AlarmSettings({ channels: initial, characteristics, escalation: initialEsc, timeZone, fallback }: Props) {
  const [channels, setChannels] = useState(initial);
  const [filter, setFilter] = useState('');
  const [sort, setSort] = useState<{ key: SortKey; dir: 1 | -1 }>({ key: 'asset', dir: 1 });
  const [editing, setEditing] = useState<number | null>(null);
  const [notice, setNotice] = useState<string | null>(null);

  const rows = useMemo(() => {
    const f = filter.trim().toLowerCase();
    const list = channels.filter((c) => !f || `${c.assetName} ${c.channelName} ${c.channelKind}`.toLowerCase().includes(f));
    const key = (c: ChannelAlarmConfigView) =>
      sort.key === 'asset' ? `${c.assetName} ${c.channelName}` : sort.key === 'channel' ? c.channelName : sourceOf(c);
    return list.sort((a, b) => key(a).localeCompare(key(b)) * sort.dir);
  }, [channels, filter, sort]);

  const sortBy = (key: SortKey) => setSort((s) => ({ key, dir: s.key === key ? (s.dir === 1 ? -1 : 1) : 1 }));
  const ariaSort = (key: SortKey) => (sort.key === key ? (sort.dir === 1 ? 'ascending' : 'descending') : 'none');

  function exportCsv() {
    const head = [
      'asset',
      'channel',
      'kind',
      'unit',
      'source',
      'limits mode',
      'low',
      'high',
      'deadband',
      'on-delay s',
      'off-delay s',
      'priority',
      'only while running',
      'wording',
      'stale s',
      'stale priority',
      'note',
    ];
    const lines = [head.join(',')];
    for (const c of rows) {
      const g = c.config;
      lines.push(
        [
          c.assetName,
          c.channelName,
          c.channelKind,
          c.unit,
          sourceOf(c),
          g?.limitsMode,
          g?.low,
          g?.high,
          g?.deadband,
          g ? g.onDelayMs / 1000 : '',
          g ? g.offDelayMs / 1000 : '',
          g?.priority,
          g ? (g.onlyWhileRunning ? 'yes' : 'no') : '',
          g?.label,
          g?.staleSeconds,
          g?.stalePriority,
          g?.note,
        ]
          .map(csvCell)
          .join(','),
      );
    }
    const blob = new Blob([lines.join('\n') + '\n'], { type: 'text/csv;charset=utf-8' });
    const a = document.createElement('a');
    a.href = URL.createObjectURL(blob);
    a.download = 'alarm-settings.csv';
    a.click();
    URL.revokeObjectURL(a.href);
  }

  return (
    <div className="space-y-6">
      <section className="panel space-y-3" aria-labelledby="limits-h">
        <h2 id="limits-h">Limit and no-data alarms per channel</h2>
        <p className="text-sm text-ink-soft">
          A channel without limits of its own is judged against the process window in force for its line (viscosity, withdrawal
          speed, bath temperature, room humidity): high = window maximum, low = window minimum, deadband{' '}
          {fallback.deadbandPercent} % of the window’s width, on-delay {fallback.onDelaySeconds} s, priority {fallback.priority}.
          Ovens count as running while their setpoint is at or above 50 °C; other channels while they had data in the last hour.
        </p>
        {notice && (
          <p className="rounded border border-slate-line bg-paper px-3 py-2 text-sm" role="status">
            {notice}
          </p>
        )}
        <div className="flex flex-wrap items-end gap-3">
          <div className="w-64">
            <label htmlFor="cfg-filter">Filter channels</label>
            <input
              id="cfg-filter"
              type="search"
              value={filter}
              onChange={(e) => setFilter(e.target.value)}
              placeholder="e.g. viscosity, Oven B"
            />
          </div>
          <button type="button" className="btn-quiet" onClick={exportCsv}>
            Export CSV
          </button>
          <span className="text-sm text-ink-soft">{rows.length} channels</span>
        </div>
        <div className="overflow-x-auto">
          <table>
            <thead>
              <tr>
                <th aria-sort={ariaSort('asset')}>
                  <button type="button" className="font-bold" onClick={() => sortBy('asset')}>
                    Asset {sort.key === 'asset' ? (sort.dir === 1 ? '▲' : '▼') : ''}
                  </button>
                </th>
                <th aria-sort={ariaSort('channel')}>
                  <button type="button" className="font-bold" onClick={() => sortBy('channel')}>
                    Channel {sort.key === 'channel' ? (sort.dir === 1 ? '▲' : '▼') : ''}
                  </button>
                </th>
                <th aria-sort={ariaSort('source')}>
                  <button type="button" className="font-bold" onClick={() => sortBy('source')}>
                    Judged by {sort.key === 'source' ? (sort.dir === 1 ? '▲' : '▼') : ''}
                  </button>
                </th>
                <th>Limits</th>
                <th className="text-right">Deadband</th>
                <th className="text-right">On / off delay</th>
                <th>Priority</th>
                <th>No data after</th>
                <th>Changed</th>
                <th>
                  <span className="sr-only">Actions</span>
                </th>
              </tr>
            </thead>
            <tbody>
              {rows.map((c) => (
                <ChannelRow
                  key={c.channelId}
                  c={c}
                  timeZone={timeZone}
                  editing={editing === c.channelId}
                  onEdit={() => setEditing(editing === c.channelId ? null : c.channelId)}
                  onSaved={(updated, message) => {
                    setChannels((list) => list.map((x) => (x.channelId === updated.channelId ? updated : x)));
                    setEditing(null);
                    setNotice(message);
                  }}
                />
              ))}
            </tbody>
          </table>
        </div>
      </section>
      <CharacteristicSection initial={characteristics} timeZone={timeZone} />
      <EscalationForm initial={initialEsc} />
    </div>
  );
}

function CharacteristicSection({ initial, timeZone }: { initial: CharacteristicAlarmConfigView[]; timeZone: string }) {
  const [rows, setRows] = useState(initial);
  const [draft, setDraft] = useState<Record<number, { enabled: boolean; priority: AlarmPriority }>>(() =>
    Object.fromEntries(
      initial.map((c) => [c.characteristicId, { enabled: c.config?.enabled ?? true, priority: c.config?.priority ?? 'medium' }]),
    ),
  );
  const [busy, setBusy] = useState<number | null>(null);
  const [status, setStatus] = useState<string | null>(null);

  async function save(c: CharacteristicAlarmConfigView) {
    const d = draft[c.characteristicId]!;
    setBusy(c.characteristicId);
    setStatus(null);
    try {
      const saved = await apiFetch<{ enabled: boolean; priority: AlarmPriority; note?: string | null }>(
        `/api/v1/alarm-configs/characteristics/${c.characteristicId}`,
        { method: 'PUT', body: { enabled: d.enabled, priority: d.priority } },
      );
      setRows((list) =>
        list.map((x) =>
          x.characteristicId === c.characteristicId
            ? { ...x, config: { ...saved, updatedAtMs: Date.now(), updatedBy: 'you' } }
            : x,
        ),
      );
      setStatus(`Saved: control-chart alarms of ${c.name} ${d.enabled ? `on, ${d.priority} priority` : 'off'}.`);
    } catch (err) {
      setStatus(err instanceof Error ? err.message : String(err));
    } finally {
      setBusy(null);
    }
  }

  return (
    <section className="panel space-y-3" aria-labelledby="spc-h">
      <h2 id="spc-h">Control-chart alarms per characteristic</h2>
      <p className="text-sm text-ink-soft">
        A point that breaks a run rule of its characteristic’s control chart raises an alarm. Characteristics without settings
        here raise at medium priority.
      </p>
      {status && (
        <p className="text-sm" role="status">
          {status}
        </p>
      )}
      {rows.length === 0 ? (
        <p className="empty">No characteristics are defined yet. Engineers add them on the control-chart screens.</p>
      ) : (
        <table>
          <thead>
            <tr>
              <th>Characteristic</th>
              <th>Asset</th>
              <th>Alarms</th>
              <th>Priority</th>
              <th>Changed</th>
              <th>
                <span className="sr-only">Save</span>
              </th>
            </tr>
          </thead>
          <tbody>
            {rows.map((c) => {
              const d = draft[c.characteristicId]!;
              const set = (patch: Partial<typeof d>) => setDraft((x) => ({ ...x, [c.characteristicId]: { ...d, ...patch } }));
              return (
                <tr key={c.characteristicId}>
                  <td>
                    {c.name}
                    {!c.active && <span className="ml-1 text-xs text-ink-soft">(chart inactive)</span>}
                  </td>
                  <td>{c.assetName}</td>
                  <td>
                    <label className="mb-0 flex items-center gap-2 font-normal text-ink">
                      <input
                        type="checkbox"
                        className="w-auto"
                        checked={d.enabled}
                        onChange={(e) => set({ enabled: e.target.checked })}
                      />{' '}
                      {d.enabled ? 'On' : 'Off'}
                    </label>
                  </td>
                  <td>
                    <label className="sr-only" htmlFor={`spc-pri-${c.characteristicId}`}>
                      Priority for {c.name}
                    </label>
                    <select
                      id={`spc-pri-${c.characteristicId}`}
                      className="w-auto py-1"
                      value={d.priority}
                      disabled={!d.enabled}
                      onChange={(e) => set({ priority: e.target.value as AlarmPriority })}
                    >
                      {ALARM_PRIORITIES.map((p) => (
                        <option key={p} value={p}>
                          {p}
                        </option>
                      ))}
                    </select>
                  </td>
                  <td className="text-xs text-ink-soft">
                    {c.config
                      ? `${formatSiteTime(c.config.updatedAtMs, timeZone)}${c.config.updatedBy ? ` by ${c.config.updatedBy}` : ''}`
                      : 'defaults'}
                  </td>
                  <td>
                    <button
                      type="button"
                      className="btn-quiet"
                      disabled={busy === c.characteristicId}
                      onClick={() => void save(c)}
                    >
                      {busy === c.characteristicId ? 'Saving…' : 'Save'}
                    </button>
                  </td>
                </tr>
              );
            })}
          </tbody>
        </table>
      )}
    </section>
  );
}

function ChannelRow({
  c,
  timeZone,
  editing,
  onEdit,
  onSaved,
}: {
  c: ChannelAlarmConfigView;
  timeZone: string;
  editing: boolean;
  onEdit(): void;
  onSaved(c: ChannelAlarmConfigView, message: string): void;
}) {
  const g = c.config;
  return (
    <>
      <tr>
        <td>{c.assetName}</td>
        <td>
          {c.channelName} <span className="text-xs text-ink-soft">({c.unit})</span>
        </td>
        <td>{sourceOf(c)}</td>
        <td className="num">
          {describeLimits(c)}
          {g?.label && <div className="font-sans text-xs text-ink-soft">“{g.label}”</div>}
          {g?.onlyWhileRunning && <div className="font-sans text-xs text-ink-soft">only while running</div>}
        </td>
        <td className="num text-right">
          {g && (g.high != null || g.low != null) && c.channelKind !== 'door' ? `${g.deadband} ${c.unit}` : '—'}
        </td>
        <td className="num text-right">
          {g && (g.high != null || g.low != null) ? `${g.onDelayMs / 1000} s / ${g.offDelayMs / 1000} s` : '—'}
        </td>
        <td>{g && (g.high != null || g.low != null) ? g.priority : '—'}</td>
        <td className="num">{g?.staleSeconds ? `${g.staleSeconds} s (${g.stalePriority})` : '—'}</td>
        <td className="text-xs text-ink-soft">
          {g ? (
            <>
              {formatSiteTime(g.updatedAtMs, timeZone)}
              {g.updatedBy ? ` by ${g.updatedBy}` : ' (seed)'}
              {g.note && <div title={g.note}>{g.note}</div>}
            </>
          ) : (
            '—'
          )}
        </td>
        <td>
          <button type="button" className="btn-quiet" aria-expanded={editing} onClick={onEdit}>
            {editing ? 'Close' : 'Edit'}
          </button>
        </td>
      </tr>
      {editing && (
        <tr>
          <td colSpan={10} className="bg-slate-panel">
            <ConfigForm c={c} onSaved={onSaved} onCancel={onEdit} />
          </td>
        </tr>
      )}
    </>
  );
}

const numOrNull = (s: string): number | null => (s.trim() === '' ? null : Number(s));

function ConfigForm({
  c,
  onSaved,
  onCancel,
}: {
  c: ChannelAlarmConfigView;
  onSaved(c: ChannelAlarmConfigView, m: string): void;
  onCancel(): void;
}) {
  const g = c.config;
  const [v, setV] = useState({
    enabled: g?.enabled ?? true,
    limitsMode: g?.limitsMode ?? 'absolute',
    low: g?.low != null ? String(g.low) : '',
    high: g?.high != null ? String(g.high) : '',
    deadband: String(g?.deadband ?? 0),
    onDelayS: String((g?.onDelayMs ?? 0) / 1000),
    offDelayS: String((g?.offDelayMs ?? 0) / 1000),
    priority: g?.priority ?? 'medium',
    onlyWhileRunning: g?.onlyWhileRunning ?? false,
    label: g?.label ?? '',
    staleSeconds: g?.staleSeconds != null ? String(g.staleSeconds) : '',
    stalePriority: g?.stalePriority ?? 'high',
    note: g?.note ?? '',
  });
  const [errors, setErrors] = useState<Record<string, string>>({});
  const [error, setError] = useState<string | null>(null);
  const [busy, setBusy] = useState(false);
  const id = (f: string) => `cfg-${c.channelId}-${f}`;
  const set = (k: keyof typeof v) => (e: { target: { value: string; checked?: boolean; type?: string } }) =>
    setV((s) => ({ ...s, [k]: e.target.type === 'checkbox' ? !!e.target.checked : e.target.value }));

  async function save(e: SubmitEvent<HTMLFormElement>) {
    e.preventDefault();
    setErrors({});
    setError(null);
    const body: AlarmConfigInput = {
      enabled: v.enabled,
      limitsMode: v.limitsMode,
      high: numOrNull(v.high),
      low: numOrNull(v.low),
      deadband: Number(v.deadband),
      onDelayMs: Math.round(Number(v.onDelayS) * 1000),
      offDelayMs: Math.round(Number(v.offDelayS) * 1000),
      priority: v.priority,
      onlyWhileRunning: v.onlyWhileRunning,
      label: v.label.trim() || null,
      staleSeconds: v.staleSeconds.trim() === '' ? null : Number(v.staleSeconds),
      stalePriority: v.stalePriority,
      note: v.note.trim() || null,
    };
    const local = AlarmConfigInputSchema.safeParse(body);
    if (!local.success) {
      setErrors(Object.fromEntries(local.error.issues.map((i) => [i.path.join('.') || 'form', i.message])));
      return;
    }
    setBusy(true);
    try {
      const saved = await apiFetch<NonNullable<ChannelAlarmConfigView['config']> & { channelId: number }>(
        `/api/v1/alarm-configs/${c.channelId}`,
        {
          method: 'PUT',
          body: local.data,
        },
      );
      onSaved(
        { ...c, config: saved },
        `Saved the alarm settings of ${c.channelName}. The ingest worker applies them within a few seconds.`,
      );
    } catch (err) {
      if (err instanceof ApiError && err.errors.length) setErrors(Object.fromEntries(err.errors.map((x) => [x.path, x.message])));
      else setError(err instanceof Error ? err.message : String(err));
    } finally {
      setBusy(false);
    }
  }

  async function remove() {
    setBusy(true);
    setError(null);
    try {
      await apiFetch<null>(`/api/v1/alarm-configs/${c.channelId}`, { method: 'DELETE' });
      onSaved(
        { ...c, config: null },
        `Removed the own settings of ${c.channelName}; ${WINDOW_KINDS[c.channelKind] ? 'the process window applies' : 'it raises no alarms now'}.`,
      );
    } catch (err) {
      setError(err instanceof Error ? err.message : String(err));
    } finally {
      setBusy(false);
    }
  }

  const field = (name: string, label: string, input: ReactElement, hint?: string) => (
    <div>
      <label htmlFor={id(name)}>{label}</label>
      {input}
      {hint && <p className="text-xs text-ink-soft">{hint}</p>}
      {errors[name] && (
        <p className="text-sm text-alert-high" role="alert">
          {errors[name]}
        </p>
      )}
    </div>
  );

  return (
    <form onSubmit={save} className="space-y-3 py-2" aria-label={`Alarm settings of ${c.channelName}`} noValidate>
      <p className="font-bold">
        {c.assetName} — {c.channelName} ({c.unit})
      </p>
      <label className="flex items-center gap-2 font-normal text-ink">
        <input type="checkbox" className="w-auto" checked={v.enabled} onChange={set('enabled')} /> Alarms on for this channel
      </label>
      <fieldset className="grid gap-3 md:grid-cols-4">
        <legend className="mb-1 text-sm font-bold">Limit alarm (leave both limits empty to use the process window)</legend>
        {field(
          'limitsMode',
          'Limits are',
          <select id={id('limitsMode')} value={v.limitsMode} onChange={set('limitsMode')}>
            <option value="absolute">Values in {c.unit}</option>
            <option value="target-offset">Offsets from the window’s target</option>
          </select>,
        )}
        {field('low', `Low (${c.unit})`, <input id={id('low')} inputMode="decimal" value={v.low} onChange={set('low')} />)}
        {field('high', `High (${c.unit})`, <input id={id('high')} inputMode="decimal" value={v.high} onChange={set('high')} />)}
        {field(
          'deadband',
          `Deadband (${c.unit})`,
          <input id={id('deadband')} inputMode="decimal" value={v.deadband} onChange={set('deadband')} />,
          'Clears only once back inside by more than this.',
        )}
        {field(
          'onDelayMs',
          'On-delay (s)',
          <input id={id('onDelayMs')} inputMode="decimal" value={v.onDelayS} onChange={set('onDelayS')} />,
          'Must stay beyond the limit this long.',
        )}
        {field(
          'offDelayMs',
          'Off-delay (s)',
          <input id={id('offDelayMs')} inputMode="decimal" value={v.offDelayS} onChange={set('offDelayS')} />,
        )}
        {field(
          'priority',
          'Priority',
          <select id={id('priority')} value={v.priority} onChange={set('priority')}>
            {ALARM_PRIORITIES.map((p) => (
              <option key={p} value={p}>
                {p} — {PRIORITY_MEANINGS[p]}
              </option>
            ))}
          </select>,
        )}
        {field(
          'label',
          'Wording (optional)',
          <input
            id={id('label')}
            value={v.label}
            maxLength={120}
            onChange={set('label')}
            placeholder="e.g. Oven door open during cure"
          />,
        )}
        <label className="flex items-center gap-2 font-normal text-ink md:col-span-4">
          <input type="checkbox" className="w-auto" checked={v.onlyWhileRunning} onChange={set('onlyWhileRunning')} /> Only while
          the asset runs (ovens: setpoint ≥ 50 °C)
        </label>
      </fieldset>
      <fieldset className="grid gap-3 md:grid-cols-4">
        <legend className="mb-1 text-sm font-bold">No-data alarm</legend>
        {field(
          'staleSeconds',
          'No reading for (s, empty = off)',
          <input id={id('staleSeconds')} inputMode="numeric" value={v.staleSeconds} onChange={set('staleSeconds')} />,
        )}
        {field(
          'stalePriority',
          'Priority',
          <select id={id('stalePriority')} value={v.stalePriority} onChange={set('stalePriority')}>
            {ALARM_PRIORITIES.map((p) => (
              <option key={p} value={p}>
                {p}
              </option>
            ))}
          </select>,
        )}
        <div className="md:col-span-2">
          {field(
            'note',
            'Where these values come from',
            <input
              id={id('note')}
              value={v.note}
              maxLength={500}
              onChange={set('note')}
              placeholder="e.g. lacquer data sheet rev. C"
            />,
          )}
        </div>
      </fieldset>
      {errors['form'] && <p className="text-sm text-alert-high">{errors['form']}</p>}
      {error && (
        <p className="text-sm text-alert-high" role="alert">
          {error}
        </p>
      )}
      <div className="flex flex-wrap gap-2">
        <button type="submit" className="btn" disabled={busy}>
          {busy ? 'Saving…' : 'Save'}
        </button>
        <button type="button" className="btn-quiet" onClick={onCancel} disabled={busy}>
          Cancel
        </button>
        {c.config && (
          <button type="button" className="btn-quiet" onClick={() => void remove()} disabled={busy}>
            Remove own settings
          </button>
        )}
      </div>
    </form>
  );
}

function EscalationForm({ initial }: { initial: EscalationSettings }) {
  const byPriority = (rules: EscalationRule[]) =>
    Object.fromEntries(
      ALARM_PRIORITIES.map((p) => [
        p,
        (rules.find((r) => r.priority === p)?.steps ?? []).map((s) => ({
          afterMinutes: String(s.afterMinutes),
          notify: s.notify,
        })),
      ]),
    ) as Record<AlarmPriority, { afterMinutes: string; notify: string }[]>;
  const [steps, setSteps] = useState(() => byPriority(initial.rules));
  const [email, setEmail] = useState(initial.onShiftEngineerEmail);
  const [errors, setErrors] = useState<Record<string, string>>({});
  const [status, setStatus] = useState<string | null>(null);
  const [busy, setBusy] = useState(false);

  const update = (p: AlarmPriority, i: number, patch: Partial<{ afterMinutes: string; notify: string }>) =>
    setSteps((s) => ({ ...s, [p]: s[p].map((x, j) => (j === i ? { ...x, ...patch } : x)) }));

  async function save(e: SubmitEvent<HTMLFormElement>) {
    e.preventDefault();
    setErrors({});
    setStatus(null);
    const rules = ALARM_PRIORITIES.filter((p) => steps[p].length > 0).map((p) => ({
      priority: p,
      steps: steps[p].map((s) => ({ afterMinutes: Number(s.afterMinutes), notify: s.notify })),
    }));
    const body = { rules, onShiftEngineerEmail: email.trim() };
    const local = EscalationSettingsSchema.safeParse(body);
    if (!local.success) {
      setErrors(Object.fromEntries(local.error.issues.map((i) => [i.path.join('.'), i.message])));
      return;
    }
    setBusy(true);
    try {
      const saved = await apiFetch<EscalationSettings>('/api/v1/alarm-configs/escalation', { method: 'PUT', body: local.data });
      setSteps(byPriority(saved.rules));
      setStatus('Escalation saved. It applies to alarms still waiting for acknowledgement.');
    } catch (err) {
      if (err instanceof ApiError && err.errors.length) setErrors(Object.fromEntries(err.errors.map((x) => [x.path, x.message])));
      else setStatus(err instanceof Error ? err.message : String(err));
    } finally {
      setBusy(false);
    }
  }

  return (
    <section className="panel space-y-3" aria-labelledby="esc-h">
      <h2 id="esc-h">Escalation of unacknowledged alarms</h2>
      <p className="text-sm text-ink-soft">
        When an alarm still waits for acknowledgement this many minutes after it was raised, an e-mail goes to the chosen people
        with a link to the alarm. Each step is sent once per alarm. Steps count from the alarm’s latest activation, in whole
        minutes, in increasing order.
      </p>
      <form onSubmit={save} className="space-y-4" noValidate aria-label="Escalation rules">
        <div className="max-w-md">
          <label htmlFor="esc-email">On-shift engineer’s e-mail</label>
          <input
            id="esc-email"
            type="email"
            value={email}
            onChange={(e) => setEmail(e.target.value)}
            aria-invalid={!!errors['onShiftEngineerEmail']}
          />
          {errors['onShiftEngineerEmail'] && <p className="text-sm text-alert-high">{errors['onShiftEngineerEmail']}</p>}
        </div>
        {ALARM_PRIORITIES.map((p) => {
          const ruleIndex = ALARM_PRIORITIES.filter((q) => steps[q].length > 0).indexOf(p);
          return (
            <fieldset key={p} className="rounded border border-slate-line p-3">
              <legend className="px-1 text-sm font-bold">
                {p[0]!.toUpperCase() + p.slice(1)} priority — {PRIORITY_MEANINGS[p]}
              </legend>
              {steps[p].length === 0 && <p className="text-sm text-ink-soft">Never escalates.</p>}
              <ol className="space-y-2">
                {steps[p].map((s, i) => {
                  const path = `rules.${ruleIndex}.steps.${i}`;
                  return (
                    <li key={i} className="flex flex-wrap items-end gap-3">
                      <div className="w-40">
                        <label htmlFor={`esc-${p}-${i}-min`}>After (minutes)</label>
                        <input
                          id={`esc-${p}-${i}-min`}
                          inputMode="numeric"
                          value={s.afterMinutes}
                          onChange={(e) => update(p, i, { afterMinutes: e.target.value })}
                        />
                      </div>
                      <div className="w-72">
                        <label htmlFor={`esc-${p}-${i}-to`}>E-mail</label>
                        <select
                          id={`esc-${p}-${i}-to`}
                          value={s.notify}
                          onChange={(e) => update(p, i, { notify: e.target.value })}
                        >
                          {NOTIFY_OPTIONS.map(([k, l]) => (
                            <option key={k} value={k}>
                              {l}
                            </option>
                          ))}
                        </select>
                      </div>
                      <button
                        type="button"
                        className="btn-quiet"
                        onClick={() => setSteps((x) => ({ ...x, [p]: x[p].filter((_, j) => j !== i) }))}
                      >
                        Remove step
                      </button>
                      {(errors[`${path}.afterMinutes`] || errors[path]) && (
                        <p className="w-full text-sm text-alert-high" role="alert">
                          {errors[`${path}.afterMinutes`] ?? errors[path]}
                        </p>
                      )}
                    </li>
                  );
                })}
              </ol>
              {errors[`rules.${ruleIndex}.steps`] && (
                <p className="text-sm text-alert-high">{errors[`rules.${ruleIndex}.steps`]}</p>
              )}
              <button
                type="button"
                className="btn-quiet mt-2"
                disabled={steps[p].length >= 10}
                onClick={() =>
                  setSteps((x) => ({
                    ...x,
                    [p]: [
                      ...x[p],
                      {
                        afterMinutes: String((Number(x[p][x[p].length - 1]?.afterMinutes) || 0) + 10),
                        notify: 'on-shift-engineer',
                      },
                    ],
                  }))
                }
              >
                Add step
              </button>
            </fieldset>
          );
        })}
        {status && (
          <p className="text-sm" role="status">
            {status}
          </p>
        )}
        <button type="submit" className="btn" disabled={busy}>
          {busy ? 'Saving…' : 'Save escalation'}
        </button>
      </form>
    </section>
  );
}
