import type { APIRoute } from 'astro';
import { z } from 'zod';
import { requireRole } from '../../../../lib/server/guard.ts';
import { readJson, readQuery } from '../../../../lib/server/http.ts';
import { assignWindow, listAssignments } from '../../../../lib/server/services/windows.ts';
import { WindowAssignSchema } from '../../../../lib/shared/windows.ts';

const Query = z.object({ assetId: z.coerce.number().int().positive().optional() });

/** Assignment history (which window each line/oven ran when), newest first. */
export const GET: APIRoute = async ({ locals, url }) => {
  requireRole(locals, 'view');
  const { assetId } = readQuery(url, Query);
  return Response.json(await listAssignments(assetId));
};

/** Assign an approved window to a line/oven from a time on (engineer; audited). */
export const POST: APIRoute = async ({ locals, request, clientAddress }) => {
  const user = requireRole(locals, 'window.edit');
  const input = await readJson(request, WindowAssignSchema);
  return Response.json(await assignWindow(user, input, clientAddress), { status: 201 });
};
