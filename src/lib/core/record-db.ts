/**
 * How the worker-safe core reaches the database: the process's one Sequelize instance, or a
 * transaction on it (`Db`). Records are written and read through the models; raw SQL goes through
 * the same instance (`selectRows`, bind parameters) where a model query would not pay.
 */
import type pg from 'pg';
import { QueryTypes, Transaction, type Sequelize } from 'sequelize';
import { withTransaction } from '../../../db/transaction.ts';

/** The process's Sequelize instance, or a transaction on it. */
export type Db = Sequelize | Transaction;

export function sequelizeOf(db: Db): Sequelize {
  return db instanceof Transaction ? (db as unknown as { sequelize: Sequelize }).sequelize : db;
}

export function transactionOf(db: Db): Transaction | undefined {
  return db instanceof Transaction ? db : undefined;
}

/** `withTransaction` on `db`: a new transaction on an instance, the same one when `db` already is one. */
export function inTransaction<T>(db: Db, work: (t: Transaction) => Promise<T>): Promise<T> {
  return withTransaction(sequelizeOf(db), work, transactionOf(db));
}

/** Rows of a raw SELECT with `$1…` bind parameters, on `db` (inside its transaction when it is one). */
export function selectRows<T extends object>(db: Db, sql: string, bind: unknown[] = []): Promise<T[]> {
  const transaction = transactionOf(db);
  return sequelizeOf(db).query<T>(sql, { bind, type: QueryTypes.SELECT, ...(transaction ? { transaction } : {}) });
}

const views = new WeakMap<Sequelize, pg.Pool>();

/**
 * Transitional: a pg.Pool-shaped view of the instance's own connection pool, for the core
 * modules of other areas that still take a `pg.Pool` (window-store, alarm-store, settings-store).
 * Their queries run on this process's Sequelize connections (one pool), outside any Sequelize
 * transaction. Remove each use when its store takes a `Db`.
 */
export function poolView(db: Db): pg.Pool {
  const sequelize = sequelizeOf(db);
  const hit = views.get(sequelize);
  if (hit) return hit;
  const cm = sequelize.connectionManager;
  const acquire = async () => (await cm.getConnection({ type: 'write' })) as unknown as pg.PoolClient;
  const view = {
    async query(text: string, values?: unknown[]) {
      const c = await acquire();
      try {
        return await c.query(text, values);
      } finally {
        cm.releaseConnection(c as never);
      }
    },
    async connect() {
      const c = await acquire();
      return Object.assign(c, { release: () => cm.releaseConnection(c as never) });
    },
  } as unknown as pg.Pool;
  views.set(sequelize, view);
  return view;
}
