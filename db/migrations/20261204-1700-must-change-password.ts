import { sql, type Migration } from './types.ts';

/**
 * A user whose password someone else chose (the first administrator of a production start, an
 * account an admin created with a password) must set their own before doing anything else.
 */
export const migration: Migration = {
  name: '20261204-1700-must-change-password',
  async up(ctx) {
    await sql(ctx, `alter table users add column must_change_password boolean not null default false;`);
  },
  async down(ctx) {
    await sql(ctx, `alter table users drop column must_change_password;`);
  },
};
