import { sql, type Migration } from './types.ts';

/** API tokens expire: existing tokens get 90 days from their creation (new ones choose, at most 365). */
export const migration: Migration = {
  name: '20261204-1710-token-expiry',
  async up(ctx) {
    await sql(
      ctx,
      `alter table api_tokens add column expires_at timestamptz;
       update api_tokens set expires_at = created_at + interval '90 days';
       alter table api_tokens alter column expires_at set not null;
       alter table api_tokens alter column expires_at set default now() + interval '90 days';`,
    );
  },
  async down(ctx) {
    await sql(ctx, `alter table api_tokens drop column expires_at;`);
  },
};
