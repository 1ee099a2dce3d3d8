import type { APIRoute } from 'astro';
import { requireRole } from '../../../../lib/server/guard.ts';
import { readJson } from '../../../../lib/server/http.ts';
import { escalation, saveEscalation } from '../../../../lib/server/services/alarms.ts';
import { EscalationSettingsSchema } from '../../../../lib/shared/alarm-views.ts';
import { operation } from '../../../../lib/server/api-operation.ts';
import { EscalationSchema } from '../../../../lib/shared/api/alarms.ts';

export const contract = {
  GET: operation({
    summary: 'Escalation rules',
    tag: 'alarms',
    action: 'alarm.configure',
    responses: { 200: EscalationSchema },
  }),
  PUT: operation({
    summary: 'Set the escalation rules',
    tag: 'alarms',
    action: 'alarm.configure',
    body: EscalationSettingsSchema,
    responses: { 200: EscalationSchema },
  }),
};

/** Escalation rules per priority and the on-shift engineer's e-mail, engineer. */
export const GET: APIRoute = async ({ locals }) => {
  requireRole(locals, contract.GET.action);
  return Response.json(await escalation(), { headers: { 'cache-control': 'no-store' } });
};

/** Replace the escalation rules (steps in whole minutes, strictly increasing) and the address; audited. */
export const PUT: APIRoute = async (ctx) => {
  const user = requireRole(ctx.locals, contract.PUT.action);
  const body = await readJson(ctx.request, contract.PUT.body);
  return Response.json(await saveEscalation(user, ctx.clientAddress ?? null, body));
};
