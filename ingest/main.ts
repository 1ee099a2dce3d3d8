/**
 * The ingest worker process: `tsx ingest/main.ts`. Connects to PostgreSQL and the broker,
 * subscribes to the plant's topics, stores readings and reports its heartbeat and lag.
 */
import { createPool } from '../db/connection.ts';
import { loadConfig } from './config.ts';
import { startWorker } from './subscriber.ts';

const config = loadConfig();
const pool = createPool({ url: config.DATABASE_URL, max: 4 });
const worker = await startWorker({ config, pool, log: (s) => console.log(`[ingest] ${s}`) });

const stop = async () => {
  await worker.close();
  await pool.end().catch(() => {});
  process.exit(0);
};
process.once('SIGTERM', stop);
process.once('SIGINT', stop);
