import { spectrumColour } from '../../../../lib/domain/colour/colorimetry.ts';
import { calcRoute } from '../../../../lib/server/calc-route.ts';
import { SpectrumColourInputSchema } from '../../../../lib/shared/optics.ts';

/** Colour of a reflectance spectrum (CIE 1931 2°, D65) and ISO 13666 luminous reflectance. */
export const POST = calcRoute(SpectrumColourInputSchema, (input) => spectrumColour(input.wavelengthsNm, input.reflectancePct));
