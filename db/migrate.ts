/** umzug over Sequelize: migrations own the schema (never `sync()`). */
import { Umzug, SequelizeStorage } from 'umzug';
import type { Sequelize } from 'sequelize';
import { migrations } from './migrations/index.ts';
import type { MigrationContext } from './migrations/types.ts';

export function createMigrator(sequelize: Sequelize) {
  return new Umzug<MigrationContext>({
    migrations: migrations.map((m) => ({
      name: m.name,
      up: ({ context }) => m.up(context),
      down: ({ context }) => m.down(context),
    })),
    context: { sequelize },
    storage: new SequelizeStorage({ sequelize, tableName: 'schema_migrations' }),
    logger: undefined,
  });
}

/** Apply every pending migration; returns the names applied. */
export async function migrateUp(sequelize: Sequelize): Promise<string[]> {
  const done = await createMigrator(sequelize).up();
  return done.map((m) => m.name);
}

/** Revert every migration (tests, and `npm run db:rollback -- all`). */
export async function migrateDownAll(sequelize: Sequelize): Promise<string[]> {
  const done = await createMigrator(sequelize).down({ to: 0 });
  return done.map((m) => m.name);
}
