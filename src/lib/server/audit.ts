/** Append to the audit trail (who, when, what, before → after, from where, signature). */
import type { Transaction } from 'sequelize';
import { AuditEntry, type SignatureRecord } from '../../../db/models/index.ts';
import { db } from './db.ts';

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
