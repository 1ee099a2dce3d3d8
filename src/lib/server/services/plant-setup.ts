/**
 * Plant set-up (product.md §6): devices with MQTT credentials shown once, channels with the
 * topic their device publishes on, and the approval of channels the ingest worker heard from
 * a known device but did not know. Every change is audited (before → after; never a secret).
 */
import { randomBytes } from 'node:crypto';
import type pg from 'pg';
import { channelTopic, deviceTopicPrefix } from '../../shared/topics.ts';
import {
  codeFromName,
  type ApproveUnknownChannel,
  type ChannelView,
  type CreateChannel,
  type DeviceCredentials,
  type DeviceView,
  type UnknownChannelView,
} from '../../shared/plant.ts';
import type { Actor } from '../audit.ts';
import { appendAudit } from '../../core/audit-store.ts';
import { pgPool } from '../db.ts';
import { HttpProblem } from '../http.ts';
import { hashPassword } from '../passwords.ts';
import { listChannels } from './plant.ts';

const iso = (d: Date | string | null | undefined) => (d == null ? null : new Date(d).toISOString());
/** Broker service accounts (ingest/broker.ts): never a device username. */
const RESERVED = new Set(['svc-ingest', 'svc-web']);

const badField = (status: number, title: string, path: string, message: string) =>
  new HttpProblem(status, title, `${path}: ${message}`, { errors: [{ path, message }] });

async function inTransaction<T>(fn: (client: pg.PoolClient) => Promise<T>): Promise<T> {
  const client = await pgPool().connect();
  try {
    await client.query('begin');
    const out = await fn(client);
    await client.query('commit');
    return out;
  } catch (e) {
    await client.query('rollback').catch(() => {});
    throw e;
  } finally {
    client.release();
  }
}

// --- devices ----------------------------------------------------------------------------

export async function listDevices(): Promise<DeviceView[]> {
  const { rows } = await pgPool().query<{
    id: number;
    name: string;
    username: string;
    topic_prefix: string;
    enabled: boolean;
    online: boolean;
    last_seen_at: Date | null;
    created_at: Date;
    channels: string;
  }>(
    `select d.id, d.name, d.username, d.topic_prefix, d.enabled, d.online, d.last_seen_at, d.created_at,
            (select count(*) from channels c where c.device_id = d.id) as channels
       from devices d order by d.username`,
  );
  return rows.map((r) => ({
    id: r.id,
    name: r.name,
    username: r.username,
    topicPrefix: r.topic_prefix,
    enabled: r.enabled,
    online: r.enabled && r.online,
    lastSeenAt: iso(r.last_seen_at),
    createdAt: iso(r.created_at)!,
    channels: Number(r.channels),
  }));
}

async function theSite(client: pg.PoolClient): Promise<{ id: number; code: string }> {
  const { rows } = await client.query<{ id: number; code: string }>('select id, code from sites order by id limit 1');
  if (!rows[0]) throw new HttpProblem(409, 'No site', 'The database holds no site yet; run the seed first.');
  return rows[0];
}

const newDevicePassword = () => randomBytes(18).toString('base64url');

/** Create a device: a unique username from its name, a random password (shown once), its topic prefix. */
export async function createDevice(actor: Actor, name: string): Promise<DeviceCredentials> {
  const password = newDevicePassword();
  const passwordHash = await hashPassword(password);
  const client = await pgPool().connect();
  try {
    await client.query('begin');
    const site = await theSite(client);
    const base = codeFromName(name, 40);
    const { rows: taken } = await client.query<{ username: string }>(
      `select username from devices where username = $1 or username like $1 || '-%'`,
      [base],
    );
    const used = new Set(taken.map((r) => r.username));
    let username = base;
    for (let n = 2; used.has(username) || RESERVED.has(username); n++) username = `${base}-${n}`;
    const topicPrefix = deviceTopicPrefix(site.code, username);
    const { rows } = await client.query<{ id: number }>(
      `insert into devices (site_id, name, username, password_hash, topic_prefix) values ($1, $2, $3, $4, $5) returning id`,
      [site.id, name, username, passwordHash, topicPrefix],
    );
    const id = rows[0]!.id;
    await appendAudit(client, actor, {
      action: 'device.created',
      entity: 'device',
      entityId: id,
      before: null,
      after: { name, username, topicPrefix, enabled: true },
    });
    await client.query('commit');
    return { id, username, password, topicPrefix };
  } catch (e) {
    await client.query('rollback').catch(() => {});
    if ((e as { code?: string }).code === '23505')
      throw badField(409, 'Device exists', 'name', 'A device with this name was created at the same moment; try again.');
    throw e;
  } finally {
    client.release();
  }
}

