import { deltaE2000, deltaE76 } from '../../../../lib/domain/colour/difference.ts';
import { calcRoute } from '../../../../lib/server/calc-route.ts';
import { ColourDifferenceInputSchema, ColourDifferenceOutputSchema } from '../../../../lib/shared/optics.ts';
import { operation } from '../../../../lib/server/api-operation.ts';

/** ΔE*ab (CIE 1976) and ΔE00 (CIEDE2000) between two CIELAB colours. */
export const contract = {
  POST: operation({
    summary: 'Colour difference ΔE76 and CIEDE2000',
    tag: 'calculators',
    action: 'calc.use',
    body: ColourDifferenceInputSchema,
    responses: { 200: ColourDifferenceOutputSchema },
  }),
};

export const POST = calcRoute(contract.POST, ({ lab1, lab2 }) => ({
  deltaE76: deltaE76(lab1, lab2),
  deltaE2000: deltaE2000(lab1, lab2),
}));
