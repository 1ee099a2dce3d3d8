import { sql, type Migration } from './types.ts';

/**
 * Sessions are stored by the SHA-256 of their id (a read of the table no longer yields usable
 * cookies), and carry their creation time for an absolute lifetime. Existing ids are hashed in
 * place, so signed-in people stay signed in; going down ends every session (a hash cannot be undone).
 */
export const migration: Migration = {
  name: '20261204-1720-sessions-hashed',
  async up(ctx) {
    await sql(
      ctx,
      `alter table user_sessions add column created_at timestamptz not null default now();
       update user_sessions set id = encode(sha256(convert_to(id, 'UTF8')), 'hex');`,
    );
  },
  async down(ctx) {
    await sql(ctx, `delete from user_sessions; alter table user_sessions drop column created_at;`);
  },
};
