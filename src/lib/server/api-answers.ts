/**
 * Compile-time proof that every documented success answer is what the service returns: each
 * line fails to type-check when a service's return type (as JSON: dates become strings) stops
 * fitting the response schema the OpenAPI document shows (`src/lib/shared/api/*.ts`). When a
 * service changes its answer, change its schema with it (and the line here if it moves).
 */
import type { z } from 'zod';
import type * as admin from '../shared/api/admin.ts';
import type * as plant from '../shared/api/plant.ts';
import type * as alarms from '../shared/api/alarms.ts';
import type * as windows from '../shared/api/windows.ts';
import type * as baths from '../shared/api/baths.ts';
import type * as production from '../shared/api/production.ts';
import type * as quality from '../shared/api/quality.ts';
import type * as ovens from '../shared/api/ovens.ts';
import type * as spc from '../shared/api/spc.ts';
import type * as calc from '../shared/api/calc.ts';
import type * as serverAccounts from './services/accounts.ts';
import type * as serverAuditTrail from './services/audit-trail.ts';
import type * as serverPlantSetup from './services/plant-setup.ts';
import type * as coreReadingsStore from '../core/readings-store.ts';
import type * as serverTrend from './services/trend.ts';
import type * as serverFloor from './services/floor.ts';
import type * as serverIngest from './services/ingest.ts';
import type * as serverAlarms from './services/alarms.ts';
import type * as coreAlarmConfigStore from '../core/alarm-config-store.ts';
import type * as serverWindows from './services/windows.ts';
import type * as coreWindowStore from '../core/window-store.ts';
import type * as serverBaths from './services/baths.ts';
import type * as serverDips from './services/dips.ts';
import type * as serverLoads from './services/loads.ts';
import type * as serverQuality from './services/quality.ts';
import type * as serverTrace from './services/trace.ts';
import type * as serverHolds from './services/holds.ts';
import type * as serverSurveys from './services/surveys.ts';
import type * as domainEvaluate from '../domain/spc/evaluate.ts';
import type * as serverSpc from './services/spc.ts';
import type * as domainDipCoat from '../domain/film/dip-coat.ts';
import type * as domainBathMaintenance from '../domain/film/bath-maintenance.ts';
import type * as domainAbrasion from '../domain/quality/abrasion.ts';
import type * as domainFringes from '../domain/quality/fringes.ts';
import type * as domainViscosityCups from '../domain/film/viscosity-cups.ts';

/** A value as `JSON.stringify` writes it. */
type Jsonify<T> = T extends Date
  ? string
  : T extends readonly (infer U)[]
    ? Jsonify<U>[]
    : T extends object
      ? { [K in keyof T]: Jsonify<T[K]> }
      : T;

/** `A` must be assignable to `B`. */
type Conforms<A extends B, B> = [A, B];

