/**
 * Append to the audit trail through a pg pool or a client inside the caller's transaction
 * (worker-safe: no astro:env). Same row shape as `audit()` in ../audit.ts.
 *
 * @deprecated Write the audit row with `auditIn(t, actor, record)` inside the change's
 * `withTransaction` (db/transaction.ts). No call site is left in the accounts and plant area;
 * remove this module once TEMPORARY_OFFENDERS in tests/db/audit-static.test.ts is empty.
 */
import type pg from 'pg';

export interface AuditActor {
  id: number | null;
  label: string;
  address?: string | null;
}

export interface AuditRecord {
  action: string;
  entity: string;
  entityId?: string | number | null;
  before?: unknown;
  after?: unknown;
  signature?: unknown;
}

const json = (v: unknown) => (v === undefined || v === null ? null : JSON.stringify(v));

/** @deprecated Use `auditIn` inside `withTransaction` (db/transaction.ts). */
export async function appendAudit(q: pg.Pool | pg.PoolClient, actor: AuditActor, rec: AuditRecord): Promise<void> {
  await q.query(
    `insert into audit_log (actor_id, actor_label, action, entity, entity_id, before, after, address, signature)
     values ($1, $2, $3, $4, $5, $6::jsonb, $7::jsonb, $8, $9::jsonb)`,
    [
      actor.id,
      actor.label,
      rec.action,
      rec.entity,
      rec.entityId == null ? null : String(rec.entityId),
      json(rec.before),
      json(rec.after),
      actor.address ?? null,
      json(rec.signature),
    ],
  );
}
