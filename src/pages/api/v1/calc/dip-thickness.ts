import { dipThickness } from '../../../../lib/domain/film/dip-coat.ts';
import { calcRoute } from '../../../../lib/server/calc-route.ts';
import { DipThicknessInputSchema } from '../../../../lib/shared/calc.ts';

/** Landau–Levich wet (and dry) thickness, capillary number, capillary length and regime (product.md §6). */
export const POST = calcRoute(DipThicknessInputSchema, (input) => dipThickness(input));