export type AnswerChecks = [
  Conforms<Jsonify<Awaited<ReturnType<typeof serverAccounts.updateUser>>>, z.infer<typeof admin.UserViewSchema>>,
  Conforms<Jsonify<Awaited<ReturnType<typeof serverAccounts.adminSendReset>>>, z.infer<typeof admin.ResetSentSchema>>,
  Conforms<Jsonify<Awaited<ReturnType<typeof serverAccounts.revokeToken>>>, z.infer<typeof admin.TokenViewSchema>>,
  Conforms<Jsonify<Awaited<ReturnType<typeof serverAccounts.listLocks>>[number]>, z.infer<typeof admin.LockViewSchema>>,
  Conforms<Jsonify<Awaited<ReturnType<typeof serverAccounts.listCaughtMail>>[number]>, z.infer<typeof admin.MailViewSchema>>,
  Conforms<Jsonify<Awaited<ReturnType<typeof serverAuditTrail.queryAudit>>>, z.infer<typeof admin.AuditPageSchema>>,
  Conforms<Jsonify<Awaited<ReturnType<typeof serverPlantSetup.createChannel>>>, z.infer<typeof plant.ChannelViewSchema>>,
  Conforms<Jsonify<Awaited<ReturnType<typeof serverPlantSetup.listDevices>>[number]>, z.infer<typeof plant.DeviceViewSchema>>,
  Conforms<Jsonify<Awaited<ReturnType<typeof serverPlantSetup.createDevice>>>, z.infer<typeof plant.DeviceCredentialsSchema>>,
  Conforms<Jsonify<Awaited<ReturnType<typeof serverPlantSetup.updateDevice>>>, z.infer<typeof plant.UpdatedDeviceSchema>>,
  Conforms<Jsonify<Awaited<ReturnType<typeof coreReadingsStore.queryReadings>>>, z.infer<typeof plant.ReadingsSchema>>,
  Conforms<
    Jsonify<NonNullable<Awaited<ReturnType<typeof serverTrend.channelAnnotations>>>>,
    z.infer<typeof plant.AnnotationsSchema>
  >,
  Conforms<Jsonify<Awaited<ReturnType<typeof serverFloor.floorSnapshot>>>, z.infer<typeof plant.FloorSnapshotSchema>>,
  Conforms<Jsonify<Awaited<ReturnType<typeof serverIngest.listRejections>>>, z.infer<typeof plant.RejectionsSchema>>,
  Conforms<
    Jsonify<Awaited<ReturnType<typeof serverIngest.listUnknownChannels>>[number]>,
    z.infer<typeof plant.UnknownChannelSchema>
  >,
  Conforms<Jsonify<Awaited<ReturnType<typeof serverAlarms.applyAlarmEvent>>>, z.infer<typeof alarms.AlarmViewSchema>>,
  Conforms<Jsonify<Awaited<ReturnType<typeof serverAlarms.alarmWithEvents>>>, z.infer<typeof alarms.AlarmWithEventsSchema>>,
  Conforms<Jsonify<Awaited<ReturnType<typeof serverAlarms.bulkAck>>>, z.infer<typeof alarms.BulkAckResultSchema>>,
  Conforms<Jsonify<serverAlarms.AlarmHealth>, z.infer<typeof alarms.AlarmKpiReportSchema>>,
  Conforms<
    Jsonify<Awaited<ReturnType<typeof coreAlarmConfigStore.listChannelAlarmConfigs>>[number]>,
    z.infer<typeof alarms.ChannelAlarmConfigViewSchema>
  >,
  Conforms<Jsonify<Awaited<ReturnType<typeof serverAlarms.saveChannelConfig>>>, z.infer<typeof alarms.ChannelAlarmConfigSchema>>,
  Conforms<
    Jsonify<Awaited<ReturnType<typeof coreAlarmConfigStore.listCharacteristicAlarmConfigs>>[number]>,
    z.infer<typeof alarms.CharacteristicAlarmConfigViewSchema>
  >,
  Conforms<
    Jsonify<Awaited<ReturnType<typeof serverAlarms.saveCharacteristicConfig>>>,
    z.infer<typeof alarms.CharacteristicAlarmConfigAnswerSchema>
  >,
  Conforms<Jsonify<Awaited<ReturnType<typeof serverAlarms.escalation>>>, z.infer<typeof alarms.EscalationSchema>>,
  Conforms<Jsonify<Awaited<ReturnType<typeof serverWindows.getWindow>>>, z.infer<typeof windows.WindowViewSchema>>,
  Conforms<
    Jsonify<Awaited<ReturnType<typeof serverWindows.windowWithVersions>>>,
    z.infer<typeof windows.WindowWithVersionsSchema>
  >,
  Conforms<Jsonify<Awaited<ReturnType<typeof serverWindows.approveWindow>>>, z.infer<typeof windows.ApprovedWindowSchema>>,
  Conforms<Jsonify<Awaited<ReturnType<typeof serverWindows.updateDraft>>>, z.infer<typeof windows.UpdatedDraftSchema>>,
  Conforms<
    Jsonify<Awaited<ReturnType<typeof coreWindowStore.listAssignments>>[number]>,
    z.infer<typeof windows.AssignmentSchema>
  >,
  Conforms<Jsonify<Awaited<ReturnType<typeof serverWindows.assignWindow>>>, z.infer<typeof windows.AssignedWindowSchema>>,
  Conforms<
    Jsonify<NonNullable<Awaited<ReturnType<typeof coreWindowStore.windowInForce>>>>,
    z.infer<typeof windows.WindowInForceSchema>
  >,
  Conforms<Jsonify<Awaited<ReturnType<typeof serverWindows.createMaterial>>>, z.infer<typeof windows.MaterialSchema>>,
  Conforms<Jsonify<Awaited<ReturnType<typeof serverWindows.createLacquer>>>, z.infer<typeof windows.LacquerSchema>>,
  Conforms<Jsonify<Awaited<ReturnType<typeof serverBaths.createLot>>>, z.infer<typeof baths.LotSchema>>,
  Conforms<Jsonify<Awaited<ReturnType<typeof serverBaths.listBaths>>[number]>, z.infer<typeof baths.BathStateSchema>>,
  Conforms<Jsonify<Awaited<ReturnType<typeof serverBaths.listChecks>>[number]>, z.infer<typeof baths.BathCheckSchema>>,
  Conforms<Jsonify<Awaited<ReturnType<typeof serverBaths.recordCheck>>>, z.infer<typeof baths.RecordedCheckSchema>>,
  Conforms<Jsonify<Awaited<ReturnType<typeof serverBaths.recordAddition>>>, z.infer<typeof baths.AdditionSchema>>,
  Conforms<Jsonify<Awaited<ReturnType<typeof serverBaths.recordFilterChange>>>, z.infer<typeof baths.FilterChangeRowSchema>>,
  Conforms<Jsonify<Awaited<ReturnType<typeof serverBaths.createCharge>>>, z.infer<typeof baths.ChargeSchema>>,
  Conforms<Jsonify<Awaited<ReturnType<typeof serverDips.listDipRuns>>>, z.infer<typeof production.DipRunListSchema>>,
  Conforms<Jsonify<Awaited<ReturnType<typeof serverDips.recordDipRun>>>, z.infer<typeof production.RecordedDipRunSchema>>,
  Conforms<Jsonify<NonNullable<Awaited<ReturnType<typeof serverDips.getDipRun>>>>, z.infer<typeof production.DipRunSchema>>,
  Conforms<Jsonify<Awaited<ReturnType<typeof serverDips.searchJobs>>[number]>, z.infer<typeof production.JobSearchItemSchema>>,
  Conforms<
    Jsonify<Awaited<ReturnType<typeof serverDips.previewJobCsv>>>,
    z.infer<typeof production.JobImportPreviewAnswerSchema>
  >,
  Conforms<Jsonify<Awaited<ReturnType<typeof serverDips.commitJobCsv>>>, z.infer<typeof production.JobImportResultSchema>>,
  Conforms<Jsonify<Awaited<ReturnType<typeof serverLoads.listLoads>>[number]>, z.infer<typeof production.LoadListItemSchema>>,
  Conforms<Jsonify<Awaited<ReturnType<typeof serverLoads.openLoadByHand>>>, z.infer<typeof production.LoadDetailSchema>>,
  Conforms<Jsonify<Awaited<ReturnType<typeof serverLoads.closeLoadByHand>>>, z.infer<typeof production.ClosedLoadSchema>>,
  Conforms<Jsonify<Awaited<ReturnType<typeof serverLoads.addJobs>>>, z.infer<typeof production.LoadJobsAddedSchema>>,
  Conforms<Jsonify<Awaited<ReturnType<typeof serverLoads.recompute>>>, z.infer<typeof production.RecomputeResultSchema>>,
  Conforms<Jsonify<Awaited<ReturnType<typeof serverQuality.listTests>>[number]>, z.infer<typeof quality.TestListItemSchema>>,
  Conforms<Jsonify<Awaited<ReturnType<typeof serverQuality.createTest>>>, z.infer<typeof quality.RecordedTestSchema>>,
  Conforms<Jsonify<NonNullable<Awaited<ReturnType<typeof serverQuality.getTest>>>>, z.infer<typeof quality.TestDetailSchema>>,
  Conforms<Jsonify<Awaited<ReturnType<typeof serverQuality.uploadTestFile>>>, z.infer<typeof quality.UploadedFileSchema>>,
  Conforms<Jsonify<Awaited<ReturnType<typeof serverQuality.adhesionPChart>>>, z.infer<typeof quality.AdhesionChartSchema>>,
  Conforms<Jsonify<Awaited<ReturnType<typeof serverQuality.failuresByOven>>[number]>, z.infer<typeof quality.FailureGroupSchema>>,
  Conforms<Jsonify<NonNullable<Awaited<ReturnType<typeof serverTrace.traceJob>>>>, z.infer<typeof quality.TraceSchema>>,
  Conforms<Jsonify<Awaited<ReturnType<typeof serverHolds.closeHolds>>[number]>, z.infer<typeof quality.HoldItemSchema>>,
  Conforms<Jsonify<Awaited<ReturnType<typeof serverHolds.placeHolds>>>, z.infer<typeof quality.PlacedHoldsSchema>>,
  Conforms<Jsonify<Awaited<ReturnType<typeof serverHolds.listNcs>>[number]>, z.infer<typeof quality.NcItemSchema>>,
  Conforms<Jsonify<NonNullable<Awaited<ReturnType<typeof serverHolds.getNc>>>>, z.infer<typeof quality.NcDetailSchema>>,
  Conforms<Jsonify<Awaited<ReturnType<typeof serverHolds.dispositionNc>>>, z.infer<typeof quality.NcDispositionedSchema>>,
  Conforms<Jsonify<Awaited<ReturnType<typeof serverHolds.closeNc>>>, z.infer<typeof quality.NcClosedSchema>>,
  Conforms<Jsonify<Awaited<ReturnType<typeof serverSurveys.computeSurvey>>>, z.infer<typeof ovens.SurveyComputationSchema>>,
  Conforms<Jsonify<Awaited<ReturnType<typeof serverSurveys.recordSurvey>>>, z.infer<typeof ovens.RecordedSurveySchema>>,
  Conforms<Jsonify<Awaited<ReturnType<typeof serverSurveys.listSurveys>>[number]>, z.infer<typeof ovens.SurveyItemSchema>>,
  Conforms<Jsonify<Awaited<ReturnType<typeof serverSurveys.surveyStatus>>>, z.infer<typeof ovens.SurveyStatusSchema>>,
  Conforms<Jsonify<Awaited<ReturnType<typeof domainEvaluate.evaluateSpc>>>, z.infer<typeof spc.SpcEvaluateOutputSchema>>,
  Conforms<
    Jsonify<Awaited<ReturnType<typeof serverSpc.characteristicSummaries>>[number]>,
    z.infer<typeof spc.CharacteristicSummarySchema>
  >,
  Conforms<Jsonify<Awaited<ReturnType<typeof serverSpc.getCharacteristic>>>, z.infer<typeof spc.CharacteristicSchema>>,
  Conforms<Jsonify<Awaited<ReturnType<typeof serverSpc.createCharacteristic>>>, z.infer<typeof spc.CreatedCharacteristicSchema>>,
  Conforms<Jsonify<Awaited<ReturnType<typeof serverSpc.updateCharacteristic>>>, z.infer<typeof spc.UpdatedCharacteristicSchema>>,
  Conforms<Jsonify<Awaited<ReturnType<typeof serverSpc.chartData>>>, z.infer<typeof spc.ChartDataSchema>>,
  Conforms<Jsonify<Awaited<ReturnType<typeof serverSpc.pointDetail>>>, z.infer<typeof spc.PointDetailSchema>>,
  Conforms<Jsonify<Awaited<ReturnType<typeof serverSpc.trialStudy>>>, z.infer<typeof spc.TrialStudySchema>>,
  Conforms<Jsonify<Awaited<ReturnType<typeof serverSpc.limitSetFor>>>, z.infer<typeof spc.LimitSetViewSchema>>,
  Conforms<Jsonify<Awaited<ReturnType<typeof serverSpc.draftLimitSet>>>, z.infer<typeof spc.DraftLimitSetSchema>>,
  Conforms<Jsonify<Awaited<ReturnType<typeof serverSpc.approveLimitSet>>>, z.infer<typeof spc.ApprovedLimitSetSchema>>,
  Conforms<
    Jsonify<Awaited<ReturnType<typeof domainDipCoat.withdrawalSpeedForThickness>>>,
    z.infer<typeof calc.SpeedAdviceSchema>
  >,
  Conforms<
    Jsonify<Awaited<ReturnType<typeof domainDipCoat.calibrateThicknessConstant>>>,
    z.infer<typeof calc.ThicknessCalibrationSchema>
  >,
  Conforms<Jsonify<domainBathMaintenance.BathAddition>, z.infer<typeof calc.BathAdditionResultSchema>>,
  Conforms<Jsonify<Awaited<ReturnType<typeof domainAbrasion.bayerRatio>>>, z.infer<typeof calc.AbrasionResultSchema>>,
  Conforms<Jsonify<Awaited<ReturnType<typeof domainFringes.findExtrema>>>, z.infer<typeof calc.FringeAnalysisSchema>>,
  Conforms<
    Jsonify<Awaited<ReturnType<typeof domainViscosityCups.viscosityFromCup>>>,
    z.infer<typeof calc.ViscosityCupResultSchema>
  >,
];
