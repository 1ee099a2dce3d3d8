/**
 * How the worker-safe core reaches the database: the process's one Sequelize instance, or a
 * transaction of it (`Db`). Records go through the models in `db/models/`; the few measured hot
 * statements go through {@link select} / {@link execute}, i.e. `sequelize.query` with bind
 * parameters on the same instance and, when given, inside the same transaction.
 *
 * `LegacyPg` is accepted only by the functions that code outside the alarms/SPC/windows area
 * still calls with a raw pg pool or client (load, job and quality stores, some web services);
 * it goes when those callers pass their Sequelize instance.
 */
import type pg from 'pg';
import { QueryTypes, type Sequelize, type Transaction } from 'sequelize';
import { withTransaction } from '../../../db/transaction.ts';

export type Db = Sequelize | Transaction;
export type LegacyPg = pg.Pool | pg.PoolClient;
export type AnyDb = Db | LegacyPg;

export function isTransaction(q: AnyDb): q is Transaction {
  const t = q as Partial<Transaction> & { sequelize?: unknown };
  return typeof t.commit === 'function' && typeof t.rollback === 'function' && t.sequelize !== undefined;
}

export function isSequelize(q: AnyDb): q is Sequelize {
  const s = q as Partial<Sequelize>;
  return typeof s.transaction === 'function' && typeof s.define === 'function';
}

export function isDb(q: AnyDb): q is Db {
  return isTransaction(q) || isSequelize(q);
}

/** The Sequelize instance behind `db`. */
export function sequelizeOf(db: Db): Sequelize {
  return isTransaction(db) ? (db as unknown as { sequelize: Sequelize }).sequelize : db;
}

/** `{transaction}` for a model call when `db` is a transaction, else `{}`. */
export function txOpt(db: Db): { transaction?: Transaction } {
  return isTransaction(db) ? { transaction: db } : {};
}

/** Run `work` in `db` when it is a transaction already, else in a new one (withTransaction). */
export function inTransaction<T>(db: Db, work: (t: Transaction) => Promise<T>): Promise<T> {
  return isTransaction(db) ? work(db) : withTransaction(db, work);
}

/** Rows of one statement with `$n` bind parameters (a SELECT, or a data-modifying one with RETURNING). */
export async function select<T extends object>(q: AnyDb, sql: string, bind: unknown[] = []): Promise<T[]> {
  if (isDb(q)) {
    return sequelizeOf(q).query<T>(sql, { bind, type: QueryTypes.SELECT, ...txOpt(q) });
  }
  return (await q.query(sql, bind)).rows as T[];
}

/** Run one statement with `$n` bind parameters for its effect; returns the number of rows it touched. */
export async function execute(q: AnyDb, sql: string, bind: unknown[] = []): Promise<number> {
  if (isDb(q)) {
    const [, meta] = await sequelizeOf(q).query(sql, { bind, type: QueryTypes.RAW, ...txOpt(q) });
    // Sequelize answers [rows, pg result] for most statements, [rows, rowCount] for an INSERT/UPDATE.
    if (typeof meta === 'number') return meta;
    return (meta as { rowCount?: number } | undefined)?.rowCount ?? 0;
  }
  return (await q.query(sql, bind)).rowCount ?? 0;
}
