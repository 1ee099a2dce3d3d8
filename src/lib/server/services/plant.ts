/** The plant model: assets, devices and channels (with the topic each channel arrives on). */
import { QueryTypes } from 'sequelize';
import { db, pgPool } from '../db.ts';

export interface AssetRow {
  id: number;
  siteId: number;
  parentId: number | null;
  kind: string;
  code: string;
  name: string;
  details: Record<string, unknown>;
}

export interface ChannelRow {
  id: number;
  name: string;
  key: string;
  kind: string;
  unit: string;
  min: number;
  max: number;
  topic: string;
  deviceId: number;
  assetId: number;
  assetCode: string;
  assetName: string;
}

export async function listAssets(): Promise<AssetRow[]> {
  return db().query<AssetRow>(
    `select id, site_id as "siteId", parent_id as "parentId", kind, code, name, details from assets order by coalesce(parent_id, id), parent_id nulls first, code`,
    { type: QueryTypes.SELECT },
  );
}

export async function listChannels(): Promise<ChannelRow[]> {
  const { rows } = await pgPool().query<ChannelRow>(`
    select c.id, c.name, c.key, c.kind, c.unit, c.min, c.max,
           d.topic_prefix || '/' || a.code || '/' || c.key as topic,
           c.device_id as "deviceId", c.asset_id as "assetId", a.code as "assetCode", a.name as "assetName"
      from channels c join assets a on a.id = c.asset_id join devices d on d.id = c.device_id
     order by a.code, c.key`);
  return rows;
}

export interface LatestReading {
  channelId: number;
  tMs: number;
  value: number;
}

/** The newest reading of every channel (one index probe per channel). */
export async function latestReadings(): Promise<Map<number, LatestReading>> {
  const { rows } = await pgPool().query<LatestReading>(`
    select c.id as "channelId", r.t_ms as "tMs", r.value
      from channels c
      cross join lateral (
        select (extract(epoch from ts) * 1000)::float8 as t_ms, value
          from readings where channel_id = c.id order by ts desc limit 1) r`);
  return new Map(rows.map((r) => [r.channelId, r]));
}
