/**
 * The weekly partitions of `readings` this process knows to exist. The flush creates the
 * weeks a batch needs before its transaction (`ensure_reading_partitions`, migration
 * 20261202-0910); retention forgets them after dropping old ones.
 */
import { QueryTypes, type Sequelize } from 'sequelize';

const DAY_MS = 86_400_000;
const WEEK_MS = 7 * DAY_MS;
/** 1970-01-05 was a Monday: partitions run Monday 00:00 UTC to Monday 00:00 UTC. */
const MONDAY_MS = 4 * DAY_MS;

export function weekStartMs(tMs: number): number {
  return Math.floor((tMs - MONDAY_MS) / WEEK_MS) * WEEK_MS + MONDAY_MS;
}

/** Weekly partitions this process knows to exist. */
const knownWeeks = new Set<number>();

/** The PostgreSQL error code of a pg or Sequelize error (Sequelize wraps pg's error as `parent`). */
export function pgCode(e: unknown): string | undefined {
  const x = e as { code?: unknown; parent?: { code?: unknown } } | null;
  const code = typeof x?.code === 'string' ? x.code : x?.parent?.code;
  return typeof code === 'string' ? code : undefined;
}

/** Create the weekly partitions the batch needs (outside the batch transaction; cached per week). */
export async function ensurePartitions(sequelize: Sequelize, t: readonly number[]): Promise<void> {
  const missing = new Set<number>();
  for (const x of t) {
    const w = weekStartMs(x);
    if (!knownWeeks.has(w)) missing.add(w);
  }
  for (const w of missing) {
    for (let attempt = 0; ; attempt++) {
      try {
        await sequelize.query(
          "select ensure_reading_partitions(to_timestamp($1::float8 / 1000), to_timestamp($1::float8 / 1000) + interval '1 ms')",
          { bind: [w], type: QueryTypes.SELECT },
        );
        break;
      } catch (e) {
        // Two workers creating the same week at once: the loser sees "already exists"; look again.
        if (attempt >= 2 || pgCode(e) !== '42P07') throw e;
      }
    }
    knownWeeks.add(w);
  }
}

/** Forget the cache (after retention dropped partitions). */
export function forgetPartitions(): void {
  knownWeeks.clear();
}
