/**
 * Oven temperature-uniformity surveys: a multi-sensor CSV is checked, the stabilised soak found
 * (chosen by the user, or automatically: every sensor within setpoint − 2 °C, then 10 minutes),
 * the hottest and coldest deviation and the uniformity class computed by the domain
 * (lib/domain/oven/uniformity.ts) against the configured class table (SAE AMS2750G furnace
 * classes by default), and the survey stored per oven with its raw file. An oven whose last
 * survey is older than the configured interval (default 90 days, common practice) is overdue.
 */
import { AMS2750G_CLASSES, uniformitySurvey, type UniformityResult } from '../../domain/oven/uniformity.ts';
import { lttb } from '../../domain/series/lttb.ts';
import { CsvSyntaxError } from '../../shared/csv-table.ts';
import {
  DEFAULT_SURVEY_INTERVAL_DAYS,
  SurveyCsvError,
  SurveySettingsSchema,
  autoStabilisedIndex,
  indexAtMinutes,
  parseSurveyCsv,
  type SurveyInput,
  type SurveySettings,
} from '../../shared/surveys.ts';
import { audit } from '../audit.ts';
import type { SessionUser } from '../auth.ts';
import { pgPool, sequelize } from '../db.ts';
import { actorOf } from '../guard.ts';
import { HttpProblem } from '../http.ts';
import { attachFile } from '../../core/quality-store.ts';
import { readSetting, writeSetting } from '../../core/settings-store.ts';
import type { SurveyComputation, SurveyItem, OvenSurveyStatus } from '../../shared/trace-views.ts';

export const DEFAULT_SURVEY_SETTINGS: SurveySettings = {
  intervalDays: DEFAULT_SURVEY_INTERVAL_DAYS,
  classTableName: 'SAE AMS2750G furnace classes',
  classTable: AMS2750G_CLASSES.map((c) => ({ ...c })),
};

export function surveySettings(): Promise<SurveySettings> {
  return readSetting(pgPool(), 'ovenSurveys', SurveySettingsSchema, DEFAULT_SURVEY_SETTINGS);
}

export async function putSurveySettings(
  user: SessionUser,
  value: SurveySettings,
  address: string | null,
): Promise<SurveySettings> {
  const before = await writeSetting(pgPool(), 'ovenSurveys', value);
  await audit(actorOf(user, address), {
    action: 'settings.ovenSurveys',
    entity: 'site_settings',
    entityId: 'ovenSurveys',
    before,
    after: value,
  });
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
  const oven = await pgPool().query<{ kind: string }>('select kind from assets where id = $1', [input.ovenAssetId]);
  if (oven.rows[0]?.kind !== 'oven')
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
  const pool = pgPool();
  const startMs = c.surveyedAtMs;
  const { rows } = await pool.query<{ id: number }>(
    `insert into oven_surveys (oven_asset_id, surveyed_at, setpoint_c, sensors, stabilised_from, stabilised_auto, hottest_deviation_c, coldest_deviation_c,
        uniformity_class, class_table_name, class_table, result, note, recorded_by)
     values ($1, to_timestamp($2 / 1000.0), $3, $4::jsonb, to_timestamp($5 / 1000.0), $6, $7, $8, $9, $10, $11::jsonb, $12::jsonb, $13, $14) returning id`,
    [
      input.ovenAssetId,
      startMs,
      input.setpointC,
      JSON.stringify(c.sensors),
      startMs + c.stabilisedFromMinutes * 60_000,
      c.stabilisedAuto,
      c.result.hottestDeviationC,
      c.result.coldestDeviationC,
      c.result.uniformityClass,
      c.classTableName,
      JSON.stringify(c.classTable),
      JSON.stringify({
        ...c.result,
        rows: c.rows,
        durationMinutes: c.durationMinutes,
        stabilisedFromMinutes: c.stabilisedFromMinutes,
      }),
      input.note ?? null,
      user.id,
    ],
  );
  const id = rows[0]!.id;
  await attachFile(sequelize(), {
    surveyId: id,
    name: input.fileName || 'survey.csv',
    bytes: new TextEncoder().encode(input.csv),
    userId: user.id,
  });
  await audit(actorOf(user, address), {
    action: 'survey.record',
    entity: 'oven_survey',
    entityId: id,
    after: {
      ovenAssetId: input.ovenAssetId,
      setpointC: input.setpointC,
      hottestDeviationC: c.result.hottestDeviationC,
      coldestDeviationC: c.result.coldestDeviationC,
      uniformityClass: c.result.uniformityClass,
      classTable: c.classTableName,
    },
  });
  return { id, ...c };
}

export async function listSurveys(ovenAssetId?: number, id?: number): Promise<SurveyItem[]> {
  const { rows } = await pgPool().query<{
    id: number;
    oven_asset_id: number;
    oven_code: string;
    oven_name: string;
    surveyed_at: Date;
    setpoint_c: number;
    hottest_deviation_c: number;
    coldest_deviation_c: number;
    uniformity_class: number | null;
    class_table_name: string;
    stabilised_auto: boolean;
    stabilised_from: Date | null;
    sensors: SurveyComputation['sensors'];
    result: UniformityResult;
    note: string | null;
    recorded_by: string | null;
    file_id: number | null;
  }>(
    `select s.id, s.oven_asset_id, a.code as oven_code, a.name as oven_name, s.surveyed_at, s.setpoint_c, s.hottest_deviation_c, s.coldest_deviation_c,
            s.uniformity_class, s.class_table_name, s.stabilised_auto, s.stabilised_from, s.sensors, s.result, s.note, u.display_name as recorded_by,
            (select f.id from test_files f where f.survey_id = s.id order by f.id limit 1) as file_id
       from oven_surveys s join assets a on a.id = s.oven_asset_id left join users u on u.id = s.recorded_by
      where ($1::int is null or s.oven_asset_id = $1) and ($2::int is null or s.id = $2)
      order by s.surveyed_at desc, s.id desc limit 500`,
    [ovenAssetId ?? null, id ?? null],
  );
  return rows.map((r) => ({
    id: r.id,
    ovenAssetId: r.oven_asset_id,
    ovenCode: r.oven_code,
    ovenName: r.oven_name,
    surveyedAt: r.surveyed_at.toISOString(),
    setpointC: r.setpoint_c,
    hottestDeviationC: r.hottest_deviation_c,
    coldestDeviationC: r.coldest_deviation_c,
    hottestSensor: r.result.hottestSensor ?? null,
    coldestSensor: r.result.coldestSensor ?? null,
    uniformityClass: r.uniformity_class,
    classToleranceC: r.result.classToleranceC ?? null,
    classTableName: r.class_table_name,
    stabilisedAuto: r.stabilised_auto,
    stabilisedFrom: r.stabilised_from?.toISOString() ?? null,
    sensors: r.sensors,
    note: r.note,
    recordedBy: r.recorded_by,
    fileId: r.file_id,
  }));
}

/** Each oven's last survey and whether it is overdue (older than the configured interval, or never surveyed). */
export async function surveyStatus(): Promise<{ intervalDays: number; ovens: OvenSurveyStatus[] }> {
  const settings = await surveySettings();
  const ovens = await pgPool().query<{ id: number; code: string; name: string }>(
    `select id, code, name from assets where kind = 'oven' order by code`,
  );
  const all = await listSurveys();
  const now = Date.now();
  return {
    intervalDays: settings.intervalDays,
    ovens: ovens.rows.map((o) => {
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
