import type { APIRoute } from 'astro';
import { healthReport, publicHealth } from '../../lib/server/services/health.ts';

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
