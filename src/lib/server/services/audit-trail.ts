/**
 * Reading the audit trail: filters (actor, action, entity, entity id, date range in the
 * site's time zone), paging, and CSV export. The trail itself is append-only in the database.
 */
import type { AuditPage, AuditQuery, AuditRowView } from '../../shared/admin.ts';
import { toCsv } from '../../shared/csv-table.ts';
import { config } from '../config.ts';
import { pgPool } from '../db.ts';

interface Row {
  id: string;
  at: Date;
  actor_id: number | null;
  actor_label: string;
  action: string;
  entity: string;
  entity_id: string | null;
  before: unknown;
  after: unknown;
  address: string | null;
  signature: AuditRowView['signature'];
}

const DATE_ONLY = /^\d{4}-\d{2}-\d{2}$/;
const HAS_ZONE = /(Z|[+-]\d{2}:?\d{2})$/i;

/** A bound as SQL: a date or a zone-less date-time is read in the site's time zone. */
function bound(value: string, params: unknown[], end: boolean): string {
  const tz = config.siteTimeZone;
  if (DATE_ONLY.test(value)) {
    params.push(value, tz);
    const d = `$${params.length - 1}::date${end ? " + interval '1 day'" : ''}`;
    return `((${d})::timestamp at time zone $${params.length})`;
  }
  if (HAS_ZONE.test(value)) {
    params.push(value);
    return `$${params.length}::timestamptz`;
  }
  params.push(value, tz);
  return `($${params.length - 1}::timestamp at time zone $${params.length})`;
}

function where(q: AuditQuery): { sql: string; params: unknown[] } {
  const conds: string[] = [];
  const params: unknown[] = [];
  const like = (s: string) => `%${s.replace(/[\\%_]/g, (c) => '\\' + c)}%`;
  if (q.actor) {
    params.push(like(q.actor));
    conds.push(`actor_label ilike $${params.length}`);
  }
  if (q.action) {
    params.push(like(q.action));
    conds.push(`action ilike $${params.length}`);
  }
  if (q.entity) {
    params.push(q.entity);
    conds.push(`entity = $${params.length}`);
  }
  if (q.entityId) {
    params.push(q.entityId);
    conds.push(`entity_id = $${params.length}`);
  }
  // "to" is inclusive for a date (the whole day), exclusive for a date-time.
  if (q.from) conds.push(`at >= ${bound(q.from, params, false)}`);
  if (q.to) conds.push(`at < ${bound(q.to, params, true)}`);
  return { sql: conds.length ? `where ${conds.join(' and ')}` : '', params };
}

const view = (r: Row): AuditRowView => ({
  id: Number(r.id),
  at: new Date(r.at).toISOString(),
  actorId: r.actor_id,
  actor: r.actor_label,
  action: r.action,
  entity: r.entity,
  entityId: r.entity_id,
  before: r.before,
  after: r.after,
  address: r.address,
  signature: r.signature,
});

export async function queryAudit(q: AuditQuery): Promise<AuditPage> {
  const w = where(q);
  const pool = pgPool();
  const [{ rows: count }, { rows }] = await Promise.all([
    pool.query<{ n: string }>(`select count(*) as n from audit_log ${w.sql}`, w.params),
    pool.query<Row>(
      `select id, at, actor_id, actor_label, action, entity, entity_id, before, after, address, signature
         from audit_log ${w.sql} order by at desc, id desc limit ${q.pageSize} offset ${(q.page - 1) * q.pageSize}`,
      w.params,
    ),
  ]);
  return { rows: rows.map(view), total: Number(count[0]?.n ?? 0), page: q.page, pageSize: q.pageSize };
}

/** Distinct entities and action names, for the filter's suggestions. */
export async function auditVocabulary(): Promise<{ entities: string[]; actions: string[] }> {
  const pool = pgPool();
  const [e, a] = await Promise.all([
    pool.query<{ v: string }>('select distinct entity as v from audit_log order by 1 limit 200'),
    pool.query<{ v: string }>('select distinct action as v from audit_log order by 1 limit 500'),
  ]);
  return { entities: e.rows.map((r) => r.v), actions: a.rows.map((r) => r.v) };
}

export const AUDIT_CSV_LIMIT = 100_000;

/** The whole filtered trail (newest first, at most AUDIT_CSV_LIMIT rows) as CSV. */
export async function auditCsv(q: AuditQuery): Promise<string> {
  const w = where(q);
  const { rows } = await pgPool().query<Row>(
    `select id, at, actor_id, actor_label, action, entity, entity_id, before, after, address, signature
       from audit_log ${w.sql} order by at desc, id desc limit ${AUDIT_CSV_LIMIT}`,
    w.params,
  );
  const head = [
    'id',
    'at_utc',
    'actor',
    'actor_id',
    'action',
    'entity',
    'entity_id',
    'before',
    'after',
    'address',
    'signed_by',
    'signature_meaning',
    'signed_at_utc',
  ];
  const json = (v: unknown) => (v == null ? '' : JSON.stringify(v));
  return toCsv(
    head,
    rows.map((r) => {
      const s = r.signature;
      return [
        r.id,
        new Date(r.at).toISOString(),
        r.actor_label,
        r.actor_id,
        r.action,
        r.entity,
        r.entity_id,
        json(r.before),
        json(r.after),
        r.address,
        s ? `${s.displayName} (${s.username})` : '',
        s?.meaning ?? '',
        s?.signedAt ?? '',
      ];
    }),
  );
}
