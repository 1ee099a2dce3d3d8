import { withdrawalSpeedForThickness } from '../../../../lib/domain/film/dip-coat.ts';
import { calcRoute } from '../../../../lib/server/calc-route.ts';
import { SpeedAdvisorInputSchema } from '../../../../lib/shared/calc.ts';

/** Withdrawal speed that gives the target thickness at the bath's current viscosity. */
export const POST = calcRoute(SpeedAdvisorInputSchema, (input) => withdrawalSpeedForThickness(input));
