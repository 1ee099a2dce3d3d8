/** Every seed step, in order (idempotent). */
import type { Sequelize } from 'sequelize';
import { seedDemoPlant, type SeedOptions } from './demo-plant.ts';

export async function seedAll(sequelize: Sequelize, opts: SeedOptions): Promise<void> {
  await seedDemoPlant(sequelize, opts);
}
