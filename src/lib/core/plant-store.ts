/**
 * The plant's records (worker-safe: no Astro, the caller passes its Sequelize instance): the
 * site row (the one source of the site's name and time zone), MQTT devices and their
 * channels, and the approval of a channel the worker heard from a known device but did not
 * know. Every change and its audit row commit together; device passwords arrive hashed and
 * never enter the trail.
 */
import { Op, QueryTypes, UniqueConstraintError, type Sequelize, type Transaction } from 'sequelize';
import { Asset, Channel, Device, Site, initModels } from '../../../db/models/index.ts';
import { auditIn, withTransaction, type AuditActor } from '../../../db/transaction.ts';
import { channelTopic, deviceTopicPrefix } from '../shared/topics.ts';
import { DomainError, fieldError } from './errors.ts';

/** Broker service accounts (ingest/broker.ts): never a device username. */
const RESERVED = new Set(['svc-ingest', 'svc-web']);

/** The time zone used when the database holds no site yet. */
export const NO_SITE_TIME_ZONE = 'UTC';

export interface SiteInfo {
  id: number;
  code: string;
  name: string;
  timeZone: string;
}

/** The site (the first row of `sites`), read each time it is asked for: a change applies at once. */
export async function siteInfo(sequelize: Sequelize, t?: Transaction | null): Promise<SiteInfo | null> {
  initModels(sequelize);
  const s = await Site.findOne({ order: [['id', 'ASC']], ...(t ? { transaction: t } : {}) });
  return s ? { id: s.id, code: s.code, name: s.name, timeZone: s.timeZone } : null;
}

/** The site's IANA time zone (the demo site's is Europe/London); UTC while no site exists. */
export async function siteTimeZone(sequelize: Sequelize): Promise<string> {
  return (await siteInfo(sequelize))?.timeZone ?? NO_SITE_TIME_ZONE;
}

async function theSite(sequelize: Sequelize, t: Transaction): Promise<SiteInfo> {
  const site = await siteInfo(sequelize, t);
  if (!site) throw new DomainError('conflict', 'No site', 'The database holds no site yet; run the seed first.');
  return site;
}

// --- devices ----------------------------------------------------------------------------

/** Create a device: a unique username from `code` (its name as a code), the hashed password, its topic prefix. */
export async function createDeviceRecord(
  sequelize: Sequelize,
  actor: AuditActor,
  input: { name: string; code: string; passwordHash: string },
): Promise<{ id: number; username: string; topicPrefix: string }> {
  try {
    return await withTransaction(sequelize, async (t) => {
      const site = await theSite(sequelize, t);
      const base = input.code;
      const taken = await Device.findAll({
        attributes: ['username'],
        where: { username: { [Op.or]: [{ [Op.eq]: base }, { [Op.like]: `${base}-%` }] } },
        transaction: t,
      });
      const used = new Set(taken.map((r) => r.username));
      let username = base;
      for (let n = 2; used.has(username) || RESERVED.has(username); n++) username = `${base}-${n}`;
      const topicPrefix = deviceTopicPrefix(site.code, username);
      const d = await Device.create(
        { siteId: site.id, name: input.name, username, passwordHash: input.passwordHash, topicPrefix, lastSeenAt: null },
        { transaction: t },
      );
      await auditIn(t, actor, {
        action: 'device.created',
        entity: 'device',
        entityId: d.id,
        before: null,
        after: { name: input.name, username, topicPrefix, enabled: true },
      });
      return { id: d.id, username, topicPrefix };
    });
  } catch (e) {
    if (e instanceof UniqueConstraintError)
      throw fieldError('name', 'A device with this name was created at the same moment; try again.', 'conflict', 'Device exists');
    throw e;
  }
}

async function deviceForUpdate(id: number, t: Transaction): Promise<Device> {
  const d = await Device.findByPk(id, { transaction: t, lock: t.LOCK.UPDATE });
  if (!d) throw new DomainError('not-found', 'Not found', 'No such device.');
  return d;
}

/** Store a device's new (hashed) password; the old one stops working at the device's next connection. */
export async function rotateDevicePasswordRecord(
  sequelize: Sequelize,
  actor: AuditActor,
  id: number,
  passwordHash: string,
): Promise<{ id: number; username: string; topicPrefix: string }> {
  return withTransaction(sequelize, async (t) => {
    const d = await deviceForUpdate(id, t);
    d.passwordHash = passwordHash;
    await d.save({ transaction: t });
    await auditIn(t, actor, {
      action: 'device.password-rotated',
      entity: 'device',
      entityId: id,
      before: { username: d.username },
      after: { username: d.username, passwordRotated: true },
    });
    return { id, username: d.username, topicPrefix: d.topicPrefix };
  });
}

