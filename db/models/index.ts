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
import { IngestRejection } from './ingest-rejection.ts';
import { UnknownChannel } from './unknown-channel.ts';
import { IngestStatus } from './ingest-status.ts';
import { DeviceEvent } from './device-event.ts';
import { Alarm } from './alarm.ts';
import { AlarmEvent } from './alarm-event.ts';
import { AlarmConfig } from './alarm-config.ts';
import { Characteristic } from './characteristic.ts';
import { LimitSet } from './limit-set.ts';
import { SpcPoint } from './spc-point.ts';
import { SiteSetting } from './site-setting.ts';
import { ProcessWindow } from './process-window.ts';
import { WindowAssignment } from './window-assignment.ts';
import { Job } from './job.ts';
import { Rack } from './rack.ts';
import { DipRun } from './dip-run.ts';
import { DipRunJob } from './dip-run-job.ts';
import { OvenLoad } from './oven-load.ts';
import { LoadJob } from './load-job.ts';
import { QualityTest } from './quality-test.ts';
import { Nonconformance } from './nonconformance.ts';
import { NcTest } from './nc-test.ts';
import { Hold } from './hold.ts';
import { NcDisposition } from './nc-disposition.ts';
import { TestFile } from './test-file.ts';
import { Gauge } from './gauge.ts';
import { GaugeStudy } from './gauge-study.ts';
import { CharacteristicGauge } from './characteristic-gauge.ts';
import { AuditVerification } from './audit-verification.ts';

