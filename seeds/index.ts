/** Every seed step, in order (idempotent). */
import pg from 'pg';
import type { Sequelize } from 'sequelize';
import { seedAlarmDefaults } from './alarm-defaults.ts';
import { seedCharacteristics } from './characteristics.ts';
import { seedDemoPlant, type SeedOptions } from './demo-plant.ts';
import { seedHistory } from './history.ts';
import { seedStory } from './story.ts';
import { seedWindows } from './windows.ts';

export interface SeedAllOptions extends SeedOptions {
  /** "Now" of every time-dependent seed step, so that their stories line up (default Date.now()). */
  nowMs?: number;
  /** The readings history: true (default, 21 days), `{ days }`, or false for none. */
  history?: boolean | { days?: number };
  /** A pg pool for the bulk paths (default: one made from sequelize's configuration, closed afterwards). */
  pool?: pg.Pool;
}

/** A small pg pool on the database sequelize is connected to. */
function poolFrom(sequelize: Sequelize): pg.Pool {
  const c = sequelize.config;
  const pool = new pg.Pool({
    host: c.host,
    port: Number(c.port),
    user: c.username,
    password: c.password ?? undefined,
    database: c.database,
    max: 2,
  });
  pool.on('error', () => {});
  return pool;
}

export async function seedAll(sequelize: Sequelize, opts: SeedAllOptions): Promise<void> {
  const nowMs = opts.nowMs ?? Date.now();
  await seedDemoPlant(sequelize, opts);
  await seedAlarmDefaults(sequelize, opts.log ? { log: opts.log } : {});
  await seedWindows(sequelize, { nowMs, ...(opts.log ? { log: opts.log } : {}) });
  if (opts.history !== false) {
    const pool = opts.pool ?? poolFrom(sequelize);
    try {
      await seedHistory(pool, { nowMs, days: typeof opts.history === 'object' ? opts.history.days : undefined, log: opts.log });
      // Jobs, dip runs, oven loads (cure records from the history's readings) and quality tests: the trace story.
      await seedStory(sequelize, pool, { nowMs, ...(opts.log ? { log: opts.log } : {}) });
    } finally {
      if (!opts.pool) await pool.end();
    }
  }
  // SPC characteristics study the seeded history (readings, oven loads): keep this step LAST.
  await seedCharacteristics(sequelize, { nowMs, ...(opts.log ? { log: opts.log } : {}) });
}
