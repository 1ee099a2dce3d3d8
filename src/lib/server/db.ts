/** The web server's database handles (one Sequelize and one pg pool per process). */
import type pg from 'pg';
import type { Sequelize } from 'sequelize';
import { createPool, createSequelize } from '../../../db/connection.ts';
import { initModels } from '../../../db/models/index.ts';
import { config } from './config.ts';

let seq: Sequelize | null = null;
let pool: pg.Pool | null = null;

export function sequelize(): Sequelize {
  if (!seq) {
    seq = createSequelize({ url: config.databaseUrl, max: 8 });
    initModels(seq);
  }
  return seq;
}

export function pgPool(): pg.Pool {
  if (!pool) pool = createPool({ url: config.databaseUrl, max: 6 });
  return pool;
}

/** Make sure the models are initialised before a model class is used. */
export function db(): Sequelize {
  return sequelize();
}