async function deviceRow(id: number) {
  const { rows } = await pgPool().query<{ id: number; name: string; username: string; topic_prefix: string; enabled: boolean }>(
    'select id, name, username, topic_prefix, enabled from devices where id = $1',
    [id],
  );
  if (!rows[0]) throw new HttpProblem(404, 'Not found', 'No such device.');
  return rows[0];
}

/** A new password for a device (shown once); the old one stops working at the device's next connection. */
export async function rotateDevicePassword(actor: Actor, id: number): Promise<DeviceCredentials> {
  const d = await deviceRow(id);
  const password = newDevicePassword();
  const hash = await hashPassword(password);
  await inTransaction(async (client) => {
    await client.query('update devices set password_hash = $2 where id = $1', [id, hash]);
    await appendAudit(client, actor, {
      action: 'device.password-rotated',
      entity: 'device',
      entityId: id,
      before: { username: d.username },
      after: { username: d.username, passwordRotated: true },
    });
  });
  return { id, username: d.username, password, topicPrefix: d.topic_prefix };
}

/** Rename, disable or re-enable a device (a disabled device cannot connect to the broker). */
export async function updateDevice(
  actor: Actor,
  id: number,
  input: { name?: string | undefined; enabled?: boolean | undefined },
): Promise<DeviceView> {
  const d = await deviceRow(id);
  const after = { name: input.name ?? d.name, enabled: input.enabled ?? d.enabled };
  const action =
    input.enabled === false && d.enabled
      ? 'device.disabled'
      : input.enabled === true && !d.enabled
        ? 'device.enabled'
        : 'device.updated';
  await inTransaction(async (client) => {
    await client.query('update devices set name = $2, enabled = $3 where id = $1', [id, after.name, after.enabled]);
    await appendAudit(client, actor, {
      action,
      entity: 'device',
      entityId: id,
      before: { name: d.name, enabled: d.enabled },
      after,
    });
  });
  return (await listDevices()).find((x) => x.id === id)!;
}

// --- channels ---------------------------------------------------------------------------

function toView(c: Awaited<ReturnType<typeof listChannels>>[number]): ChannelView {
  return {
    id: c.id,
    name: c.name,
    key: c.key,
    kind: c.kind,
    unit: c.unit,
    min: c.min,
    max: c.max,
    topic: c.topic,
    deviceId: c.deviceId,
    assetId: c.assetId,
    assetCode: c.assetCode,
    assetName: c.assetName,
  };
}

export async function channelViews(): Promise<ChannelView[]> {
  return (await listChannels()).map(toView);
}

