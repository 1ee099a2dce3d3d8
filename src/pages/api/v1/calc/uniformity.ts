import { uniformitySurvey } from '../../../../lib/domain/oven/uniformity.ts';
import { calcRoute } from '../../../../lib/server/calc-route.ts';
import { UniformityInputSchema, UniformityOutputSchema } from '../../../../lib/shared/calc.ts';
import { operation } from '../../../../lib/server/api-operation.ts';

export const contract = {
  POST: operation({
    summary: 'Oven uniformity survey',
    tag: 'calculators',
    action: 'calc.use',
    body: UniformityInputSchema,
    responses: { 200: UniformityOutputSchema },
  }),
};

/** Oven uniformity survey: hottest and coldest deviation from setpoint and the class (AMS2750F Table 11 template). */
export const POST = calcRoute(contract.POST, (input) => uniformitySurvey(input));
