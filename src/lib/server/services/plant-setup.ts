/**
 * Plant set-up: devices with MQTT credentials shown once, channels with the topic their device
 * publishes on, and the approval of channels the ingest worker heard from a known device but
 * did not know. The records and their audit rows are written by `core/plant-store.ts`; this
 * service makes the secrets, hashes them and shapes the views.
 */
import { randomBytes } from 'node:crypto';
import { QueryTypes, col, fn } from 'sequelize';
import { Channel, Device } from '../../../../db/models/index.ts';
import type { AuditActor as Actor } from '../../../../db/transaction.ts';
import {
  approveUnknownChannelRecord,
  createChannelRecord,
  createDeviceRecord,
  rotateDevicePasswordRecord,
  updateDeviceRecord,
} from '../../core/plant-store.ts';
import {
  codeFromName,
  type ApproveUnknownChannel,
  type ChannelView,
  type CreateChannel,
  type DeviceCredentials,
  type DeviceView,
  type UnknownChannelView,
} from '../../shared/plant.ts';
import { db } from '../db.ts';
import { hashPassword } from '../passwords.ts';
import { listChannels } from './plant.ts';

const iso = (d: Date | string | null | undefined) => (d == null ? null : new Date(d).toISOString());

// --- devices ----------------------------------------------------------------------------

export async function listDevices(): Promise<DeviceView[]> {
  db();
  const [devices, counts] = await Promise.all([
    Device.findAll({ order: [['username', 'ASC']] }),
    Channel.findAll({
      attributes: ['deviceId', [fn('count', col('id')), 'n']],
      group: ['deviceId'],
      raw: true,
    }) as unknown as Promise<Array<{ deviceId: number; n: number | string }>>,
  ]);
  const channels = new Map(counts.map((c) => [c.deviceId, Number(c.n)]));
  return devices.map((d) => ({
    id: d.id,
    name: d.name,
    username: d.username,
    topicPrefix: d.topicPrefix,
    enabled: d.enabled,
    online: d.enabled && d.online,
    lastSeenAt: iso(d.lastSeenAt),
    createdAt: iso(d.createdAt)!,
    channels: channels.get(d.id) ?? 0,
  }));
}

const newDevicePassword = () => randomBytes(18).toString('base64url');

/** Create a device: a unique username from its name, a random password (shown once), its topic prefix. */
export async function createDevice(actor: Actor, name: string): Promise<DeviceCredentials> {
  const password = newDevicePassword();
  const passwordHash = await hashPassword(password);
  const d = await createDeviceRecord(db(), actor, { name, code: codeFromName(name, 40), passwordHash });
  return { ...d, password };
}

/** A new password for a device (shown once); the old one stops working at the device's next connection. */
export async function rotateDevicePassword(actor: Actor, id: number): Promise<DeviceCredentials> {
  const password = newDevicePassword();
  const d = await rotateDevicePasswordRecord(db(), actor, id, await hashPassword(password));
  return { ...d, password };
}

/** Rename, disable or re-enable a device (a disabled device cannot connect to the broker). */
export async function updateDevice(
  actor: Actor,
  id: number,
  input: { name?: string | undefined; enabled?: boolean | undefined },
): Promise<DeviceView> {
  await updateDeviceRecord(db(), actor, id, input);
  return (await listDevices()).find((x) => x.id === id)!;
}

// --- channels ---------------------------------------------------------------------------

export async function channelViews(): Promise<ChannelView[]> {
  return listChannels();
}

export async function createChannel(actor: Actor, input: CreateChannel): Promise<ChannelView> {
  const key = input.key ?? codeFromName(input.name, 32);
  const { assetId, deviceId, name, kind, unit, min, max } = input;
  const created = await createChannelRecord(db(), actor, { assetId, deviceId, key, name, kind, unit, min, max }, { ...input });
  return (await channelViews()).find((c) => c.id === created.id)!;
}

// --- unknown channels -------------------------------------------------------------------

/** Topics a known device published on that match no channel (not yet approved or dismissed). */
export async function pendingUnknownChannels(): Promise<UnknownChannelView[]> {
  // unknown_channels is the ingest worker's record (no model here yet): a plain read.
  const rows = await db().query<{
    id: number;
    device_id: number;
    username: string;
    topic: string;
    asset_code: string;
    channel_key: string;
    first_seen_at: Date;
    last_seen_at: Date;
    messages: number;
    sample_payload: string | null;
  }>(
    `select u.id, u.device_id, d.username, u.topic, u.asset_code, u.channel_key, u.first_seen_at, u.last_seen_at, u.messages, u.sample_payload
       from unknown_channels u join devices d on d.id = u.device_id
      where u.resolved_at is null order by u.last_seen_at desc limit 500`,
    { type: QueryTypes.SELECT },
  );
  return rows.map((r) => ({
    id: r.id,
    deviceId: r.device_id,
    deviceUsername: r.username,
    topic: r.topic,
    assetCode: r.asset_code,
    channelKey: r.channel_key,
    firstSeenAt: iso(r.first_seen_at)!,
    lastSeenAt: iso(r.last_seen_at)!,
    messages: r.messages,
    samplePayload: r.sample_payload,
  }));
}

/** Approve a topic the worker did not know: creates the channel on the asset its topic names. */
export async function approveUnknownChannel(actor: Actor, id: number, spec: ApproveUnknownChannel): Promise<ChannelView> {
  const created = await approveUnknownChannelRecord(db(), actor, id, spec);
  return (await channelViews()).find((c) => c.id === created.id)!;
}
