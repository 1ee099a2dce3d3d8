import { fringeThickness } from '../../../../lib/domain/quality/fringes.ts';
import { calcRoute } from '../../../../lib/server/calc-route.ts';
import { FringeThicknessInputSchema, FringeThicknessOutputSchema } from '../../../../lib/shared/calc.ts';
import { operation } from '../../../../lib/server/api-operation.ts';

export const contract = {
  POST: operation({
    summary: 'Thickness from two reflectance extrema',
    tag: 'calculators',
    action: 'calc.use',
    body: FringeThicknessInputSchema,
    responses: { 200: FringeThicknessOutputSchema },
  }),
};

/** Coat thickness from two reflectance extrema: d = N·λ1·λ2 / (2n(λ1 − λ2)). */
export const POST = calcRoute(contract.POST, (input) => fringeThickness(input));
