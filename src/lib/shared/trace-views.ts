/**
 * The shapes the loads, dip-run, quality, trace, hold and survey endpoints return (and the pages
 * hand to their islands). Types only; shared by the server services and the browser.
 */
import type { BathAge } from './baths.ts';
import type { StoredCureRecord } from './jobs.ts';
import type { Acceptance, Disposition, TestKind, TestListItem, TestResult } from './quality.ts';
import type { SpcEvaluateOutput } from './spc.ts';
import type { SurveySettings, UniformityResult } from './surveys.ts';
import type { SignatureRecord } from './signature.ts';
import type { Range } from './windows.ts';

/** An electronic signature as stored with a signed record (the one type, in signature.ts). */
export type Signature = SignatureRecord;

/** The phase of an open load (lib/domain/cure ovenLoadPhase) with the latest setpoint and coldest zone. */
export interface OpenLoadPhase {
  phase: string;
  soakStartMs?: number;
  predictedEndMs?: number;
  setpointC: number | null;
  coldestC: number | null;
}

export interface OvenRow {
  id: number;
  code: string;
  name: string;
}

export interface LoadListItem {
  id: number;
  ovenAssetId: number;
  ovenCode: string;
  ovenName: string;
  openedAt: string;
  closedAt: string | null;
  status: 'open' | 'closed';
  openedBy: 'auto' | 'user';
  openedByName: string | null;
  verdict: StoredCureRecord['verdict'] | null;
  jobs: number;
  equivalentMinutes: number | null;
  peakC: number | null;
  minutesAtOrAboveMin: number | null;
  doorOpenings: number | null;
  gaps: number | null;
  windowName: string | null;
  windowVersion: number | null;
  alarmId: number | null;
  /** For open loads: ramp / soak / cool / idle from the latest readings. */
  phase: string | null;
}

export interface LoadAlarm {
  id: number;
  priority: string;
  state: string;
  sourceLabel: string;
  message: string;
  raisedAt: string;
  clearedAt: string | null;
  ackedBy: string | null;
}

export interface TrendSeries {
  key: string;
  label: string;
  unit: string;
  kind: 'setpoint' | 'zone' | 'door';
  points: { x: number; y: number }[];
}

export interface LoadJob {
  jobId: number;
  jobNumber: string;
  status: string;
  rackCode: string | null;
  addedAt: string;
  tests: number;
  failed: number;
}

export interface LoadDetail extends LoadListItem {
  closedBy: 'auto' | 'user' | null;
  closedByName: string | null;
  record: StoredCureRecord | null;
  computedAt: string | null;
  note: string | null;
  jobList: LoadJob[];
  alarms: LoadAlarm[];
  openPhase: OpenLoadPhase | null;
  window: { id: number; name: string; version: number; lacquer: string; substrate: string } | null;
}

export interface LineRow {
  id: number;
  code: string;
  name: string;
}

export interface DipRunItem {
  id: number;
  lineCode: string;
  lineName: string;
  dippedAt: string;
  rackCode: string | null;
  jobs: string[];
  withdrawalSpeedMmS: number | null;
  strokeSamples: number | null;
  speedWindow: { min: number; max: number; target?: number } | null;
  bathChargeId: number | null;
  lotCode: string | null;
  lastCheckAt: string | null;
  lastCheckMm2S: number | null;
  viscosityWindow: { min: number; max: number; target?: number } | null;
  windowName: string | null;
  windowVersion: number | null;
  source: string;
  recordedBy: string | null;
}

export interface JobSearchItem {
  jobNumber: string;
  status: string;
  customerRef: string | null;
}

export interface TraceBathSnapshot {
  charge: {
    id: number;
    chargedAt: string;
    lotCode: string;
    lacquer: string;
    lotExpiresOn: string;
    potLifeDays: number;
    /** Age of the charge at the dip, and pot-life use then (domain bathAge: near end ≥ 80 %, common practice). */
    age: BathAge | null;
  } | null;
  lastCheck: {
    id: number;
    at: string;
    minutesBeforeDip: number;
    kinematicMm2S: number;
    method: string;
    cup: string | null;
    effluxSeconds: number | null;
    bathTempC: number | null;
    solidsPct: number | null;
    by: string;
  } | null;
  /** The bath's viscosity sensor at the dip (latest reading within 30 min before it). */
  sensorViscosityMm2S: number | null;
  viscosityWindow: Range | null;
  /** Where the last check's viscosity sits against the window. */
  viscosityStatus: 'in' | 'low' | 'high' | 'unknown';
}

export interface TraceDipRun {
  id: number;
  dippedAt: string;
  line: { id: number; code: string; name: string };
  tank: { id: number; code: string; name: string } | null;
  rackCode: string | null;
  withdrawalSpeedMmS: number | null;
  strokeSamples: number | null;
  speedWindow: Range | null;
  window: { id: number; name: string; version: number } | null;
  bath: TraceBathSnapshot;
  jobsInRun: number;
}

