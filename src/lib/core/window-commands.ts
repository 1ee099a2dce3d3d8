/**
 * The audited changes to process windows (worker-safe): drafts, edits, signed approval and
 * assignment to a line, oven or coater. Each runs in one transaction with its audit row(s)
 * (`withTransaction` + `auditIn`); records go through the `ProcessWindow` and
 * `WindowAssignment` models. The caller (web service) checks the password and passes the
 * signature record in.
 */
import type { Sequelize } from 'sequelize';
import { Asset, ProcessWindow, WindowAssignment, type SignatureRecord } from '../../../db/models/index.ts';
import { auditIn, withTransaction, type AuditActor } from '../../../db/transaction.ts';
import type { WindowAssign, WindowDraftCreate, WindowDraftUpdate } from '../shared/windows.ts';
import { execute, select } from './db.ts';
import { DomainError, fieldError } from './errors.ts';
import { windowById, type AssignmentRow, type WindowRow } from './window-store.ts';

/** Who changes a window: the audit actor and the user's name for the views. */
export interface WindowEditor extends AuditActor {
  username: string;
}

const notFound = () => new DomainError('not-found', 'Not found', 'No such process window.');

async function clockNow(t: Parameters<typeof execute>[0]): Promise<Date> {
  const [{ now }] = (await select<{ now: Date }>(t, `select clock_timestamp() as now`)) as [{ now: Date }];
  return now;
}

/** Serialise versions of one lacquer × substrate. */
async function lockRecipe(t: Parameters<typeof execute>[0], lacquerId: number, materialId: number): Promise<void> {
  await execute(t, `select pg_advisory_xact_lock(hashtext('process_windows'), $1)`, [lacquerId * 1000 + materialId]);
}

/** Create the next version of a lacquer × substrate window as a draft (audited `window.draft`). */
export async function createWindowDraft(
  sequelize: Sequelize,
  editor: WindowEditor,
  input: WindowDraftCreate,
): Promise<WindowRow> {
  return withTransaction(sequelize, async (t) => {
    const [pair] = await select<{ lacquer: number | null; material: number | null }>(
      t,
      `select (select id from lacquers where id = $1) as lacquer, (select id from materials where id = $2 and active) as material`,
      [input.lacquerId, input.materialId],
    );
    if (!pair?.lacquer) throw fieldError('lacquerId', 'No such lacquer.');
    if (!pair.material) throw fieldError('materialId', 'No such active substrate.');
    await lockRecipe(t, input.lacquerId, input.materialId);
    const draft = await ProcessWindow.findOne({
      where: { lacquerId: input.lacquerId, materialId: input.materialId, status: 'draft' },
      attributes: ['id', 'version'],
      transaction: t,
    });
    if (draft) {
      throw new DomainError(
        'conflict',
        'A draft exists',
        `Version ${draft.version} of this window is still a draft: edit or approve it first.`,
        { draftId: draft.id },
      );
    }
    const latest = await ProcessWindow.max<number | null, ProcessWindow>('version', {
      where: { lacquerId: input.lacquerId, materialId: input.materialId },
      transaction: t,
    });
    const row = await ProcessWindow.create(
      {
        lacquerId: input.lacquerId,
        materialId: input.materialId,
        version: (latest ?? 0) + 1,
        name: input.name,
        status: 'draft',
        limits: input.limits,
        note: input.note ?? null,
        createdBy: editor.id,
      },
      { transaction: t },
    );
    const created = (await windowById(t, row.id))!;
    await auditIn(t, editor, { action: 'window.draft', entity: 'process_window', entityId: created.id, after: created });
    return created;
  });
}

/** Edit a draft (audited `window.edit`); only drafts can change. */
export async function updateWindowDraft(
  sequelize: Sequelize,
  editor: WindowEditor,
  id: number,
  input: WindowDraftUpdate,
): Promise<WindowRow> {
  return withTransaction(sequelize, async (t) => {
    const locked = await ProcessWindow.findByPk(id, { transaction: t, lock: t.LOCK.UPDATE });
    if (!locked) throw notFound();
    if (locked.status !== 'draft') {
      throw new DomainError(
        'conflict',
        'Not a draft',
        `This version is ${locked.status}; only drafts can be edited. Create a new draft instead.`,
      );
    }
    const before = (await windowById(t, id))!;
    await locked.update(
      {
        ...(input.name != null ? { name: input.name } : {}),
        ...(input.limits != null ? { limits: input.limits } : {}),
        ...(input.note != null ? { note: input.note } : {}),
        updatedAt: new Date(),
      },
      { transaction: t },
    );
    const after = (await windowById(t, id))!;
    await auditIn(t, editor, { action: 'window.edit', entity: 'process_window', entityId: id, before, after });
    return after;
  });
}

/**
 * Approve a draft with an electronic signature: it becomes effective from now and the
 * previously effective version of the same lacquer × substrate is superseded at that instant
 * (audited `window.approve` with the signature, and `window.supersede` per superseded version).
 */
