import type { APIRoute } from 'astro';
import { siteTimeZone } from '../../../../lib/server/services/plant.ts';
import { requireRole } from '../../../../lib/server/guard.ts';
import { boundedRange, readQuery } from '../../../../lib/server/http.ts';
import { alarmHealth, healthCsv } from '../../../../lib/server/services/alarms.ts';
import { AlarmKpiQuerySchema } from '../../../../lib/shared/alarm-views.ts';
import { operation } from '../../../../lib/server/api-operation.ts';
import { AlarmKpiSchema } from '../../../../lib/shared/api/alarms.ts';

export const contract = {
  GET: operation({
    summary: 'Alarm-system performance (ISA-18.2 benchmarks); ?format=csv',
    tag: 'alarms',
    action: 'alarm.health',
    query: AlarmKpiQuerySchema,
    responses: { 200: { json: AlarmKpiSchema, csv: true } },
  }),
};

/**
 * Alarm-system health figures (ANSI/ISA-18.2 / IEC 62682 performance metrics against the
 * common practice benchmarks): `?from&to` (ISO date-time or epoch ms; default the last 24 h),
 * `?positions=` operator positions (default 1), `?format=csv` for a spreadsheet. The range is
 * bounded after defaulting: `to` defaults to now, at most 92 days, nothing before 2000 (400).
 */
export const GET: APIRoute = async ({ locals, url }) => {
  requireRole(locals, contract.GET.action);
  const q = readQuery(url, contract.GET.query);
  const { fromMs, toMs } = boundedRange(q.fromMs, q.toMs, { defaultSpanMs: 86_400_000, maxSpanMs: 92 * 86_400_000 });
  const h = await alarmHealth(fromMs, toMs, q.positions);
  if (q.format === 'csv') {
    return new Response(healthCsv(h, await siteTimeZone()), {
      headers: {
        'content-type': 'text/csv; charset=utf-8',
        'content-disposition': `attachment; filename="alarm-health-${new Date(fromMs).toISOString().slice(0, 10)}.csv"`,
        'cache-control': 'no-store',
      },
    });
  }
  return Response.json(
    { ...h.report, per10Min: h.per10Min, meanTimeToAckMs: h.meanTimeToAckMs },
    { headers: { 'cache-control': 'no-store' } },
  );
};
