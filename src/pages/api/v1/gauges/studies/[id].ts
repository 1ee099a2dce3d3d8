import type { APIRoute } from 'astro';
import { requireRole } from '../../../../../lib/server/guard.ts';
import { idParam } from '../../../../../lib/server/http.ts';
import { gauges } from '../../../../../lib/server/services/gauges.ts';
import { operation } from '../../../../../lib/server/api-operation.ts';
import { z } from 'zod';

export const contract = {
  GET: operation({
    summary: 'One study with its readings and result',
    tag: 'msa',
    action: 'view',
    responses: { 200: z.looseObject({}) },
    problems: [404],
  }),
};

/** One study with its readings and computed result. */
export const GET: APIRoute = async ({ locals, params }) => {
  requireRole(locals, contract.GET.action);
  return Response.json(await gauges.study(idParam(params['id'], 'gauge study')));
};
