/** Answers of the service endpoints: health and sign-in. */
import { z } from 'zod';
import { RoleSchema } from '../roles.ts';
import { DateTimeSchema } from './common.ts';

/**
 * `GET /api/health`: the database, broker and ingest worker, and which of them fail. Anonymous
 * callers get the status and each part's `ok` only; signed-in callers also the details (the
 * optional fields), and under `npm start` the supervised processes.
 */
export const HealthReportSchema = z.object({
  status: z.enum(['ok', 'degraded']),
  time: DateTimeSchema,
  db: z.object({ ok: z.boolean(), latencyMs: z.number().optional(), error: z.string().optional() }),
  broker: z.object({ ok: z.boolean(), error: z.string().optional() }),
  ingest: z.object({
    ok: z.boolean(),
    workers: z.int().optional(),
    lagMs: z.number().nullable().optional(),
    heartbeatAgeMs: z.number().nullable().optional(),
    buffered: z.int().optional(),
    journalBytes: z.number().optional(),
    error: z.string().optional(),
  }),
  supervisor: z
    .object({
      processes: z.array(
        z.object({
          name: z.string(),
          state: z.enum(['starting', 'running', 'restarting', 'stopped']),
          pid: z.int().nullable(),
          restarts: z.int(),
          since: z.string(),
          lastExit: z.object({ code: z.int().nullable(), signal: z.string().nullable(), at: z.string() }).nullable(),
          nextStartAt: z.string().nullable(),
        }),
      ),
    })
    .optional(),
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
