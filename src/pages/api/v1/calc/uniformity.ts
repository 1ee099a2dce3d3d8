import { uniformitySurvey } from '../../../../lib/domain/oven/uniformity.ts';
import { calcRoute } from '../../../../lib/server/calc-route.ts';
import { UniformityInputSchema } from '../../../../lib/shared/calc.ts';

/** Oven uniformity survey: hottest and coldest deviation from setpoint and the class (AMS2750G template). */
export const POST = calcRoute(UniformityInputSchema, (input) => uniformitySurvey(input));
