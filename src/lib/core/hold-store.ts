/**
 * Holds and nonconformances (worker- and seed-safe: takes the Sequelize instance or a
 * transaction, imports no Astro env). Placing a hold needs a reason; closing a hold (release or
 * another disposition), dispositioning a nonconformance's holds and closing a nonconformance are
 * electronic signatures (21 CFR Part 11 §11.50, §11.200).
 *
 * Each change runs in one transaction with its audit row. A signed change locks its rows, checks
 * their state, and only then asks `sign` for the signature (the web layer checks the signer's
 * password there): a wrong password or a state that refuses the change writes nothing, and two
 * concurrent closes cannot both sign.
 */
import { Op } from 'sequelize';
import { Hold, Job, NcDisposition, NcTest, Nonconformance, OvenLoad, QualityTest } from '../../../db/models/index.ts';
import type { SignatureRecord } from '../../../db/models/index.ts';
import { auditIn, type AuditActor, type Transaction } from '../../../db/transaction.ts';
import { DISPOSITION_JOB_STATUS, type Disposition } from '../shared/quality.ts';
import { DomainError, fieldError } from './errors.ts';
import { inTransaction, selectRows, type Db } from './record-db.ts';

/** Produces the signer's signature record, or throws (wrong password, locked account, a token). */
export type Sign = () => Promise<SignatureRecord>;

export interface PlaceHoldsInput {
  jobNumbers: readonly string[];
  reason: string;
  ncId?: number | undefined;
  userId: number | null;
}

/**
 * Holds jobs, one audit row (`hold.place`) per hold placed. Unknown job numbers refuse the whole
 * request (listing them); jobs already on hold are reported and left as they are.
 */
export async function placeHolds(
  db: Db,
  input: PlaceHoldsInput,
  actor: AuditActor,
): Promise<{ placed: { holdId: number; jobNumber: string }[]; alreadyHeld: string[] }> {
  const nums = [...new Set(input.jobNumbers)];
  return inTransaction(db, async (t) => {
    const jobs = await Job.findAll({
      attributes: ['id', 'jobNumber', 'status'],
      where: { jobNumber: { [Op.in]: nums } },
      transaction: t,
    });
    const known = new Map(jobs.map((j) => [j.jobNumber, j]));
    const unknown = nums.filter((n) => !known.has(n));
    if (unknown.length) throw fieldError('jobNumbers', `Unknown job number(s): ${unknown.join(', ')}.`);
    if (input.ncId !== undefined && !(await Nonconformance.findByPk(input.ncId, { attributes: ['id'], transaction: t })))
      throw fieldError('ncId', 'No such nonconformance.');
    const placed: { holdId: number; jobNumber: string }[] = [];
    const alreadyHeld: string[] = [];
    for (const n of nums) {
      const job = known.get(n)!;
      // At most one active hold per job (partial unique index): a job already held is skipped.
      const [hold] = await Hold.bulkCreate(
        [{ jobId: job.id, ncId: input.ncId ?? null, reason: input.reason, placedBy: input.userId }],
        { ignoreDuplicates: true, returning: true, transaction: t },
      );
      if (!hold?.id) {
        alreadyHeld.push(n);
        continue;
      }
      await Job.update({ status: 'held', updatedAt: new Date() }, { where: { id: job.id }, transaction: t });
      placed.push({ holdId: hold.id, jobNumber: n });
      await auditIn(t, actor, {
        action: 'hold.place',
        entity: 'hold',
        entityId: hold.id,
        before: { jobNumber: n, jobStatus: job.status },
        after: { jobNumber: n, jobStatus: 'held', reason: input.reason, ncId: input.ncId ?? null },
      });
    }
    return { placed, alreadyHeld };
  });
}

export interface CloseHoldsInput {
  holdIds: readonly number[];
  disposition: Disposition;
  comment: string;
  userId: number;
}

/**
 * Closes holds inside `t`: locks them, checks they exist, are active and (with `ncId`) belong to
 * that nonconformance, signs, then closes each with its job's new status and one audit row.
 */
