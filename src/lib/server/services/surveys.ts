/**
 * Oven temperature-uniformity surveys: a multi-sensor CSV is checked, the stabilised soak found
 * (chosen by the user, or automatically: every sensor within setpoint − 2 °C, then 10 minutes),
 * the hottest and coldest deviation and the uniformity class computed by the domain
 * (lib/domain/oven/uniformity.ts) against the configured class table (SAE AMS2750F furnace
 * classes by default), and the survey stored per oven with its raw file. An oven whose last
 * survey is older than the configured interval (default 90 days, common practice) is overdue.
 */
import { AMS2750_CLASSES, uniformitySurvey, type UniformityResult } from '../../domain/oven/uniformity.ts';
import { lttb } from '../../domain/series/lttb.ts';
import { CsvSyntaxError } from '../../shared/csv-table.ts';
import {
  DEFAULT_SURVEY_INTERVAL_DAYS,
  SurveyCsvError,
  autoStabilisedIndex,
  indexAtMinutes,
  parseSurveyCsv,
  type SurveyInput,
  type SurveySettings,
} from '../../shared/surveys.ts';
import { QueryTypes } from 'sequelize';
import { Asset, OvenSurvey, User } from '../../../../db/models/index.ts';
import { readSurveySettings, recordSurveyRecord, writeSurveySettings } from '../../core/survey-store.ts';
import type { SessionUser } from '../auth.ts';
import { db } from '../db.ts';
import { actorOf } from '../guard.ts';
import { HttpProblem } from '../http.ts';
import type { SurveyComputation, SurveyItem, OvenSurveyStatus } from '../../shared/trace-views.ts';

export const DEFAULT_SURVEY_SETTINGS: SurveySettings = {
  intervalDays: DEFAULT_SURVEY_INTERVAL_DAYS,
  classTableName: 'SAE AMS2750F furnace classes (Table 11)',
  classTable: AMS2750_CLASSES.map((c) => ({ ...c })),
};

export function surveySettings(): Promise<SurveySettings> {
  return readSurveySettings(db(), DEFAULT_SURVEY_SETTINGS);
}

export async function putSurveySettings(
  user: SessionUser,
  value: SurveySettings,
  address: string | null,
): Promise<SurveySettings> {
  await writeSurveySettings(db(), actorOf(user, address), value);
  return value;
}

/** Parse and compute a survey (nothing stored). 400 with line numbers for a bad file; 422 when the soak never stabilised. */
export async function computeSurvey(input: SurveyInput): Promise<SurveyComputation> {
  let table;
  try {
    table = parseSurveyCsv(input.csv);
  } catch (e) {
    if (e instanceof SurveyCsvError) {
      throw new HttpProblem(400, 'Malformed survey file', e.message, {
        errors: e.errors.map((x) => ({ path: 'csv', message: `line ${x.line}: ${x.message}` })),
      });
    }
    if (e instanceof CsvSyntaxError)
      throw new HttpProblem(400, 'Malformed CSV', e.message, { errors: [{ path: 'csv', message: e.message }] });
    throw e;
  }
  const names = table.sensors.map((s) => s.name);
  const unknown = Object.keys(input.corrections).filter((n) => !names.includes(n));
  if (unknown.length)
    throw new HttpProblem(400, 'Invalid input', `corrections: unknown sensor(s) ${unknown.join(', ')}`, {
      errors: [{ path: 'corrections', message: `Not in the file: ${unknown.join(', ')}.` }],
    });
  db();
  const oven = await Asset.findByPk(input.ovenAssetId, { attributes: ['kind'] });
  if (oven?.kind !== 'oven')
    throw new HttpProblem(400, 'Invalid input', 'ovenAssetId: not an oven', {
      errors: [{ path: 'ovenAssetId', message: 'Choose an oven.' }],
    });
  const auto = input.stabilisedFromMinutes === undefined;
  const idx = auto
    ? autoStabilisedIndex(table, input.setpointC, input.corrections)
    : indexAtMinutes(table, input.stabilisedFromMinutes as number);
  if (idx === null) {
    const msg = auto
      ? `Not every sensor reached ${input.setpointC - 2} °C (setpoint − 2 °C) with 10 minutes of data after it: choose the start of the soak yourself, or check the setpoint.`
      : 'No readings at or after the chosen start of the soak.';
    throw new HttpProblem(422, 'No stabilised soak', msg, {
      errors: [{ path: auto ? 'csv' : 'stabilisedFromMinutes', message: msg }],
    });
  }
  const settings = await surveySettings();
  const sensors = table.sensors.map((s) => ({
    name: s.name,
    readingsC: s.readingsC,
    correctionC: input.corrections[s.name] ?? 0,
  }));
  const result = uniformitySurvey({
    setpointC: input.setpointC,
    sensors,
    stabilisedFromIndex: idx,
    classTable: settings.classTable,
  });
  const surveyedAtMs = table.startMs ?? (input.surveyedAt ? Date.parse(input.surveyedAt) : Date.now());
  return {
    result,
    setpointC: input.setpointC,
    surveyedAtMs,
    stabilisedFromMinutes: table.minutes[idx] as number,
    stabilisedAuto: auto,
    rows: table.minutes.length,
    durationMinutes: table.minutes.at(-1) as number,
    sensors: sensors.map((s) => {
      const v = s.readingsC.slice(idx).map((x) => x + s.correctionC);
      return {
        name: s.name,
        correctionC: s.correctionC,
        minC: Math.min(...v),
        maxC: Math.max(...v),
        meanC: v.reduce((a, b) => a + b, 0) / v.length,
      };
    }),
    classTableName: settings.classTableName,
    classTable: settings.classTable,
    series: sensors.map((s) => ({
      name: s.name,
      points: lttb(
        table.minutes.map((m, i) => ({ x: m, y: (s.readingsC[i] as number) + s.correctionC })),
        600,
      ),
    })),
  };
}

