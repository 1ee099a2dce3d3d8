import { calibrateThicknessConstant } from '../../../../lib/domain/film/dip-coat.ts';
import { calcRoute } from '../../../../lib/server/calc-route.ts';
import { CalibrationInputSchema } from '../../../../lib/shared/calc.ts';

/** Thickness constant C in h = C·(ηU)^k from measured films, by least squares (fixed k = 2/3 and free k). */
export const POST = calcRoute(CalibrationInputSchema, (input) => calibrateThicknessConstant(input.points));
