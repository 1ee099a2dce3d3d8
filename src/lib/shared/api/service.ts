/** Answers of the service endpoints: health and sign-in. */
import { z } from 'zod';
import { RoleSchema } from '../roles.ts';
import { DateTimeSchema } from './common.ts';

/** `GET /api/health` (product.md §6): the database, broker and ingest worker, and which of them fail. */
export const HealthReportSchema = z.object({
  status: z.enum(['ok', 'degraded']),
  time: DateTimeSchema,
  db: z.object({ ok: z.boolean(), latencyMs: z.number().optional(), error: z.string().optional() }),
  broker: z.object({ ok: z.boolean(), error: z.string().optional() }),
  ingest: z.object({
    ok: z.boolean(),
    workers: z.int(),
    lagMs: z.number().nullable(),
    heartbeatAgeMs: z.number().nullable(),
    buffered: z.int(),
    journalBytes: z.number(),
    error: z.string().optional(),
  }),
  failing: z.array(z.string()),
});
export type HealthReportView = z.infer<typeof HealthReportSchema>;

/** The signed-in user as sign-in answers it. */
export const SignedInSchema = z.object({
  user: z.object({ id: z.int(), username: z.string(), displayName: z.string(), role: RoleSchema }),
});

export const SignedOutSchema = z.object({ signedOut: z.literal(true) });
export const MessageSchema = z.object({ message: z.string() });
export const PasswordSetSchema = z.object({ passwordSet: z.literal(true), username: z.string() });