async function closeHoldsIn(
  t: Transaction,
  input: CloseHoldsInput,
  sign: Sign | SignatureRecord,
  actor: AuditActor,
  ncId: number | null,
): Promise<{ signature: SignatureRecord; jobIds: number[]; jobNumbers: string[] }> {
  const ids = [...new Set(input.holdIds)];
  const holds = await Hold.findAll({
    where: { id: { [Op.in]: ids } },
    order: [['id', 'ASC']],
    lock: t.LOCK.UPDATE,
    transaction: t,
  });
  const found = new Set(holds.map((h) => h.id));
  const missing = ids.filter((i) => !found.has(i));
  if (missing.length) throw fieldError('holdIds', `No such hold(s): ${missing.join(', ')}.`);
  const jobs = new Map(
    (
      await Job.findAll({
        attributes: ['id', 'jobNumber', 'status'],
        where: { id: { [Op.in]: holds.map((h) => h.jobId) } },
        transaction: t,
      })
    ).map((j) => [j.id, j]),
  );
  const closed = holds.filter((h) => h.status !== 'active');
  if (closed.length)
    throw new DomainError(
      'conflict',
      'Hold already closed',
      `Hold(s) ${closed.map((h) => `${h.id} (${jobs.get(h.jobId)?.jobNumber})`).join(', ')} are already closed.`,
    );
  if (ncId !== null) {
    const other = holds.filter((h) => h.ncId !== ncId);
    if (other.length)
      throw fieldError('holdIds', `Hold(s) ${other.map((h) => h.id).join(', ')} do not belong to nonconformance ${ncId}.`);
  }
  const signature = typeof sign === 'function' ? await sign() : sign;
  const jobStatus = DISPOSITION_JOB_STATUS[input.disposition];
  for (const h of holds) {
    const job = jobs.get(h.jobId)!;
    await Hold.update(
      {
        status: 'closed',
        disposition: input.disposition,
        dispositionComment: input.comment || null,
        closedAt: new Date(),
        closedBy: input.userId,
        signature,
      },
      { where: { id: h.id }, transaction: t },
    );
    await Job.update({ status: jobStatus, updatedAt: new Date() }, { where: { id: h.jobId }, transaction: t });
    await auditIn(t, actor, {
      action: input.disposition === 'release' ? 'hold.release' : 'hold.disposition',
      entity: 'hold',
      entityId: h.id,
      before: { status: 'active', jobNumber: job.jobNumber, jobStatus: job.status },
      after: { status: 'closed', disposition: input.disposition, comment: input.comment, jobStatus, ncId },
      signature,
    });
  }
  return { signature, jobIds: holds.map((h) => h.jobId), jobNumbers: holds.map((h) => jobs.get(h.jobId)!.jobNumber) };
}

/**
 * Releases or dispositions holds (signed): one transaction for the holds, their jobs' statuses
 * and one audit row per hold carrying the signature.
 * @throws DomainError invalid (unknown holds), conflict (a hold already closed); whatever `sign` throws.
 */
export async function closeHolds(db: Db, input: CloseHoldsInput, sign: Sign, actor: AuditActor): Promise<number[]> {
  await inTransaction(db, (t) => closeHoldsIn(t, input, sign, actor, null));
  return [...new Set(input.holdIds)].sort((a, b) => a - b);
}

export interface CreateNcInput {
  title: string;
  description: string;
  suspectedCause: Nonconformance['suspectedCause'];
  suspectedLoadId?: number | undefined;
  suspectedBathChargeId?: number | undefined;
  testIds: readonly number[];
  holdIds: readonly number[];
  userId: number | null;
}

/**
 * Writes a nonconformance tying failed tests, the suspected cause and active holds together,
 * with its audit row (`nc.create`, the input as `after`).
 */
