import type { APIRoute } from 'astro';
import { requireRole } from '../../../../lib/server/guard.ts';
import { readJson } from '../../../../lib/server/http.ts';
import { characteristicSummaries, createCharacteristic } from '../../../../lib/server/services/spc.ts';
import { CharacteristicInputSchema } from '../../../../lib/shared/characteristics.ts';
import { operation } from '../../../../lib/server/api-operation.ts';
import { CharacteristicSummaryListSchema, CreatedCharacteristicSchema } from '../../../../lib/shared/api/spc.ts';

export const contract = {
  GET: operation({
    summary: 'Characteristics',
    tag: 'spc',
    action: 'view',
    responses: { 200: CharacteristicSummaryListSchema },
  }),
  POST: operation({
    summary: 'Define a characteristic',
    tag: 'spc',
    action: 'characteristic.edit',
    body: CharacteristicInputSchema,
    responses: { 201: CreatedCharacteristicSchema },
  }),
};

/** Every characteristic with its limits version, point count and latest point. */
export const GET: APIRoute = async ({ locals }) => {
  requireRole(locals, contract.GET.action);
  return Response.json(await characteristicSummaries());
};

/** A new characteristic (engineer). */
export const POST: APIRoute = async ({ locals, request, clientAddress }) => {
  const user = requireRole(locals, contract.POST.action);
  const input = await readJson(request, contract.POST.body);
  return Response.json(await createCharacteristic(user, input, clientAddress), { status: 201 });
};
