import { cureVerdict } from '../../../../lib/domain/cure/cure-record.ts';
import { calcRoute } from '../../../../lib/server/calc-route.ts';
import { CureVerdictInputSchema } from '../../../../lib/shared/calc.ts';

/** The oven-load cure verdict (same domain code as the load record) on a posted profile and window; at most 100 000 readings. */
export const POST = calcRoute(CureVerdictInputSchema, (input) => cureVerdict(input));
