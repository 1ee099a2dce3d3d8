import { sql, type Migration } from './types.ts';

/**
 * Traceability (product.md §1, §4): jobs and the racks/trays that carry them, dip runs (which
 * rack went through which bath, when, at what withdrawal speed, from which bath charge and after
 * which bath check), oven loads with their cure record and verdict, quality tests with their
 * attached files (stored in PostgreSQL), holds with signed releases and dispositions,
 * nonconformances, and oven temperature-uniformity surveys.
 *
 * Bath charges/checks and process windows belong to 20261202-1040 (windows and bath log).
 * Acceptance, trace and survey settings live in `site_settings` (keys `acceptance`, `trace`,
 * `ovenSurveys`); absent keys mean the documented defaults.
 */
export const migration: Migration = {
  name: '20261202-1050-loads-quality-trace',
  async up(ctx) {
    await sql(
      ctx,
      `
      create table jobs (
        id serial primary key,
        job_number text not null unique check (job_number ~ '^[A-Za-z0-9][A-Za-z0-9._/-]{0,39}$'),
        customer_ref text check (customer_ref is null or length(customer_ref) <= 80),
        lens_material text check (lens_material is null or length(lens_material) <= 80),
        material_id int references materials(id),
        status text not null default 'active' check (status in ('active','held','released','recoat','scrapped')),
        note text,
        created_at timestamptz not null default now(),
        updated_at timestamptz not null default now()
      );

      create table racks (
        id serial primary key,
        code text not null unique check (code ~ '^[A-Za-z0-9][A-Za-z0-9._/-]{0,39}$'),
        kind text not null default 'rack' check (kind in ('rack','tray')),
        created_at timestamptz not null default now()
      );

      create table dip_runs (
        id serial primary key,
        line_asset_id int not null references assets(id),
        tank_asset_id int references assets(id),
        rack_id int references racks(id),
        dipped_at timestamptz not null,
        bath_charge_id int references bath_charges(id),
        last_check_id bigint references bath_checks(id),
        window_id int references process_windows(id),
        -- mean withdrawal speed over the stroke, from the stored readings (null: none found)
        withdrawal_speed_mm_s double precision,
        stroke_started_at timestamptz,
        stroke_ended_at timestamptz,
        stroke_samples int,
        source text not null default 'scan' check (source in ('scan','csv','seed','api')),
        note text,
        recorded_by int references users(id),
        created_at timestamptz not null default now()
      );
      create index dip_runs_line_at on dip_runs(line_asset_id, dipped_at desc);
      create index dip_runs_charge_at on dip_runs(bath_charge_id, dipped_at);
      create index dip_runs_at on dip_runs(dipped_at desc);

      create table dip_run_jobs (
        dip_run_id int not null references dip_runs(id) on delete cascade,
        job_id int not null references jobs(id),
        primary key (dip_run_id, job_id)
      );
      create index dip_run_jobs_job on dip_run_jobs(job_id);

      create table oven_loads (
        id serial primary key,
        oven_asset_id int not null references assets(id),
        opened_at timestamptz not null,
        closed_at timestamptz,
        opened_by text not null check (opened_by in ('auto','user')),
        opened_by_user int references users(id),
        closed_by text check (closed_by in ('auto','user')),
        closed_by_user int references users(id),
        status text not null default 'open' check (status in ('open','closed')),
        window_id int references process_windows(id),
        record jsonb,
        verdict text check (verdict in ('complete','under-cured','over-temperature','unverifiable')),
        computed_at timestamptz,
        alarm_id int references alarms(id) on delete set null,
        note text,
        created_at timestamptz not null default now(),
        check ((status = 'open') = (closed_at is null)),
        check (closed_at is null or closed_at > opened_at)
      );
      create unique index oven_loads_one_open on oven_loads(oven_asset_id) where status = 'open';
      create index oven_loads_oven_at on oven_loads(oven_asset_id, opened_at desc);
      create index oven_loads_at on oven_loads(opened_at desc);

      create table load_jobs (
        load_id int not null references oven_loads(id) on delete cascade,
        job_id int not null references jobs(id),
        rack_id int references racks(id),
        added_at timestamptz not null default now(),
        added_by int references users(id),
        primary key (load_id, job_id)
      );
      create index load_jobs_job on load_jobs(job_id);

      create table quality_tests (
        id serial primary key,
        job_id int not null references jobs(id),
        kind text not null check (kind in ('crosscut','boil','abrasion','thickness','cosmetic')),
        tested_at timestamptz not null,
        tested_by int references users(id),
        tested_by_label text not null,
        inputs jsonb not null,
        computed jsonb not null,
        result text not null check (result in ('pass','fail')),
        reasons text[] not null default '{}',
        boil_cycles int check (boil_cycles is null or boil_cycles between 0 and 100),
        acceptance jsonb not null,
        note text,
        created_at timestamptz not null default now()
      );
      create index quality_tests_job on quality_tests(job_id, tested_at desc);
      create index quality_tests_result_at on quality_tests(result, tested_at desc);
      create index quality_tests_at on quality_tests(tested_at desc);

      create table nonconformances (
        id serial primary key,
        title text not null check (length(title) between 1 and 200),
        description text not null default '',
        suspected_cause text not null default 'unknown' check (suspected_cause in ('load','bath','load-and-bath','other','unknown')),
        suspected_load_id int references oven_loads(id),
        suspected_bath_charge_id int references bath_charges(id),
        status text not null default 'open' check (status in ('open','closed')),
        opened_at timestamptz not null default now(),
        opened_by int references users(id),
        closed_at timestamptz,
        closed_by int references users(id),
        close_signature jsonb
      );
      create table nc_tests (
        nc_id int not null references nonconformances(id) on delete cascade,
        test_id int not null references quality_tests(id),
        primary key (nc_id, test_id)
      );

      create table holds (
        id serial primary key,
        job_id int not null references jobs(id),
        nc_id int references nonconformances(id),
        reason text not null check (length(reason) between 3 and 1000),
        placed_by int references users(id),
        placed_at timestamptz not null default now(),
        status text not null default 'active' check (status in ('active','closed')),
        disposition text check (disposition in ('release','recoat','scrap','use-as-is')),
        disposition_comment text,
        closed_at timestamptz,
        closed_by int references users(id),
        signature jsonb,
        check ((status = 'active') = (disposition is null)),
        check (status = 'active' or signature is not null)
      );
      create unique index holds_one_active_per_job on holds(job_id) where status = 'active';
      create index holds_status_at on holds(status, placed_at desc);
      create index holds_nc on holds(nc_id);

      create table nc_dispositions (
        id serial primary key,
        nc_id int not null references nonconformances(id) on delete cascade,
        disposition text not null check (disposition in ('release','recoat','scrap','use-as-is')),
        job_ids int[] not null default '{}',
        comment text not null default '',
        signature jsonb not null,
        at timestamptz not null default now()
      );

      create table oven_surveys (
        id serial primary key,
        oven_asset_id int not null references assets(id),
        surveyed_at timestamptz not null,
        setpoint_c double precision not null,
        sensors jsonb not null,
        stabilised_from timestamptz,
        stabilised_auto boolean not null default true,
        hottest_deviation_c double precision not null,
        coldest_deviation_c double precision not null,
        uniformity_class int,
        class_table_name text not null,
        class_table jsonb not null,
        result jsonb not null,
        note text,
        recorded_by int references users(id),
        created_at timestamptz not null default now()
      );
      create index oven_surveys_oven_at on oven_surveys(oven_asset_id, surveyed_at desc);

      -- Files attached to a quality test or an oven survey, kept in PostgreSQL.
      create table test_files (
        id serial primary key,
        test_id int references quality_tests(id) on delete cascade,
        survey_id int references oven_surveys(id) on delete cascade,
        filename text not null check (length(filename) between 1 and 200),
        mime text not null check (mime in ('image/png','image/jpeg','application/pdf','text/csv','text/plain')),
        size_bytes int not null check (size_bytes > 0 and size_bytes <= 5242880),
        sha256 text not null check (sha256 ~ '^[0-9a-f]{64}$'),
        content bytea not null,
        uploaded_by int references users(id),
        uploaded_at timestamptz not null default now(),
        check ((test_id is null) <> (survey_id is null))
      );
      create index test_files_test on test_files(test_id);
      create index test_files_survey on test_files(survey_id);
    `,
    );
  },
  async down(ctx) {
    await sql(
      ctx,
      `
      drop table test_files;
      drop table oven_surveys;
      drop table nc_dispositions;
      drop table holds;
      drop table nc_tests;
      drop table nonconformances;
      drop table quality_tests;
      drop table load_jobs;
      drop table oven_loads;
      drop table dip_run_jobs;
      drop table dip_runs;
      drop table racks;
      drop table jobs;
      delete from site_settings where key in ('acceptance', 'trace', 'ovenSurveys');
    `,
    );
  },
};
