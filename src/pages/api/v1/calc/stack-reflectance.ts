import { DEFAULT_MATERIALS } from '../../../../lib/domain/optics/materials.ts';
import { computeStack, type LayerSpec } from '../../../../lib/domain/optics/stack.ts';
import { calcRoute, refusal } from '../../../../lib/server/calc-route.ts';
import { StackReflectanceInputSchema, StackReflectanceOutputSchema } from '../../../../lib/shared/optics.ts';
import { operation } from '../../../../lib/server/api-operation.ts';

/**
 * Stack reflectance and transmittance by the characteristic-matrix method (Macleod): layers in
 * deposition order, defaults incidentN 1, angle 0°, average polarisation, one face.
 */
export const contract = {
  POST: operation({
    summary: 'Stack reflectance and transmittance (characteristic-matrix method)',
    tag: 'calculators',
    action: 'calc.use',
    body: StackReflectanceInputSchema,
    responses: { 200: StackReflectanceOutputSchema },
  }),
};

export const POST = calcRoute(contract.POST, (input) => {
  const layers: LayerSpec[] = input.layers.map((l, i) => {
    if (l.material !== undefined) {
      if (!DEFAULT_MATERIALS.some((m) => m.id === l.material)) {
        throw refusal(
          'Unknown material',
          `unknown material "${l.material}" (known: ${DEFAULT_MATERIALS.map((m) => m.id).join(', ')})`,
          `layers.${i}.material`,
        );
      }
      return { index: { material: l.material }, thicknessNm: l.thicknessNm };
    }
    return { index: { n: l.n!, k: l.k ?? 0 }, thicknessNm: l.thicknessNm };
  });
  const r = computeStack({ layers, substrate: { n: input.substrateN }, incidentN: input.incidentN }, input.wavelengthsNm, {
    angleDeg: input.angleDeg,
    polarization: input.polarization,
    bothFaces: input.bothFaces,
  });
  return {
    reflectancePct: r.reflectance.map((x) => x * 100),
    transmittancePct: r.transmittance.map((x) => x * 100),
    ...(r.warnings.length ? { warnings: r.warnings } : {}),
  };
});
