import { spectrumColour } from '../../../../lib/domain/colour/colorimetry.ts';
import { calcRoute } from '../../../../lib/server/calc-route.ts';
import { SpectrumColourInputSchema, SpectrumColourOutputSchema } from '../../../../lib/shared/optics.ts';
import { operation } from '../../../../lib/server/api-operation.ts';

/** Colour of a reflectance spectrum (CIE 1931 2°, D65) and ISO 13666 luminous reflectance. */
export const contract = {
  POST: operation({
    summary: 'Colour of a reflectance spectrum (CIE 1931 2°, D65) and luminous reflectance',
    tag: 'calculators',
    action: 'calc.use',
    body: SpectrumColourInputSchema,
    responses: { 200: SpectrumColourOutputSchema },
  }),
};

export const POST = calcRoute(contract.POST, (input) => spectrumColour(input.wavelengthsNm, input.reflectancePct));
