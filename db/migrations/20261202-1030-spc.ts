import { sql, type Migration } from './types.ts';

/**
 * Statistical process control (product.md §3–4): characteristics built from channels by
 * rational subgrouping, their versioned control-limit sets (drafted by a Phase I study,
 * approved with an electronic signature, never recomputed), and the plotted points the ingest
 * worker judges against the set in force when the subgroup closed.
 *
 * - `characteristics.subgroup_rule` is a JSON object (`src/lib/shared/characteristics.ts`):
 *   `{kind:'per-dip-stroke'}`, `{kind:'per-oven-load'}`, `{kind:'per-n-minutes', minutes, mode}`,
 *   `{kind:'per-manual-check', minSpacingMinutes}`; `subgroup_size` is n (1 for individuals).
 * - `characteristics.spec` is `{mode:'none'}`, `{mode:'fixed', lsl?, usl?, target?}` or
 *   `{mode:'window', key}` (the limits of the process window in force, looked up when needed).
 * - `limit_sets.status`: draft → approved → superseded (by the next approval). A superseded set
 *   keeps its `effective_from`, so charts draw each period against the limits in force then.
 *   At most one approved set per characteristic.
 * - `spc_points.idx` is the 1-based position of the point in its characteristic's chart;
 *   `members` are the subgroup's n values (observations or block means), `readings` the raw
 *   readings behind them, `value` the plotted statistic (x, x̄, or the EWMA z; the observation for
 *   CUSUM, whose sums are in `extra`); `subgroup_key` (e.g. `load:42`, `w:…`) makes a subgroup's
 *   insertion idempotent.
 */
export const migration: Migration = {
  name: '20261202-1030-spc',
  async up(ctx) {
    await sql(
      ctx,
      `
      create table characteristics (
        id serial primary key,
        name text not null unique check (length(name) between 1 and 120),
        description text not null default '',
        asset_id int not null references assets(id),
        channel_ids int[] not null check (cardinality(channel_ids) between 1 and 8),
        subgroup_rule jsonb not null,
        subgroup_size int not null default 1 check (subgroup_size between 1 and 25),
        chart text not null check (chart in ('xbar-r','xbar-s','imr','ewma','cusum')),
        chart_params jsonb not null default '{}',
        rules text[] not null default '{we1}',
        spec jsonb not null default '{"mode":"none"}',
        unit text not null,
        active boolean not null default true,
        created_by int references users(id),
        created_at timestamptz not null default now(),
        updated_at timestamptz not null default now()
      );
      create index characteristics_channels on characteristics using gin (channel_ids);

      create table limit_sets (
        id serial primary key,
        characteristic_id int not null references characteristics(id) on delete cascade,
        version int not null,
        status text not null check (status in ('draft','approved','superseded')),
        chart text not null check (chart in ('xbar-r','xbar-s','imr','ewma','cusum')),
        center double precision not null,
        ucl double precision not null,
        lcl double precision not null,
        dispersion_center double precision,
        dispersion_ucl double precision,
        dispersion_lcl double precision,
        sigma double precision,
        n double precision not null,
        params jsonb not null default '{}',
        baseline_from timestamptz not null,
        baseline_to timestamptz not null,
        baseline_first_index int,
        baseline_last_index int,
        baseline_points int not null,
        excluded jsonb not null default '[]',
        suggested jsonb not null default '[]',
        capability jsonb,
        note text not null default '',
        effective_from timestamptz,
        approved_signature jsonb,
        approved_at timestamptz,
        seeded boolean not null default false,
        created_by int references users(id),
        created_at timestamptz not null default now(),
        unique (characteristic_id, version),
        check (status = 'draft' or (effective_from is not null and approved_signature is not null))
      );
      create unique index limit_sets_one_approved on limit_sets(characteristic_id) where status = 'approved';
      create index limit_sets_in_force on limit_sets(characteristic_id, effective_from) where status <> 'draft';

      create table spc_points (
        id bigserial primary key,
        characteristic_id int not null references characteristics(id) on delete cascade,
        idx int not null,
        t timestamptz not null,
        t_from timestamptz,
        value double precision not null,
        observation double precision not null,
        dispersion double precision,
        n int not null,
        members double precision[] not null,
        readings jsonb not null default '[]',
        extra jsonb not null default '{}',
        center double precision,
        ucl double precision,
        lcl double precision,
        violations text[] not null default '{}',
        limit_set_id int references limit_sets(id),
        excluded boolean not null default false,
        exclusion_reason text,
        subgroup_key text,
        dip_run_id int,
        oven_load_id int,
        created_at timestamptz not null default now(),
        unique (characteristic_id, idx)
      );
      create index spc_points_t on spc_points(characteristic_id, t);
      create unique index spc_points_subgroup_key on spc_points(characteristic_id, subgroup_key) where subgroup_key is not null;
      create index spc_points_violations on spc_points(characteristic_id, t) where cardinality(violations) > 0;
    `,
    );
  },
  async down(ctx) {
    await sql(
      ctx,
      `
      drop table spc_points;
      drop table limit_sets;
      drop table characteristics;
    `,
    );
  },
};
