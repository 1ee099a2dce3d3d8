/**
 * Reading the audit trail: filters (actor, action, entity, entity id, date range in the
 * site's time zone, read from the site row at the time of the query), paging, and CSV export.
 * The trail itself is append-only in the database.
 */
import { Op, QueryTypes, type WhereOptions } from 'sequelize';
import { AuditEntry } from '../../../../db/models/index.ts';
import type { AuditPage, AuditQuery, AuditRowView } from '../../shared/admin.ts';
import { toCsv } from '../../shared/csv-table.ts';
import { db } from '../db.ts';
import { siteTimeZone } from './plant.ts';

const DATE_ONLY = /^\d{4}-\d{2}-\d{2}$/;
const HAS_ZONE = /(Z|[+-]\d{2}:?\d{2})$/i;

/** The instant of a bound: a date (its start, or the next day's for an inclusive end) or a zone-less date-time is read in `tz`. */
async function bound(value: string, end: boolean, tz: string): Promise<Date> {
  const sql = DATE_ONLY.test(value)
    ? `select (($1::date${end ? " + interval '1 day'" : ''})::timestamp at time zone $2) as t`
    : HAS_ZONE.test(value)
      ? 'select $1::timestamptz as t'
      : 'select ($1::timestamp at time zone $2) as t';
  const [row] = await db().query<{ t: Date }>(sql, {
    bind: HAS_ZONE.test(value) && !DATE_ONLY.test(value) ? [value] : [value, tz],
    type: QueryTypes.SELECT,
  });
  return new Date(row!.t);
}

async function where(q: AuditQuery): Promise<WhereOptions<AuditEntry>> {
  const like = (s: string) => `%${s.replace(/[\\%_]/g, (c) => '\\' + c)}%`;
  const w: Record<string | symbol, unknown> = {};
  if (q.actor) w['actorLabel'] = { [Op.iLike]: like(q.actor) };
  if (q.action) w['action'] = { [Op.iLike]: like(q.action) };
  if (q.entity) w['entity'] = q.entity;
  if (q.entityId) w['entityId'] = q.entityId;
  if (q.from || q.to) {
    const tz = await siteTimeZone();
    // "to" is inclusive for a date (the whole day), exclusive for a date-time.
    const at: Record<symbol, Date> = {};
    if (q.from) at[Op.gte] = await bound(q.from, false, tz);
    if (q.to) at[Op.lt] = await bound(q.to, true, tz);
    w['at'] = at;
  }
  return w as WhereOptions<AuditEntry>;
}

const view = (r: AuditEntry): AuditRowView => ({
  id: Number(r.id),
  at: new Date(r.at).toISOString(),
  actorId: r.actorId,
  actor: r.actorLabel,
  action: r.action,
  entity: r.entity,
  entityId: r.entityId,
  before: r.before,
  after: r.after,
  address: r.address,
  signature: r.signature,
});

const NEWEST_FIRST: Array<[string, string]> = [
  ['at', 'DESC'],
  ['id', 'DESC'],
];

export async function queryAudit(q: AuditQuery): Promise<AuditPage> {
  db();
  const w = await where(q);
  const [total, rows] = await Promise.all([
    AuditEntry.count({ where: w }),
    AuditEntry.findAll({ where: w, order: NEWEST_FIRST, limit: q.pageSize, offset: (q.page - 1) * q.pageSize }),
  ]);
  return { rows: rows.map(view), total, page: q.page, pageSize: q.pageSize };
}

/** Distinct entities and action names, for the filter's suggestions. */
export async function auditVocabulary(): Promise<{ entities: string[]; actions: string[] }> {
  db();
  const [e, a] = await Promise.all([
    AuditEntry.findAll({ attributes: ['entity'], group: ['entity'], order: [['entity', 'ASC']], limit: 200, raw: true }),
    AuditEntry.findAll({ attributes: ['action'], group: ['action'], order: [['action', 'ASC']], limit: 500, raw: true }),
  ]);
  return { entities: e.map((r) => r.entity), actions: a.map((r) => r.action) };
}

export const AUDIT_CSV_LIMIT = 100_000;

/** The whole filtered trail (newest first, at most AUDIT_CSV_LIMIT rows) as CSV. */
export async function auditCsv(q: AuditQuery): Promise<string> {
  db();
  const rows = (await AuditEntry.findAll({
    where: await where(q),
    order: NEWEST_FIRST,
    limit: AUDIT_CSV_LIMIT,
    raw: true,
  })) as unknown as AuditEntry[];
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
        r.actorLabel,
        r.actorId,
        r.action,
        r.entity,
        r.entityId,
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
