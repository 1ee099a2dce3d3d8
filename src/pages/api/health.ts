import type { APIRoute } from 'astro';
import { operation } from '../../lib/server/api-operation.ts';
import { healthReport, publicHealth } from '../../lib/server/services/health.ts';
import { HealthReportSchema } from '../../lib/shared/api/service.ts';

export const contract = {
  GET: operation({
    summary: 'Health: database, broker and ingest lag',
    tag: 'service',
    action: 'public',
    responses: { 200: HealthReportSchema, 503: HealthReportSchema },
  }),
};

/**
 * Liveness for load balancers and the lab's monitoring: 503 names the failing part. Anonymous
 * callers get the status only (`status`, `time`, `failing`, and each part's `ok`); any signed-in
 * user or token gets the details (latencies, lag, supervised processes, error messages).
 */
export const GET: APIRoute = async ({ locals }) => {
  const report = await healthReport();
  const body = locals.user ? report : publicHealth(report);
  return Response.json(body, { status: report.status === 'ok' ? 200 : 503, headers: { 'cache-control': 'no-store' } });
};
