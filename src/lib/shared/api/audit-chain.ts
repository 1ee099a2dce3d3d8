/** Answers of the audit-chain verification endpoint (`src/pages/api/v1/admin/audit-chain.ts`). */
import { z } from 'zod';

/** One kept verification run (`src/lib/core/audit-chain.ts`, `VerificationRecord`). */
export const AuditVerificationSchema = z.object({
  at: z.string(),
  by: z.string(),
  ok: z.boolean(),
  rowsChecked: z.number(),
  lastId: z.string().nullable(),
  brokenId: z.string().nullable(),
  problem: z.string().nullable(),
});
export type AuditVerificationView = z.infer<typeof AuditVerificationSchema>;

/** The latest verification (null before the first). */
export const AuditChainStatusSchema = z.object({ last: AuditVerificationSchema.nullable() });
export type AuditChainStatus = z.infer<typeof AuditChainStatusSchema>;
