/** All models and their associations; call `initModels(sequelize)` once per process. */
import type { Sequelize } from 'sequelize';
import { ApiToken } from './api-token.ts';
import { Asset } from './asset.ts';
import { AuditEntry } from './audit-entry.ts';
import { Channel } from './channel.ts';
import { Device } from './device.ts';
import { LoginThrottle } from './login-throttle.ts';
import { OutboxMail } from './outbox-mail.ts';
import { PasswordReset } from './password-reset.ts';
import { Site } from './site.ts';
import { User } from './user.ts';
import { UserSession } from './user-session.ts';
import { IngestRejection } from './ingest-rejection.ts';
import { UnknownChannel } from './unknown-channel.ts';
import { IngestStatus } from './ingest-status.ts';
import { DeviceEvent } from './device-event.ts';

export { ApiToken, Asset, AuditEntry, Channel, Device, LoginThrottle, OutboxMail, PasswordReset, Site, User, UserSession };
export { IngestRejection, UnknownChannel, IngestStatus, DeviceEvent };
export type { RoleName } from './user.ts';
export type { AssetKind } from './asset.ts';
export type { SignatureRecord } from './audit-entry.ts';

let initialised: Sequelize | null = null;

export function initModels(sequelize: Sequelize): void {
  if (initialised === sequelize) return;
  initialised = sequelize;
  for (const m of [
    ApiToken,
    Asset,
    AuditEntry,
    Channel,
    Device,
    LoginThrottle,
    OutboxMail,
    PasswordReset,
    Site,
    User,
    UserSession,
    IngestRejection,
    UnknownChannel,
    IngestStatus,
    DeviceEvent,
  ]) {
    m.initModel(sequelize);
  }
  Asset.belongsTo(Site, { foreignKey: 'siteId' });
  Asset.belongsTo(Asset, { as: 'parent', foreignKey: 'parentId' });
  Asset.hasMany(Asset, { as: 'children', foreignKey: 'parentId' });
  Channel.belongsTo(Asset, { foreignKey: 'assetId' });
  Channel.belongsTo(Device, { foreignKey: 'deviceId' });
  Device.hasMany(Channel, { foreignKey: 'deviceId' });
  Device.belongsTo(Site, { foreignKey: 'siteId' });
  UserSession.belongsTo(User, { foreignKey: 'userId' });
  ApiToken.belongsTo(User, { as: 'creator', foreignKey: 'createdBy' });
  UnknownChannel.belongsTo(Device, { foreignKey: 'deviceId' });
  DeviceEvent.belongsTo(Device, { foreignKey: 'deviceId' });
}
