import { fringeThickness } from '../../../../lib/domain/quality/fringes.ts';
import { calcRoute } from '../../../../lib/server/calc-route.ts';
import { FringeThicknessInputSchema } from '../../../../lib/shared/calc.ts';

/** Coat thickness from two reflectance extrema: d = N·λ1·λ2 / (2n(λ1 − λ2)). */
export const POST = calcRoute(FringeThicknessInputSchema, (input) => fringeThickness(input));