/** Insert a channel (inside the caller's transaction) and mark a matching unknown topic resolved. */
async function insertChannel(
  client: pg.PoolClient,
  input: { assetId: number; deviceId: number; key: string; name: string; kind: string; unit: string; min: number; max: number },
  resolution: string,
): Promise<{ id: number; topic: string }> {
  const { rows: dev } = await client.query<{ site_id: number; topic_prefix: string }>(
    'select site_id, topic_prefix from devices where id = $1',
    [input.deviceId],
  );
  const { rows: asset } = await client.query<{ site_id: number; code: string }>(
    'select site_id, code from assets where id = $1',
    [input.assetId],
  );
  if (!asset[0]) throw badField(400, 'Invalid input', 'assetId', 'No asset with this id.');
  if (!dev[0]) throw badField(400, 'Invalid input', 'deviceId', 'No device with this id.');
  if (asset[0].site_id !== dev[0].site_id)
    throw badField(400, 'Invalid input', 'assetId', 'The asset belongs to another site than the device.');
  const topic = channelTopic(dev[0].topic_prefix, asset[0].code, input.key);
  const { rows: dup } = await client.query<{ id: number }>(
    'select id from channels where device_id = $1 and asset_id = $2 and key = $3',
    [input.deviceId, input.assetId, input.key],
  );
  if (dup[0]) throw badField(409, 'Channel exists', 'key', `Channel ${dup[0].id} already publishes on ${topic}.`);
  const { rows } = await client.query<{ id: number }>(
    `insert into channels (asset_id, device_id, key, name, kind, unit, min, max) values ($1, $2, $3, $4, $5, $6, $7, $8) returning id`,
    [input.assetId, input.deviceId, input.key, input.name, input.kind, input.unit, input.min, input.max],
  );
  const id = rows[0]!.id;
  await client.query(
    `update unknown_channels set resolved_at = now(), resolution = $2 where topic = $1 and resolved_at is null`,
    [topic, `${resolution} as channel ${id}`],
  );
  return { id, topic };
}

export async function createChannel(actor: Actor, input: CreateChannel): Promise<ChannelView> {
  const key = input.key ?? codeFromName(input.name, 32);
  const { assetId, deviceId, name, kind, unit, min, max } = input;
  const created = await inTransaction(async (client) => {
    const c = await insertChannel(client, { assetId, deviceId, key, name, kind, unit, min, max }, 'created');
    await appendAudit(client, actor, {
      action: 'channel.created',
      entity: 'channel',
      entityId: c.id,
      before: null,
      after: { ...input, key, topic: c.topic },
    });
    return c;
  });
  return (await channelViews()).find((c) => c.id === created.id)!;
}

// --- unknown channels -------------------------------------------------------------------

/** Topics a known device published on that match no channel (not yet approved or dismissed). */
export async function pendingUnknownChannels(): Promise<UnknownChannelView[]> {
  const { rows } = await pgPool().query<{
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
  const client = await pgPool().connect();
  let created: { id: number; topic: string };
  try {
    await client.query('begin');
    const { rows } = await client.query<{
      device_id: number;
      asset_code: string;
      channel_key: string;
      topic: string;
      resolved_at: Date | null;
      resolution: string | null;
    }>(
      'select device_id, asset_code, channel_key, topic, resolved_at, resolution from unknown_channels where id = $1 for update',
      [id],
    );
    const u = rows[0];
    if (!u) throw new HttpProblem(404, 'Not found', 'No such unknown channel.');
    if (u.resolved_at)
      throw new HttpProblem(
        409,
        'Already resolved',
        `This topic was resolved at ${iso(u.resolved_at)} (${u.resolution ?? 'no note'}).`,
      );
    const { rows: assets } = await client.query<{ id: number }>(
      'select a.id from assets a join devices d on d.site_id = a.site_id where d.id = $1 and a.code = $2',
      [u.device_id, u.asset_code],
    );
    if (!assets[0]) {
      throw new HttpProblem(
        409,
        'Unknown asset',
        `The topic names the asset “${u.asset_code}”, which this site does not have. Add the asset, or have the device publish under an existing asset code.`,
      );
    }
    if (!/^[a-z0-9][a-z0-9-]{0,31}$/.test(u.channel_key)) {
      throw new HttpProblem(
        409,
        'Channel code too long',
        `The topic's channel code “${u.channel_key}” is longer than 32 characters; have the device publish under a shorter code.`,
      );
    }
    created = await insertChannel(
      client,
      { ...spec, assetId: assets[0].id, deviceId: u.device_id, key: u.channel_key },
      'approved',
    );
    await appendAudit(client, actor, {
      action: 'channel.approved',
      entity: 'channel',
      entityId: created.id,
      before: { unknownChannelId: id, topic: u.topic, resolved: false },
      after: { ...spec, assetId: assets[0].id, deviceId: u.device_id, key: u.channel_key, topic: created.topic },
    });
    await client.query('commit');
  } catch (e) {
    await client.query('rollback').catch(() => {});
    throw e;
  } finally {
    client.release();
  }
  return (await channelViews()).find((c) => c.id === created.id)!;
}