export async function createNc(db: Db, input: CreateNcInput, actor: AuditActor, logged: unknown = input): Promise<number> {
  return inTransaction(db, async (t) => {
    const tests = await QualityTest.findAll({
      attributes: ['id', 'result'],
      where: { id: { [Op.in]: [...input.testIds] } },
      transaction: t,
    });
    const missing = input.testIds.filter((id) => !tests.some((r) => r.id === id));
    if (missing.length) throw fieldError('testIds', `No such test(s): ${missing.join(', ')}.`);
    const passed = tests.filter((r) => r.result !== 'fail');
    if (passed.length)
      throw fieldError('testIds', `Test(s) ${passed.map((r) => r.id).join(', ')} passed; a nonconformance ties failed tests.`);
    if (
      input.suspectedLoadId !== undefined &&
      !(await OvenLoad.findByPk(input.suspectedLoadId, { attributes: ['id'], transaction: t }))
    )
      throw fieldError('suspectedLoadId', 'No such oven load.');
    if (
      input.suspectedBathChargeId !== undefined &&
      !(await selectRows(t, 'select 1 from bath_charges where id = $1', [input.suspectedBathChargeId])).length
    )
      throw fieldError('suspectedBathChargeId', 'No such bath charge.');
    const nc = await Nonconformance.create(
      {
        title: input.title,
        description: input.description,
        suspectedCause: input.suspectedCause,
        suspectedLoadId: input.suspectedLoadId ?? null,
        suspectedBathChargeId: input.suspectedBathChargeId ?? null,
        openedBy: input.userId,
      },
      { transaction: t },
    );
    await NcTest.bulkCreate(
      [...new Set(input.testIds)].map((testId) => ({ ncId: nc.id, testId })),
      { ignoreDuplicates: true, transaction: t },
    );
    if (input.holdIds.length) {
      const [tied] = await Hold.update(
        { ncId: nc.id },
        { where: { id: { [Op.in]: [...input.holdIds] }, status: 'active' }, transaction: t },
      );
      if (tied !== new Set(input.holdIds).size) throw fieldError('holdIds', 'Only active holds can be tied to a nonconformance.');
    }
    await auditIn(t, actor, { action: 'nc.create', entity: 'nonconformance', entityId: nc.id, after: logged });
    return nc.id;
  });
}

async function lockOpenNc(t: Transaction, ncId: number, closedTitle: string, closedDetail: string): Promise<Nonconformance> {
  const nc = await Nonconformance.findByPk(ncId, { lock: t.LOCK.UPDATE, transaction: t });
  if (!nc) throw new DomainError('not-found', 'Not found', 'No such nonconformance.');
  if (nc.status !== 'open') throw new DomainError('conflict', closedTitle, closedDetail);
  return nc;
}

/**
 * Dispositions held jobs of an open nonconformance (signed): the holds are closed (one audit row
 * each), the disposition is stored, and its own audit row (`nc.disposition`) written, all in one
 * transaction with one signature.
 */
export async function dispositionNc(
  db: Db,
  ncId: number,
  input: CloseHoldsInput,
  sign: Sign,
  actor: AuditActor,
): Promise<number> {
  return inTransaction(db, async (t) => {
    await lockOpenNc(t, ncId, 'Nonconformance closed', 'A closed nonconformance takes no more dispositions.');
    const closed = await closeHoldsIn(t, input, sign, actor, ncId);
    const d = await NcDisposition.create(
      {
        ncId,
        disposition: input.disposition,
        jobIds: closed.jobIds,
        comment: input.comment,
        signature: closed.signature,
      },
      { transaction: t },
    );
    await auditIn(t, actor, {
      action: 'nc.disposition',
      entity: 'nonconformance',
      entityId: ncId,
      after: { dispositionId: d.id, disposition: input.disposition, jobs: closed.jobNumbers, comment: input.comment },
      signature: closed.signature,
    });
    return d.id;
  });
}

/**
 * Closes an open nonconformance none of whose holds is active (signed), with its audit row
 * (`nc.close`). The row is locked first, so two concurrent closes cannot both sign.
 */
export async function closeNc(
  db: Db,
  ncId: number,
  input: { comment: string; userId: number },
  sign: Sign,
  actor: AuditActor,
): Promise<void> {
  await inTransaction(db, async (t) => {
    await lockOpenNc(t, ncId, 'Already closed', 'This nonconformance is already closed.');
    const active = await Hold.count({ where: { ncId, status: 'active' }, transaction: t });
    if (active > 0)
      throw new DomainError(
        'conflict',
        'Jobs still on hold',
        `${active} job(s) tied to this nonconformance are still on hold; disposition them first.`,
      );
    const signature = await sign();
    await Nonconformance.update(
      { status: 'closed', closedAt: new Date(), closedBy: input.userId, closeSignature: signature },
      { where: { id: ncId }, transaction: t },
    );
    await auditIn(t, actor, {
      action: 'nc.close',
      entity: 'nonconformance',
      entityId: ncId,
      before: { status: 'open' },
      after: { status: 'closed', comment: input.comment },
      signature,
    });
  });
}
