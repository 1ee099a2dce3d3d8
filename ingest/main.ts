/**
 * The ingest worker process: `tsx ingest/main.ts`. Connects to PostgreSQL and the broker,
 * subscribes to the plant's topics, stores readings and reports its heartbeat and lag.
 */
import { createPool, createSequelize } from '../db/connection.ts';
import { initModels } from '../db/models/index.ts';
import { loadConfig } from './config.ts';
import { startProcessMetrics } from '../src/lib/core/process-metrics.ts';
import { startWorker } from './subscriber.ts';

const config = loadConfig();
// Bounded waits: a database that stops answering must surface as an error (then the worker
// buffers and journals) rather than as a flush that never returns.
const timeouts = { connectionTimeoutMillis: 5000, queryTimeoutMillis: 60_000 };
// The one pool of the process: the telemetry path, records and the handlers' queries.
const sequelize = createSequelize({ url: config.DATABASE_URL, max: 6, ...timeouts });
initModels(sequelize);
// Transitional: for the post-commit handlers that still take a pg pool (WorkerContext.pool).
const pool = createPool({ url: config.DATABASE_URL, max: 4, ...timeouts });
const worker = await startWorker({ config, sequelize, pool, log: (s) => console.log(`[ingest] ${s}`) });

const flushMetrics = startProcessMetrics('ingest-worker', () => ({ ...worker.stats() }));

const stop = async () => {
  await worker.close();
  flushMetrics();
  await pool.end().catch(() => {});
  await sequelize.close().catch(() => {});
  process.exit(0);
};
process.once('SIGTERM', stop);
process.once('SIGINT', stop);
