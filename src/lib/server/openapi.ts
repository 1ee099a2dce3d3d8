/**
 * The OpenAPI 3.1 document of Coatrail's API (served at `GET /api/openapi.json`).
 *
 * One entry per operation in `OPERATIONS`; request bodies and query parameters come from the
 * same zod v4 schemas the endpoints validate with (`z.toJSONSchema`). To document a new route,
 * append one line to `OPERATIONS` (tests/api/openapi.test.ts fails for a route file that is
 * not listed). Path parameters are written `{id}` (the route file's `[id]`).
 */
import { z } from 'zod';
import { LoginSchema } from '../shared/auth.ts';
import { AckAlarmSchema, BulkAckSchema, OutOfServiceSchema, ShelveAlarmSchema } from '../shared/alarms.ts';
import {
  AlarmConfigInputSchema,
  AlarmKpiQuerySchema,
  AlarmListQuerySchema,
  CharacteristicAlarmConfigSchema,
  EscalationSettingsSchema,
} from '../shared/alarm-views.ts';
import {
  ActivationEnergyInputSchema,
  AbrasionInputSchema,
  BathAdditionInputSchema,
  CalibrationInputSchema,
  CrosscutInputSchema,
  CrosscutOutputSchema,
  CureEquivalentInputSchema,
  CureEquivalentOutputSchema,
  DipThicknessInputSchema,
  DipThicknessOutputSchema,
  FringeThicknessInputSchema,
  FringeThicknessOutputSchema,
  SpeedAdvisorInputSchema,
  UniformityInputSchema,
  UniformityOutputSchema,
  ViscosityCupInputSchema,
  ViscosityCupOutputSchema,
} from '../shared/calc.ts';
import {
  BathAdditionEntrySchema,
  BathCheckInputSchema,
  BathListQuerySchema,
  ChargeCreateSchema,
  FilterChangeSchema,
  LacquerCreateSchema,
  LotCreateSchema,
  MaterialCreateSchema,
} from '../shared/baths.ts';
import type { Action } from '../shared/roles.ts';
import {
  DipRunCreateSchema,
  DipRunListQuerySchema,
  JobImportCommitSchema,
  JobImportPreviewSchema,
  LoadAddJobsSchema,
  LoadCloseSchema,
  LoadListQuerySchema,
  LoadOpenSchema,
} from '../shared/jobs.ts';
import {
  AcceptanceSchema,
  HoldCloseSchema,
  HoldListQuerySchema,
  HoldPlaceSchema,
  NcCloseSchema,
  NcCreateSchema,
  NcDispositionSchema,
  TestCreateSchema,
  TestListQuerySchema,
  TraceQuerySchema,
} from '../shared/quality.ts';
import { SpcEvaluateInputSchema } from '../shared/spc.ts';
import { SurveyInputSchema, SurveySettingsSchema } from '../shared/surveys.ts';
import { ApproveLimitSetSchema, CharacteristicInputSchema, StudyInputSchema } from '../shared/characteristics.ts';
import { SpectrumOptionsSchema } from '../shared/spectrum.ts';
import {
  CharacteristicGaugeSchema,
  GaugeBiasInputSchema,
  GaugeCreateSchema,
  GaugeLinearityInputSchema,
  GaugeRrInputSchema,
  GaugeStudyCreateSchema,
} from '../shared/msa.ts';
import { DewPointInputSchema } from '../shared/room.ts';
import {
  ColourDifferenceInputSchema,
  ColourDifferenceOutputSchema,
  SpectrumColourInputSchema,
  SpectrumColourOutputSchema,
  StackReflectanceInputSchema,
  StackReflectanceOutputSchema,
} from '../shared/optics.ts';
import {
  WindowApproveSchema,
  WindowAssignSchema,
  WindowDraftCreateSchema,
  WindowDraftUpdateSchema,
  WINDOW_STATUSES,
} from '../shared/windows.ts';

export type Method = 'GET' | 'POST' | 'PUT' | 'PATCH' | 'DELETE';

export interface Operation {
  method: Method;
  /** OpenAPI path, e.g. `/api/v1/windows/{id}/approve`. */
  path: string;
  summary: string;
  /** The permission the endpoint asks for (`requireRole`), or 'public'. */
  access: Action | 'public';
  tag: string;
  /** JSON request body schema. */
  body?: z.ZodType;
  /** A multipart/CSV upload instead of JSON (described by hand). */
  upload?: { fields: z.ZodType; note: string };
  /** Query-string schema (an object). */
  query?: z.ZodType;
  /** Success response body schema (200/201), when there is a shared one. */
  response?: z.ZodType;
  /** Success status (default 200). */
  status?: number;
}

const WindowStatusQuery = z.object({ status: z.enum(WINDOW_STATUSES).optional() });
const AssetQuery = z.object({ assetId: z.number().int().positive().optional() });
const InForceQuery = z.object({ assetId: z.number().int().positive(), at: z.iso.datetime({ offset: true }).optional() });

