import type { APIRoute } from 'astro';
import { operation } from '../../lib/server/api-operation.ts';
import { healthReport } from '../../lib/server/services/health.ts';
import { HealthReportSchema } from '../../lib/shared/api/service.ts';

export const contract = {
  GET: operation({
    summary: 'Health: database, broker and ingest lag',
    tag: 'service',
    action: 'public',
    responses: { 200: HealthReportSchema, 503: HealthReportSchema },
  }),
};

/** Public liveness for load balancers and the lab's monitoring: 503 names the failing part. */
export const GET: APIRoute = async () => {
  const report = await healthReport();
  return Response.json(report, { status: report.status === 'ok' ? 200 : 503, headers: { 'cache-control': 'no-store' } });
};
