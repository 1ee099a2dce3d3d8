import type { APIRoute } from 'astro';
import { requireRole } from '../../../../lib/server/guard.ts';
import { listBaths } from '../../../../lib/server/services/baths.ts';

/** Hard-coat tanks with their charge, age and pot-life state, window, last check and recent additions. */
export const GET: APIRoute = async ({ locals }) => {
  requireRole(locals, 'view');
  return Response.json(await listBaths());
};
