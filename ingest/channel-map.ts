/**
 * Topic → device, asset and channel, cached in the worker. Refreshed every 30 s, and at once
 * (at most once a second) when a message arrives on a topic the cache does not know, so a
 * channel an engineer has just created is picked up without a restart.
 */
import type pg from 'pg';
import { RetentionSettingsSchema, type RetentionSettings } from '../src/lib/shared/telemetry.ts';

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

const REFRESH_EVERY_MS = 30_000;
const MISS_REFRESH_MIN_MS = 1_000;

export class ChannelMap {
  private channels = new Map<string, ChannelInfo>();
  private devices = new Map<string, DeviceInfo>();
  private assets = new Set<string>();
  retention: RetentionSettings = DEFAULT_RETENTION;
  private loadedAt = 0;
  private loading: Promise<void> | null = null;

  constructor(private pool: pg.Pool) {}

  get loaded(): boolean {
    return this.loadedAt > 0;
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

  /** Whether a refresh is due: the periodic one, or one for a topic that missed. */
  shouldRefresh(nowMs: number, missed: boolean): boolean {
    const age = nowMs - this.loadedAt;
    return age >= REFRESH_EVERY_MS || (missed && age >= MISS_REFRESH_MIN_MS);
  }

  /** Reload from the database (concurrent callers share one load). Throws when the database is unreachable. */
  refresh(): Promise<void> {
    if (!this.loading) {
      this.loading = this.load().finally(() => (this.loading = null));
    }
    return this.loading;
  }

  private async load(): Promise<void> {
    const [ch, dev, as, settings] = await Promise.all([
      this.pool.query<{
        topic: string;
        id: number;
        device_id: number;
        asset_id: number;
        kind: string;
        unit: string;
        min: number;
        max: number;
        raw_retention_days: number;
      }>(
        `select d.topic_prefix || '/' || a.code || '/' || c.key as topic, c.id, c.device_id, c.asset_id, c.kind, c.unit, c.min, c.max, c.raw_retention_days
           from channels c join assets a on a.id = c.asset_id join devices d on d.id = c.device_id`,
      ),
      this.pool.query<{ id: number; username: string; topic_prefix: string; site_code: string; enabled: boolean }>(
        `select d.id, d.username, d.topic_prefix, s.code as site_code, d.enabled from devices d join sites s on s.id = d.site_id`,
      ),
      this.pool.query<{ key: string }>(`select s.code || '/' || a.code as key from assets a join sites s on s.id = a.site_id`),
      this.pool.query<{ value: unknown }>(`select value from site_settings where key = 'retention'`),
    ]);
    const parsed = RetentionSettingsSchema.safeParse(settings.rows[0]?.value);
    const retention = parsed.success ? parsed.data : DEFAULT_RETENTION;
    const channels = new Map<string, ChannelInfo>();
    for (const r of ch.rows) {
      channels.set(r.topic, {
        id: r.id,
        deviceId: r.device_id,
        assetId: r.asset_id,
        kind: r.kind,
        unit: r.unit,
        min: r.min,
        max: r.max,
        rawRetentionDays: retention.rawDaysByKind[r.kind] ?? r.raw_retention_days,
      });
    }
    const devices = new Map<string, DeviceInfo>();
    for (const d of dev.rows)
      devices.set(d.topic_prefix, { id: d.id, username: d.username, siteCode: d.site_code, enabled: d.enabled });
    this.channels = channels;
    this.devices = devices;
    this.assets = new Set(as.rows.map((r) => r.key));
    this.retention = retention;
    this.loadedAt = Date.now();
  }
}
