/** The plant model: the site, assets, devices and channels (with the topic each channel arrives on). */
import { QueryTypes, literal } from 'sequelize';
import { Asset, Channel, Device } from '../../../../db/models/index.ts';
import { siteInfo as siteRow, siteTimeZone as siteZone, type SiteInfo } from '../../core/plant-store.ts';
import type { AssetView, ChannelView } from '../../shared/plant.ts';
import { channelTopic } from '../../shared/topics.ts';
import { db } from '../db.ts';

export interface AssetRow extends AssetView {
  details: Record<string, unknown>;
}

export type ChannelRow = ChannelView;

/**
 * The site's IANA time zone, read from the `sites` row on every call (never baked into the
 * build): a page or endpoint that shows site times asks for it and passes it on to islands.
 */
export function siteTimeZone(): Promise<string> {
  return siteZone(db());
}

/** The site row (name, code, time zone); null before the seed has run. */
export function site(): Promise<SiteInfo | null> {
  return siteRow(db());
}

export async function listAssets(): Promise<AssetRow[]> {
  db();
  const rows = await Asset.findAll({
    order: [literal('coalesce(parent_id, id)'), literal('parent_id nulls first'), ['code', 'ASC']],
  });
  return rows.map((a) => ({
    id: a.id,
    siteId: a.siteId,
    parentId: a.parentId,
    kind: a.kind,
    code: a.code,
    name: a.name,
    details: a.details,
  }));
}

export async function listChannels(): Promise<ChannelRow[]> {
  db();
  const rows = (await Channel.findAll({
    include: [
      { model: Asset, attributes: ['code', 'name'], required: true },
      { model: Device, attributes: ['topicPrefix'], required: true },
    ],
    order: [
      [Asset, 'code', 'ASC'],
      ['key', 'ASC'],
    ],
  })) as Array<Channel & { Asset: Asset; Device: Device }>;
  return rows.map((c) => ({
    id: c.id,
    name: c.name,
    key: c.key,
    kind: c.kind,
    unit: c.unit,
    min: c.min,
    max: c.max,
    topic: channelTopic(c.Device.topicPrefix, c.Asset.code, c.key),
    deviceId: c.deviceId,
    assetId: c.assetId,
    assetCode: c.Asset.code,
    assetName: c.Asset.name,
  }));
}

export interface LatestReading {
  channelId: number;
  tMs: number;
  value: number;
}

/** The newest reading of every channel (one index probe per channel; telemetry, so plain SQL). */
export async function latestReadings(): Promise<Map<number, LatestReading>> {
  const rows = await db().query<LatestReading>(
    `select c.id as "channelId", r.t_ms as "tMs", r.value
       from channels c
       cross join lateral (
         select (extract(epoch from ts) * 1000)::float8 as t_ms, value
           from readings where channel_id = c.id order by ts desc limit 1) r`,
    { type: QueryTypes.SELECT },
  );
  return new Map(rows.map((r) => [r.channelId, r]));
}
