/**
 * Oven uniformity surveys and their settings (worker-safe: no Astro, the caller passes its
 * Sequelize instance). A survey, its raw file and its audit row commit together; so do a
 * change of the survey settings and its audit row.
 */
import type { Sequelize } from 'sequelize';
import { OvenSurvey } from '../../../db/models/index.ts';
import { auditIn, withTransaction, type AuditActor } from '../../../db/transaction.ts';
import { SurveySettingsSchema, type SurveySettings } from '../shared/surveys.ts';
import type { SurveyComputation } from '../shared/trace-views.ts';
import { attachFile } from './quality-store.ts';
import { readSetting, writeSetting } from './settings-store.ts';

export const SURVEY_SETTINGS_KEY = 'ovenSurveys';

export function readSurveySettings(sequelize: Sequelize, fallback: SurveySettings): Promise<SurveySettings> {
  return readSetting(sequelize, SURVEY_SETTINGS_KEY, SurveySettingsSchema, fallback);
}

/** Replace the survey settings; the previous value goes into the audit row. */
export async function writeSurveySettings(sequelize: Sequelize, actor: AuditActor, value: SurveySettings): Promise<void> {
  await withTransaction(sequelize, async (t) => {
    const before = await writeSetting(t, SURVEY_SETTINGS_KEY, value);
    await auditIn(t, actor, {
      action: 'settings.ovenSurveys',
      entity: 'site_settings',
      entityId: SURVEY_SETTINGS_KEY,
      before,
      after: value,
    });
  });
}

/** Store a computed survey with its raw file (checked like any upload) and audit it. */
export async function recordSurveyRecord(
  sequelize: Sequelize,
  actor: AuditActor,
  input: { ovenAssetId: number; setpointC: number; note: string | null; userId: number | null; fileName: string; csv: string },
  c: SurveyComputation,
): Promise<number> {
  return withTransaction(sequelize, async (t) => {
    const startMs = c.surveyedAtMs;
    const row = await OvenSurvey.create(
      {
        ovenAssetId: input.ovenAssetId,
        surveyedAt: new Date(startMs),
        setpointC: input.setpointC,
        sensors: c.sensors,
        stabilisedFrom: new Date(startMs + c.stabilisedFromMinutes * 60_000),
        stabilisedAuto: c.stabilisedAuto,
        hottestDeviationC: c.result.hottestDeviationC,
        coldestDeviationC: c.result.coldestDeviationC,
        uniformityClass: c.result.uniformityClass,
        classTableName: c.classTableName,
        classTable: c.classTable,
        result: {
          ...c.result,
          rows: c.rows,
          durationMinutes: c.durationMinutes,
          stabilisedFromMinutes: c.stabilisedFromMinutes,
        },
        note: input.note,
        recordedBy: input.userId,
      },
      { transaction: t },
    );
    await attachFile(t, {
      surveyId: row.id,
      name: input.fileName,
      bytes: new TextEncoder().encode(input.csv),
      userId: input.userId,
    });
    await auditIn(t, actor, {
      action: 'survey.record',
      entity: 'oven_survey',
      entityId: row.id,
      after: {
        ovenAssetId: input.ovenAssetId,
        setpointC: input.setpointC,
        hottestDeviationC: c.result.hottestDeviationC,
        coldestDeviationC: c.result.coldestDeviationC,
        uniformityClass: c.result.uniformityClass,
        classTable: c.classTableName,
      },
    });
    return row.id;
  });
}
