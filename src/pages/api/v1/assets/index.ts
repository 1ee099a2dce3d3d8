import type { APIRoute } from 'astro';
import { requireRole } from '../../../../lib/server/guard.ts';
import { listAssets } from '../../../../lib/server/services/plant.ts';
import type { AssetView } from '../../../../lib/shared/plant.ts';
import { operation } from '../../../../lib/server/api-operation.ts';
import { AssetListSchema } from '../../../../lib/shared/api/plant.ts';

export const contract = {
  GET: operation({
    summary: 'The asset tree (lines, tanks, ovens, zones, coaters)',
    tag: 'plant',
    action: 'view',
    responses: { 200: AssetListSchema },
  }),
};

/** The plant's assets as a flat list; `parentId` makes the tree (site → line → tank, oven → zone). */
export const GET: APIRoute = async ({ locals }) => {
  requireRole(locals, contract.GET.action);
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
