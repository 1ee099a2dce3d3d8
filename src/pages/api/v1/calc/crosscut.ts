import { crosscutClass } from '../../../../lib/domain/quality/crosscut.ts';
import { calcRoute } from '../../../../lib/server/calc-route.ts';
import { CrosscutInputSchema } from '../../../../lib/shared/calc.ts';

/** Percent of the lattice removed → ISO 2409 class and ASTM D3359 method B class. */
export const POST = calcRoute(CrosscutInputSchema, (input) => crosscutClass(input));
