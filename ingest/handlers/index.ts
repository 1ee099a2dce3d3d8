/**
 * Post-commit handlers of the ingest worker. After each committed batch the worker calls
 * every handler's `onReadings` with the rows actually inserted (duplicates excluded), and
 * `onTick` about once a second. A handler's error is logged and never stops ingest.
 * Handlers live in `ingest/handlers/<name>.ts`; add one line per handler below.
 */
import type pg from 'pg';
import type { Sequelize } from 'sequelize';
import { retentionHandler } from './retention.ts';
import { alarmsHandler } from './alarms/index.ts';
import { ovenLoadsHandler } from './oven-loads.ts';
import { spcHandler } from './spc.ts';

export interface StoredReading {
  channelId: number;
  tMs: number;
  value: number;
  quality: number;
}

export interface WorkerContext {
  /** The process's one Sequelize instance (models initialised): records and `sequelize.query`. */
  sequelize: Sequelize;
  /** Transitional: the raw pool, until every store takes the Sequelize instance. */
  pool: pg.Pool;
  /** → coatrail/v1/_live/{kind} */
  publishLive(kind: string, payload: unknown): void;
  log(line: string): void;
}

export interface PostCommitHandler {
  name: string;
  init?(ctx: WorkerContext): Promise<void>;
  /** Called after each committed batch with the rows actually inserted (duplicates excluded). */
  onReadings(ctx: WorkerContext, rows: StoredReading[]): Promise<void>;
  /** Called about once a second (stale-data checks, shelving expiry, load detection, escalation). */
  onTick?(ctx: WorkerContext, nowMs: number): Promise<void>;
}

export const postCommitHandlers: PostCommitHandler[] = [
  // one line per handler
  retentionHandler,
  alarmsHandler,
  ovenLoadsHandler,
  spcHandler,
];
