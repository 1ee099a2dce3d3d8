import { sql, type Migration } from './types.ts';

/**
 * Process windows (recipes) per lacquer × substrate, versioned and signed; which window each
 * line/oven runs over time; and the bath log: lacquer lots, bath charges, checks (with the
 * computed viscosity stored beside the raw cup reading), additions and filter changes.
 */
export const migration: Migration = {
  name: '20261202-1040-windows-baths',
  async up(ctx) {
    await sql(
      ctx,
      `
      create table materials (
        id serial primary key,
        code text not null unique check (code ~ '^[a-z0-9][a-z0-9.-]{0,31}$'),
        name text not null,
        refractive_index double precision not null check (refractive_index > 1 and refractive_index < 3),
        active boolean not null default true,
        created_at timestamptz not null default now()
      );
      -- Substrate catalogue (configurable: rows can be added or deactivated).
      insert into materials (code, name, refractive_index) values
        ('cr39-1.50', 'CR-39-type 1.50', 1.50),
        ('pc-1.59', 'Polycarbonate 1.59', 1.59),
        ('trivex-1.53', 'Trivex-type 1.53', 1.53),
        ('mr-1.60', 'High index 1.60', 1.60),
        ('mr-1.67', 'High index 1.67', 1.67),
        ('mr-1.74', 'High index 1.74', 1.74);

      create table lacquers (
        id serial primary key,
        name text not null unique,
        maker text not null,
        solids_pct double precision not null check (solids_pct > 0 and solids_pct < 100),
        density_g_cm3 double precision not null check (density_g_cm3 > 0 and density_g_cm3 < 5),
        activation_energy_kj_mol double precision not null check (activation_energy_kj_mol > 0),
        note text,
        created_at timestamptz not null default now()
      );

      create table process_windows (
        id serial primary key,
        lacquer_id int not null references lacquers(id),
        material_id int not null references materials(id),
        version int not null check (version > 0),
        name text not null,
        status text not null default 'draft' check (status in ('draft','effective','superseded')),
        limits jsonb not null,
        note text,
        created_by int references users(id),
        created_at timestamptz not null default now(),
        updated_at timestamptz not null default now(),
        approved_by int references users(id),
        approved_signature jsonb,
        effective_from timestamptz,
        superseded_at timestamptz,
        unique (lacquer_id, material_id, version),
        check (status = 'draft' or (approved_signature is not null and effective_from is not null))
      );
      create unique index process_windows_one_effective on process_windows(lacquer_id, material_id) where status = 'effective';
      create unique index process_windows_one_draft on process_windows(lacquer_id, material_id) where status = 'draft';

      create table window_assignments (
        id serial primary key,
        asset_id int not null references assets(id),
        window_id int not null references process_windows(id),
        valid_from timestamptz not null,
        valid_to timestamptz,
        assigned_by int references users(id),
        note text,
        created_at timestamptz not null default now(),
        check (valid_to is null or valid_to > valid_from)
      );
      create index window_assignments_asset_from on window_assignments(asset_id, valid_from desc);
      create unique index window_assignments_one_open on window_assignments(asset_id) where valid_to is null;

      create table lacquer_lots (
        id serial primary key,
        lacquer_id int not null references lacquers(id),
        lot_code text not null,
        received_on date not null,
        expires_on date not null,
        solids_pct double precision not null check (solids_pct > 0 and solids_pct < 100),
        note text,
        created_by int references users(id),
        created_at timestamptz not null default now(),
        unique (lacquer_id, lot_code),
        check (expires_on >= received_on)
      );

      create table bath_charges (
        id serial primary key,
        tank_asset_id int not null references assets(id),
        lot_id int not null references lacquer_lots(id),
        charged_at timestamptz not null,
        mass_kg double precision not null check (mass_kg > 0),
        pot_life_days double precision not null check (pot_life_days > 0),
        note text,
        created_by int references users(id),
        created_at timestamptz not null default now()
      );
      create index bath_charges_tank_at on bath_charges(tank_asset_id, charged_at desc);

      create table bath_checks (
        id bigserial primary key,
        tank_asset_id int not null references assets(id),
        charge_id int references bath_charges(id),
        at timestamptz not null,
        by_user int references users(id),
        by_label text not null,
        cup text,
        efflux_seconds double precision check (efflux_seconds > 0),
        measured_mm2s double precision check (measured_mm2s > 0),
        kinematic_mm2s double precision not null check (kinematic_mm2s > 0),
        method text not null,
        density_g_cm3 double precision check (density_g_cm3 > 0),
        dynamic_mpas double precision,
        bath_temp_c double precision,
        solids_pct double precision check (solids_pct > 0 and solids_pct < 100),
        window_id int references process_windows(id),
        note text,
        created_at timestamptz not null default now(),
        check ((cup is not null and efflux_seconds is not null) <> (measured_mm2s is not null))
      );
      create index bath_checks_tank_at on bath_checks(tank_asset_id, at desc);

      create table bath_additions (
        id bigserial primary key,
        tank_asset_id int not null references assets(id),
        charge_id int references bath_charges(id),
        at timestamptz not null,
        by_user int references users(id),
        by_label text not null,
        kind text not null check (kind in ('solvent','fresh-lacquer')),
        mass_kg double precision not null check (mass_kg > 0),
        lot_id int references lacquer_lots(id),
        check_id bigint references bath_checks(id),
        recommendation jsonb,
        note text,
        created_at timestamptz not null default now()
      );
      create index bath_additions_tank_at on bath_additions(tank_asset_id, at desc);

      create table filter_changes (
        id bigserial primary key,
        tank_asset_id int not null references assets(id),
        at timestamptz not null,
        by_user int references users(id),
        by_label text not null,
        filter_type text not null,
        rating_um double precision check (rating_um > 0),
        note text,
        created_at timestamptz not null default now()
      );
      create index filter_changes_tank_at on filter_changes(tank_asset_id, at desc);
    `,
    );
  },
  async down(ctx) {
    await sql(
      ctx,
      `
      drop table filter_changes;
      drop table bath_additions;
      drop table bath_checks;
      drop table bath_charges;
      drop table lacquer_lots;
      drop table window_assignments;
      drop table process_windows;
      drop table lacquers;
      drop table materials;
    `,
    );
  },
};
