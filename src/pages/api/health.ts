import type { APIRoute } from 'astro';
import { healthReport } from '../../lib/server/services/health.ts';

/** Public liveness for load balancers and the lab's monitoring: 503 names the failing part. */
export const GET: APIRoute = async () => {
  const report = await healthReport();
  return Response.json(report, { status: report.status === 'ok' ? 200 : 503, headers: { 'cache-control': 'no-store' } });
};
