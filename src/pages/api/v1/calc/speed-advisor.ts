import { withdrawalSpeedForThickness } from '../../../../lib/domain/film/dip-coat.ts';
import { calcRoute } from '../../../../lib/server/calc-route.ts';
import { SpeedAdvisorInputSchema } from '../../../../lib/shared/calc.ts';
import { operation } from '../../../../lib/server/api-operation.ts';
import { SpeedAdviceSchema } from '../../../../lib/shared/api/calc.ts';

export const contract = {
  POST: operation({
    summary: 'Withdrawal speed for a target thickness',
    tag: 'calculators',
    action: 'calc.use',
    body: SpeedAdvisorInputSchema,
    responses: { 200: SpeedAdviceSchema },
  }),
};

/** Withdrawal speed that gives the target thickness at the bath's current viscosity. */
export const POST = calcRoute(contract.POST, (input) => withdrawalSpeedForThickness(input));
