/** The web server's database handles (one Sequelize and one pg pool per process). */
import type pg from 'pg';
import type { Sequelize } from 'sequelize';
import { createPool, createSequelize } from '../../../db/connection.ts';
import { initModels } from '../../../db/models/index.ts';
import { config } from './config.ts';

/**
 * Longest any one statement of a web request may run (PostgreSQL `statement_timeout`): a slow
 * query is cancelled instead of holding one of the few pooled connections every page needs.
 */
export const WEB_STATEMENT_TIMEOUT_MS = 15_000;

let seq: Sequelize | null = null;
let pool: pg.Pool | null = null;

export function sequelize(): Sequelize {
  if (!seq) {
    seq = createSequelize({ url: config.databaseUrl, max: 8, statementTimeoutMs: WEB_STATEMENT_TIMEOUT_MS });
    initModels(seq);
  }
  return seq;
}

export function pgPool(): pg.Pool {
  if (!pool) pool = createPool({ url: config.databaseUrl, max: 6, statementTimeoutMs: WEB_STATEMENT_TIMEOUT_MS });
  return pool;
}

/** Make sure the models are initialised before a model class is used. */
export function db(): Sequelize {
  return sequelize();
}
