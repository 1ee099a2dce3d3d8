import type { APIRoute } from 'astro';
import { requireRole } from '../../../../lib/server/guard.ts';
import { readJson } from '../../../../lib/server/http.ts';
import { escalation, saveEscalation } from '../../../../lib/server/services/alarms.ts';
import { EscalationSettingsSchema } from '../../../../lib/shared/alarm-views.ts';

/** Escalation rules per priority and the on-shift engineer's e-mail, engineer. */
export const GET: APIRoute = async ({ locals }) => {
  requireRole(locals, 'alarm.configure');
  return Response.json(await escalation(), { headers: { 'cache-control': 'no-store' } });
};

/** Replace the escalation rules (steps in whole minutes, strictly increasing) and the address; audited. */
export const PUT: APIRoute = async (ctx) => {
  const user = requireRole(ctx.locals, 'alarm.configure');
  const body = await readJson(ctx.request, EscalationSettingsSchema);
  return Response.json(await saveEscalation(user, ctx.clientAddress ?? null, body));
};
