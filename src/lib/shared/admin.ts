/**
 * Schemas of the admin and account endpoints (users, password resets, API tokens, sign-in
 * locks, the audit trail query). The same schemas validate the islands' forms and the API.
 */
import { z } from 'zod';
import { RoleSchema } from './roles.ts';
import type { SignatureRecord } from './signature.ts';

/** Passwords: at least 10 characters (NIST SP 800-63B asks for 8 or more; we ask a little more). */
export const PASSWORD_MIN = 10;
export const PasswordSchema = z
  .string()
  .min(PASSWORD_MIN, `Use at least ${PASSWORD_MIN} characters.`)
  .max(500, 'Use at most 500 characters.');

export const UsernameSchema = z
  .string()
  .trim()
  .toLowerCase()
  .regex(/^[a-z0-9._-]{2,40}$/, 'Use 2–40 lower-case letters, digits, dot, dash or underscore.');

export const EmailSchema = z.string().trim().toLowerCase().max(200).pipe(z.email('Enter an e-mail address.'));

export const CreateUserSchema = z.object({
  username: UsernameSchema,
  displayName: z.string().trim().min(1, 'Enter the person’s name.').max(120),
  email: EmailSchema,
  role: RoleSchema,
  /** Optional initial password; without it the person gets an e-mailed link to set one. */
  password: PasswordSchema.optional(),
});
export type CreateUser = z.infer<typeof CreateUserSchema>;

export const UpdateUserSchema = z
  .object({
    displayName: z.string().trim().min(1, 'Enter the person’s name.').max(120).optional(),
    email: EmailSchema.optional(),
    role: RoleSchema.optional(),
    active: z.boolean().optional(),
  })
  .refine((v) => Object.values(v).some((x) => x !== undefined), { message: 'Change at least one field.', path: [] });
export type UpdateUser = z.infer<typeof UpdateUserSchema>;

export interface UserView {
  id: number;
  username: string;
  displayName: string;
  email: string | null;
  role: z.infer<typeof RoleSchema>;
  active: boolean;
  createdAt: string;
  lastSignInAt: string | null;
  sessions: number;
}

/** Public "forgot password": a username or an e-mail address. */
export const ForgotPasswordSchema = z.object({
  login: z.string().trim().min(1, 'Enter your username or e-mail address.').max(200),
});

export const ResetPasswordSchema = z
  .object({
    token: z.string().trim().min(20, 'The link is not complete.').max(200),
    password: PasswordSchema,
    confirm: z.string().max(500).optional(),
  })
  .refine((v) => v.confirm === undefined || v.confirm === v.password, {
    message: 'The two passwords differ.',
    path: ['confirm'],
  });

/** The one answer of the forgot-password form, whatever was entered (no enumeration). */
export const FORGOT_PASSWORD_ANSWER =
  'If that account exists and has an e-mail address, a link to set a new password is on its way. It works once, for 30 minutes.';

export const RESET_LINK_MINUTES = 30;

/** API token lifetime in days: default and maximum. */
export const TOKEN_DEFAULT_DAYS = 90;
export const TOKEN_MAX_DAYS = 365;

export const CreateTokenSchema = z.object({
  name: z.string().trim().min(2, 'Name the client, e.g. “lab LIMS”.').max(80),
  role: RoleSchema,
  expiresInDays: z.coerce
    .number()
    .int('Whole days.')
    .min(1, 'At least one day.')
    .max(TOKEN_MAX_DAYS, `At most ${TOKEN_MAX_DAYS} days.`)
    .default(TOKEN_DEFAULT_DAYS),
});

export interface TokenView {
  id: number;
  name: string;
  role: z.infer<typeof RoleSchema>;
  prefix: string;
  createdAt: string;
  createdBy: string;
  lastUsedAt: string | null;
  revokedAt: string | null;
  expiresAt: string;
}

export const UnlockSchema = z.object({
  key: z.string().trim().min(3).max(300),
});

export interface LockView {
  key: string;
  kind: 'user' | 'address';
  subject: string;
  failures: number;
  lastFailureAt: string | null;
  lockedUntil: string | null;
  locked: boolean;
}

export interface MailView {
  id: number;
  caughtAt: string;
  from: string | null;
  to: string;
  subject: string | null;
  body: string;
}

const dateOrDateTime = z
  .string()
  .trim()
  .refine((s) => !Number.isNaN(Date.parse(s)), 'Use a date such as 2026-12-02 or 2026-12-02T08:00.');

/** An empty query-string value counts as absent. */
const blankIsAbsent = <T extends z.ZodType>(schema: T) => z.preprocess((v) => (v === '' ? undefined : v), schema.optional());

/** Query of `GET /api/v1/audit` and the audit trail page. */
export const AuditQuerySchema = z.object({
  actor: blankIsAbsent(z.string().trim().max(80)),
  action: blankIsAbsent(z.string().trim().max(80)),
  entity: blankIsAbsent(z.string().trim().max(80)),
  entityId: blankIsAbsent(z.string().trim().max(80)),
  from: blankIsAbsent(dateOrDateTime),
  to: blankIsAbsent(dateOrDateTime),
  page: z.coerce.number().int().min(1).max(100_000).default(1),
  pageSize: z.coerce.number().int().min(1).max(500).default(50),
  format: z.enum(['json', 'csv']).default('json'),
});
export type AuditQuery = z.infer<typeof AuditQuerySchema>;

export interface AuditRowView {
  id: number;
  at: string;
  actorId: number | null;
  actor: string;
  action: string;
  entity: string;
  entityId: string | null;
  before: unknown;
  after: unknown;
  address: string | null;
  signature: Omit<SignatureRecord, 'userId'> | null;
}

export interface AuditPage {
  rows: AuditRowView[];
  total: number;
  page: number;
  pageSize: number;
}

/** A signed-in user sets their own password (required when someone else chose the current one). */
export const ChangePasswordSchema = z
  .object({
    currentPassword: z.string().min(1, 'Enter your current password.').max(500),
    newPassword: PasswordSchema,
    confirm: z.string().max(500).optional(),
  })
  .refine((v) => v.confirm === undefined || v.confirm === v.newPassword, {
    message: 'The two passwords differ.',
    path: ['confirm'],
  })
  .refine((v) => v.newPassword !== v.currentPassword, {
    message: 'Choose a password other than the current one.',
    path: ['newPassword'],
  });
export type ChangePassword = z.infer<typeof ChangePasswordSchema>;
