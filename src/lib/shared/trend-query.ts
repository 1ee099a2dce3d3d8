/**
 * Query schema of `GET /api/v1/channels/{id}/annotations` (kept apart from trend.ts so that the
 * chart islands, which import trend.ts, do not bundle zod).
 */
import { z } from 'zod';
import { MAX_SPAN_MS } from './trend.ts';

const HOUR_MS = 3_600_000;

const msParam = (what: string) =>
  z
    .string()
    .trim()
    .regex(/^\d{12,14}$/, `${what} must be epoch milliseconds`)
    .transform(Number);

/** `GET /api/v1/channels/{id}/annotations?from&to` (epoch ms; at most 2 years; default the last hour). */
export const AnnotationsQuerySchema = z
  .object({ from: msParam('from').optional(), to: msParam('to').optional() })
  .transform((q, ctx) => {
    const to = q.to ?? Date.now();
    const from = q.from ?? to - HOUR_MS;
    if (!(from < to)) {
      ctx.addIssue({ code: 'custom', path: ['from'], message: 'from must be before to' });
      return z.NEVER;
    }
    if (to - from > MAX_SPAN_MS) {
      ctx.addIssue({ code: 'custom', path: ['from'], message: 'the range may span at most 2 years' });
      return z.NEVER;
    }
    return { from, to };
  });
