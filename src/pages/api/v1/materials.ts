import type { APIRoute } from 'astro';
import { requireRole } from '../../../lib/server/guard.ts';
import { readJson } from '../../../lib/server/http.ts';
import { createMaterial, listMaterials } from '../../../lib/server/services/windows.ts';
import { MaterialCreateSchema } from '../../../lib/shared/baths.ts';
import { operation } from '../../../lib/server/api-operation.ts';
import { MaterialListSchema, MaterialSchema } from '../../../lib/shared/api/windows.ts';

export const contract = {
  GET: operation({
    summary: 'Substrates',
    tag: 'windows',
    action: 'view',
    responses: { 200: MaterialListSchema },
  }),
  POST: operation({
    summary: 'Add a substrate',
    tag: 'windows',
    action: 'window.edit',
    body: MaterialCreateSchema,
    responses: { 201: MaterialSchema },
    problems: [409],
  }),
};

/** Substrates the windows are written for (configurable). */
export const GET: APIRoute = async ({ locals }) => {
  requireRole(locals, contract.GET.action);
  return Response.json(await listMaterials());
};

/** Add a substrate (engineer). */
export const POST: APIRoute = async ({ locals, request, clientAddress }) => {
  const user = requireRole(locals, contract.POST.action);
  const input = await readJson(request, contract.POST.body);
  return Response.json(await createMaterial(user, input, clientAddress), { status: 201 });
};