/** Every operation of the API. Append new routes here (one line each). */
export const OPERATIONS: Operation[] = [
  // service
  { method: 'GET', path: '/api/health', summary: 'Health: database, broker and ingest lag', access: 'public', tag: 'service' },
  { method: 'GET', path: '/api/openapi.json', summary: 'This OpenAPI document', access: 'public', tag: 'service' },
  {
    method: 'GET',
    path: '/api/v1/stream',
    summary: 'Live events (server-sent events; ?kinds=readings,alarms,points,devices,loads)',
    access: 'view',
    tag: 'service',
  },
  // sign-in
  {
    method: 'POST',
    path: '/api/auth/login',
    summary: 'Sign in; sets the session cookie',
    access: 'public',
    tag: 'auth',
    body: LoginSchema,
  },
  { method: 'POST', path: '/api/auth/logout', summary: 'Sign out', access: 'public', tag: 'auth' },
  {
    method: 'POST',
    path: '/api/auth/forgot-password',
    summary: 'Ask for a password-reset link by e-mail',
    access: 'public',
    tag: 'auth',
  },
  {
    method: 'POST',
    path: '/api/auth/reset-password',
    summary: 'Set a new password with a reset link',
    access: 'public',
    tag: 'auth',
  },
  // administration
  { method: 'GET', path: '/api/v1/admin/users', summary: 'Users', access: 'admin.users', tag: 'admin' },
  { method: 'POST', path: '/api/v1/admin/users', summary: 'Create a user', access: 'admin.users', tag: 'admin' },
  {
    method: 'PATCH',
    path: '/api/v1/admin/users/{id}',
    summary: 'Change a user (role, name, active)',
    access: 'admin.users',
    tag: 'admin',
  },
  {
    method: 'POST',
    path: '/api/v1/admin/users/{id}/password-reset',
    summary: 'Send a user a password-reset link',
    access: 'admin.users',
    tag: 'admin',
  },
  { method: 'GET', path: '/api/v1/admin/tokens', summary: 'API tokens', access: 'admin.tokens', tag: 'admin' },
  {
    method: 'POST',
    path: '/api/v1/admin/tokens',
    summary: 'Create an API token (shown once)',
    access: 'admin.tokens',
    tag: 'admin',
  },
  {
    method: 'POST',
    path: '/api/v1/admin/tokens/{id}/revoke',
    summary: 'Revoke an API token',
    access: 'admin.tokens',
    tag: 'admin',
  },
  { method: 'GET', path: '/api/v1/admin/security/locks', summary: 'Sign-in lock-outs', access: 'admin.security', tag: 'admin' },
  {
    method: 'POST',
    path: '/api/v1/admin/security/unlock',
    summary: 'Lift a sign-in lock-out',
    access: 'admin.security',
    tag: 'admin',
  },
  { method: 'GET', path: '/api/v1/admin/mail', summary: 'Outgoing mail log', access: 'admin.mail', tag: 'admin' },
  { method: 'GET', path: '/api/v1/audit', summary: 'The audit trail', access: 'audit.view', tag: 'admin' },
  // plant
  {
    method: 'GET',
    path: '/api/v1/assets',
    summary: 'The asset tree (lines, tanks, ovens, zones, coaters)',
    access: 'view',
    tag: 'plant',
  },
  { method: 'GET', path: '/api/v1/channels', summary: 'Channels with unit, range and MQTT topic', access: 'view', tag: 'plant' },
  { method: 'POST', path: '/api/v1/channels', summary: 'Add a channel', access: 'plant.configure', tag: 'plant' },
  { method: 'GET', path: '/api/v1/devices', summary: 'MQTT devices', access: 'plant.view' as Action, tag: 'plant' },
  {
    method: 'POST',
    path: '/api/v1/devices',
    summary: 'Add a device (its password is shown once)',
    access: 'admin.devices',
    tag: 'plant',
  },
  { method: 'PATCH', path: '/api/v1/devices/{id}', summary: 'Change a device', access: 'admin.devices', tag: 'plant' },
  {
    method: 'POST',
    path: '/api/v1/devices/{id}/rotate-password',
    summary: 'New device password (shown once)',
    access: 'admin.devices',
    tag: 'plant',
  },
  {
    method: 'POST',
    path: '/api/v1/ingest/unknown-channels/{id}/approve',
    summary: 'Turn an unknown topic into a channel',
    access: 'plant.configure',
    tag: 'plant',
  },
  {
    method: 'GET',
    path: '/api/v1/channels/{id}/readings',
    summary: 'Readings of a channel, raw or downsampled (?from&to&maxPoints)',
    access: 'view',
    tag: 'plant',
  },
  {
    method: 'GET',
    path: '/api/v1/channels/{id}/annotations',
    summary: 'Events to mark on a channel’s chart',
    access: 'view',
    tag: 'plant',
  },
  { method: 'GET', path: '/api/v1/floor', summary: 'The floor overview', access: 'view', tag: 'plant' },
  {
    method: 'GET',
    path: '/api/v1/ingest/rejections',
    summary: 'Refused MQTT messages with reasons',
    access: 'ingest.review',
    tag: 'plant',
  },
  {
    method: 'GET',
    path: '/api/v1/ingest/unknown-channels',
    summary: 'Topics that name no channel',
    access: 'ingest.review',
    tag: 'plant',
  },
  // production records
  {
    method: 'GET',
    path: '/api/v1/dip-runs',
    summary: 'Dip runs (?line&job&from&to&limit)',
    access: 'view',
    tag: 'production',
    query: DipRunListQuerySchema,
  },
  {
    method: 'POST',
    path: '/api/v1/dip-runs',
    summary: 'Record a dip run',
    access: 'dip.record' as Action,
    tag: 'production',
    body: DipRunCreateSchema,
    status: 201,
  },
  {
    method: 'GET',
    path: '/api/v1/dip-runs/{id}',
    summary: 'One dip run with its jobs, bath charge, last check and stroke speed',
    access: 'view',
    tag: 'production',
  },
  { method: 'GET', path: '/api/v1/jobs', summary: 'Jobs by number prefix (?q)', access: 'view', tag: 'production' },
  {
    method: 'POST',
    path: '/api/v1/jobs/import/preview',
    summary: 'Preview a job import',
    access: 'dip.record' as Action,
    tag: 'production',
    body: JobImportPreviewSchema,
  },
  {
    method: 'POST',
    path: '/api/v1/jobs/import/commit',
    summary: 'Commit a job import',
    access: 'dip.record' as Action,
    tag: 'production',
    body: JobImportCommitSchema,
    status: 201,
  },
  {
    method: 'GET',
    path: '/api/v1/loads',
    summary: 'Oven loads (?oven&status&verdict&from&to&job&limit; format=csv)',
    access: 'view',
    tag: 'production',
    query: LoadListQuerySchema,
  },
  {
    method: 'POST',
    path: '/api/v1/loads',
    summary: 'Open an oven load by hand',
    access: 'load.manage',
    tag: 'production',
    body: LoadOpenSchema,
    status: 201,
  },
  {
    method: 'GET',
    path: '/api/v1/loads/{id}',
    summary: 'One load: cure record and verdict, jobs, alarms during the load',
    access: 'view',
    tag: 'production',
  },
  {
    method: 'POST',
    path: '/api/v1/loads/{id}/close',
    summary: 'Close an open load (the cure record is computed at once)',
    access: 'load.manage',
    tag: 'production',
    body: LoadCloseSchema,
  },
  {
    method: 'POST',
    path: '/api/v1/loads/{id}/jobs',
    summary: 'Scan jobs or racks into an open load',
    access: 'load.manage',
    tag: 'production',
    body: LoadAddJobsSchema,
  },
  {
    method: 'POST',
    path: '/api/v1/loads/{id}/recompute',
    summary: 'Recompute a closed load’s cure record',
    access: 'load.recompute' as Action,
    tag: 'production',
  },
  // quality
  {
    method: 'GET',
    path: '/api/v1/quality/tests',
    summary: 'Quality tests (?result=fail…)',
    access: 'view',
    tag: 'quality',
    query: TestListQuerySchema,
  },
  {
    method: 'POST',
    path: '/api/v1/quality/tests',
    summary: 'Record a test',
    access: 'quality.record',
    tag: 'quality',
    body: TestCreateSchema,
    status: 201,
  },
  {
    method: 'GET',
    path: '/api/v1/quality/tests/{id}',
    summary: 'One test with its inputs, classes, acceptance and files',
    access: 'view',
    tag: 'quality',
  },
  {
    method: 'POST',
    path: '/api/v1/quality/tests/{id}/files',
    summary: 'Attach a photo or spectrum to a test',
    access: 'quality.record',
    tag: 'quality',
    upload: {
      fields: z.object({}),
      note: 'multipart/form-data with one `file` field: PNG, JPEG, PDF or UTF-8 text/CSV judged by its content (415 otherwise), at most 5 MB (413), a CSV must parse (400). Send a same-origin Origin header (Astro refuses cross-site multipart posts).',
    },
    status: 201,
  },
  { method: 'GET', path: '/api/v1/quality/files/{id}', summary: 'A test’s attached file', access: 'view', tag: 'quality' },
  {
    method: 'GET',
    path: '/api/v1/quality/acceptance',
    summary: 'The lab’s acceptance settings',
    access: 'view',
    tag: 'quality',
    response: AcceptanceSchema,
  },
  {
    method: 'PUT',
    path: '/api/v1/quality/acceptance',
    summary: 'Replace the acceptance settings',
    access: 'quality.settings' as Action,
    tag: 'quality',
    body: AcceptanceSchema,
  },
  {
    method: 'GET',
    path: '/api/v1/quality/adhesion',
    summary: 'Adhesion failure rate per week and by oven and bath charge',
    access: 'view',
    tag: 'quality',
  },
  {
    method: 'GET',
    path: '/api/v1/trace/jobs/{jobNumber}',
    summary: 'Trace a job: dip runs with the bath at dip time, cure loads, alarms, tests, siblings',
    access: 'view',
    tag: 'quality',
    query: TraceQuerySchema,
  },
  {
    method: 'GET',
    path: '/api/v1/holds',
    summary: 'Holds (?status=active|closed|all&job; format=csv)',
    access: 'view',
    tag: 'quality',
    query: HoldListQuerySchema,
  },
  {
    method: 'POST',
    path: '/api/v1/holds',
    summary: 'Place jobs on hold',
    access: 'hold.place',
    tag: 'quality',
    body: HoldPlaceSchema,
    status: 201,
  },
  {
    method: 'POST',
    path: '/api/v1/holds/close',
    summary: 'Release or disposition holds (electronic signature)',
    access: 'hold.release',
    tag: 'quality',
    body: HoldCloseSchema,
  },
  {
    method: 'GET',
    path: '/api/v1/nonconformances',
    summary: 'Nonconformances (?status=open|closed)',
    access: 'view',
    tag: 'quality',
  },
  {
    method: 'POST',
    path: '/api/v1/nonconformances',
    summary: 'Write a nonconformance',
    access: 'nc.write',
    tag: 'quality',
    body: NcCreateSchema,
    status: 201,
  },
  {
    method: 'GET',
    path: '/api/v1/nonconformances/{id}',
    summary: 'One nonconformance with its tests, holds and dispositions',
    access: 'view',
    tag: 'quality',
  },
  {
    method: 'POST',
    path: '/api/v1/nonconformances/{id}/dispositions',
    summary: 'Disposition held jobs of a nonconformance (electronic signature)',
    access: 'hold.release',
    tag: 'quality',
    body: NcDispositionSchema,
    status: 201,
  },
  {
    method: 'POST',
    path: '/api/v1/nonconformances/{id}/close',
    summary: 'Close a nonconformance (electronic signature)',
    access: 'nc.write',
    tag: 'quality',
    body: NcCloseSchema,
  },
  {
    method: 'GET',
    path: '/api/v1/surveys',
    summary: 'Oven uniformity surveys (?ovenAssetId), with overdue state',
    access: 'view',
    tag: 'ovens',
  },
  {
    method: 'POST',
    path: '/api/v1/surveys',
    summary: 'Record a uniformity survey',
    access: 'survey.record' as Action,
    tag: 'ovens',
    body: SurveyInputSchema,
    status: 201,
  },
  {
    method: 'POST',
    path: '/api/v1/surveys/preview',
    summary: 'Check and compute a survey without storing it',
    access: 'survey.record' as Action,
    tag: 'ovens',
    body: SurveyInputSchema,
  },
  { method: 'GET', path: '/api/v1/surveys/{id}', summary: 'One survey', access: 'view', tag: 'ovens' },
  {
    method: 'GET',
    path: '/api/v1/surveys/settings',
    summary: 'Survey interval and uniformity class table',
    access: 'view',
    tag: 'ovens',
    response: SurveySettingsSchema,
  },
  {
    method: 'PUT',
    path: '/api/v1/surveys/settings',
    summary: 'Change the survey settings',
    access: 'plant.configure',
    tag: 'ovens',
    body: SurveySettingsSchema,
  },
  // alarms
  {
    method: 'GET',
    path: '/api/v1/alarms',
    summary: 'Alarms (?state=ISA state names or open, ?priority=, ?limit=)',
    access: 'view',
    tag: 'alarms',
    query: AlarmListQuerySchema,
  },
  {
    method: 'POST',
    path: '/api/v1/alarms/ack',
    summary: 'Acknowledge several alarms with one comment',
    access: 'alarm.ack',
    tag: 'alarms',
    body: BulkAckSchema,
  },
  {
    method: 'GET',
    path: '/api/v1/alarms/kpi',
    summary: 'Alarm-system performance (ISA-18.2 benchmarks); ?format=csv',
    access: 'alarm.health',
    tag: 'alarms',
    query: AlarmKpiQuerySchema,
  },
  { method: 'GET', path: '/api/v1/alarms/{id}', summary: 'One alarm with its history', access: 'view', tag: 'alarms' },
  {
    method: 'POST',
    path: '/api/v1/alarms/{id}/ack',
    summary: 'Acknowledge an alarm with a comment',
    access: 'alarm.ack',
    tag: 'alarms',
    body: AckAlarmSchema,
  },
  {
    method: 'POST',
    path: '/api/v1/alarms/{id}/shelve',
    summary: 'Shelve an alarm for minutes with a reason',
    access: 'alarm.shelve',
    tag: 'alarms',
    body: ShelveAlarmSchema,
  },
  { method: 'POST', path: '/api/v1/alarms/{id}/unshelve', summary: 'Unshelve an alarm', access: 'alarm.shelve', tag: 'alarms' },
  {
    method: 'POST',
    path: '/api/v1/alarms/{id}/out-of-service',
    summary: 'Take an alarm out of service',
    access: 'alarm.configure',
    tag: 'alarms',
    body: OutOfServiceSchema,
  },
  {
    method: 'POST',
    path: '/api/v1/alarms/{id}/return-to-service',
    summary: 'Return an alarm to service',
    access: 'alarm.configure',
    tag: 'alarms',
    body: OutOfServiceSchema,
  },
  { method: 'GET', path: '/api/v1/alarm-configs', summary: 'Limit-alarm settings', access: 'alarm.configure', tag: 'alarms' },
  {
    method: 'PUT',
    path: '/api/v1/alarm-configs/{channelId}',
    summary: 'Set a channel’s limit and no-data alarm',
    access: 'alarm.configure',
    tag: 'alarms',
    body: AlarmConfigInputSchema,
  },
  {
    method: 'DELETE',
    path: '/api/v1/alarm-configs/{channelId}',
    summary: 'Remove a channel’s limit alarm',
    access: 'alarm.configure',
    tag: 'alarms',
  },
  {
    method: 'GET',
    path: '/api/v1/alarm-configs/escalation',
    summary: 'Escalation rules',
    access: 'alarm.configure',
    tag: 'alarms',
  },
  {
    method: 'PUT',
    path: '/api/v1/alarm-configs/escalation',
    summary: 'Set the escalation rules',
    access: 'alarm.configure',
    tag: 'alarms',
    body: EscalationSettingsSchema,
  },
  {
    method: 'GET',
    path: '/api/v1/alarm-configs/characteristics',
    summary: 'Control-chart alarm settings per characteristic',
    access: 'alarm.configure',
    tag: 'alarms',
  },
  {
    method: 'PUT',
    path: '/api/v1/alarm-configs/characteristics/{characteristicId}',
    summary: 'Switch a characteristic’s control-chart alarms on or off and set their priority',
    access: 'alarm.configure',
    tag: 'alarms',
    body: CharacteristicAlarmConfigSchema,
  },
  // SPC
  {
    method: 'POST',
    path: '/api/v1/spc/evaluate',
    summary: 'Stateless SPC on posted data (product.md §6)',
    access: 'spc.evaluate',
    tag: 'spc',
    body: SpcEvaluateInputSchema,
  },
  { method: 'GET', path: '/api/v1/characteristics', summary: 'Characteristics', access: 'view', tag: 'spc' },
  {
    method: 'POST',
    path: '/api/v1/characteristics',
    summary: 'Define a characteristic',
    access: 'characteristic.edit',
    tag: 'spc',
    body: CharacteristicInputSchema,
  },
  { method: 'GET', path: '/api/v1/characteristics/{id}', summary: 'One characteristic', access: 'view', tag: 'spc' },
  {
    method: 'PUT',
    path: '/api/v1/characteristics/{id}',
    summary: 'Change a characteristic',
    access: 'characteristic.edit',
    tag: 'spc',
    body: CharacteristicInputSchema,
  },
  {
    method: 'POST',
    path: '/api/v1/characteristics/{id}/study',
    summary: 'Phase I trial limits (not stored)',
    access: 'limits.study',
    tag: 'spc',
    body: StudyInputSchema,
  },
  { method: 'GET', path: '/api/v1/characteristics/{id}/limit-sets', summary: 'Control-limit sets', access: 'view', tag: 'spc' },
  {
    method: 'POST',
    path: '/api/v1/characteristics/{id}/limit-sets',
    summary: 'Propose a control-limit set',
    access: 'limits.study',
    tag: 'spc',
    body: StudyInputSchema,
  },
  {
    method: 'GET',
    path: '/api/v1/characteristics/{id}/limit-sets/{setId}',
    summary: 'One control-limit set',
    access: 'view',
    tag: 'spc',
  },
  {
    method: 'DELETE',
    path: '/api/v1/characteristics/{id}/limit-sets/{setId}',
    summary: 'Withdraw a proposed limit set',
    access: 'limits.study',
    tag: 'spc',
  },
  {
    method: 'POST',
    path: '/api/v1/characteristics/{id}/limit-sets/{setId}/approve',
    summary: 'Approve a limit set (electronic signature)',
    access: 'limits.approve',
    tag: 'spc',
    body: ApproveLimitSetSchema,
  },
  { method: 'GET', path: '/api/v1/characteristics/{id}/points', summary: 'Chart points', access: 'view', tag: 'spc' },
  {
    method: 'GET',
    path: '/api/v1/characteristics/{id}/points/{pointId}',
    summary: 'One chart point',
    access: 'view',
    tag: 'spc',
  },
  // process windows
  {
    method: 'GET',
    path: '/api/v1/windows',
    summary: 'Process-window versions',
    access: 'view',
    tag: 'windows',
    query: WindowStatusQuery,
  },
  {
    method: 'POST',
    path: '/api/v1/windows',
    summary: 'New draft version of a lacquer × substrate window',
    access: 'window.edit',
    tag: 'windows',
    body: WindowDraftCreateSchema,
    status: 201,
  },
  {
    method: 'GET',
    path: '/api/v1/windows/{id}',
    summary: 'A window with every version (diff vs previous) and its assignments',
    access: 'view',
    tag: 'windows',
  },
  {
    method: 'PATCH',
    path: '/api/v1/windows/{id}',
    summary: 'Edit a draft',
    access: 'window.edit',
    tag: 'windows',
    body: WindowDraftUpdateSchema,
  },
  {
    method: 'POST',
    path: '/api/v1/windows/{id}/approve',
    summary: 'Approve a draft with an electronic signature (effective now; previous version superseded)',
    access: 'window.approve',
    tag: 'windows',
    body: WindowApproveSchema,
  },
  {
    method: 'GET',
    path: '/api/v1/windows/assignments',
    summary: 'Which window each line/oven ran when',
    access: 'view',
    tag: 'windows',
    query: AssetQuery,
  },
  {
    method: 'POST',
    path: '/api/v1/windows/assignments',
    summary: 'Assign a window to a line/oven from a time',
    access: 'window.edit',
    tag: 'windows',
    body: WindowAssignSchema,
    status: 201,
  },
  {
    method: 'GET',
    path: '/api/v1/windows/in-force',
    summary: 'The window in force for an asset at a time',
    access: 'view',
    tag: 'windows',
    query: InForceQuery,
  },
  { method: 'GET', path: '/api/v1/materials', summary: 'Substrates', access: 'view', tag: 'windows' },
  {
    method: 'POST',
    path: '/api/v1/materials',
    summary: 'Add a substrate',
    access: 'window.edit',
    tag: 'windows',
    body: MaterialCreateSchema,
    status: 201,
  },
  { method: 'GET', path: '/api/v1/lacquers', summary: 'Lacquers', access: 'view', tag: 'windows' },
  {
    method: 'POST',
    path: '/api/v1/lacquers',
    summary: 'Add a lacquer',
    access: 'window.edit',
    tag: 'windows',
    body: LacquerCreateSchema,
    status: 201,
  },
  // bath log
  { method: 'GET', path: '/api/v1/lots', summary: 'Lacquer lots', access: 'view', tag: 'baths' },
  {
    method: 'POST',
    path: '/api/v1/lots',
    summary: 'Record a received lot',
    access: 'bath.configure',
    tag: 'baths',
    body: LotCreateSchema,
    status: 201,
  },
  {
    method: 'GET',
    path: '/api/v1/baths',
    summary: 'Hard-coat baths: charge, age, pot life, window, last check, additions',
    access: 'view',
    tag: 'baths',
  },
  {
    method: 'GET',
    path: '/api/v1/baths/checks',
    summary: 'Bath checks',
    access: 'view',
    tag: 'baths',
    query: BathListQuerySchema,
  },
  {
    method: 'POST',
    path: '/api/v1/baths/checks',
    summary: 'Log a bath check (viscosity computed and stored by the server)',
    access: 'bath.log',
    tag: 'baths',
    body: BathCheckInputSchema,
    status: 201,
  },
  {
    method: 'GET',
    path: '/api/v1/baths/additions',
    summary: 'Bath additions',
    access: 'view',
    tag: 'baths',
    query: BathListQuerySchema,
  },
  {
    method: 'POST',
    path: '/api/v1/baths/additions',
    summary: 'Log a solvent or fresh-lacquer addition',
    access: 'bath.log',
    tag: 'baths',
    body: BathAdditionEntrySchema,
    status: 201,
  },
  {
    method: 'GET',
    path: '/api/v1/baths/filter-changes',
    summary: 'Filter changes',
    access: 'view',
    tag: 'baths',
    query: BathListQuerySchema,
  },
  {
    method: 'POST',
    path: '/api/v1/baths/filter-changes',
    summary: 'Log a filter change',
    access: 'bath.log',
    tag: 'baths',
    body: FilterChangeSchema,
    status: 201,
  },
  {
    method: 'GET',
    path: '/api/v1/baths/charges',
    summary: 'Bath charges',
    access: 'view',
    tag: 'baths',
    query: BathListQuerySchema,
  },
  {
    method: 'POST',
    path: '/api/v1/baths/charges',
    summary: 'Record a charge (a tank filled from a lot)',
    access: 'bath.configure',
    tag: 'baths',
    body: ChargeCreateSchema,
    status: 201,
  },
  // calculators (product.md §6)
  {
    method: 'POST',
    path: '/api/v1/calc/dip-thickness',
    summary: 'Landau–Levich dip-coat thickness',
    access: 'calc.use',
    tag: 'calculators',
    body: DipThicknessInputSchema,
    response: DipThicknessOutputSchema,
  },
  {
    method: 'POST',
    path: '/api/v1/calc/viscosity-cup',
    summary: 'Viscosity from cup efflux time',
    access: 'calc.use',
    tag: 'calculators',
    body: ViscosityCupInputSchema,
    response: ViscosityCupOutputSchema,
  },
  {
    method: 'POST',
    path: '/api/v1/calc/cure-equivalent',
    summary: 'Arrhenius equivalent cure minutes',
    access: 'calc.use',
    tag: 'calculators',
    body: CureEquivalentInputSchema,
    response: CureEquivalentOutputSchema,
  },
  {
    method: 'POST',
    path: '/api/v1/calc/fringe-thickness',
    summary: 'Thickness from two reflectance extrema',
    access: 'calc.use',
    tag: 'calculators',
    body: FringeThicknessInputSchema,
    response: FringeThicknessOutputSchema,
  },
  {
    method: 'POST',
    path: '/api/v1/calc/fringe-thickness/spectrum',
    summary: 'Thickness from an uploaded reflectance spectrum',
    access: 'calc.use',
    tag: 'calculators',
    upload: {
      fields: SpectrumOptionsSchema,
      note: 'multipart/form-data with a CSV `file` (wavelength nm, reflectance; ≤ 1 MB, text only) plus these fields (browsers; Astro’s origin check wants a same-origin Origin header on multipart posts); machine clients send a text/csv body with the fields as query parameters.',
    },
  },
  {
    method: 'POST',
    path: '/api/v1/calc/crosscut',
    summary: 'Cross-cut class (ISO 2409, ASTM D3359)',
    access: 'calc.use',
    tag: 'calculators',
    body: CrosscutInputSchema,
    response: CrosscutOutputSchema,
  },
  {
    method: 'POST',
    path: '/api/v1/calc/uniformity',
    summary: 'Oven uniformity survey',
    access: 'calc.use',
    tag: 'calculators',
    body: UniformityInputSchema,
    response: UniformityOutputSchema,
  },
  {
    method: 'POST',
    path: '/api/v1/calc/speed-advisor',
    summary: 'Withdrawal speed for a target thickness',
    access: 'calc.use',
    tag: 'calculators',
    body: SpeedAdvisorInputSchema,
  },
  {
    method: 'POST',
    path: '/api/v1/calc/calibration',
    summary: 'Calibrate the thickness constant from measured films',
    access: 'calc.use',
    tag: 'calculators',
    body: CalibrationInputSchema,
  },
  {
    method: 'POST',
    path: '/api/v1/calc/bath-addition',
    summary: 'Solvent / fresh-lacquer addition by mass balance',
    access: 'calc.use',
    tag: 'calculators',
    body: BathAdditionInputSchema,
  },
  {
    method: 'POST',
    path: '/api/v1/calc/activation-energy',
    summary: 'Activation energy making two cure schedules equivalent',
    access: 'calc.use',
    tag: 'calculators',
    body: ActivationEnergyInputSchema,
  },
  {
    method: 'POST',
    path: '/api/v1/calc/abrasion',
    summary: 'Bayer abrasion ratio (ASTM F735)',
    access: 'calc.use',
    tag: 'calculators',
    body: AbrasionInputSchema,
  },
  // AR coating calculators (issue 16)
  {
    method: 'POST',
    path: '/api/v1/calc/stack-reflectance',
    summary: 'Thin-film stack reflectance and transmittance (characteristic matrix; ≤ 50 layers, ≤ 2,001 wavelengths)',
    access: 'calc.use',
    tag: 'calculators',
    body: StackReflectanceInputSchema,
    response: StackReflectanceOutputSchema,
  },
  {
    method: 'POST',
    path: '/api/v1/calc/spectrum-colour',
    summary: 'Colour and luminous reflectance of a reflectance spectrum (CIE 1931 2°, D65; ≤ 2,001 points)',
    access: 'calc.use',
    tag: 'calculators',
    body: SpectrumColourInputSchema,
    response: SpectrumColourOutputSchema,
  },
  {
    method: 'POST',
    path: '/api/v1/calc/colour-difference',
    summary: 'ΔE76 and CIEDE2000 between two CIELAB colours',
    access: 'calc.use',
    tag: 'calculators',
    body: ColourDifferenceInputSchema,
    response: ColourDifferenceOutputSchema,
  },
  // measurement-system analysis (issue 15)
  { method: 'GET', path: '/api/v1/gauges', summary: 'Gauges with their newest gauge R&R verdict', access: 'view', tag: 'msa' },
  {
    method: 'POST',
    path: '/api/v1/gauges',
    summary: 'Register a gauge',
    access: 'msa.record',
    tag: 'msa',
    body: GaugeCreateSchema,
    status: 201,
  },
  {
    method: 'GET',
    path: '/api/v1/gauges/studies',
    summary: 'Measurement-system studies, newest first',
    access: 'view',
    tag: 'msa',
    query: z.object({ gaugeId: z.number().int().positive().optional() }),
  },
  {
    method: 'POST',
    path: '/api/v1/gauges/studies',
    summary: 'Compute and store a gauge R&R, bias or linearity study (AIAG MSA 4th ed.)',
    access: 'msa.record',
    tag: 'msa',
    body: GaugeStudyCreateSchema,
    status: 201,
  },
  {
    method: 'GET',
    path: '/api/v1/gauges/studies/{id}',
    summary: 'One study with readings and result',
    access: 'view',
    tag: 'msa',
  },
  {
    method: 'GET',
    path: '/api/v1/characteristics/{id}/gauge',
    summary: 'The gauge of a characteristic and its study status',
    access: 'view',
    tag: 'msa',
  },
  {
    method: 'PUT',
    path: '/api/v1/characteristics/{id}/gauge',
    summary: 'Set or clear the gauge of a characteristic',
    access: 'characteristic.edit',
    tag: 'msa',
    body: CharacteristicGaugeSchema,
  },
  {
    method: 'POST',
    path: '/api/v1/calc/gauge-rr',
    summary: 'Gauge R&R by ANOVA or average and range',
    access: 'calc.use',
    tag: 'calculators',
    body: GaugeRrInputSchema,
  },
  {
    method: 'POST',
    path: '/api/v1/calc/gauge-bias',
    summary: 'Gauge bias t test',
    access: 'calc.use',
    tag: 'calculators',
    body: GaugeBiasInputSchema,
  },
  {
    method: 'POST',
    path: '/api/v1/calc/gauge-linearity',
    summary: 'Gauge linearity regression',
    access: 'calc.use',
    tag: 'calculators',
    body: GaugeLinearityInputSchema,
  },
  {
    method: 'POST',
    path: '/api/v1/calc/dew-point',
    summary: 'Dew point (Magnus) and blush risk of a surface',
    access: 'calc.use',
    tag: 'calculators',
    body: DewPointInputSchema,
  },
];

