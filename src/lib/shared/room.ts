/** Room climate: the dew-point and blush-risk calculator's schema. */
import { z } from 'zod';

const num = (label: string) => z.number({ error: `${label} must be a finite number` });

export const DewPointInputSchema = z.object({
  airC: num('airC')
    .min(-40, { error: 'the Magnus coefficients hold from −40 °C' })
    .max(50, { error: 'the Magnus coefficients hold up to 50 °C' }),
  rhPct: num('rhPct')
    .gt(0, { error: 'relative humidity must be above 0 %' })
    .max(100, { error: 'relative humidity is at most 100 %' }),
  surfaceC: num('surfaceC').min(-40).max(100).optional(),
  marginC: num('marginC').min(0).max(20).default(3),
});
export type DewPointInput = z.infer<typeof DewPointInputSchema>;
