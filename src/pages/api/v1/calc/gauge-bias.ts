import { z } from 'zod';
import { operation } from '../../../../lib/server/api-operation.ts';
import { calcRoute } from '../../../../lib/server/calc-route.ts';
import { msaCalc } from '../../../../lib/server/services/gauges.ts';
import { GaugeBiasInputSchema } from '../../../../lib/shared/msa.ts';

/** Measurement-system analysis calculator (AIAG MSA 4th ed.): the same computation as a stored study. */
export const contract = {
  POST: operation({
    summary: 'Gauge bias t test (AIAG MSA 4th ed.)',
    tag: 'calculators',
    action: 'calc.use',
    body: GaugeBiasInputSchema,
    responses: { 200: z.looseObject({}) },
  }),
};

export const POST = calcRoute(contract.POST, (input) => msaCalc.bias(input));
