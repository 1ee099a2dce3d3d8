import { viscosityFromCup } from '../../../../lib/domain/film/viscosity-cups.ts';
import { calcRoute } from '../../../../lib/server/calc-route.ts';
import { ViscosityCupInputSchema } from '../../../../lib/shared/calc.ts';
import { operation } from '../../../../lib/server/api-operation.ts';
import { ViscosityCupResultSchema } from '../../../../lib/shared/api/calc.ts';

export const contract = {
  POST: operation({
    summary: 'Viscosity from cup efflux time',
    tag: 'calculators',
    action: 'calc.use',
    body: ViscosityCupInputSchema,
    responses: { 200: ViscosityCupResultSchema },
  }),
};

/** Efflux seconds → kinematic (and dynamic) viscosity; outside the cup's window `inRange` is false and no viscosity is given. */
export const POST = calcRoute(contract.POST, (input) => viscosityFromCup(input));
