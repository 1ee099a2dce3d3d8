import type { APIRoute } from 'astro';
import { z } from 'zod';
import { requireRole } from '../../../../lib/server/guard.ts';
import { readJson, readQuery } from '../../../../lib/server/http.ts';
import { createDraft, listWindows } from '../../../../lib/server/services/windows.ts';
import { WINDOW_STATUSES, WindowDraftCreateSchema } from '../../../../lib/shared/windows.ts';

const ListQuery = z.object({ status: z.enum(WINDOW_STATUSES).optional() });

/** Every window version (optionally one status), for everyone signed in. */
export const GET: APIRoute = async ({ locals, url }) => {
  requireRole(locals, 'view');
  const query = readQuery(url, ListQuery);
  return Response.json(await listWindows(query.status ? { status: query.status } : {}));
};

/** A new draft version of a lacquer × substrate window (engineer). */
export const POST: APIRoute = async ({ locals, request, clientAddress }) => {
  const user = requireRole(locals, 'window.edit');
  const input = await readJson(request, WindowDraftCreateSchema);
  return Response.json(await createDraft(user, input, clientAddress), { status: 201 });
};