/** Rename, disable or re-enable a device (a disabled device cannot connect to the broker). */
export async function updateDeviceRecord(
  sequelize: Sequelize,
  actor: AuditActor,
  id: number,
  input: { name?: string | undefined; enabled?: boolean | undefined },
): Promise<void> {
  await withTransaction(sequelize, async (t) => {
    const d = await deviceForUpdate(id, t);
    const before = { name: d.name, enabled: d.enabled };
    const after = { name: input.name ?? d.name, enabled: input.enabled ?? d.enabled };
    const action =
      input.enabled === false && d.enabled
        ? 'device.disabled'
        : input.enabled === true && !d.enabled
          ? 'device.enabled'
          : 'device.updated';
    d.name = after.name;
    d.enabled = after.enabled;
    await d.save({ transaction: t });
    await auditIn(t, actor, { action, entity: 'device', entityId: id, before, after });
  });
}

// --- channels ---------------------------------------------------------------------------

export interface ChannelSpec {
  assetId: number;
  deviceId: number;
  key: string;
  name: string;
  kind: string;
  unit: string;
  min: number;
  max: number;
}

/** Insert a channel (inside `t`) and mark a matching unknown topic resolved. */
async function insertChannel(
  sequelize: Sequelize,
  t: Transaction,
  input: ChannelSpec,
  resolution: string,
): Promise<{ id: number; topic: string }> {
  const [asset, dev] = [
    await Asset.findByPk(input.assetId, { transaction: t }),
    await Device.findByPk(input.deviceId, { transaction: t }),
  ];
  if (!asset) throw fieldError('assetId', 'No asset with this id.');
  if (!dev) throw fieldError('deviceId', 'No device with this id.');
  if (asset.siteId !== dev.siteId) throw fieldError('assetId', 'The asset belongs to another site than the device.');
  const topic = channelTopic(dev.topicPrefix, asset.code, input.key);
  const dup = await Channel.findOne({
    attributes: ['id'],
    where: { deviceId: input.deviceId, assetId: input.assetId, key: input.key },
    transaction: t,
  });
  if (dup) throw fieldError('key', `Channel ${dup.id} already publishes on ${topic}.`, 'conflict', 'Channel exists');
  const c = await Channel.create(input, { transaction: t });
  // unknown_channels belongs to the ingest worker's records (no model here yet).
  await sequelize.query(
    `update unknown_channels set resolved_at = now(), resolution = $2 where topic = $1 and resolved_at is null`,
    {
      bind: [topic, `${resolution} as channel ${c.id}`],
      transaction: t,
    },
  );
  return { id: c.id, topic };
}

export async function createChannelRecord(
  sequelize: Sequelize,
  actor: AuditActor,
  input: ChannelSpec,
  audited: Record<string, unknown> = { ...input },
): Promise<{ id: number; topic: string }> {
  return withTransaction(sequelize, async (t) => {
    const c = await insertChannel(sequelize, t, input, 'created');
    await auditIn(t, actor, {
      action: 'channel.created',
      entity: 'channel',
      entityId: c.id,
      before: null,
      after: { ...audited, key: input.key, topic: c.topic },
    });
    return c;
  });
}

/** Approve a topic the worker did not know: creates the channel on the asset its topic names. */
export async function approveUnknownChannelRecord(
  sequelize: Sequelize,
  actor: AuditActor,
  id: number,
  spec: { name: string; kind: string; unit: string; min: number; max: number },
): Promise<{ id: number; topic: string }> {
  return withTransaction(sequelize, async (t) => {
    const [u] = await sequelize.query<{
      device_id: number;
      asset_code: string;
      channel_key: string;
      topic: string;
      resolved_at: Date | null;
      resolution: string | null;
    }>(
      'select device_id, asset_code, channel_key, topic, resolved_at, resolution from unknown_channels where id = $1 for update',
      { bind: [id], type: QueryTypes.SELECT, transaction: t },
    );
    if (!u) throw new DomainError('not-found', 'Not found', 'No such unknown channel.');
    if (u.resolved_at)
      throw new DomainError(
        'conflict',
        'Already resolved',
        `This topic was resolved at ${new Date(u.resolved_at).toISOString()} (${u.resolution ?? 'no note'}).`,
      );
    const device = await Device.findByPk(u.device_id, { transaction: t });
    const asset = device ? await Asset.findOne({ where: { siteId: device.siteId, code: u.asset_code }, transaction: t }) : null;
    if (!asset) {
      throw new DomainError(
        'conflict',
        'Unknown asset',
        `The topic names the asset “${u.asset_code}”, which this site does not have. Add the asset, or have the device publish under an existing asset code.`,
      );
    }
    if (!/^[a-z0-9][a-z0-9-]{0,31}$/.test(u.channel_key)) {
      throw new DomainError(
        'conflict',
        'Channel code too long',
        `The topic's channel code “${u.channel_key}” is longer than 32 characters; have the device publish under a shorter code.`,
      );
    }
    const created = await insertChannel(
      sequelize,
      t,
      { ...spec, assetId: asset.id, deviceId: u.device_id, key: u.channel_key },
      'approved',
    );
    await auditIn(t, actor, {
      action: 'channel.approved',
      entity: 'channel',
      entityId: created.id,
      before: { unknownChannelId: id, topic: u.topic, resolved: false },
      after: { ...spec, assetId: asset.id, deviceId: u.device_id, key: u.channel_key, topic: created.topic },
    });
    return created;
  });
}
