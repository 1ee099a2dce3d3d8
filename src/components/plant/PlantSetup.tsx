/**
 * Plant set-up: the asset tree, the MQTT devices (admins create them, rotate their passwords,
 * disable them), every channel with the topic its device publishes on (engineers add
 * channels and approve topics a device sent that no channel matched), and the `mqtt` CLI line
 * that publishes one sample for the selected device.
 */
import { useEffect, useMemo, useState, type SubmitEvent } from 'react';
import { apiFetch, subscribeLive } from '../../lib/client/api.ts';
import {
  CHANNEL_KINDS,
  KIND_UNITS,
  ApproveUnknownChannelSchema,
  CreateChannelSchema,
  CreateDeviceSchema,
  mqttExample,
  type AssetView,
  type ChannelKind,
  type ChannelView,
  type DeviceCredentials,
  type DeviceView,
  type UnknownChannelView,
} from '../../lib/shared/plant.ts';
import { formatSiteTime } from '../../lib/shared/site-time.ts';
import { downloadCsv, NoticeLine, problemText, SortTh, sortRows, useSort, type Notice } from '../admin/table.tsx';

interface Props {
  assets: AssetView[];
  devices: DeviceView[];
  channels: ChannelView[];
  unknown: UnknownChannelView[];
  canConfigure: boolean;
  canManageDevices: boolean;
  mqtt: { host: string; port: number };
  timeZone: string;
}

type DevKey = 'name' | 'username' | 'online' | 'lastSeenAt' | 'channels';
type ChKey = 'name' | 'assetCode' | 'kind' | 'unit' | 'min' | 'topic';

function DeviceState({ d }: { d: DeviceView }) {
  if (!d.enabled) return <span className="tag border-ink-faint text-ink-soft">✕ Disabled</span>;
  return d.online ? (
    <span className="tag border-slate-line">● Online</span>
  ) : (
    <span className="tag border-alert-low text-alert-low">○ Offline</span>
  );
}

function CopyButton({ text, label = 'Copy' }: { text: string; label?: string }) {
  const [done, setDone] = useState(false);
  return (
    <button
      type="button"
      className="btn-quiet px-2 py-1 text-sm"
      onClick={() =>
        void navigator.clipboard?.writeText(text).then(() => {
          setDone(true);
          setTimeout(() => setDone(false), 1500);
        })
      }
    >
      {done ? 'Copied ✓' : label}
    </button>
  );
}

function fieldErrorsOf(err: unknown): Record<string, string> {
  const fe = (err as { errors?: { path: string; message: string }[] }).errors ?? [];
  return Object.fromEntries(fe.map((f) => [f.path, f.message]));
}

const emptyChannel = {
  assetId: '',
  deviceId: '',
  name: '',
  kind: 'viscosity' as ChannelKind,
  unit: KIND_UNITS.viscosity,
  min: '',
  max: '',
  key: '',
};
const emptyApprove = { name: '', kind: 'other' as ChannelKind, unit: '', min: '', max: '' };

