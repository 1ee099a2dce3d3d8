import type { Sequelize } from 'sequelize';

/** Context handed to every migration by db/migrate.ts. */
export interface MigrationContext {
  sequelize: Sequelize;
}

export interface Migration {
  name: string;
  up(ctx: MigrationContext): Promise<void>;
  down(ctx: MigrationContext): Promise<void>;
}

/** Run several SQL statements in one transaction. */
export async function sql(ctx: MigrationContext, text: string): Promise<void> {
  await ctx.sequelize.transaction(async (transaction) => {
    await ctx.sequelize.query(text, { transaction });
  });
}
