import { bayerRatio } from '../../../../lib/domain/quality/abrasion.ts';
import { calcRoute } from '../../../../lib/server/calc-route.ts';
import { AbrasionInputSchema } from '../../../../lib/shared/calc.ts';

/** Bayer abrasion ratio (ASTM F735): reference haze gain ÷ test haze gain. */
export const POST = calcRoute(AbrasionInputSchema, (input) => bayerRatio(input));
