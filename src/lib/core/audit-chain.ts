/**
 * Verification of the audit trail's hash chain (migration 20261204-1900): walks `audit_log` in
 * id order, one page at a time (linear time, memory bounded by the page), and reports the first
 * broken link. For each row the database gives its canonical text (`audit_log_canonical`, the
 * same text the insert trigger hashed) and this module hashes it itself with node:crypto, so a
 * row whose content was changed behind the triggers' back no longer matches its stored hash; a
 * deleted row leaves the next row's `prev_hash` pointing at nothing; rows removed from the end
 * leave the chain head ahead of the last row; and a chain rewritten from some row onwards no
 * longer holds the hash an earlier verification saw for its last row.
 *
 * Worker-safe: takes the process's Sequelize instance; no Astro, no env.
 */
import { createHash } from 'node:crypto';
import { QueryTypes, type Sequelize } from 'sequelize';
import { AuditVerification } from '../../../db/models/index.ts';

export interface ChainBreak {
  /** The first row whose link does not hold (for a missing tail: the id the head names). */
  id: string;
  kind: 'content' | 'link' | 'head' | 'anchor';
  problem: string;
}

export interface ChainReport {
  ok: boolean;
  rowsChecked: number;
  lastId: string | null;
  lastHash: string | null;
  broken: ChainBreak | null;
}

export const VERIFY_PAGE_ROWS = 500;

const hex = (b: Buffer | null | undefined) => (b ? b.toString('hex') : 'none');
const same = (a: Buffer | null | undefined, b: Buffer | null | undefined) => (!a && !b) || (!!a && !!b && a.equals(b));

interface PageRow {
  id: string;
  prev_hash: Buffer | null;
  hash: Buffer | null;
  canonical: string;
}

/** Walk the whole chain; `pageRows` only for tests (small pages exercise the paging). */
export async function verifyAuditChain(sequelize: Sequelize, pageRows = VERIFY_PAGE_ROWS): Promise<ChainReport> {
  let after = '0';
  let prevId: string | null = null;
  let prevHash: Buffer | null = null;
  let checked = 0;
  const anchor = await AuditVerification.findOne({ where: { ok: true }, order: [['id', 'DESC']] });
  const report = (broken: ChainBreak | null): ChainReport => ({
    ok: broken === null,
    rowsChecked: checked,
    lastId: prevId,
    lastHash: prevHash ? prevHash.toString('hex') : null,
    broken,
  });
  for (;;) {
    const rows = await sequelize.query<PageRow>(
      `select a.id::text as id, a.prev_hash, a.hash, audit_log_canonical(a, a.prev_hash) as canonical
         from audit_log a where a.id > $1::bigint order by a.id limit $2`,
      { bind: [after, pageRows], type: QueryTypes.SELECT },
    );
    for (const r of rows) {
      if (!same(r.prev_hash, prevHash)) {
        return report({
          id: r.id,
          kind: 'link',
          problem:
            `prev_hash ${hex(r.prev_hash)} is not the hash of the row before it ` +
            `(${prevId === null ? 'none: this is the first row' : `row ${prevId}: ${hex(prevHash)}`}); ` +
            'a row before it was deleted, inserted or re-hashed',
        });
      }
      const expected = createHash('sha256').update(r.canonical, 'utf8').digest();
      if (!r.hash || !expected.equals(r.hash)) {
        return report({
          id: r.id,
          kind: 'content',
          problem: `the row's content hashes to ${hex(expected)} but its stored hash is ${hex(r.hash)}; the row was altered or written without the chain trigger`,
        });
      }
      if (anchor && anchor.lastId !== null && String(anchor.lastId) === r.id && !same(anchor.lastHash, r.hash)) {
        return report({
          id: r.id,
          kind: 'anchor',
          problem: `the verification of ${anchor.at.toISOString()} saw hash ${hex(anchor.lastHash)} for this row, now ${hex(r.hash)}; the chain was rewritten`,
        });
      }
      prevId = r.id;
      prevHash = r.hash;
      checked++;
    }
    if (rows.length < pageRows) break;
    after = rows[rows.length - 1]!.id;
  }
  if (anchor && anchor.lastId !== null && (prevId === null || BigInt(prevId) < BigInt(anchor.lastId))) {
    return report({
      id: String(anchor.lastId),
      kind: 'anchor',
      problem: `the verification of ${anchor.at.toISOString()} ended at row ${anchor.lastId}, which is gone (the chain now ends at ${prevId ?? 'no row'})`,
    });
  }
  const heads = await sequelize.query<{ last_id: string | null; last_hash: Buffer | null }>(
    'select last_id::text as last_id, last_hash from audit_chain_head',
    { type: QueryTypes.SELECT },
  );
  const head = heads[0];
  if (!head || head.last_id !== prevId || !same(head.last_hash, prevHash)) {
    return report({
      id: head?.last_id ?? 'head',
      kind: 'head',
      problem: `the chain head names row ${head?.last_id ?? 'none'} (${hex(head?.last_hash)}) but the chain ends at row ${prevId ?? 'none'} (${hex(prevHash)}); rows at the end were deleted`,
    });
  }
  return report(null);
}

export interface VerificationRecord {
  at: string;
  by: string;
  ok: boolean;
  rowsChecked: number;
  lastId: string | null;
  brokenId: string | null;
  problem: string | null;
}

const toRecord = (v: AuditVerification): VerificationRecord => ({
  at: v.at.toISOString(),
  by: v.actorLabel,
  ok: v.ok,
  rowsChecked: Number(v.rowsChecked),
  lastId: v.lastId === null ? null : String(v.lastId),
  brokenId: v.brokenId === null ? null : String(v.brokenId),
  problem: v.problem,
});

/** Verify now and keep the outcome (the admin screen shows the latest one). */
export async function runAuditVerification(
  sequelize: Sequelize,
  actorLabel: string,
): Promise<{ report: ChainReport; record: VerificationRecord }> {
  const report = await verifyAuditChain(sequelize);
  const row = await AuditVerification.create({
    actorLabel,
    ok: report.ok,
    rowsChecked: report.rowsChecked,
    // A broken chain is no anchor for the next run: keep its end only when it held.
    lastId: report.ok && report.lastId !== null ? Number(report.lastId) : null,
    lastHash: report.ok && report.lastHash ? Buffer.from(report.lastHash, 'hex') : null,
    brokenId: report.broken && /^\d+$/.test(report.broken.id) ? Number(report.broken.id) : null,
    problem: report.broken ? `${report.broken.kind}: ${report.broken.problem}` : null,
  });
  return { report, record: toRecord(row) };
}

/** The latest verification, or null when none has run. */
export async function lastAuditVerification(): Promise<VerificationRecord | null> {
  const v = await AuditVerification.findOne({ order: [['id', 'DESC']] });
  return v ? toRecord(v) : null;
}
