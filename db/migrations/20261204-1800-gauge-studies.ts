import { sql, type Migration } from './types.ts';

/**
 * Measurement-system analysis (issue 15): the lab's gauges (thickness gauge, haze meter,
 * viscosity cups, …), their studies (gauge R&R by ANOVA or average and range, bias, linearity;
 * the readings and the computed result stored together) and which gauge measures which SPC
 * characteristic, so the capability report can warn when that gauge has no acceptable study.
 */
export const migration: Migration = {
  name: '20261204-1800-gauge-studies',
  async up(ctx) {
    await sql(
      ctx,
      `
      create table gauges (
        id serial primary key,
        name text not null unique check (length(name) between 1 and 80),
        kind text not null check (kind in ('thickness','haze','viscosity-cup','other')),
        unit text not null check (length(unit) between 1 and 20),
        resolution double precision check (resolution is null or resolution > 0),
        note text check (note is null or length(note) <= 500),
        created_at timestamptz not null default now()
      );
      create table gauge_studies (
        id serial primary key,
        gauge_id int not null references gauges(id) on delete restrict,
        kind text not null check (kind in ('grr','bias','linearity')),
        method text not null check (method in ('anova','average-range','bias','linearity')),
        title text not null check (length(title) between 1 and 120),
        tolerance double precision check (tolerance is null or tolerance > 0),
        data jsonb not null,
        result jsonb not null,
        verdict text not null check (verdict in ('acceptable','conditional','unacceptable')),
        studied_at timestamptz not null,
        recorded_by int references users(id),
        created_at timestamptz not null default now()
      );
      create index gauge_studies_gauge on gauge_studies(gauge_id, studied_at desc);
      create table characteristic_gauges (
        characteristic_id int primary key references characteristics(id) on delete cascade,
        gauge_id int not null references gauges(id) on delete restrict,
        created_at timestamptz not null default now()
      );
      `,
    );
  },
  async down(ctx) {
    await sql(
      ctx,
      `
      drop table characteristic_gauges;
      drop table gauge_studies;
      drop table gauges;
      `,
    );
  },
};