export interface TraceLoad {
  id: number;
  oven: { id: number; code: string; name: string };
  openedAt: string;
  closedAt: string | null;
  status: 'open' | 'closed';
  verdict: StoredCureRecord['verdict'] | null;
  record: StoredCureRecord | null;
  alarms: LoadAlarm[];
  jobsInLoad: number;
}

export interface TraceTest {
  id: number;
  kind: TestKind;
  result: TestResult;
  testedAt: string;
  testedBy: string;
  summary: string;
  boilCycles: number | null;
  files: number;
}

export interface TraceSibling {
  jobNumber: string;
  status: string;
  sameLoads: number[];
  sameBathRuns: { dipRunId: number; dippedAt: string; hoursApart: number }[];
  tests: number;
  failed: number;
  lastTest: { kind: TestKind; result: TestResult; testedAt: string } | null;
  activeHoldId: number | null;
}

export interface TraceResult {
  job: {
    id: number;
    jobNumber: string;
    customerRef: string | null;
    lensMaterial: string | null;
    status: string;
    activeHold: { id: number; reason: string; placedAt: string; placedBy: string | null } | null;
  };
  dipRuns: TraceDipRun[];
  loads: TraceLoad[];
  tests: TraceTest[];
  siblings: TraceSibling[];
  siblingWindowHours: number;
}

export interface HoldItem {
  id: number;
  jobNumber: string;
  jobStatus: string;
  reason: string;
  placedAt: string;
  placedBy: string | null;
  status: 'active' | 'closed';
  disposition: Disposition | null;
  dispositionComment: string | null;
  closedAt: string | null;
  closedBy: string | null;
  signature: Signature | null;
  ncId: number | null;
  ncTitle: string | null;
}

export interface NcItem {
  id: number;
  title: string;
  description: string;
  suspectedCause: string;
  suspectedLoadId: number | null;
  suspectedBathChargeId: number | null;
  status: 'open' | 'closed';
  openedAt: string;
  openedBy: string | null;
  closedAt: string | null;
  closedBy: string | null;
  closeSignature: Signature | null;
  tests: number;
  activeHolds: number;
  holds: number;
}

export interface NcDetail extends NcItem {
  testList: { id: number; jobNumber: string; kind: string; result: string; testedAt: string; summary: string }[];
  holdList: HoldItem[];
  dispositions: {
    id: number;
    disposition: Disposition;
    jobNumbers: string[];
    comment: string;
    signature: Signature;
    at: string;
  }[];
  load: { id: number; ovenName: string; openedAt: string; verdict: string | null } | null;
  bathCharge: { id: number; tankCode: string; lotCode: string; chargedAt: string } | null;
}

export interface TestFile {
  id: number;
  filename: string;
  mime: string;
  sizeBytes: number;
  sha256: string;
  uploadedAt: string;
  uploadedBy: string | null;
}

export interface TestDetail extends TestListItem {
  inputs: Record<string, unknown>;
  note: string | null;
  acceptance: Acceptance;
  fileList: TestFile[];
}

export interface AdhesionWeek {
  week: string;
  startMs: number;
  tests: number;
  failed: number;
}

export interface AdhesionChart {
  weeks: AdhesionWeek[];
  evaluation: SpcEvaluateOutput | null;
  /** Why there is no chart (too few weeks with tests, …). */
  message: string | null;
}

export interface FailureGroup {
  key: string;
  label: string;
  tests: number;
  failed: number;
  /** Link target for the group (an oven's loads, a bath charge's baths page). */
  href: string | null;
}

export interface SurveyComputation {
  result: UniformityResult;
  setpointC: number;
  surveyedAtMs: number;
  stabilisedFromMinutes: number;
  stabilisedAuto: boolean;
  rows: number;
  durationMinutes: number;
  sensors: { name: string; correctionC: number; minC: number; maxC: number; meanC: number }[];
  classTableName: string;
  classTable: SurveySettings['classTable'];
  /** Per sensor, minutes → °C (corrected), downsampled for the chart. */
  series: { name: string; points: { x: number; y: number }[] }[];
}

export interface SurveyItem {
  id: number;
  ovenAssetId: number;
  ovenCode: string;
  ovenName: string;
  surveyedAt: string;
  setpointC: number;
  hottestDeviationC: number;
  coldestDeviationC: number;
  hottestSensor: string | null;
  coldestSensor: string | null;
  uniformityClass: number | null;
  classToleranceC: number | null;
  classTableName: string;
  stabilisedAuto: boolean;
  stabilisedFrom: string | null;
  sensors: SurveyComputation['sensors'];
  note: string | null;
  recordedBy: string | null;
  fileId: number | null;
}

export interface OvenSurveyStatus {
  ovenAssetId: number;
  ovenCode: string;
  ovenName: string;
  last: SurveyItem | null;
  dueAt: string | null;
  overdue: boolean;
  daysSince: number | null;
}
