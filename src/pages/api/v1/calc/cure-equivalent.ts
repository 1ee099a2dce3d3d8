import { cureEquivalent } from '../../../../lib/domain/cure/arrhenius.ts';
import { calcRoute } from '../../../../lib/server/calc-route.ts';
import { CureEquivalentInputSchema, CureEquivalentOutputSchema } from '../../../../lib/shared/calc.ts';
import { operation } from '../../../../lib/server/api-operation.ts';

export const contract = {
  POST: operation({
    summary: 'Arrhenius equivalent cure minutes',
    tag: 'calculators',
    action: 'calc.use',
    body: CureEquivalentInputSchema,
    responses: { 200: CureEquivalentOutputSchema },
  }),
};

/** Arrhenius equivalent minutes at the reference temperature (ASTM C1074 equivalent-age form), and minutes at or above a threshold. */
export const POST = calcRoute(contract.POST, (input) => cureEquivalent(input));
