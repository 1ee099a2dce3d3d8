import type { APIRoute } from 'astro';
import { requireRole } from '../../../../lib/server/guard.ts';
import { idParam, readJson } from '../../../../lib/server/http.ts';
import { removeChannelConfig, saveChannelConfig } from '../../../../lib/server/services/alarms.ts';
import { AlarmConfigInputSchema } from '../../../../lib/shared/alarm-views.ts';

/** Set one channel's alarm settings (limits, deadband, delays, priority, stale seconds), engineer; audited. */
export const PUT: APIRoute = async (ctx) => {
  const user = requireRole(ctx.locals, 'alarm.configure');
  const body = await readJson(ctx.request, AlarmConfigInputSchema);
  const channelId = idParam(ctx.params['channelId'], 'channel');
  return Response.json(await saveChannelConfig(user, ctx.clientAddress ?? null, channelId, body));
};

/** Remove a channel's own settings (it falls back to the process window in force), engineer; audited. */
export const DELETE: APIRoute = async (ctx) => {
  const user = requireRole(ctx.locals, 'alarm.configure');
  const channelId = idParam(ctx.params['channelId'], 'channel');
  await removeChannelConfig(user, ctx.clientAddress ?? null, channelId);
  return new Response(null, { status: 204 });
};
