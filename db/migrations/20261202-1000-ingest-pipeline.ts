import { sql, type Migration } from './types.ts';

/**
 * The telemetry pipeline's additions: a free-text detail on refused messages (which samples of
 * a batch, which limit), an index for listing them by reason, and the default retention policy
 * (site_settings key `retention`, see src/lib/shared/telemetry.ts RetentionSettingsSchema).
 */
export const migration: Migration = {
  name: '20261202-1000-ingest-pipeline',
  async up(ctx) {
    await sql(
      ctx,
      `
      alter table ingest_rejections add column detail text;
      create index ingest_rejections_reason on ingest_rejections(reason, id desc);
      insert into site_settings(key, value) values ('retention', '{
        "rawDaysByKind": {"door": 180, "spin-speed": 180, "room-humidity": 400, "room-temperature": 400},
        "minuteRollupDays": 1100,
        "hourRollupDays": null,
        "rejectionDays": 90
      }'::jsonb) on conflict (key) do nothing;
    `,
    );
  },
  async down(ctx) {
    await sql(
      ctx,
      `
      delete from site_settings where key = 'retention';
      drop index ingest_rejections_reason;
      alter table ingest_rejections drop column detail;
    `,
    );
  },
};