export default function PlantSetup(props: Props) {
  const { assets, canConfigure, canManageDevices, mqtt, timeZone } = props;
  const [devices, setDevices] = useState(props.devices);
  const [channels, setChannels] = useState(props.channels);
  const [unknown, setUnknown] = useState(props.unknown);
  const [notice, setNotice] = useState<Notice>(null);
  const [busy, setBusy] = useState<string | null>(null);
  const [selectedDevice, setSelectedDevice] = useState<number | null>(props.devices[0]?.id ?? null);
  const [assetFilter, setAssetFilter] = useState<number | null>(null);
  const [text, setText] = useState('');
  const [credentials, setCredentials] = useState<(DeviceCredentials & { what: string }) | null>(null);
  const [newDeviceName, setNewDeviceName] = useState('');
  const [deviceError, setDeviceError] = useState<string | null>(null);
  const [chForm, setChForm] = useState(emptyChannel);
  const [chErrors, setChErrors] = useState<Record<string, string>>({});
  const [approving, setApproving] = useState<number | null>(null);
  const [apForm, setApForm] = useState(emptyApprove);
  const [apErrors, setApErrors] = useState<Record<string, string>>({});
  const devSort = useSort<DevKey>({ key: 'username', dir: 1 });
  const chSort = useSort<ChKey>({ key: 'topic', dir: 1 });

  // Live online/offline from the broker (SSE kind "devices").
  useEffect(
    () =>
      subscribeLive(['devices'], (_k, p: { deviceId: number; online: boolean }) =>
        setDevices((all) =>
          all.map((d) => (d.id === p.deviceId ? { ...d, online: p.online, lastSeenAt: new Date().toISOString() } : d)),
        ),
      ),
    [],
  );

  const assetById = useMemo(() => new Map(assets.map((a) => [a.id, a])), [assets]);
  const children = useMemo(() => {
    const m = new Map<number | null, AssetView[]>();
    for (const a of assets) m.set(a.parentId, [...(m.get(a.parentId) ?? []), a]);
    return m;
  }, [assets]);
  const subtree = useMemo(() => {
    if (assetFilter == null) return null;
    const out = new Set<number>();
    const walk = (id: number) => {
      out.add(id);
      for (const c of children.get(id) ?? []) walk(c.id);
    };
    walk(assetFilter);
    return out;
  }, [assetFilter, children]);

  const shownChannels = useMemo(() => {
    const f = text.trim().toLowerCase();
    const rows = channels.filter(
      (c) =>
        (!subtree || subtree.has(c.assetId)) &&
        (!f || [c.name, c.topic, c.kind, c.unit, c.assetName].some((s) => s.toLowerCase().includes(f))),
    );
    return sortRows(rows, (c) => c[chSort.sort.key], chSort.sort.dir);
  }, [channels, subtree, text, chSort.sort]);
  const shownDevices = useMemo(
    () =>
      sortRows(
        devices,
        (d) => (devSort.sort.key === 'online' ? (d.enabled ? (d.online ? 2 : 1) : 0) : d[devSort.sort.key]),
        devSort.sort.dir,
      ),
    [devices, devSort.sort],
  );

  const device = devices.find((d) => d.id === selectedDevice) ?? null;
  const exampleTopic = device
    ? (channels.find((c) => c.deviceId === device.id)?.topic ?? `${device.topicPrefix}/<asset code>/<channel code>`)
    : '';
  const example = device
    ? mqttExample({
        host: mqtt.host,
        port: mqtt.port,
        username: device.username,
        topic: exampleTopic,
        ...(credentials?.id === device.id ? { password: credentials.password } : {}),
      })
    : '';

  async function refreshDevices() {
    setDevices(await apiFetch<DeviceView[]>('/api/v1/devices'));
  }

  async function createDevice(e: SubmitEvent<HTMLFormElement>) {
    e.preventDefault();
    const parsed = CreateDeviceSchema.safeParse({ name: newDeviceName });
    if (!parsed.success) return setDeviceError(parsed.error.issues[0]?.message ?? 'Name the device.');
    setDeviceError(null);
    setBusy('device');
    try {
      const c = await apiFetch<DeviceCredentials>('/api/v1/devices', { body: parsed.data });
      setCredentials({ ...c, what: `Device “${parsed.data.name}” created.` });
      setNewDeviceName('');
      await refreshDevices();
      setSelectedDevice(c.id);
    } catch (err) {
      setNotice({ kind: 'error', text: problemText(err) });
    } finally {
      setBusy(null);
    }
  }

  async function rotate(d: DeviceView) {
    if (
      !window.confirm(
        `Give ${d.username} a new password? The device must be reconfigured; the old password stops working at its next connection.`,
      )
    )
      return;
    setBusy(`d${d.id}`);
    try {
      const c = await apiFetch<DeviceCredentials>(`/api/v1/devices/${d.id}/rotate-password`, { method: 'POST', body: {} });
      setCredentials({ ...c, what: `New password for ${d.username}.` });
      setSelectedDevice(d.id);
    } catch (err) {
      setNotice({ kind: 'error', text: problemText(err) });
    } finally {
      setBusy(null);
    }
  }

  async function setEnabled(d: DeviceView, enabled: boolean) {
    if (
      !enabled &&
      !window.confirm(`Disable ${d.username}? The broker refuses its next connection; its channels and history stay.`)
    )
      return;
    setBusy(`d${d.id}`);
    try {
      const v = await apiFetch<DeviceView>(`/api/v1/devices/${d.id}`, { method: 'PATCH', body: { enabled } });
      setDevices((all) => all.map((x) => (x.id === v.id ? v : x)));
      setNotice({ kind: 'ok', text: `${d.username} is ${enabled ? 'enabled' : 'disabled'}.` });
    } catch (err) {
      setNotice({ kind: 'error', text: problemText(err) });
    } finally {
      setBusy(null);
    }
  }

  async function createChannel(e: SubmitEvent<HTMLFormElement>) {
    e.preventDefault();
    const body = {
      assetId: Number(chForm.assetId) || undefined,
      deviceId: Number(chForm.deviceId) || undefined,
      name: chForm.name,
      kind: chForm.kind,
      unit: chForm.unit,
      min: chForm.min === '' ? undefined : Number(chForm.min),
      max: chForm.max === '' ? undefined : Number(chForm.max),
      ...(chForm.key.trim() ? { key: chForm.key.trim() } : {}),
    };
    const parsed = CreateChannelSchema.safeParse(body);
    if (!parsed.success)
      return setChErrors(Object.fromEntries(parsed.error.issues.map((i) => [String(i.path[0] ?? ''), i.message])));
    setChErrors({});
    setBusy('channel');
    try {
      const c = await apiFetch<ChannelView>('/api/v1/channels', { body: parsed.data });
      setChannels((all) => [...all, c]);
      setChForm({ ...emptyChannel, assetId: chForm.assetId, deviceId: chForm.deviceId });
      setNotice({ kind: 'ok', text: `Channel “${c.name}” added; its device publishes on ${c.topic}.` });
      void refreshDevices();
    } catch (err) {
      setChErrors(fieldErrorsOf(err));
      setNotice({ kind: 'error', text: problemText(err) });
    } finally {
      setBusy(null);
    }
  }

  async function approve(e: SubmitEvent<HTMLFormElement>, u: UnknownChannelView) {
    e.preventDefault();
    const parsed = ApproveUnknownChannelSchema.safeParse({
      ...apForm,
      min: apForm.min === '' ? undefined : Number(apForm.min),
      max: apForm.max === '' ? undefined : Number(apForm.max),
    });
    if (!parsed.success)
      return setApErrors(Object.fromEntries(parsed.error.issues.map((i) => [String(i.path[0] ?? ''), i.message])));
    setApErrors({});
    setBusy(`u${u.id}`);
    try {
      const c = await apiFetch<ChannelView>(`/api/v1/ingest/unknown-channels/${u.id}/approve`, { body: parsed.data });
      setChannels((all) => [...all, c]);
      setUnknown((all) => all.filter((x) => x.id !== u.id));
      setApproving(null);
      setNotice({ kind: 'ok', text: `Approved: ${u.topic} is now the channel “${c.name}”. New messages on it are stored.` });
    } catch (err) {
      setApErrors(fieldErrorsOf(err));
      setNotice({ kind: 'error', text: problemText(err) });
    } finally {
      setBusy(null);
    }
  }

  const err = (errors: Record<string, string>, k: string) =>
    errors[k] ? (
      <p className="mt-1 text-sm text-alert-high" id={`e-${k}`}>
        ✕ {errors[k]}
      </p>
    ) : null;

  const renderTree = (parent: number | null, depth: number): React.ReactNode =>
    (children.get(parent) ?? []).map((a) => (
      <li key={a.id}>
        <button
          type="button"
          onClick={() => setAssetFilter(assetFilter === a.id ? null : a.id)}
          aria-pressed={assetFilter === a.id}
          className={`flex w-full items-baseline gap-2 rounded px-1.5 py-0.5 text-left text-sm hover:bg-slate-panel ${assetFilter === a.id ? 'bg-lacquer-light font-bold' : ''}`}
          style={{ paddingLeft: `${0.4 + depth * 0.9}rem` }}
        >
          <span>{a.name}</span>
          <span className="font-mono text-xs text-ink-faint">{a.code}</span>
          <span className="ml-auto text-xs text-ink-faint">{a.kind}</span>
        </button>
        {(children.get(a.id)?.length ?? 0) > 0 && <ul>{renderTree(a.id, depth + 1)}</ul>}
      </li>
    ));

  const approvingRow = unknown.find((u) => u.id === approving) ?? null;

  return (
    <div className="grid gap-5 xl:grid-cols-[280px_1fr]">
      <aside className="panel h-fit space-y-2" aria-labelledby="assets-h">
        <h2 id="assets-h">Assets</h2>
        <p className="text-sm text-ink-soft">Choose one to show only its channels.</p>
        {assets.length === 0 ? (
          <p className="empty">No assets. Seed the plant first.</p>
        ) : (
          <ul className="-mx-1">{renderTree(null, 0)}</ul>
        )}
      </aside>

      <div className="min-w-0 space-y-5">
        <NoticeLine notice={notice} onClose={() => setNotice(null)} />

        {credentials && (
          <div role="status" className="rounded-md border-2 border-lacquer bg-white p-4">
            <p className="font-bold">
              {credentials.what} Copy the password now: it is shown this once, Coatrail keeps only a hash.
            </p>
            <dl className="mt-2 grid grid-cols-[max-content_1fr_auto] items-center gap-x-3 gap-y-1 text-sm">
              <dt className="font-bold text-ink-soft">Username</dt>
              <dd className="num">{credentials.username}</dd>
              <dd />
              <dt className="font-bold text-ink-soft">Password</dt>
              <dd className="num select-all break-all">{credentials.password}</dd>
              <dd>
                <CopyButton text={credentials.password} />
              </dd>
              <dt className="font-bold text-ink-soft">Topic prefix</dt>
              <dd className="num break-all">{credentials.topicPrefix}/…</dd>
              <dd />
            </dl>
            <button type="button" className="mt-2 text-sm underline" onClick={() => setCredentials(null)}>
              I have stored it — hide
            </button>
          </div>
        )}

        <section aria-labelledby="dev-h" className="space-y-2">
          <div className="flex flex-wrap items-end gap-3">
            <h2 id="dev-h" className="mr-auto">
              Devices{' '}
              <span className="text-sm font-normal text-ink-soft">
                ({devices.filter((d) => d.enabled && d.online).length} of {devices.length} online)
              </span>
            </h2>
            {canManageDevices && (
              <form onSubmit={createDevice} className="flex items-end gap-2" noValidate>
                <div>
                  <label htmlFor="new-device">New device name</label>
                  <input
                    id="new-device"
                    className="w-64"
                    value={newDeviceName}
                    onChange={(e) => setNewDeviceName(e.target.value)}
                    placeholder="e.g. Dip line 3 PLC gateway"
                    aria-invalid={!!deviceError}
                  />
                </div>
                <button className="btn" type="submit" disabled={busy === 'device'} aria-busy={busy === 'device'}>
                  {busy === 'device' ? 'Creating…' : 'Create device'}
                </button>
              </form>
            )}
          </div>
          {deviceError && <p className="text-sm text-alert-high">✕ {deviceError}</p>}
          <div className="overflow-x-auto rounded-md border border-slate-line bg-white">
            <table>
              <thead>
                <tr>
                  <th scope="col">
                    <span className="sr-only">Selected</span>
                  </th>
                  <SortTh k="name" {...devSort}>
                    Name
                  </SortTh>
                  <SortTh k="username" {...devSort}>
                    MQTT username
                  </SortTh>
                  <SortTh k="online" {...devSort}>
                    State
                  </SortTh>
                  <SortTh k="lastSeenAt" {...devSort}>
                    Last seen
                  </SortTh>
                  <SortTh k="channels" {...devSort}>
                    Channels
                  </SortTh>
                  {canManageDevices && <th scope="col">Actions</th>}
                </tr>
              </thead>
              <tbody>
                {shownDevices.length === 0 && (
                  <tr>
                    <td colSpan={7} className="text-ink-soft">
                      No devices yet.
                      {canManageDevices ? ' Create one for each PLC gateway or sensor box.' : ' An administrator creates them.'}
                    </td>
                  </tr>
                )}
                {shownDevices.map((d) => (
                  <tr key={d.id} className={selectedDevice === d.id ? 'bg-lacquer-light/50' : ''}>
                    <td>
                      <input
                        type="radio"
                        className="w-auto"
                        name="device"
                        aria-label={`Show the mqtt example for ${d.username}`}
                        checked={selectedDevice === d.id}
                        onChange={() => setSelectedDevice(d.id)}
                      />
                    </td>
                    <td>{d.name}</td>
                    <td className="font-mono">{d.username}</td>
                    <td>
                      <DeviceState d={d} />
                    </td>
                    <td className="num whitespace-nowrap">{d.lastSeenAt ? formatSiteTime(d.lastSeenAt, timeZone) : 'never'}</td>
                    <td className="num text-right">{d.channels}</td>
                    {canManageDevices && (
                      <td className="whitespace-nowrap">
                        <div className="flex gap-1.5">
                          <button
                            type="button"
                            className="btn-quiet px-2 py-1 text-sm"
                            disabled={busy === `d${d.id}`}
                            onClick={() => void rotate(d)}
                          >
                            New password
                          </button>
                          <button
                            type="button"
                            className="btn-quiet px-2 py-1 text-sm"
                            disabled={busy === `d${d.id}`}
                            onClick={() => void setEnabled(d, !d.enabled)}
                          >
                            {d.enabled ? 'Disable' : 'Enable'}
                          </button>
                        </div>
                      </td>
                    )}
                  </tr>
                ))}
              </tbody>
            </table>
          </div>
          {device && (
            <div className="panel space-y-1" aria-labelledby="mqtt-h">
              <div className="flex items-center gap-2">
                <h3 id="mqtt-h" className="mr-auto font-bold">
                  Publish one sample as {device.username}
                </h3>
                <CopyButton text={example} label="Copy command" />
              </div>
              <pre className="num overflow-x-auto whitespace-pre-wrap break-all rounded bg-slate-deep p-2 text-[13px] text-paper">
                {example}
              </pre>
              <p className="text-sm text-ink-soft">
                With the MQTT.js command-line tool (<code className="num">npm i -g mqtt</code>). A payload is one sample{' '}
                <code className="num">{'{"t": <ISO 8601 or epoch ms>, "v": <number>}'}</code> or a list of them; the device may
                publish only under <code className="num">{device.topicPrefix}/</code>.
              </p>
            </div>
          )}
        </section>

        {(unknown.length > 0 || canConfigure) && (
          <section aria-labelledby="unk-h" className="space-y-2">
            <h2 id="unk-h">
              Topics heard, no channel <span className="text-sm font-normal text-ink-soft">({unknown.length})</span>
            </h2>
            {unknown.length === 0 ? (
              <p className="empty">Every topic the devices publish on matches a channel.</p>
            ) : (
              <div className="overflow-x-auto rounded-md border border-slate-line bg-white">
                <table>
                  <thead>
                    <tr>
                      <th scope="col">Topic</th>
                      <th scope="col">Device</th>
                      <th scope="col">Messages</th>
                      <th scope="col">Last heard</th>
                      <th scope="col">Sample</th>
                      {canConfigure && <th scope="col">Action</th>}
                    </tr>
                  </thead>
                  <tbody>
                    {unknown.map((u) => (
                      <tr key={u.id}>
                        <td className="num break-all">{u.topic}</td>
                        <td className="font-mono">{u.deviceUsername}</td>
                        <td className="num text-right">{u.messages}</td>
                        <td className="num whitespace-nowrap">{formatSiteTime(u.lastSeenAt, timeZone)}</td>
                        <td className="num max-w-[16rem] truncate" title={u.samplePayload ?? ''}>
                          {u.samplePayload ?? '—'}
                        </td>
                        {canConfigure && (
                          <td>
                            <button
                              type="button"
                              className="btn-quiet px-2 py-1 text-sm"
                              onClick={() => {
                                setApproving(u.id);
                                setApErrors({});
                                setApForm({ ...emptyApprove, name: u.channelKey.replace(/-/g, ' ') });
                              }}
                            >
                              Approve…
                            </button>
                          </td>
                        )}
                      </tr>
                    ))}
                  </tbody>
                </table>
              </div>
            )}
            {approvingRow && (
              <form
                onSubmit={(e) => void approve(e, approvingRow)}
                className="panel grid grid-cols-2 items-end gap-3 md:grid-cols-6"
                aria-label={`Approve ${approvingRow.topic}`}
                noValidate
              >
                <p className="col-span-full text-sm">
                  Make <code className="num">{approvingRow.topic}</code> a channel of asset{' '}
                  <span className="font-mono">{approvingRow.assetCode}</span>:
                </p>
                <div className="col-span-2">
                  <label htmlFor="ap-name">Name</label>
                  <input id="ap-name" value={apForm.name} onChange={(e) => setApForm({ ...apForm, name: e.target.value })} />
                  {err(apErrors, 'name')}
                </div>
                <div>
                  <label htmlFor="ap-kind">Kind</label>
                  <select
                    id="ap-kind"
                    value={apForm.kind}
                    onChange={(e) =>
                      setApForm({
                        ...apForm,
                        kind: e.target.value as ChannelKind,
                        unit: apForm.unit || KIND_UNITS[e.target.value as ChannelKind],
                      })
                    }
                  >
                    {CHANNEL_KINDS.map((k) => (
                      <option key={k}>{k}</option>
                    ))}
                  </select>
                </div>
                <div>
                  <label htmlFor="ap-unit">Unit</label>
                  <input id="ap-unit" value={apForm.unit} onChange={(e) => setApForm({ ...apForm, unit: e.target.value })} />
                  {err(apErrors, 'unit')}
                </div>
                <div>
                  <label htmlFor="ap-min">Lowest valid</label>
                  <input
                    id="ap-min"
                    inputMode="decimal"
                    value={apForm.min}
                    onChange={(e) => setApForm({ ...apForm, min: e.target.value })}
                  />
                  {err(apErrors, 'min')}
                </div>
                <div>
                  <label htmlFor="ap-max">Highest valid</label>
                  <input
                    id="ap-max"
                    inputMode="decimal"
                    value={apForm.max}
                    onChange={(e) => setApForm({ ...apForm, max: e.target.value })}
                  />
                  {err(apErrors, 'max')}
                </div>
                <div className="col-span-full flex gap-2">
                  <button className="btn" type="submit" disabled={busy === `u${approvingRow.id}`}>
                    Approve as channel
                  </button>
                  <button type="button" className="btn-quiet" onClick={() => setApproving(null)}>
                    Cancel
                  </button>
                </div>
              </form>
            )}
          </section>
        )}

        <section aria-labelledby="ch-h" className="space-y-2">
          <div className="flex flex-wrap items-end gap-3">
            <h2 id="ch-h" className="mr-auto">
              Channels{' '}
              <span className="text-sm font-normal text-ink-soft">
                ({shownChannels.length} shown{assetFilter != null ? ` under ${assetById.get(assetFilter)?.name ?? ''}` : ''})
              </span>
            </h2>
            {assetFilter != null && (
              <button type="button" className="btn-quiet" onClick={() => setAssetFilter(null)}>
                Show all assets
              </button>
            )}
            <div>
              <label htmlFor="ch-filter">Filter</label>
              <input
                id="ch-filter"
                type="search"
                className="w-56"
                value={text}
                onChange={(e) => setText(e.target.value)}
                placeholder="name, topic, kind"
              />
            </div>
            <button
              type="button"
              className="btn-quiet"
              onClick={() =>
                downloadCsv(
                  'coatrail-channels.csv',
                  ['id', 'name', 'asset', 'kind', 'unit', 'min', 'max', 'topic', 'device_id'],
                  shownChannels.map((c) => [c.id, c.name, c.assetCode, c.kind, c.unit, c.min, c.max, c.topic, c.deviceId]),
                )
              }
            >
              Export CSV
            </button>
          </div>
          <div className="overflow-x-auto rounded-md border border-slate-line bg-white">
            <table>
              <thead>
                <tr>
                  <SortTh k="name" {...chSort}>
                    Channel
                  </SortTh>
                  <SortTh k="assetCode" {...chSort}>
                    Asset
                  </SortTh>
                  <SortTh k="kind" {...chSort}>
                    Kind
                  </SortTh>
                  <SortTh k="unit" {...chSort}>
                    Unit
                  </SortTh>
                  <SortTh k="min" {...chSort}>
                    Valid range
                  </SortTh>
                  <SortTh k="topic" {...chSort}>
                    Topic
                  </SortTh>
                </tr>
              </thead>
              <tbody>
                {shownChannels.length === 0 && (
                  <tr>
                    <td colSpan={6} className="text-ink-soft">
                      No channel matches.
                    </td>
                  </tr>
                )}
                {shownChannels.map((c) => (
                  <tr key={c.id}>
                    <td>{c.name}</td>
                    <td>
                      {c.assetName} <span className="font-mono text-xs text-ink-faint">{c.assetCode}</span>
                    </td>
                    <td>{c.kind}</td>
                    <td>{c.unit}</td>
                    <td className="num whitespace-nowrap">
                      {c.min} … {c.max} {c.unit}
                    </td>
                    <td className="num break-all text-[13px]">{c.topic}</td>
                  </tr>
                ))}
              </tbody>
            </table>
          </div>
        </section>

        {canConfigure && (
          <section aria-labelledby="newch-h" className="panel space-y-3">
            <h2 id="newch-h">New channel</h2>
            <form
              onSubmit={createChannel}
              className="grid grid-cols-2 items-start gap-3 md:grid-cols-4 xl:grid-cols-8"
              noValidate
            >
              <div className="col-span-2">
                <label htmlFor="ch-asset">Asset</label>
                <select id="ch-asset" value={chForm.assetId} onChange={(e) => setChForm({ ...chForm, assetId: e.target.value })}>
                  <option value="">Choose…</option>
                  {assets.map((a) => (
                    <option key={a.id} value={a.id}>
                      {a.name} ({a.code})
                    </option>
                  ))}
                </select>
                {err(chErrors, 'assetId')}
              </div>
              <div className="col-span-2">
                <label htmlFor="ch-device">Device that publishes it</label>
                <select
                  id="ch-device"
                  value={chForm.deviceId}
                  onChange={(e) => setChForm({ ...chForm, deviceId: e.target.value })}
                >
                  <option value="">Choose…</option>
                  {devices.map((d) => (
                    <option key={d.id} value={d.id}>
                      {d.username}
                    </option>
                  ))}
                </select>
                {err(chErrors, 'deviceId')}
              </div>
              <div className="col-span-2">
                <label htmlFor="ch-name">Name</label>
                <input
                  id="ch-name"
                  value={chForm.name}
                  onChange={(e) => setChForm({ ...chForm, name: e.target.value })}
                  placeholder="e.g. Line 3 bath viscosity"
                />
                {err(chErrors, 'name')}
              </div>
              <div className="col-span-2">
                <label htmlFor="ch-key">Topic code (optional)</label>
                <input
                  id="ch-key"
                  value={chForm.key}
                  onChange={(e) => setChForm({ ...chForm, key: e.target.value })}
                  placeholder="from the name"
                  spellCheck={false}
                />
                {err(chErrors, 'key')}
              </div>
              <div className="col-span-2">
                <label htmlFor="ch-kind">Kind</label>
                <select
                  id="ch-kind"
                  value={chForm.kind}
                  onChange={(e) =>
                    setChForm({ ...chForm, kind: e.target.value as ChannelKind, unit: KIND_UNITS[e.target.value as ChannelKind] })
                  }
                >
                  {CHANNEL_KINDS.map((k) => (
                    <option key={k}>{k}</option>
                  ))}
                </select>
              </div>
              <div>
                <label htmlFor="ch-unit">Unit</label>
                <input id="ch-unit" value={chForm.unit} onChange={(e) => setChForm({ ...chForm, unit: e.target.value })} />
                {err(chErrors, 'unit')}
              </div>
              <div>
                <label htmlFor="ch-min">Lowest valid</label>
                <input
                  id="ch-min"
                  inputMode="decimal"
                  value={chForm.min}
                  onChange={(e) => setChForm({ ...chForm, min: e.target.value })}
                />
                {err(chErrors, 'min')}
              </div>
              <div>
                <label htmlFor="ch-max">Highest valid</label>
                <input
                  id="ch-max"
                  inputMode="decimal"
                  value={chForm.max}
                  onChange={(e) => setChForm({ ...chForm, max: e.target.value })}
                />
                {err(chErrors, 'max')}
              </div>
              <div className="col-span-2 self-end">
                <button className="btn" type="submit" disabled={busy === 'channel'} aria-busy={busy === 'channel'}>
                  {busy === 'channel' ? 'Adding…' : 'Add channel'}
                </button>
              </div>
              <p className="col-span-full text-sm text-ink-soft">
                The valid range is physical plausibility (readings outside it are refused as sensor faults), not the process
                window. Windows are set under Process windows.
              </p>
            </form>
          </section>
        )}
      </div>
    </div>
  );
}
