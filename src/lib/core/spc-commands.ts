/**
 * The audited changes to SPC records (worker-safe): characteristics created and edited, limit
 * sets drafted from a study, approved with an electronic signature, or discarded. Each runs in
 * one transaction with its audit row (`withTransaction` + `auditIn`). The web service runs the
 * study and checks the password; this layer stores and audits.
 */
import type { Sequelize } from 'sequelize';
import { auditIn, withTransaction, type AuditActor } from '../../../db/transaction.ts';
import type { SignatureRecord } from '../../../db/models/index.ts';
import type { CharacteristicFields, LimitSetView } from '../shared/characteristics.ts';
import { DomainError } from './errors.ts';
import {
  approveLimitSetRow,
  deleteDraftLimitSet,
  getLimitSet,
  insertCharacteristic,
  insertDraftLimitSet,
  updateCharacteristicRow,
  type NewLimitSet,
} from './spc-store.ts';

type StoredFields = Omit<CharacteristicFields, 'backfillDays'>;

/** Create a characteristic (audited `characteristic.create`); returns its id. */
export async function createCharacteristicAudited(
  sequelize: Sequelize,
  actor: AuditActor,
  fields: StoredFields,
  assetId: number,
): Promise<number> {
  return withTransaction(sequelize, async (t) => {
    const id = await insertCharacteristic(t, fields, assetId, actor.id);
    await auditIn(t, actor, { action: 'characteristic.create', entity: 'characteristic', entityId: id, after: fields });
    return id;
  });
}

/** Replace a characteristic's fields (audited `characteristic.update` with before → after). */
export async function updateCharacteristicAudited(
  sequelize: Sequelize,
  actor: AuditActor,
  id: number,
  fields: StoredFields,
  assetId: number,
  before: StoredFields,
): Promise<void> {
  await withTransaction(sequelize, async (t) => {
    if (!(await updateCharacteristicRow(t, id, fields, assetId))) {
      throw new DomainError('not-found', 'Not found', 'No such characteristic.');
    }
    await auditIn(t, actor, { action: 'characteristic.update', entity: 'characteristic', entityId: id, before, after: fields });
  });
}

/** Store a study as the next draft limit set (audited `limits.draft`). */
export async function draftLimitSetAudited(sequelize: Sequelize, actor: AuditActor, s: NewLimitSet): Promise<LimitSetView> {
  return withTransaction(sequelize, async (t) => {
    const draft = await insertDraftLimitSet(t, s);
    await auditIn(t, actor, {
      action: 'limits.draft',
      entity: 'limit-set',
      entityId: draft.id,
      after: {
        characteristicId: s.characteristicId,
        version: draft.version,
        center: draft.center,
        ucl: draft.ucl,
        lcl: draft.lcl,
        sigma: draft.sigma,
        excluded: draft.excluded,
      },
    });
    return draft;
  });
}

/**
 * Approve a draft with its signature from `effectiveFromMs` (audited `limits.approve` with the
 * signature, naming the superseded version). `previous` is the set in force until now, if any.
 */
export async function approveLimitSetAudited(
  sequelize: Sequelize,
  actor: AuditActor,
  setId: number,
  signature: SignatureRecord,
  effectiveFromMs: number,
  previous: LimitSetView | null,
): Promise<LimitSetView> {
  return withTransaction(sequelize, async (t) => {
    const approved = await approveLimitSetRow(t, setId, signature, effectiveFromMs);
    await auditIn(t, actor, {
      action: 'limits.approve',
      entity: 'limit-set',
      entityId: setId,
      before: previous
        ? { supersededVersion: previous.version, center: previous.center, ucl: previous.ucl, lcl: previous.lcl }
        : null,
      after: {
        characteristicId: approved.characteristicId,
        version: approved.version,
        center: approved.center,
        ucl: approved.ucl,
        lcl: approved.lcl,
        sigma: approved.sigma,
        effectiveFrom: approved.effectiveFrom,
        excluded: approved.excluded,
      },
      signature,
    });
    return approved;
  });
}

/** Discard a draft (audited `limits.discard-draft`); `not-found` / `conflict` otherwise. */
export async function discardDraftAudited(
  sequelize: Sequelize,
  actor: AuditActor,
  characteristicId: number,
  setId: number,
): Promise<void> {
  await withTransaction(sequelize, async (t) => {
    const draft = await getLimitSet(t, setId);
    if (!draft || draft.characteristicId !== characteristicId) {
      throw new DomainError('not-found', 'Not found', 'No such limit set for this characteristic.');
    }
    if (draft.status !== 'draft' || !(await deleteDraftLimitSet(t, setId))) {
      throw new DomainError('conflict', 'Not a draft', `Limit set v${draft.version} is ${draft.status} and stays on record.`);
    }
    await auditIn(t, actor, {
      action: 'limits.discard-draft',
      entity: 'limit-set',
      entityId: setId,
      before: { characteristicId, version: draft.version },
    });
  });
}
