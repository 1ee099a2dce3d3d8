import type { APIRoute } from 'astro';
import { requireRole } from '../../../lib/server/guard.ts';
import { readJson } from '../../../lib/server/http.ts';
import { createMaterial, listMaterials } from '../../../lib/server/services/windows.ts';
import { MaterialCreateSchema } from '../../../lib/shared/baths.ts';

/** Substrates the windows are written for (configurable). */
export const GET: APIRoute = async ({ locals }) => {
  requireRole(locals, 'view');
  return Response.json(await listMaterials());
};

/** Add a substrate (engineer). */
export const POST: APIRoute = async ({ locals, request, clientAddress }) => {
  const user = requireRole(locals, 'window.edit');
  const input = await readJson(request, MaterialCreateSchema);
  return Response.json(await createMaterial(user, input, clientAddress), { status: 201 });
};