function jsonSchema(schema: z.ZodType, io: 'input' | 'output'): Record<string, unknown> {
  try {
    const s = z.toJSONSchema(schema, { io, unrepresentable: 'any' }) as Record<string, unknown>;
    delete s['$schema'];
    return s;
  } catch {
    return { type: 'object' };
  }
}

const problem = { $ref: '#/components/schemas/Problem' };
const problemResponse = (description: string) => ({ description, content: { 'application/problem+json': { schema: problem } } });

function queryParameters(schema: z.ZodType): unknown[] {
  const s = jsonSchema(schema, 'input');
  const props = (s['properties'] ?? {}) as Record<string, unknown>;
  const required = new Set((s['required'] as string[] | undefined) ?? []);
  return Object.entries(props).map(([name, p]) => ({ name, in: 'query', required: required.has(name), schema: p }));
}

function operationObject(op: Operation): Record<string, unknown> {
  const params: unknown[] = [...op.path.matchAll(/\{([^}]+)\}/g)].map((m) => ({
    name: m[1],
    in: 'path',
    required: true,
    schema: { type: 'string' },
  }));
  if (op.query) params.push(...queryParameters(op.query));
  const o: Record<string, unknown> = {
    summary: op.summary,
    tags: [op.tag],
    operationId: `${op.method.toLowerCase()}${op.path.replace(/[{}]/g, '').replace(/[^A-Za-z0-9]+(.)/g, (_, c: string) => c.toUpperCase())}`,
    'x-coatrail-permission': op.access,
    ...(op.access === 'public' ? { security: [] } : {}),
    ...(params.length ? { parameters: params } : {}),
  };
  if (op.body) o['requestBody'] = { required: true, content: { 'application/json': { schema: jsonSchema(op.body, 'input') } } };
  if (op.upload) {
    const fields = jsonSchema(op.upload.fields, 'input');
    const props = { file: { type: 'string', contentMediaType: 'text/csv' }, ...((fields['properties'] as object) ?? {}) };
    o['requestBody'] = {
      required: true,
      description: op.upload.note,
      content: {
        'multipart/form-data': {
          schema: { type: 'object', properties: props, required: ['file', ...((fields['required'] as string[]) ?? [])] },
        },
        'text/csv': { schema: { type: 'string' } },
      },
    };
  }
  const ok: Record<string, unknown> = { description: 'Success' };
  if (op.response) ok['content'] = { 'application/json': { schema: jsonSchema(op.response, 'output') } };
  else if (op.path !== '/api/v1/stream') ok['content'] = { 'application/json': { schema: {} } };
  else ok['content'] = { 'text/event-stream': { schema: { type: 'string' } } };
  const responses: Record<string, unknown> = { [String(op.status ?? 200)]: ok };
  if (op.body || op.query || op.upload) responses['400'] = problemResponse('Invalid input (errors list each field path)');
  if (op.access !== 'public') {
    responses['401'] = problemResponse('Not signed in');
    responses['403'] = problemResponse('Not allowed for this role');
  }
  if (op.upload) {
    responses['413'] = problemResponse('Upload larger than 1 MB');
    responses['415'] = problemResponse('Not a text/CSV upload');
  }
  o['responses'] = responses;
  return o;
}

