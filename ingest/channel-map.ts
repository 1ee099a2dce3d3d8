/**
 * Topic → device, asset and channel, cached in the worker.
 *
 * The cache is reloaded whole when a configuration change is announced (`coatrail_config`,
 * ingest/config-listener.ts) and, as a safety net, every 5 minutes while the worker listens
 * (every 30 s while it cannot). A message whose topic the cache does not know is never refused
 * on the cache's word alone: unless a load or look-up began after the message arrived, the
 * flush looks its device and channel up first ({@link ChannelMap.lookUp}, one query set for
 * all such topics of a batch) and holds the batch until the answer is in.
 */
import { Op, QueryTypes, type Sequelize } from 'sequelize';
import { Asset, Channel, Device, Site } from '../db/models/index.ts';
import { RetentionSettingsSchema, type RetentionSettings } from '../src/lib/shared/telemetry.ts';
import { TOPIC_ROOT, parseTopic } from '../src/lib/shared/topics.ts';

export interface ChannelInfo {
  id: number;
  deviceId: number;
  assetId: number;
  kind: string;
  unit: string;
  min: number;
  max: number;
  /** Effective raw retention, days (the kind's setting, else the channel's own column). */
  rawRetentionDays: number;
}

export interface DeviceInfo {
  id: number;
  username: string;
  siteCode: string;
  enabled: boolean;
}

export const DEFAULT_RETENTION: RetentionSettings = {
  rawDaysByKind: {},
  minuteRollupDays: 1100,
  hourRollupDays: null,
  rejectionDays: 90,
};

/** Safety-net reload while configuration changes are announced to this worker … */
export const REFRESH_LISTENING_MS = 5 * 60_000;
/** … and while they are not (the listening connection is down). */
export const REFRESH_DEAF_MS = 30_000;
/** Look-ups remembered per topic before the next full load clears them. */
const MAX_CHECKED = 50_000;

interface ChannelRow {
  id: number;
  deviceId: number;
  assetId: number;
  key: string;
  kind: string;
  unit: string;
  min: number;
  max: number;
  rawRetentionDays: number;
  Asset: { code: string };
  Device: { topicPrefix: string };
}

interface DeviceRow {
  id: number;
  username: string;
  topicPrefix: string;
  enabled: boolean;
  Site: { code: string };
}

interface AssetRow {
  code: string;
  Site: { code: string };
}

export class ChannelMap {
  private channels = new Map<string, ChannelInfo>();
  private devices = new Map<string, DeviceInfo>();
  private assets = new Set<string>();
  retention: RetentionSettings = DEFAULT_RETENTION;
  /** When the last completed full load began (0: never). */
  private loadedFrom = 0;
  /** Per topic: when the last look-up covering it began (cleared by each full load). */
  private checked = new Map<string, number>();
  private loading: Promise<void> | null = null;
  /** A change was announced while a load was running: load once more after it. */
  private again = false;
  /** Whether configuration changes are being announced to this worker (then the safety net runs less often). */
  listening = false;
  private stale = false;

  constructor(private sequelize: Sequelize) {}

  get loaded(): boolean {
    return this.loadedFrom > 0;
  }

  channel(topic: string): ChannelInfo | undefined {
    return this.channels.get(topic);
  }

  /** The device owning a topic prefix `coatrail/v1/{site}/{device}`. */
  device(prefix: string): DeviceInfo | undefined {
    return this.devices.get(prefix);
  }

  hasAsset(siteCode: string, assetCode: string): boolean {
    return this.assets.has(`${siteCode}/${assetCode}`);
  }

  /** Every topic with a channel (for resolving the unknown-channel list). */
  topics(): IterableIterator<string> {
    return this.channels.keys();
  }

  /** Whether a reload is due: one that failed is retried, else the periodic safety net. */
  shouldRefresh(nowMs: number): boolean {
    return this.stale || nowMs - this.loadedFrom >= (this.listening ? REFRESH_LISTENING_MS : REFRESH_DEAF_MS);
  }

  /** A change was announced but could not be loaded: reload before the next batch. */
  markStale(): void {
    this.stale = true;
  }

  /**
   * Whether the cache's answer for `topic` can be trusted for a message that arrived at
   * `rxMs`: true when the topic is known, or when a full load or a look-up of it began after
   * the message arrived (so anything committed before the message is in the answer).
   */
  settled(topic: string, rxMs: number): boolean {
    if (this.loadedFrom > rxMs) return true;
    return (this.checked.get(topic) ?? 0) > rxMs;
  }

  /**
   * Reload everything from the database. Concurrent callers share one load; a call made while
   * a load runs gets a second load after it (the first may have read before the change).
   * Throws when the database is unreachable.
   */
  refresh(): Promise<void> {
    if (this.loading) {
      this.again = true;
      return this.loading;
    }
    this.loading = (async () => {
      try {
        do {
          this.again = false;
          await this.load();
        } while (this.again);
        this.stale = false;
      } finally {
        this.loading = null;
      }
    })();
    return this.loading;
  }

