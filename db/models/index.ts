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
import { Material } from './material.ts';
import { Lacquer } from './lacquer.ts';
import { LacquerLot } from './lacquer-lot.ts';
import { BathCharge } from './bath-charge.ts';
import { BathCheck } from './bath-check.ts';
import { BathAddition } from './bath-addition.ts';
import { FilterChange } from './filter-change.ts';
import { OvenSurvey } from './oven-survey.ts';
import { AuditVerification } from './audit-verification.ts';

export { ApiToken, Asset, AuditEntry, Channel, Device, LoginThrottle, OutboxMail, PasswordReset, Site, User, UserSession };
export { Material, Lacquer, LacquerLot, BathCharge, BathCheck, BathAddition, FilterChange, OvenSurvey };
export { AuditVerification };
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
    Material,
    Lacquer,
    LacquerLot,
    BathCharge,
    BathCheck,
    BathAddition,
    FilterChange,
    OvenSurvey,
    AuditVerification,
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
  LacquerLot.belongsTo(Lacquer, { foreignKey: 'lacquerId' });
  LacquerLot.belongsTo(User, { as: 'creator', foreignKey: 'createdBy' });
  BathCharge.belongsTo(Asset, { as: 'tank', foreignKey: 'tankAssetId' });
  BathCharge.belongsTo(LacquerLot, { as: 'lot', foreignKey: 'lotId' });
  BathCharge.belongsTo(User, { as: 'creator', foreignKey: 'createdBy' });
  BathCheck.belongsTo(Asset, { as: 'tank', foreignKey: 'tankAssetId' });
  BathCheck.belongsTo(BathCharge, { as: 'charge', foreignKey: 'chargeId' });
  BathAddition.belongsTo(Asset, { as: 'tank', foreignKey: 'tankAssetId' });
  BathAddition.belongsTo(BathCharge, { as: 'charge', foreignKey: 'chargeId' });
  BathAddition.belongsTo(LacquerLot, { as: 'lot', foreignKey: 'lotId' });
  BathAddition.belongsTo(BathCheck, { as: 'check', foreignKey: 'checkId' });
  FilterChange.belongsTo(Asset, { as: 'tank', foreignKey: 'tankAssetId' });
  OvenSurvey.belongsTo(Asset, { as: 'oven', foreignKey: 'ovenAssetId' });
  OvenSurvey.belongsTo(User, { as: 'recorder', foreignKey: 'recordedBy' });
}
