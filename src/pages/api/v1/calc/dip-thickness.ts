import { dipThickness } from '../../../../lib/domain/film/dip-coat.ts';
import { operation } from '../../../../lib/server/api-operation.ts';
import { calcRoute } from '../../../../lib/server/calc-route.ts';
import { DipThicknessInputSchema, DipThicknessOutputSchema } from '../../../../lib/shared/calc.ts';

export const contract = {
  POST: operation({
    summary: 'Landau–Levich dip-coat thickness',
    tag: 'calculators',
    action: 'calc.use',
    body: DipThicknessInputSchema,
    responses: { 200: DipThicknessOutputSchema },
  }),
};

/** Landau–Levich wet (and dry) thickness, capillary number, capillary length and regime (product.md §6). */
export const POST = calcRoute(contract.POST, (input) => dipThickness(input));
