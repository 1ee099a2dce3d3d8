import type { APIRoute } from 'astro';
import { requireRole } from '../../../../lib/server/guard.ts';
import { idParam, readJson } from '../../../../lib/server/http.ts';
import { removeChannelConfig, saveChannelConfig } from '../../../../lib/server/services/alarms.ts';
import { AlarmConfigInputSchema } from '../../../../lib/shared/alarm-views.ts';
import { operation } from '../../../../lib/server/api-operation.ts';
import { ChannelAlarmConfigSchema } from '../../../../lib/shared/api/alarms.ts';

export const contract = {
  PUT: operation({
    summary: 'Set a channel’s limit and no-data alarm',
    tag: 'alarms',
    action: 'alarm.configure',
    body: AlarmConfigInputSchema,
    responses: { 200: ChannelAlarmConfigSchema },
  }),
  DELETE: operation({
    summary: 'Remove a channel’s limit alarm',
    tag: 'alarms',
    action: 'alarm.configure',
    responses: { 204: null },
  }),
};

/** Set one channel's alarm settings (limits, deadband, delays, priority, stale seconds), engineer; audited. */
export const PUT: APIRoute = async (ctx) => {
  const user = requireRole(ctx.locals, contract.PUT.action);
  const body = await readJson(ctx.request, contract.PUT.body);
  const channelId = idParam(ctx.params['channelId'], 'channel');
  return Response.json(await saveChannelConfig(user, ctx.clientAddress ?? null, channelId, body));
};

/** Remove a channel's own settings (it falls back to the process window in force), engineer; audited. */
export const DELETE: APIRoute = async (ctx) => {
  const user = requireRole(ctx.locals, contract.DELETE.action);
  const channelId = idParam(ctx.params['channelId'], 'channel');
  await removeChannelConfig(user, ctx.clientAddress ?? null, channelId);
  return new Response(null, { status: 204 });
};
