import type { APIRoute } from 'astro';
import { z } from 'zod';
import { requireRole } from '../../../../lib/server/guard.ts';
import { readJson, readQuery } from '../../../../lib/server/http.ts';
import { createNc, listNcs } from '../../../../lib/server/services/holds.ts';
import { NcCreateSchema } from '../../../../lib/shared/quality.ts';

const Query = z.object({ status: z.enum(['open', 'closed']).optional() });

/** Nonconformances, newest first (`?status=open|closed`). */
export const GET: APIRoute = async ({ locals, url }) => {
  requireRole(locals, 'view');
  return Response.json(await listNcs(readQuery(url, Query).status));
};

/** Write a nonconformance (quality): failed test(s), suspected cause (load / bath), holds to tie to it. */
export const POST: APIRoute = async ({ locals, request, clientAddress }) => {
  const user = requireRole(locals, 'nc.write');
  const input = await readJson(request, NcCreateSchema);
  return Response.json(await createNc(user, input, clientAddress), { status: 201 });
};
