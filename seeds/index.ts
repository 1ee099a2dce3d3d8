/** Every seed step, in order (idempotent). */
import type { Sequelize } from 'sequelize';
import { seedAlarmDefaults } from './alarm-defaults.ts';
import { seedCharacteristics } from './characteristics.ts';
import { seedDemoPlant, type SeedOptions } from './demo-plant.ts';
import { seedWindows } from './windows.ts';

export async function seedAll(sequelize: Sequelize, opts: SeedOptions): Promise<void> {
  await seedDemoPlant(sequelize, opts);
  await seedAlarmDefaults(sequelize, opts.log ? { log: opts.log } : {});
  await seedWindows(sequelize, opts.log ? { log: opts.log } : {});
  // SPC characteristics study the seeded history (readings, oven loads): keep this step LAST.
  await seedCharacteristics(sequelize, opts.log ? { log: opts.log } : {});
}
