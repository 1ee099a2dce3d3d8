import { cureVerdict } from '../../../../lib/domain/cure/cure-record.ts';
import { operation } from '../../../../lib/server/api-operation.ts';
import { calcRoute } from '../../../../lib/server/calc-route.ts';
import { BODY_LIMITS } from '../../../../lib/server/http.ts';
import { CureVerdictInputSchema, CureVerdictOutputSchema } from '../../../../lib/shared/calc.ts';

export const contract = {
  POST: operation({
    summary: 'Cure verdict of a profile against a cure window (the oven-load code)',
    description:
      'The same domain code as the oven-load cure record: equivalent minutes accrue only at or above the minimum cure temperature; at most 100 000 readings; bodies up to 6 MiB.',
    tag: 'calculators',
    action: 'calc.use',
    body: CureVerdictInputSchema,
    responses: { 200: CureVerdictOutputSchema },
  }),
};

/** The oven-load cure verdict (same domain code as the load record) on a posted profile and window; at most 100 000 readings. */
export const POST = calcRoute(contract.POST, (input) => cureVerdict(input), BODY_LIMITS.bulkJson);
