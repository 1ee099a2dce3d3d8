import type { APIRoute } from 'astro';
import { requireRole } from '../../../lib/server/guard.ts';
import { readJson } from '../../../lib/server/http.ts';
import { createLacquer, listLacquers } from '../../../lib/server/services/windows.ts';
import { LacquerCreateSchema } from '../../../lib/shared/baths.ts';

/** Lacquers (name, maker, nominal solids, density, activation energy). */
export const GET: APIRoute = async ({ locals }) => {
  requireRole(locals, 'view');
  return Response.json(await listLacquers());
};

/** Add a lacquer (engineer). */
export const POST: APIRoute = async ({ locals, request, clientAddress }) => {
  const user = requireRole(locals, 'window.edit');
  const input = await readJson(request, LacquerCreateSchema);
  return Response.json(await createLacquer(user, input, clientAddress), { status: 201 });
};
