/**
 * Transitional: lets a core function that is still written against `pg.Pool`
 * (`readSetting`/`writeSetting`, `windowInForce`, `attachFile`) run on the process's one
 * Sequelize instance, inside the caller's transaction, so a record written through the models
 * and its audit row commit together with what those helpers write. Only `query(sql, params)`
 * → `{rows, rowCount}` is provided: the helpers above use nothing else. Remove it once those
 * stores take a Sequelize instance or transaction themselves.
 */
import type pg from 'pg';
import { QueryTypes, type Sequelize, type Transaction } from 'sequelize';

export function pgBridge(sequelize: Sequelize, transaction?: Transaction | null): pg.Pool {
  const bridge = {
    async query(sql: string, params: unknown[] = []) {
      const rows = await sequelize.query(sql, {
        bind: params,
        type: QueryTypes.SELECT,
        ...(transaction ? { transaction } : {}),
      });
      return { rows, rowCount: rows.length };
    },
  };
  return bridge as unknown as pg.Pool;
}
