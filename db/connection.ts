/**
 * The one connection factory. `db/` takes its configuration as a parameter and never
 * reads Astro's env: the web app, the ingest worker, seeds and tests all pass a URL in.
 */
import pg from 'pg';
import { Sequelize } from 'sequelize';

// BIGINT counts come back as strings from pg by default; ids here stay well below 2^53.
pg.types.setTypeParser(20, (v) => Number(v));

export interface DbOptions {
  url: string;
  /** Pool size for this process. */
  max?: number;
  logging?: boolean;
}

/** A Sequelize instance over pg for records (not for the telemetry hot path). */
export function createSequelize({ url, max = 8, logging = false }: DbOptions): Sequelize {
  return new Sequelize(url, {
    dialect: 'postgres',
    dialectModule: pg,
    logging: logging ? console.log : false,
    pool: { max, min: 0, idle: 10_000, acquire: 20_000 },
    define: { underscored: true, timestamps: false },
  });
}

/** A plain pg pool for the fast paths (COPY, unnest inserts, bucketed reads). */
export function createPool({ url, max = 4 }: DbOptions): pg.Pool {
  const pool = new pg.Pool({ connectionString: url, max, idleTimeoutMillis: 10_000 });
  // An idle client that loses its server must not crash the process.
  pool.on('error', () => {});
  return pool;
}
