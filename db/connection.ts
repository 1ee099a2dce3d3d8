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
  /** Give up connecting after this long (default: wait indefinitely). */
  connectionTimeoutMillis?: number;
  /** Give up waiting for a query's answer after this long. */
  queryTimeoutMillis?: number;
  /** Server-side `statement_timeout` of every connection (both kinds): a statement running longer is cancelled. */
  statementTimeoutMs?: number;
}

/**
 * The process's Sequelize instance over pg: records through the models, and the measured hot
 * paths through `sequelize.query` or a connection borrowed from its pool.
 */
export function createSequelize({
  url,
  max = 8,
  logging = false,
  connectionTimeoutMillis,
  queryTimeoutMillis,
  statementTimeoutMs,
}: DbOptions): Sequelize {
  return new Sequelize(url, {
    dialect: 'postgres',
    dialectModule: pg,
    logging: logging ? console.log : false,
    pool: { max, min: 0, idle: 10_000, acquire: 20_000 },
    dialectOptions: {
      ...(connectionTimeoutMillis ? { connectionTimeoutMillis } : {}),
      ...(queryTimeoutMillis ? { query_timeout: queryTimeoutMillis } : {}),
      ...(statementTimeoutMs ? { statement_timeout: statementTimeoutMs } : {}),
    },
    define: { underscored: true, timestamps: false },
  });
}

/** A plain pg pool for the fast paths (COPY, unnest inserts, bucketed reads). */
export function createPool({
  url,
  max = 4,
  connectionTimeoutMillis,
  queryTimeoutMillis,
  statementTimeoutMs,
}: DbOptions): pg.Pool {
  const pool = new pg.Pool({
    connectionString: url,
    max,
    ...(statementTimeoutMs ? { statement_timeout: statementTimeoutMs } : {}),
    idleTimeoutMillis: 10_000,
    ...(connectionTimeoutMillis ? { connectionTimeoutMillis } : {}),
    ...(queryTimeoutMillis ? { query_timeout: queryTimeoutMillis } : {}),
  });
  // A client that loses its server (database restart) must not crash the process: idle ones
  // report on the pool; checked-out ones on themselves, and their next query then fails.
  pool.on('error', () => {});
  pool.on('connect', (client) => client.on('error', () => {}));
  return pool;
}