  private async load(): Promise<void> {
    const startedAt = Date.now();
    const [ch, dev, as, retention] = await Promise.all([
      Channel.findAll({
        attributes: ['id', 'deviceId', 'assetId', 'key', 'kind', 'unit', 'min', 'max', 'rawRetentionDays'],
        include: [
          { model: Asset, attributes: ['code'], required: true },
          { model: Device, attributes: ['topicPrefix'], required: true },
        ],
        raw: true,
        nest: true,
      }) as unknown as Promise<ChannelRow[]>,
      this.findDevices(),
      Asset.findAll({
        attributes: ['code'],
        include: [{ model: Site, attributes: ['code'], required: true }],
        raw: true,
        nest: true,
      }) as unknown as Promise<AssetRow[]>,
      this.readRetention(),
    ]);
    const channels = new Map<string, ChannelInfo>();
    for (const r of ch) channels.set(`${r.Device.topicPrefix}/${r.Asset.code}/${r.key}`, this.info(r, retention));
    const devices = new Map<string, DeviceInfo>();
    for (const d of dev)
      devices.set(d.topicPrefix, { id: d.id, username: d.username, siteCode: d.Site.code, enabled: d.enabled });
    this.channels = channels;
    this.devices = devices;
    this.assets = new Set(as.map((a) => `${a.Site.code}/${a.code}`));
    this.retention = retention;
    this.checked.clear();
    this.loadedFrom = startedAt;
  }

  /**
   * Look up the devices, assets and channels of topics the cache missed (one query each, for
   * the whole list) and add what exists to the cache. Afterwards {@link settled} is true for
   * each of these topics and messages that arrived before the call.
   */
  async lookUp(topics: readonly string[]): Promise<void> {
    if (!topics.length) return;
    const startedAt = Date.now();
    const prefixes = new Set<string>();
    const assetCodes = new Set<string>();
    for (const t of topics) {
      const p = parseTopic(t);
      if (p.kind === 'invalid') continue;
      prefixes.add(`${TOPIC_ROOT}/${p.site}/${p.device}`);
      if (p.kind === 'sample') assetCodes.add(p.asset);
    }
    const [dev, ch, as] = await Promise.all([
      this.findDevices([...prefixes]),
      Channel.findAll({
        attributes: ['id', 'deviceId', 'assetId', 'key', 'kind', 'unit', 'min', 'max', 'rawRetentionDays'],
        include: [
          { model: Asset, attributes: ['code'], required: true },
          { model: Device, attributes: ['topicPrefix'], required: true, where: { topicPrefix: { [Op.in]: [...prefixes] } } },
        ],
        raw: true,
        nest: true,
      }) as unknown as Promise<ChannelRow[]>,
      assetCodes.size
        ? (Asset.findAll({
            attributes: ['code'],
            where: { code: { [Op.in]: [...assetCodes] } },
            include: [{ model: Site, attributes: ['code'], required: true }],
            raw: true,
            nest: true,
          }) as unknown as Promise<AssetRow[]>)
        : Promise.resolve([] as AssetRow[]),
    ]);
    for (const d of dev)
      this.devices.set(d.topicPrefix, { id: d.id, username: d.username, siteCode: d.Site.code, enabled: d.enabled });
    for (const r of ch) this.channels.set(`${r.Device.topicPrefix}/${r.Asset.code}/${r.key}`, this.info(r, this.retention));
    for (const a of as) this.assets.add(`${a.Site.code}/${a.code}`);
    if (this.checked.size + topics.length > MAX_CHECKED) this.checked.clear();
    for (const t of topics) this.checked.set(t, startedAt);
  }

  private findDevices(prefixes?: string[]): Promise<DeviceRow[]> {
    return Device.findAll({
      attributes: ['id', 'username', 'topicPrefix', 'enabled'],
      ...(prefixes ? { where: { topicPrefix: { [Op.in]: prefixes } } } : {}),
      include: [{ model: Site, attributes: ['code'], required: true }],
      raw: true,
      nest: true,
    }) as unknown as Promise<DeviceRow[]>;
  }

  private async readRetention(): Promise<RetentionSettings> {
    const rows = await this.sequelize.query<{ value: unknown }>(`select value from site_settings where key = 'retention'`, {
      type: QueryTypes.SELECT,
    });
    const parsed = RetentionSettingsSchema.safeParse(rows[0]?.value);
    return parsed.success ? parsed.data : DEFAULT_RETENTION;
  }

  private info(r: ChannelRow, retention: RetentionSettings): ChannelInfo {
    return {
      id: r.id,
      deviceId: r.deviceId,
      assetId: r.assetId,
      kind: r.kind,
      unit: r.unit,
      min: r.min,
      max: r.max,
      rawRetentionDays: retention.rawDaysByKind[r.kind] ?? r.rawRetentionDays,
    };
  }
}
