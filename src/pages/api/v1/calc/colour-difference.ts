import { deltaE2000, deltaE76 } from '../../../../lib/domain/colour/difference.ts';
import { calcRoute } from '../../../../lib/server/calc-route.ts';
import { ColourDifferenceInputSchema } from '../../../../lib/shared/optics.ts';

/** ΔE*ab (CIE 1976) and ΔE00 (CIEDE2000) between two CIELAB colours. */
export const POST = calcRoute(ColourDifferenceInputSchema, ({ lab1, lab2 }) => ({
  deltaE76: deltaE76(lab1, lab2),
  deltaE2000: deltaE2000(lab1, lab2),
}));
