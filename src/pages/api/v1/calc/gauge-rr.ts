import { calcRoute } from '../../../../lib/server/calc-route.ts';
import { msaCalc } from '../../../../lib/server/services/gauges.ts';
import { GaugeRrInputSchema } from '../../../../lib/shared/msa.ts';

/** Measurement-system analysis calculator (AIAG MSA 4th ed.): the same computation as a stored study. */
export const POST = calcRoute(GaugeRrInputSchema, (input) => msaCalc.grr(input));
