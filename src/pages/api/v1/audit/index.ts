import type { APIRoute } from 'astro';
import { requireRole } from '../../../../lib/server/guard.ts';
import { readQuery } from '../../../../lib/server/http.ts';
import { auditCsv, queryAudit } from '../../../../lib/server/services/audit-trail.ts';
import { AuditQuerySchema } from '../../../../lib/shared/admin.ts';
import { operation } from '../../../../lib/server/api-operation.ts';
import { AuditPageSchema } from '../../../../lib/shared/api/admin.ts';

export const contract = {
  GET: operation({
    summary: 'The audit trail',
    tag: 'admin',
    action: 'audit.view',
    query: AuditQuerySchema,
    responses: { 200: { json: AuditPageSchema, csv: true } },
  }),
};

/**
 * The audit trail, newest first: `?actor&action&entity&entityId&from&to&page&pageSize`
 * (dates in the site's time zone; `to` as a date includes that day). `format=csv` exports
 * every matching row (up to 100,000) instead of a page.
 */
export const GET: APIRoute = async ({ locals, url }) => {
  requireRole(locals, contract.GET.action);
  const q = readQuery(url, contract.GET.query);
  if (q.format === 'csv') {
    const stamp = new Date().toISOString().slice(0, 16).replace(/[:T]/g, '');
    return new Response(await auditCsv(q), {
      headers: {
        'content-type': 'text/csv; charset=utf-8',
        'content-disposition': `attachment; filename="coatrail-audit-${stamp}.csv"`,
        'cache-control': 'no-store',
      },
    });
  }
  return Response.json(await queryAudit(q), { headers: { 'cache-control': 'no-store' } });
};
