import { viscosityFromCup } from '../../../../lib/domain/film/viscosity-cups.ts';
import { calcRoute } from '../../../../lib/server/calc-route.ts';
import { ViscosityCupInputSchema } from '../../../../lib/shared/calc.ts';

/** Efflux seconds → kinematic (and dynamic) viscosity; outside the cup's window `inRange` is false and no viscosity is given. */
export const POST = calcRoute(ViscosityCupInputSchema, (input) => viscosityFromCup(input));
