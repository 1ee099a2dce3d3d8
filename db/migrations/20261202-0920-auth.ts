import { sql, type Migration } from './types.ts';

/** Sign-in support: throttling, API tokens, password-reset links, caught e-mail. */
export const migration: Migration = {
  name: '20261202-0920-auth',
  async up(ctx) {
    await sql(
      ctx,
      `
      create table login_throttles (
        key text primary key,
        failures int not null default 0,
        last_failure_at timestamptz,
        locked_until timestamptz
      );
      create table api_tokens (
        id serial primary key,
        name text not null,
        role text not null check (role in ('viewer','operator','engineer','quality','admin')),
        token_hash text not null unique,
        prefix text not null,
        created_by int not null references users(id),
        created_at timestamptz not null default now(),
        last_used_at timestamptz,
        revoked_at timestamptz
      );
      create table password_resets (
        id serial primary key,
        user_id int not null references users(id),
        token_hash text not null unique,
        created_at timestamptz not null default now(),
        expires_at timestamptz not null,
        used_at timestamptz
      );
      create table outbox_mail (
        id serial primary key,
        caught_at timestamptz not null default now(),
        mail_from text,
        mail_to text not null,
        subject text,
        body text not null
      );
    `,
    );
  },
  async down(ctx) {
    await sql(
      ctx,
      `
      drop table outbox_mail;
      drop table password_resets;
      drop table api_tokens;
      drop table login_throttles;
    `,
    );
  },
};
