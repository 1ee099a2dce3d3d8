import { crosscutClass } from '../../../../lib/domain/quality/crosscut.ts';
import { calcRoute } from '../../../../lib/server/calc-route.ts';
import { CrosscutInputSchema, CrosscutOutputSchema } from '../../../../lib/shared/calc.ts';
import { operation } from '../../../../lib/server/api-operation.ts';

export const contract = {
  POST: operation({
    summary: 'Cross-cut class (ISO 2409, ASTM D3359)',
    tag: 'calculators',
    action: 'calc.use',
    body: CrosscutInputSchema,
    responses: { 200: CrosscutOutputSchema },
  }),
};

/** Percent of the lattice removed → ISO 2409 class and ASTM D3359 method B class. */
export const POST = calcRoute(contract.POST, (input) => crosscutClass(input));
