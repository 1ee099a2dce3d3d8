/**
 * The contracts between the ingest worker and its post-commit handlers (kept apart from the
 * registry in ./index.ts, so a handler importing them does not import the list that imports it).
 */
import type pg from 'pg';
import type { Sequelize } from 'sequelize';

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

/** The configuration tables announced on the `coatrail_config` channel (migration 20261204-1100). */
export type ConfigTable =
  | 'sites'
  | 'assets'
  | 'devices'
  | 'channels'
  | 'characteristics'
  | 'limit_sets'
  | 'alarm_configs'
  | 'process_windows'
  | 'window_assignments'
  | 'site_settings';

/**
 * One committed configuration change: the table, the operation and the row (`id`, or `key` for
 * site_settings). `table: '*'` means "anything may have changed" (the worker's listening
 * connection was re-established, so notifications may have been missed): reload everything.
 */
export interface ConfigChange {
  table: ConfigTable | '*';
  op: 'insert' | 'update' | 'delete' | 'reconnect';
  id: number | null;
  key: string | null;
}

export interface PostCommitHandler {
  name: string;
  init?(ctx: WorkerContext): Promise<void>;
  /** Called after each committed batch with the rows actually inserted (duplicates excluded). */
  onReadings(ctx: WorkerContext, rows: StoredReading[]): Promise<void>;
  /** Called about once a second (stale-data checks, shelving expiry, load detection, escalation). */
  onTick?(ctx: WorkerContext, nowMs: number): Promise<void>;
  /**
   * Called once the worker's channel map has taken in a committed configuration change (after
   * it, readings are checked against the new configuration). Drop or reload the caches the
   * change concerns; the periodic reloads remain as a safety net.
   */
  onConfigChange?(ctx: WorkerContext, change: ConfigChange): Promise<void>;
}
