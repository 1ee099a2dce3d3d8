import { sql, type Migration } from './types.ts';

/**
 * Time series: readings partitioned by week (PostgreSQL declarative range partitioning).
 * The primary key (channel_id, ts) both refuses duplicates and serves "one channel over a
 * time range"; it INCLUDEs value so that range scans are index-only. Per-minute and
 * per-hour rollups keep min/max/sum/count for long chart ranges.
 */
export const migration: Migration = {
  name: '20261202-0910-readings',
  async up(ctx) {
    await sql(
      ctx,
      `
      create table readings (
        channel_id int not null,
        ts timestamptz not null,
        value double precision not null,
        quality smallint not null default 0,
        primary key (channel_id, ts) include (value)
      ) partition by range (ts);

      -- Weekly partitions, Monday 00:00 UTC to Monday 00:00 UTC.
      create function ensure_reading_partitions(from_ts timestamptz, to_ts timestamptz)
      returns int language plpgsql as $$
      declare
        wk timestamptz := date_trunc('week', from_ts at time zone 'UTC') at time zone 'UTC';
        made int := 0;
        pname text;
      begin
        while wk < to_ts loop
          pname := 'readings_' || to_char(wk at time zone 'UTC', 'IYYY"w"IW');
          if to_regclass(pname) is null then
            execute format('create table %I partition of readings for values from (%L) to (%L)',
              pname, wk, wk + interval '7 days');
            made := made + 1;
          end if;
          wk := wk + interval '7 days';
        end loop;
        return made;
      end $$;
      select ensure_reading_partitions(now() - interval '8 weeks', now() + interval '4 weeks');

      create table readings_1m (
        channel_id int not null,
        bucket timestamptz not null,
        vmin double precision not null,
        vmax double precision not null,
        vsum double precision not null,
        n int not null,
        primary key (channel_id, bucket)
      );
      create table readings_1h (
        channel_id int not null,
        bucket timestamptz not null,
        vmin double precision not null,
        vmax double precision not null,
        vsum double precision not null,
        n int not null,
        primary key (channel_id, bucket)
      );

      create table ingest_rejections (
        id bigserial primary key,
        received_at timestamptz not null default now(),
        topic text not null,
        device_username text,
        channel_id int,
        reason text not null,
        payload text not null
      );
      create index ingest_rejections_received on ingest_rejections(received_at desc);

      create table unknown_channels (
        id serial primary key,
        device_id int not null references devices(id),
        topic text not null unique,
        asset_code text not null,
        channel_key text not null,
        first_seen_at timestamptz not null default now(),
        last_seen_at timestamptz not null default now(),
        messages int not null default 1,
        sample_payload text,
        resolved_at timestamptz,
        resolution text
      );

      create table ingest_status (
        worker_id text primary key,
        heartbeat_at timestamptz not null,
        last_commit_at timestamptz,
        lag_ms double precision,
        buffered int not null default 0,
        journal_bytes bigint not null default 0,
        committed bigint not null default 0,
        rejected bigint not null default 0
      );
    `,
    );
  },
  async down(ctx) {
    await sql(
      ctx,
      `
      drop table ingest_status;
      drop table unknown_channels;
      drop table ingest_rejections;
      drop table readings_1h;
      drop table readings_1m;
      drop table readings;
      drop function ensure_reading_partitions(timestamptz, timestamptz);
    `,
    );
  },
};
