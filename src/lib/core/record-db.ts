/**
 * How the worker-safe core reaches the database: the process's one Sequelize instance, or a
 * transaction on it (`Db`). Records are written and read through the models; raw SQL goes through
 * the same instance (`selectRows`, bind parameters) where a model query would not pay.
 */
import type pg from 'pg';
import type { Sequelize, Transaction } from 'sequelize';
import { inTransaction, isTransaction, select, sequelizeOf, type Db } from './db.ts';

export { inTransaction, sequelizeOf, type Db };

export function transactionOf(db: Db): Transaction | undefined {
  return isTransaction(db) ? db : undefined;
}

/** Rows of a raw SELECT with `$1…` bind parameters, on `db` (inside its transaction when it is one). */
export function selectRows<T extends object>(db: Db, sql: string, bind: unknown[] = []): Promise<T[]> {
  return select<T>(db, sql, bind);
}

const views = new WeakMap<Sequelize, pg.Pool>();

/**
 * A pg.Pool-shaped view of the instance's own connection pool, for code written against
 * `pg.Pool` (the broker's authentication and revocation queries): its queries run on this
 * process's Sequelize connections, so the process keeps one pool.
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