export async function approveWindowDraft(
  sequelize: Sequelize,
  editor: WindowEditor,
  id: number,
  signature: SignatureRecord,
): Promise<WindowRow> {
  return withTransaction(sequelize, async (t) => {
    const current = await windowById(t, id);
    if (!current) throw notFound();
    if (current.status !== 'draft')
      throw new DomainError('conflict', 'Not a draft', `This version is already ${current.status}.`);
    await lockRecipe(t, current.lacquerId, current.materialId);
    const locked = await ProcessWindow.findByPk(id, { transaction: t, lock: t.LOCK.UPDATE });
    if (locked?.status !== 'draft') throw new DomainError('conflict', 'Not a draft', 'This version was approved meanwhile.');
    const now = await clockNow(t);
    const superseded = await ProcessWindow.findAll({
      where: { lacquerId: current.lacquerId, materialId: current.materialId, status: 'effective' },
      transaction: t,
      lock: t.LOCK.UPDATE,
    });
    for (const s of superseded) await s.update({ status: 'superseded', supersededAt: now, updatedAt: now }, { transaction: t });
    await locked.update(
      { status: 'effective', effectiveFrom: now, approvedBy: editor.id, approvedSignature: signature, updatedAt: now },
      { transaction: t },
    );
    const after = (await windowById(t, id))!;
    await auditIn(t, editor, {
      action: 'window.approve',
      entity: 'process_window',
      entityId: id,
      before: current,
      after,
      signature,
    });
    for (const s of superseded) {
      await auditIn(t, editor, {
        action: 'window.supersede',
        entity: 'process_window',
        entityId: s.id,
        before: { status: 'effective' },
        after: { status: 'superseded', supersededAt: now.toISOString(), by: id },
      });
    }
    return after;
  });
}

/** Assign a window (its lacquer × substrate recipe) to a line, an oven or a coater from a time on (audited). */
export async function assignWindowToAsset(
  sequelize: Sequelize,
  editor: WindowEditor,
  input: WindowAssign,
): Promise<AssignmentRow> {
  return withTransaction(sequelize, async (t) => {
    const asset = await Asset.findByPk(input.assetId, { attributes: ['id', 'kind', 'code'], transaction: t });
    if (!asset) throw fieldError('assetId', 'No such line or oven.');
    if (!['line', 'oven', 'coater'].includes(asset.kind)) {
      throw new DomainError('invalid', 'Invalid input', 'Windows are assigned to a dip line, an oven or a coater.', {
        errors: [{ path: 'assetId', message: `A ${asset.kind} cannot run a window; choose its line or oven.` }],
      });
    }
    const w = await windowById(t, input.windowId);
    if (!w) throw notFound();
    if (w.status === 'draft') {
      throw new DomainError('invalid', 'Invalid input', 'A draft cannot be assigned; approve it first.', {
        errors: [{ path: 'windowId', message: 'This version is a draft.' }],
      });
    }
    const now = await clockNow(t);
    const from = input.from ? new Date(input.from) : now;
    await execute(t, `select pg_advisory_xact_lock(hashtext('window_assignments'), $1)`, [asset.id]);
    const latest = await WindowAssignment.findOne({
      where: { assetId: asset.id },
      order: [['validFrom', 'DESC']],
      transaction: t,
      lock: t.LOCK.UPDATE,
    });
    if (latest && from.getTime() <= latest.validFrom.getTime()) {
      throw new DomainError(
        'conflict',
        'Overlaps the history',
        `The latest assignment of ${asset.code} starts ${latest.validFrom.toISOString()}; a new one must start after it.`,
        { errors: [{ path: 'from', message: 'Must be after the start of the current assignment.' }] },
      );
    }
    if (latest && latest.validTo === null) await latest.update({ validTo: from }, { transaction: t });
    const row = await WindowAssignment.create(
      { assetId: asset.id, windowId: w.id, validFrom: from, assignedBy: editor.id, note: input.note ?? null },
      { transaction: t },
    );
    await auditIn(t, editor, {
      action: 'window.assign',
      entity: 'window_assignment',
      entityId: row.id,
      before: latest ? { assignmentId: latest.id, windowId: latest.windowId, validTo: from.toISOString() } : null,
      after: {
        assetId: asset.id,
        asset: asset.code,
        windowId: w.id,
        window: `${w.name} v${w.version}`,
        validFrom: from.toISOString(),
        note: input.note ?? null,
      },
    });
    return {
      id: row.id,
      assetId: asset.id,
      assetCode: asset.code,
      assetName: asset.code,
      windowId: w.id,
      windowName: w.name,
      windowVersion: w.version,
      lacquer: w.lacquer,
      substrate: w.substrate,
      validFrom: from.toISOString(),
      validTo: null,
      assignedBy: editor.username,
      note: input.note ?? null,
    };
  });
}
