import type { APIRoute } from 'astro';
import { requireRole } from '../../../../lib/server/guard.ts';
import { listAssets } from '../../../../lib/server/services/plant.ts';
import type { AssetView } from '../../../../lib/shared/plant.ts';

/** The plant's assets as a flat list; `parentId` makes the tree (site → line → tank, oven → zone). */
export const GET: APIRoute = async ({ locals }) => {
  requireRole(locals, 'view');
  const assets: AssetView[] = (await listAssets()).map(({ id, siteId, parentId, kind, code, name }) => ({
    id,
    siteId,
    parentId,
    kind,
    code,
    name,
  }));
  return Response.json(assets);
};
