import { activationEnergyForEquivalence } from '../../../../lib/domain/cure/arrhenius.ts';
import { calcRoute, refusal } from '../../../../lib/server/calc-route.ts';
import { ActivationEnergyInputSchema } from '../../../../lib/shared/calc.ts';
import { operation } from '../../../../lib/server/api-operation.ts';
import { ActivationEnergyAnswerSchema } from '../../../../lib/shared/api/calc.ts';

export const contract = {
  POST: operation({
    summary: 'Activation energy making two cure schedules equivalent',
    tag: 'calculators',
    action: 'calc.use',
    body: ActivationEnergyInputSchema,
    responses: { 200: ActivationEnergyAnswerSchema },
  }),
};

/** The activation energy that makes two isothermal cure schedules equivalent: Ea = R·ln(tA/tB)/(1/TA − 1/TB). */
export const POST = calcRoute(contract.POST, (input) => {
  const r = activationEnergyForEquivalence(input.scheduleA, input.scheduleB);
  if (!r.ok) throw refusal('No activation energy', r.reason, 'scheduleB.minutes');
  return { activationEnergyKJMol: r.activationEnergyKJMol };
});
