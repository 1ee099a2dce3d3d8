/**
 * Answers of the administration endpoints: users, API tokens, sign-in locks, caught mail, the audit trail.
 * Each schema is the JSON the service returns; `src/lib/server/api-answers.ts` fails to compile when a
 * service's return type stops fitting its schema.
 */
import { z } from 'zod';

/** What `updateUser` answers (`src/lib/server/services/accounts.ts`). */
export const UserViewSchema = z.object({
  id: z.number(),
  username: z.string(),
  displayName: z.string(),
  email: z.string().nullable(),
  role: z.enum(['viewer', 'operator', 'engineer', 'quality', 'admin']),
  active: z.boolean(),
  createdAt: z.string(),
  lastSignInAt: z.string().nullable(),
  sessions: z.number(),
});

/** What `adminSendReset` answers (`src/lib/server/services/accounts.ts`). */
export const ResetSentSchema = z.object({
  to: z.string(),
  expiresInMinutes: z.number(),
});

/** What `revokeToken` answers (`src/lib/server/services/accounts.ts`). */
export const TokenViewSchema = z.object({
  id: z.number(),
  name: z.string(),
  role: z.enum(['viewer', 'operator', 'engineer', 'quality', 'admin']),
  prefix: z.string(),
  createdAt: z.string(),
  createdBy: z.string(),
  lastUsedAt: z.string().nullable(),
  revokedAt: z.string().nullable(),
});

/** What `listLocks` (one element) answers (`src/lib/server/services/accounts.ts`). */
export const LockViewSchema = z.object({
  key: z.string(),
  kind: z.enum(['user', 'address']),
  subject: z.string(),
  failures: z.number(),
  lastFailureAt: z.string().nullable(),
  lockedUntil: z.string().nullable(),
  locked: z.boolean(),
});

/** What `listCaughtMail` (one element) answers (`src/lib/server/services/accounts.ts`). */
export const MailViewSchema = z.object({
  id: z.number(),
  caughtAt: z.string(),
  from: z.string().nullable(),
  to: z.string(),
  subject: z.string().nullable(),
  body: z.string(),
});

/** What `queryAudit` answers (`src/lib/server/services/audit-trail.ts`). */
export const AuditPageSchema = z.object({
  rows: z.array(
    z.object({
      id: z.number(),
      at: z.string(),
      actorId: z.number().nullable(),
      actor: z.string(),
      action: z.string(),
      entity: z.string(),
      entityId: z.string().nullable(),
      before: z.unknown(),
      after: z.unknown(),
      address: z.string().nullable(),
      signature: z
        .object({
          displayName: z.string(),
          username: z.string(),
          meaning: z.string(),
          signedAt: z.string(),
        })
        .nullable(),
    }),
  ),
  total: z.number(),
  page: z.number(),
  pageSize: z.number(),
});

export const UserListSchema = z.array(UserViewSchema);
export const CreatedUserSchema = z.object({ user: UserViewSchema, invited: z.boolean() });
export const ResetLinkSentSchema = ResetSentSchema.extend({ sent: z.literal(true) });
export const TokenListSchema = z.array(TokenViewSchema);
/** A new token; `secret` is in this answer only. */
export const CreatedTokenSchema = TokenViewSchema.extend({ secret: z.string() });
export const LockListSchema = z.array(LockViewSchema);
export const UnlockedSchema = z.object({ unlocked: z.string() });
export const MailListSchema = z.array(MailViewSchema);
