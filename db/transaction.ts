/**
 * The one transaction primitive, and the only way to write an audit row.
 *
 * Every audited change runs inside `withTransaction(sequelize, async (t) => …)`: the change and
 * its `auditIn(t, …)` row commit together or not at all. `auditIn` takes the transaction as a
 * required argument, so an audit write outside a transaction does not type-check, and
 * `tests/db/audit-in-transaction.test.ts` fails for any other way of writing `audit_log`.
 *
 * Worker-safe: no Astro, no env; the caller passes its process's one Sequelize instance.
 */
import type { Sequelize, Transaction } from 'sequelize';
import { AuditEntry, type SignatureRecord } from './models/index.ts';

export type { Transaction };

/** Who made a change: a user (id) or a service ('worker', 'seed', 'token:<name>'), and from where. */
export interface AuditActor {
  id: number | null;
  label: string;
  address?: string | null;
}

/** What changed: the action, the record (entity + id), before → after, and a signature when signed. */
export interface AuditRecord {
  action: string;
  entity: string;
  entityId?: string | number | null;
  before?: unknown;
  after?: unknown;
  signature?: SignatureRecord | null;
  /** When it happened, for back-dated seed history only (default: now, the database's clock). */
  at?: Date;
}

type BeforeCommit = (t: Transaction) => void | Promise<void>;
let beforeCommitForTests: BeforeCommit | null = null;

/**
 * Tests only: run `hook` after the work of every following transaction and before its commit
 * (throw from it to inject a failure there); `null` removes it.
 */
export function setBeforeCommitHookForTests(hook: BeforeCommit | null): void {
  beforeCommitForTests = hook;
}

/**
 * Run `work` in one managed transaction on the process's pool: commit when it resolves, roll
 * back when it throws (the error is re-thrown). Nested calls with `t` passed reuse it.
 */
export async function withTransaction<T>(
  sequelize: Sequelize,
  work: (t: Transaction) => Promise<T>,
  outer?: Transaction | null,
): Promise<T> {
  if (outer) return work(outer);
  return sequelize.transaction(async (t) => {
    const result = await work(t);
    if (beforeCommitForTests) await beforeCommitForTests(t);
    return result;
  });
}

/** Append one row to the audit trail inside `t` (required): it commits with the change or not at all. */
export async function auditIn(t: Transaction, actor: AuditActor, record: AuditRecord): Promise<void> {
  await AuditEntry.create(
    {
      actorId: actor.id,
      actorLabel: actor.label,
      action: record.action,
      entity: record.entity,
      entityId: record.entityId == null ? null : String(record.entityId),
      before: record.before ?? null,
      after: record.after ?? null,
      address: actor.address ?? null,
      signature: record.signature ?? null,
      ...(record.at ? { at: record.at } : {}),
    },
    { transaction: t },
  );
}
