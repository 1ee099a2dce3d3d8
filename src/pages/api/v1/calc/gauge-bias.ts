import { calcRoute } from '../../../../lib/server/calc-route.ts';
import { msaCalc } from '../../../../lib/server/services/gauges.ts';
import { GaugeBiasInputSchema } from '../../../../lib/shared/msa.ts';

/** Measurement-system analysis calculator (AIAG MSA 4th ed.): the same computation as a stored study. */
export const POST = calcRoute(GaugeBiasInputSchema, (input) => msaCalc.bias(input));
