import { cureEquivalent } from '../../../../lib/domain/cure/arrhenius.ts';
import { calcRoute } from '../../../../lib/server/calc-route.ts';
import { CureEquivalentInputSchema } from '../../../../lib/shared/calc.ts';

/** Arrhenius equivalent minutes at the reference temperature (ASTM C1074 equivalent-age form), and minutes at or above a threshold. */
export const POST = calcRoute(CureEquivalentInputSchema, (input) => cureEquivalent(input));
