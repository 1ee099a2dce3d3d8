import { bayerRatio } from '../../../../lib/domain/quality/abrasion.ts';
import { calcRoute } from '../../../../lib/server/calc-route.ts';
import { AbrasionInputSchema } from '../../../../lib/shared/calc.ts';
import { operation } from '../../../../lib/server/api-operation.ts';
import { AbrasionResultSchema } from '../../../../lib/shared/api/calc.ts';

export const contract = {
  POST: operation({
    summary: 'Bayer abrasion ratio (ASTM F735)',
    tag: 'calculators',
    action: 'calc.use',
    body: AbrasionInputSchema,
    responses: { 200: AbrasionResultSchema },
  }),
};

/** Bayer abrasion ratio (ASTM F735): reference haze gain ÷ test haze gain. */
export const POST = calcRoute(contract.POST, (input) => bayerRatio(input));
