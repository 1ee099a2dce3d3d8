/**
 * Append to the audit trail (who, when, what, before → after, from where, signature).
 *
 * @deprecated Write the audit row with `auditIn(t, actor, record)` inside the change's
 * `withTransaction` (db/transaction.ts). Kept only for the call sites still being converted
 * (see TEMPORARY_OFFENDERS in tests/db/audit-static.test.ts); remove once that list is empty.
 */
import type { Transaction } from 'sequelize';
import { AuditEntry, type SignatureRecord } from '../../../db/models/index.ts';
import { db } from './db.ts';

/** @deprecated Use `AuditActor` from db/transaction.ts. */
export interface Actor {
  id: number | null;
  label: string;
  address?: string | null;
}

export interface AuditInput {
  action: string;
  entity: string;
  entityId?: string | number | null;
  before?: unknown;
  after?: unknown;
  signature?: SignatureRecord | null;
}

/** @deprecated Use `auditIn` inside `withTransaction` (db/transaction.ts). */
export async function audit(actor: Actor, input: AuditInput, transaction?: Transaction): Promise<void> {
  db();
  await AuditEntry.create(
    {
      actorId: actor.id,
      actorLabel: actor.label,
      action: input.action,
      entity: input.entity,
      entityId: input.entityId == null ? null : String(input.entityId),
      before: input.before ?? null,
      after: input.after ?? null,
      address: actor.address ?? null,
      signature: input.signature ?? null,
    },
    transaction ? { transaction } : {},
  );
}
