import { z } from 'zod';
import { operation } from '../../../../lib/server/api-operation.ts';
import { calcRoute } from '../../../../lib/server/calc-route.ts';
import { msaCalc } from '../../../../lib/server/services/gauges.ts';
import { GaugeLinearityInputSchema } from '../../../../lib/shared/msa.ts';

/** Measurement-system analysis calculator (AIAG MSA 4th ed.): the same computation as a stored study. */
export const contract = {
  POST: operation({
    summary: 'Gauge linearity regression (AIAG MSA 4th ed.)',
    tag: 'calculators',
    action: 'calc.use',
    body: GaugeLinearityInputSchema,
    responses: { 200: z.looseObject({}) },
  }),
};

export const POST = calcRoute(contract.POST, (input) => msaCalc.linearity(input));