export {
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
  IngestRejection,
  UnknownChannel,
  IngestStatus,
  DeviceEvent,
  Alarm,
  AlarmEvent,
  AlarmConfig,
  Characteristic,
  LimitSet,
  SpcPoint,
  SiteSetting,
  ProcessWindow,
  WindowAssignment,
  Job,
  Rack,
  DipRun,
  DipRunJob,
  OvenLoad,
  LoadJob,
  QualityTest,
  Nonconformance,
  NcTest,
  Hold,
  NcDisposition,
  TestFile,
  Gauge,
  GaugeStudy,
  CharacteristicGauge,
  AuditVerification,
};
export type { RoleName } from './user.ts';
export type { AssetKind } from './asset.ts';
export type { SignatureRecord } from './audit-entry.ts';
export type { JobStatus } from './job.ts';

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
    IngestRejection,
    UnknownChannel,
    IngestStatus,
    DeviceEvent,
    Alarm,
    AlarmEvent,
    AlarmConfig,
    Characteristic,
    LimitSet,
    SpcPoint,
    SiteSetting,
    ProcessWindow,
    WindowAssignment,
    Job,
    Rack,
    DipRun,
    DipRunJob,
    OvenLoad,
    LoadJob,
    QualityTest,
    Nonconformance,
    NcTest,
    Hold,
    NcDisposition,
    TestFile,
    Gauge,
    GaugeStudy,
    CharacteristicGauge,
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
  UnknownChannel.belongsTo(Device, { foreignKey: 'deviceId' });
  DeviceEvent.belongsTo(Device, { foreignKey: 'deviceId' });
  Alarm.belongsTo(User, { as: 'acker', foreignKey: 'ackedBy' });
  Alarm.belongsTo(Asset, { foreignKey: 'assetId' });
  Alarm.hasMany(AlarmEvent, { as: 'events', foreignKey: 'alarmId' });
  AlarmEvent.belongsTo(Alarm, { foreignKey: 'alarmId' });
  AlarmEvent.belongsTo(User, { foreignKey: 'userId' });
  AlarmConfig.belongsTo(Channel, { foreignKey: 'channelId' });
  AlarmConfig.belongsTo(Characteristic, { foreignKey: 'characteristicId' });
  AlarmConfig.belongsTo(User, { as: 'editor', foreignKey: 'updatedBy' });
  Characteristic.belongsTo(Asset, { foreignKey: 'assetId' });
  Characteristic.hasMany(LimitSet, { foreignKey: 'characteristicId' });
  Characteristic.hasMany(SpcPoint, { foreignKey: 'characteristicId' });
  LimitSet.belongsTo(Characteristic, { foreignKey: 'characteristicId' });
  SpcPoint.belongsTo(Characteristic, { foreignKey: 'characteristicId' });
  SpcPoint.belongsTo(LimitSet, { foreignKey: 'limitSetId' });
  ProcessWindow.belongsTo(User, { as: 'creator', foreignKey: 'createdBy' });
  ProcessWindow.belongsTo(User, { as: 'approver', foreignKey: 'approvedBy' });
  WindowAssignment.belongsTo(ProcessWindow, { as: 'window', foreignKey: 'windowId' });
  WindowAssignment.belongsTo(Asset, { foreignKey: 'assetId' });
  WindowAssignment.belongsTo(User, { as: 'assigner', foreignKey: 'assignedBy' });
  // Jobs, dip runs, oven loads, quality tests, holds and nonconformances (the trace records).
  DipRun.belongsTo(Asset, { as: 'line', foreignKey: 'lineAssetId' });
  DipRun.belongsTo(Asset, { as: 'tank', foreignKey: 'tankAssetId' });
  DipRun.belongsTo(Rack, { foreignKey: 'rackId' });
  DipRun.belongsTo(User, { as: 'recorder', foreignKey: 'recordedBy' });
  DipRun.belongsToMany(Job, { through: DipRunJob, foreignKey: 'dipRunId', otherKey: 'jobId' });
  Job.belongsToMany(DipRun, { through: DipRunJob, foreignKey: 'jobId', otherKey: 'dipRunId' });
  OvenLoad.belongsTo(Asset, { as: 'oven', foreignKey: 'ovenAssetId' });
  OvenLoad.belongsTo(User, { as: 'opener', foreignKey: 'openedByUser' });
  OvenLoad.belongsTo(User, { as: 'closer', foreignKey: 'closedByUser' });
  OvenLoad.hasMany(LoadJob, { foreignKey: 'loadId' });
  LoadJob.belongsTo(OvenLoad, { foreignKey: 'loadId' });
  LoadJob.belongsTo(Job, { foreignKey: 'jobId' });
  LoadJob.belongsTo(Rack, { foreignKey: 'rackId' });
  Job.hasMany(LoadJob, { foreignKey: 'jobId' });
  Job.hasMany(QualityTest, { foreignKey: 'jobId' });
  Job.hasMany(Hold, { foreignKey: 'jobId' });
  QualityTest.belongsTo(Job, { foreignKey: 'jobId' });
  QualityTest.hasMany(TestFile, { foreignKey: 'testId' });
  TestFile.belongsTo(QualityTest, { foreignKey: 'testId' });
  TestFile.belongsTo(User, { as: 'uploader', foreignKey: 'uploadedBy' });
  Hold.belongsTo(Job, { foreignKey: 'jobId' });
  Hold.belongsTo(Nonconformance, { foreignKey: 'ncId' });
  Hold.belongsTo(User, { as: 'placer', foreignKey: 'placedBy' });
  Hold.belongsTo(User, { as: 'closer', foreignKey: 'closedBy' });
  Nonconformance.hasMany(Hold, { foreignKey: 'ncId' });
  Nonconformance.hasMany(NcDisposition, { foreignKey: 'ncId' });
  Nonconformance.belongsToMany(QualityTest, { through: NcTest, foreignKey: 'ncId', otherKey: 'testId' });
  Nonconformance.belongsTo(OvenLoad, { as: 'suspectedLoad', foreignKey: 'suspectedLoadId' });
  Nonconformance.belongsTo(User, { as: 'opener', foreignKey: 'openedBy' });
  Nonconformance.belongsTo(User, { as: 'closer', foreignKey: 'closedBy' });
  NcDisposition.belongsTo(Nonconformance, { foreignKey: 'ncId' });
  GaugeStudy.belongsTo(Gauge, { foreignKey: 'gaugeId' });
  Gauge.hasMany(GaugeStudy, { as: 'studies', foreignKey: 'gaugeId' });
  GaugeStudy.belongsTo(User, { as: 'recorder', foreignKey: 'recordedBy' });
  CharacteristicGauge.belongsTo(Gauge, { foreignKey: 'gaugeId' });
}