/** The whole document. */
export function buildOpenApi(serverUrl?: string): Record<string, unknown> {
  const paths: Record<string, Record<string, unknown>> = {};
  for (const op of OPERATIONS) {
    (paths[op.path] ??= {})[op.method.toLowerCase()] = operationObject(op);
  }
  return {
    openapi: '3.1.0',
    info: {
      title: 'Coatrail API',
      version: '1',
      summary: 'Hard-coat process-window and cure-oven recorder for ophthalmic lens labs.',
      description:
        'JSON in and out. Errors are application/problem+json (RFC 9457) with a 4xx status and field paths. Calculators give estimates within their stated validity; the lacquer maker’s data and the lab’s validation govern. Alarms are advisory.',
    },
    ...(serverUrl ? { servers: [{ url: serverUrl }] } : {}),
    security: [{ session: [] }, { bearer: [] }],
    tags: [...new Set(OPERATIONS.map((o) => o.tag))].map((name) => ({ name })),
    paths,
    components: {
      securitySchemes: {
        session: {
          type: 'apiKey',
          in: 'cookie',
          name: 'coatrail_session',
          description: 'Session cookie from POST /api/auth/login',
        },
        bearer: { type: 'http', scheme: 'bearer', description: 'API token (Authorization: Bearer <token>)' },
      },
      schemas: {
        Problem: {
          type: 'object',
          properties: {
            type: { type: 'string' },
            title: { type: 'string' },
            status: { type: 'integer' },
            detail: { type: 'string' },
            errors: {
              type: 'array',
              items: {
                type: 'object',
                properties: { path: { type: 'string' }, message: { type: 'string' } },
                required: ['path', 'message'],
              },
            },
          },
          required: ['title', 'status'],
        },
      },
    },
  };
}
