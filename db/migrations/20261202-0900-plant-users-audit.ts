import { sql, type Migration } from './types.ts';

/**
 * First schema (product.md §3): the plant as one tree of assets (site → dip lines → tanks,
 * ovens → zones, spin coaters), devices and their channels, users and sessions, and the
 * append-only audit trail.
 */
export const migration: Migration = {
  name: '20261202-0900-plant-users-audit',
  async up(ctx) {
    await sql(
      ctx,
      `
      create table sites (
        id serial primary key,
        code text not null unique check (code ~ '^[a-z0-9][a-z0-9-]{0,31}$'),
        name text not null,
        time_zone text not null default 'UTC',
        created_at timestamptz not null default now()
      );
      create table assets (
        id serial primary key,
        site_id int not null references sites(id),
        parent_id int references assets(id),
        kind text not null check (kind in ('line','tank','oven','zone','coater','room')),
        code text not null check (code ~ '^[a-z0-9][a-z0-9-]{0,31}$'),
        name text not null,
        details jsonb not null default '{}',
        created_at timestamptz not null default now(),
        unique (site_id, code)
      );
      create index assets_parent on assets(parent_id);
      create table users (
        id serial primary key,
        username text not null unique check (username ~ '^[a-z0-9._-]{2,40}$'),
        display_name text not null,
        email text,
        role text not null check (role in ('viewer','operator','engineer','quality','admin')),
        password_hash text not null,
        active boolean not null default true,
        created_at timestamptz not null default now(),
        updated_at timestamptz not null default now()
      );
      create table user_sessions (
        id text primary key,
        user_id int not null references users(id),
        expires_at timestamptz not null
      );
      create index user_sessions_user on user_sessions(user_id);
      create table devices (
        id serial primary key,
        site_id int not null references sites(id),
        name text not null,
        username text not null unique,
        password_hash text not null,
        topic_prefix text not null unique,
        enabled boolean not null default true,
        online boolean not null default false,
        last_seen_at timestamptz,
        created_at timestamptz not null default now()
      );
      create table device_events (
        id bigserial primary key,
        device_id int not null references devices(id),
        kind text not null check (kind in ('online','offline')),
        reason text,
        at timestamptz not null default now()
      );
      create index device_events_device_at on device_events(device_id, at desc);
      create table channels (
        id serial primary key,
        asset_id int not null references assets(id),
        device_id int not null references devices(id),
        key text not null check (key ~ '^[a-z0-9][a-z0-9-]{0,31}$'),
        name text not null,
        kind text not null check (kind in ('withdrawal-speed','viscosity','bath-temperature','room-humidity','room-temperature','air-temperature','setpoint','door','irradiance','spin-speed','solids','other')),
        unit text not null,
        min double precision not null,
        max double precision not null check (max > min),
        raw_retention_days int not null default 400,
        created_at timestamptz not null default now(),
        unique (device_id, asset_id, key)
      );
      create table audit_log (
        id bigserial primary key,
        at timestamptz not null default now(),
        actor_id int references users(id),
        actor_label text not null,
        action text not null,
        entity text not null,
        entity_id text,
        before jsonb,
        after jsonb,
        address text,
        signature jsonb
      );
      create index audit_log_at on audit_log(at desc);
      create index audit_log_entity on audit_log(entity, entity_id);
      -- Append-only in the database itself, whatever the application does.
      create function audit_log_append_only() returns trigger language plpgsql as $$
      begin
        raise exception 'audit_log is append-only (% refused)', tg_op using errcode = 'insufficient_privilege';
      end $$;
      create trigger audit_log_no_update before update or delete on audit_log
        for each row execute function audit_log_append_only();
      create trigger audit_log_no_truncate before truncate on audit_log
        for each statement execute function audit_log_append_only();
      create table site_settings (
        key text primary key,
        value jsonb not null,
        updated_at timestamptz not null default now()
      );
    `,
    );
  },
  async down(ctx) {
    await sql(
      ctx,
      `
      drop table site_settings;
      drop trigger audit_log_no_truncate on audit_log;
      drop trigger audit_log_no_update on audit_log;
      drop table audit_log;
      drop function audit_log_append_only();
      drop table channels;
      drop table device_events;
      drop table devices;
      drop table user_sessions;
      drop table users;
      drop table assets;
      drop table sites;
    `,
    );
  },
};
