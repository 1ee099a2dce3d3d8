import { sql, type Migration } from './types.ts';

/**
 * Alarms (product.md §6): one row per alarm occurrence, every state transition in
 * `alarm_events`, and the per-channel / per-characteristic alarm settings in `alarm_configs`.
 *
 * States and events are those of `src/lib/domain/alarms/state.ts` (ANSI/ISA-18.2 /
 * IEC 62682 alarm states). A source (`source_key`) has at most one open alarm — any state but
 * `normal` — at a time (partial unique index); a raise on a source with an open alarm updates
 * that row (re-annunciating it when it had returned to normal unacknowledged) and counts the
 * activation, so chattering is visible without duplicate rows.
 *
 * Escalation rules per priority and the on-shift engineer's e-mail live in `site_settings`
 * (keys `alarmEscalation`, `onShiftEngineerEmail`).
 */
export const migration: Migration = {
  name: '20261202-1020-alarms',
  async up(ctx) {
    await sql(
      ctx,
      `
      create table alarms (
        id serial primary key,
        source_kind text not null check (source_kind in ('limit','spc','cure','stale','device','system')),
        source_key text not null check (length(source_key) between 1 and 200),
        source_label text not null,
        asset_id int references assets(id) on delete set null,
        channel_id int references channels(id) on delete set null,
        characteristic_id int,
        load_id int,
        priority text not null check (priority in ('high','medium','low')),
        message text not null,
        value double precision,
        limit_value double precision,
        state text not null check (state in ('normal','unacked','acked','rtn-unacked','shelved','suppressed','out-of-service')),
        active boolean not null,
        raised_at timestamptz not null,
        last_activated_at timestamptz not null,
        cleared_at timestamptz,
        acked_at timestamptz,
        acked_by int references users(id),
        shelved_until timestamptz,
        escalation_steps_sent int[] not null default '{}',
        activation_count int not null default 1,
        updated_at timestamptz not null default now()
      );
      create unique index alarms_one_open_per_source on alarms(source_key) where state <> 'normal';
      create index alarms_state_priority on alarms(state, priority, last_activated_at desc);
      create index alarms_raised on alarms(raised_at desc);
      create index alarms_channel on alarms(channel_id, raised_at desc);
      create index alarms_shelved_until on alarms(shelved_until) where state = 'shelved';

      create table alarm_events (
        id bigserial primary key,
        alarm_id int not null references alarms(id) on delete cascade,
        at timestamptz not null,
        event text not null check (event in ('activate','clear','ack','shelve','unshelve','shelf-expired','suppress','unsuppress','remove-from-service','return-to-service','escalate')),
        from_state text,
        to_state text not null,
        active boolean not null,
        user_id int references users(id),
        comment text
      );
      create index alarm_events_alarm on alarm_events(alarm_id, at);
      create index alarm_events_at on alarm_events(at);

      create table alarm_configs (
        id serial primary key,
        channel_id int references channels(id) on delete cascade,
        characteristic_id int,
        enabled boolean not null default true,
        -- limit alarm: absolute limits in the channel unit, or offsets from the window's target
        limits_mode text not null default 'absolute' check (limits_mode in ('absolute','target-offset')),
        high double precision,
        low double precision,
        deadband double precision not null default 0 check (deadband >= 0),
        on_delay_ms int not null default 0 check (on_delay_ms between 0 and 3600000),
        off_delay_ms int not null default 0 check (off_delay_ms between 0 and 3600000),
        priority text not null default 'medium' check (priority in ('high','medium','low')),
        only_while_running boolean not null default false,
        label text,
        -- stale data: no reading for this many seconds (while the asset runs) raises an alarm
        stale_seconds int check (stale_seconds is null or stale_seconds between 5 and 86400),
        stale_priority text not null default 'high' check (stale_priority in ('high','medium','low')),
        note text,
        updated_at timestamptz not null default now(),
        updated_by int references users(id),
        check ((channel_id is null) <> (characteristic_id is null)),
        check (high is null or low is null or low < high)
      );
      create unique index alarm_configs_channel on alarm_configs(channel_id) where channel_id is not null;
      create unique index alarm_configs_characteristic on alarm_configs(characteristic_id) where characteristic_id is not null;
    `,
    );
  },
  async down(ctx) {
    await sql(
      ctx,
      `
      drop table alarm_configs;
      drop table alarm_events;
      drop table alarms;
      delete from site_settings where key in ('alarmEscalation', 'onShiftEngineerEmail');
    `,
    );
  },
};