/** Store a survey (engineer, quality) with its raw file. */
export async function recordSurvey(
  user: SessionUser,
  input: SurveyInput,
  address: string | null,
): Promise<{ id: number } & SurveyComputation> {
  const c = await computeSurvey(input);
  const id = await recordSurveyRecord(
    db(),
    actorOf(user, address),
    {
      ovenAssetId: input.ovenAssetId,
      setpointC: input.setpointC,
      note: input.note ?? null,
      userId: user.id,
      fileName: input.fileName || 'survey.csv',
      csv: input.csv,
    },
    c,
  );
  return { id, ...c };
}

export async function listSurveys(ovenAssetId?: number, id?: number): Promise<SurveyItem[]> {
  const seq = db();
  const where: Record<string, number> = {};
  if (ovenAssetId !== undefined) where['ovenAssetId'] = ovenAssetId;
  if (id !== undefined) where['id'] = id;
  const rows = (await OvenSurvey.findAll({
    where,
    include: [
      { model: Asset, as: 'oven', attributes: ['code', 'name'], required: true },
      { model: User, as: 'recorder', attributes: ['displayName'] },
    ],
    order: [
      ['surveyedAt', 'DESC'],
      ['id', 'DESC'],
    ],
    limit: 500,
  })) as Array<OvenSurvey & { oven: Asset; recorder: User | null }>;
  // test_files is the quality records' table (no model in this area): the first file of each survey.
  const files = rows.length
    ? await seq.query<{ survey_id: number; id: number }>(
        `select survey_id, min(id) as id from test_files where survey_id = any($1::int[]) group by survey_id`,
        { bind: [rows.map((r) => r.id)], type: QueryTypes.SELECT },
      )
    : [];
  const fileOf = new Map(files.map((f) => [f.survey_id, f.id]));
  return rows.map((r) => {
    const result = r.result as UniformityResult;
    return {
      id: r.id,
      ovenAssetId: r.ovenAssetId,
      ovenCode: r.oven.code,
      ovenName: r.oven.name,
      surveyedAt: r.surveyedAt.toISOString(),
      setpointC: r.setpointC,
      hottestDeviationC: r.hottestDeviationC,
      coldestDeviationC: r.coldestDeviationC,
      hottestSensor: result.hottestSensor ?? null,
      coldestSensor: result.coldestSensor ?? null,
      uniformityClass: r.uniformityClass,
      classToleranceC: result.classToleranceC ?? null,
      classTableName: r.classTableName,
      stabilisedAuto: r.stabilisedAuto,
      stabilisedFrom: r.stabilisedFrom?.toISOString() ?? null,
      sensors: r.sensors as SurveyComputation['sensors'],
      note: r.note,
      recordedBy: r.recorder?.displayName ?? null,
      fileId: fileOf.get(r.id) ?? null,
    };
  });
}

/** Each oven's last survey and whether it is overdue (older than the configured interval, or never surveyed). */
export async function surveyStatus(): Promise<{ intervalDays: number; ovens: OvenSurveyStatus[] }> {
  const settings = await surveySettings();
  db();
  const ovens = await Asset.findAll({ attributes: ['id', 'code', 'name'], where: { kind: 'oven' }, order: [['code', 'ASC']] });
  const all = await listSurveys();
  const now = Date.now();
  return {
    intervalDays: settings.intervalDays,
    ovens: ovens.map((o) => {
      const last = all.find((s) => s.ovenAssetId === o.id) ?? null;
      const lastMs = last ? Date.parse(last.surveyedAt) : null;
      const dueMs = lastMs !== null ? lastMs + settings.intervalDays * 86_400_000 : null;
      return {
        ovenAssetId: o.id,
        ovenCode: o.code,
        ovenName: o.name,
        last,
        dueAt: dueMs !== null ? new Date(dueMs).toISOString() : null,
        overdue: dueMs === null || dueMs < now,
        daysSince: lastMs !== null ? (now - lastMs) / 86_400_000 : null,
      };
    }),
  };
}
