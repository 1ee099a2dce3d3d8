import type { APIRoute } from 'astro';
import { z } from 'zod';
import { requireRole } from '../../../../lib/server/guard.ts';
import { readJson, readQuery } from '../../../../lib/server/http.ts';
import { createNc, listNcs } from '../../../../lib/server/services/holds.ts';
import { NcCreateSchema } from '../../../../lib/shared/quality.ts';
import { operation } from '../../../../lib/server/api-operation.ts';
import { NcDetailSchema, NcListSchema } from '../../../../lib/shared/api/quality.ts';

const Query = z.object({ status: z.enum(['open', 'closed']).optional() });

export const contract = {
  GET: operation({
    summary: 'Nonconformances (?status=open|closed)',
    tag: 'quality',
    action: 'view',
    query: Query,
    responses: { 200: NcListSchema },
  }),
  POST: operation({
    summary: 'Write a nonconformance',
    tag: 'quality',
    action: 'nc.write',
    body: NcCreateSchema,
    responses: { 201: NcDetailSchema },
  }),
};

/** Nonconformances, newest first (`?status=open|closed`). */
export const GET: APIRoute = async ({ locals, url }) => {
  requireRole(locals, contract.GET.action);
  return Response.json(await listNcs(readQuery(url, contract.GET.query).status));
};

/** Write a nonconformance (quality): failed test(s), suspected cause (load / bath), holds to tie to it. */
export const POST: APIRoute = async ({ locals, request, clientAddress }) => {
  const user = requireRole(locals, contract.POST.action);
  const input = await readJson(request, contract.POST.body);
  return Response.json(await createNc(user, input, clientAddress), { status: 201 });
};
