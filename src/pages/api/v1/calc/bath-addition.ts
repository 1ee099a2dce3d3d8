import { bathAddition } from '../../../../lib/domain/film/bath-maintenance.ts';
import { calcRoute, refusal } from '../../../../lib/server/calc-route.ts';
import { BathAdditionInputSchema } from '../../../../lib/shared/calc.ts';
import { BATH_CAUTION } from '../../../../lib/shared/baths.ts';
import { operation } from '../../../../lib/server/api-operation.ts';
import { BathAdditionAnswerSchema } from '../../../../lib/shared/api/calc.ts';

export const contract = {
  POST: operation({
    summary: 'Solvent / fresh-lacquer addition by mass balance',
    tag: 'calculators',
    action: 'calc.use',
    body: BathAdditionInputSchema,
    responses: { 200: BathAdditionAnswerSchema },
  }),
};

/** Solvent or fresh-lacquer addition that returns solids to target, by mass balance; an impossible request is a 400 with the reason. */
export const POST = calcRoute(contract.POST, (input) => {
  const r = bathAddition(input);
  if (!r.ok) {
    const path = /tank/.test(r.reason) ? 'maxBathMassKg' : /lacquer/.test(r.reason) ? 'lacquerSolidsPct' : 'solidsTargetPct';
    throw refusal('No addition possible', r.reason, path);
  }
  return { ...r, caution: BATH_CAUTION };
});
