/**
 * The test process's own Sequelize instance on the test database (models initialised), for
 * tests that call the worker-safe core directly. Closed by {@link closeTestSequelize}.
 */
import type { Sequelize } from 'sequelize';
import { inject } from 'vitest';
import { createSequelize } from '../../db/connection.ts';
import { initModels } from '../../db/models/index.ts';

let seq: Sequelize | null = null;

export function testSequelize(): Sequelize {
  if (!seq) {
    seq = createSequelize({ url: inject('stack').databaseUrl, max: 3 });
    initModels(seq);
  }
  return seq;
}

export async function closeTestSequelize(): Promise<void> {
  await seq?.close();
  seq = null;
}
