/**
 * The bath log's records (worker-safe: no Astro, the caller passes its Sequelize instance):
 * lacquer lots, bath charges, checks (the viscosity computed here from the raw reading — the
 * browser's number is never trusted — and stored with the check), additions and filter
 * changes. Each entry is attributed, and it and its audit row commit together.
 */
import { Op, col, fn, type Includeable, type Sequelize, type Transaction } from 'sequelize';
import {
  Asset,
  BathAddition,
  BathCharge,
  BathCheck,
  FilterChange,
  Lacquer,
  LacquerLot,
  User,
  initModels,
} from '../../../db/models/index.ts';
import { auditIn, withTransaction, type AuditActor } from '../../../db/transaction.ts';
import {
  computeBathCheck,
  recommendAddition,
  type BathAdditionEntry,
  type BathCheckComputation,
  type BathCheckContext,
  type BathCheckInput,
  type ChargeCreate,
  type FilterChange as FilterChangeInput,
  type LotCreate,
} from '../shared/baths.ts';
import type { ProcessWindowInForce } from '../shared/windows.ts';
import { DomainError, fieldError } from './errors.ts';
import { windowInForce } from './window-store.ts';

/** Who wrote an entry (stored on the row as the user id and the label shown in the log). */
export interface EntryAuthor {
  userId: number | null;
  label: string;
}

/** Entries may be back-dated up to two days (a check written up at the end of a shift), not post-dated. */
const MAX_BACKDATE_MS = 48 * 3_600_000;
const MAX_AHEAD_MS = 5 * 60_000;

function entryTime(at: string | undefined, nowMs: number): Date {
  if (!at) return new Date(nowMs);
  const ms = Date.parse(at);
  if (ms > nowMs + MAX_AHEAD_MS) throw fieldError('at', 'The time is in the future.');
  if (ms < nowMs - MAX_BACKDATE_MS) throw fieldError('at', 'Entries can be back-dated by at most 48 hours.');
  return new Date(ms);
}

const iso = (d: Date | string): string => new Date(d).toISOString();
const tx = (t?: Transaction | null) => (t ? { transaction: t } : {});

// --- views ------------------------------------------------------------------------------

export interface TankRow {
  id: number;
  code: string;
  name: string;
  role: string | null;
  volumeL: number | null;
  lineId: number | null;
  lineName: string | null;
}

export interface ChargeRow {
  id: number;
  tankAssetId: number;
  tankCode: string;
  lotId: number;
  lotCode: string;
  lotSolidsPct: number;
  lotExpiresOn: string;
  lacquerId: number;
  lacquer: string;
  lacquerSolidsPct: number;
  densityGCm3: number;
  chargedAt: string;
  massKg: number;
  potLifeDays: number;
  note: string | null;
  createdBy: string | null;
}

export interface CheckRow {
  id: number;
  tankAssetId: number;
  tankCode: string;
  at: string;
  by: string;
  cup: string | null;
  effluxSeconds: number | null;
  measuredMm2S: number | null;
  kinematicMm2S: number;
  method: string;
  dynamicMPaS: number | null;
  bathTempC: number | null;
  solidsPct: number | null;
  windowId: number | null;
  note: string | null;
}

export interface AdditionRow {
  id: number;
  tankAssetId: number;
  tankCode: string;
  at: string;
  by: string;
  kind: 'solvent' | 'fresh-lacquer';
  massKg: number;
  lotId: number | null;
  lotCode: string | null;
  checkId: number | null;
  recommendation: unknown;
  note: string | null;
}

export interface FilterRow {
  id: number;
  tankAssetId: number;
  tankCode: string;
  at: string;
  by: string;
  filterType: string;
  ratingUm: number | null;
  note: string | null;
}

export interface LotRow {
  id: number;
  lacquerId: number;
  lacquer: string;
  lotCode: string;
  receivedOn: string;
  expiresOn: string;
  solidsPct: number;
  note: string | null;
  createdBy: string | null;
  /** Tanks this lot has charged. */
  charges: number;
}

type WithTank = { tank: Asset };
const TANK: Includeable = { model: Asset, as: 'tank', attributes: ['code'], required: true };
const CREATOR: Includeable = { model: User, as: 'creator', attributes: ['username'] };
const CHARGE_INCLUDE: Includeable[] = [
  TANK,
  { model: LacquerLot, as: 'lot', required: true, include: [{ model: Lacquer, required: true }] },
  CREATOR,
];

const chargeView = (c: BathCharge): ChargeRow => {
  const r = c as BathCharge & WithTank & { lot: LacquerLot & { Lacquer: Lacquer }; creator: User | null };
  return {
    id: Number(c.id),
    tankAssetId: c.tankAssetId,
    tankCode: r.tank.code,
    lotId: c.lotId,
    lotCode: r.lot.lotCode,
    lotSolidsPct: r.lot.solidsPct,
    lotExpiresOn: r.lot.expiresOn,
    lacquerId: r.lot.Lacquer.id,
    lacquer: r.lot.Lacquer.name,
    lacquerSolidsPct: r.lot.Lacquer.solidsPct,
    densityGCm3: r.lot.Lacquer.densityGCm3,
    chargedAt: iso(c.chargedAt),
    massKg: c.massKg,
    potLifeDays: c.potLifeDays,
    note: c.note,
    createdBy: r.creator?.username ?? null,
  };
};

const checkView = (k: BathCheck): CheckRow => ({
  id: Number(k.id),
  tankAssetId: k.tankAssetId,
  tankCode: (k as BathCheck & WithTank).tank.code,
  at: iso(k.at),
  by: k.byLabel,
  cup: k.cup,
  effluxSeconds: k.effluxSeconds,
  measuredMm2S: k.measuredMm2s,
  kinematicMm2S: k.kinematicMm2s,
  method: k.method,
  dynamicMPaS: k.dynamicMpas,
  bathTempC: k.bathTempC,
  solidsPct: k.solidsPct,
  windowId: k.windowId,
  note: k.note,
});

const additionView = (a: BathAddition): AdditionRow => ({
  id: Number(a.id),
  tankAssetId: a.tankAssetId,
  tankCode: (a as BathAddition & WithTank).tank.code,
  at: iso(a.at),
  by: a.byLabel,
  kind: a.kind,
  massKg: a.massKg,
  lotId: a.lotId,
  lotCode: (a as BathAddition & { lot: LacquerLot | null }).lot?.lotCode ?? null,
  checkId: a.checkId === null ? null : Number(a.checkId),
  recommendation: a.recommendation,
  note: a.note,
});

const filterView = (f: FilterChange): FilterRow => ({
  id: Number(f.id),
  tankAssetId: f.tankAssetId,
  tankCode: (f as FilterChange & WithTank).tank.code,
  at: iso(f.at),
  by: f.byLabel,
  filterType: f.filterType,
  ratingUm: f.ratingUm,
  note: f.note,
});

const tankView = (a: Asset): TankRow => {
  const parent = (a as Asset & { parent: Asset | null }).parent;
  const volume = a.details['volumeL'];
  return {
    id: a.id,
    code: a.code,
    name: a.name,
    role: typeof a.details['role'] === 'string' ? a.details['role'] : null,
    volumeL: volume === undefined || volume === null ? null : Number(volume),
    lineId: parent?.id ?? null,
    lineName: parent?.name ?? null,
  };
};

// --- reads ------------------------------------------------------------------------------

const PARENT: Includeable = { model: Asset, as: 'parent', attributes: ['id', 'name'] };

export async function listTanks(sequelize: Sequelize): Promise<TankRow[]> {
  initModels(sequelize);
  return (await Asset.findAll({ where: { kind: 'tank' }, include: [PARENT], order: [['code', 'ASC']] })).map(tankView);
}

async function tankOrThrow(id: number, t: Transaction): Promise<TankRow> {
  const a = await Asset.findOne({ where: { id, kind: 'tank' }, include: [PARENT], transaction: t });
  if (!a) throw fieldError('tankAssetId', 'No such tank.');
  return tankView(a);
}

/** The charge in the tank at a time (the latest charged at or before it). */
export async function chargeAt(
  sequelize: Sequelize,
  tankId: number,
  at: Date,
  t?: Transaction | null,
): Promise<ChargeRow | null> {
  initModels(sequelize);
  const c = await BathCharge.findOne({
    where: { tankAssetId: tankId, chargedAt: { [Op.lte]: at } },
    include: CHARGE_INCLUDE,
    order: [['chargedAt', 'DESC']],
    ...tx(t),
  });
  return c ? chargeView(c) : null;
}

export async function listCharges(sequelize: Sequelize, tankId?: number, limit = 200): Promise<ChargeRow[]> {
  initModels(sequelize);
  const rows = await BathCharge.findAll({
    where: tankId === undefined ? {} : { tankAssetId: tankId },
    include: CHARGE_INCLUDE,
    order: [['chargedAt', 'DESC']],
    limit,
  });
  return rows.map(chargeView);
}

/** What a check on this tank at this time is computed against. */
export async function bathContext(
  sequelize: Sequelize,
  tankId: number,
  at: Date,
  t?: Transaction | null,
): Promise<{ charge: ChargeRow | null; window: ProcessWindowInForce | null; ctx: BathCheckContext }> {
  const charge = await chargeAt(sequelize, tankId, at, t);
  const window = await windowInForce(t ?? sequelize, tankId, at.getTime());
  // Labs keep a bath topped up to its working level, and evaporation and drag-out are not
  // metered: the charged mass is the working estimate unless the operator weighs the bath.
  const estimatedBathMassKg = charge?.massKg ?? null;
  return {
    charge,
    window,
    ctx: {
      limits: window?.limits ?? null,
      targetSolidsPct: charge?.lacquerSolidsPct ?? null,
      lotSolidsPct: charge?.lotSolidsPct ?? null,
      estimatedBathMassKg,
    },
  };
}

const byTank = (tankId?: number) => (tankId === undefined ? {} : { tankAssetId: tankId });

export async function listChecks(sequelize: Sequelize, tankId?: number, limit = 100): Promise<CheckRow[]> {
  initModels(sequelize);
  const rows = await BathCheck.findAll({
    where: byTank(tankId),
    include: [TANK],
    order: [
      ['at', 'DESC'],
      ['id', 'DESC'],
    ],
    limit,
  });
  return rows.map(checkView);
}

export async function listAdditions(sequelize: Sequelize, tankId?: number, limit = 100): Promise<AdditionRow[]> {
  initModels(sequelize);
  const rows = await BathAddition.findAll({
    where: byTank(tankId),
    include: [TANK, { model: LacquerLot, as: 'lot', attributes: ['lotCode'] }],
    order: [
      ['at', 'DESC'],
      ['id', 'DESC'],
    ],
    limit,
  });
  return rows.map(additionView);
}

export async function listFilterChanges(sequelize: Sequelize, tankId?: number, limit = 100): Promise<FilterRow[]> {
  initModels(sequelize);
  const rows = await FilterChange.findAll({
    where: byTank(tankId),
    include: [TANK],
    order: [
      ['at', 'DESC'],
      ['id', 'DESC'],
    ],
    limit,
  });
  return rows.map(filterView);
}

export async function listLots(sequelize: Sequelize, id?: number, t?: Transaction | null): Promise<LotRow[]> {
  initModels(sequelize);
  const [lots, counts] = await Promise.all([
    LacquerLot.findAll({
      where: id === undefined ? {} : { id },
      include: [{ model: Lacquer, attributes: ['name'], required: true }, CREATOR],
      order: [
        ['receivedOn', 'DESC'],
        ['id', 'DESC'],
      ],
      ...tx(t),
    }),
    BathCharge.findAll({
      attributes: ['lotId', [fn('count', col('id')), 'n']],
      where: id === undefined ? {} : { lotId: id },
      group: ['lotId'],
      raw: true,
      ...tx(t),
    }) as unknown as Promise<Array<{ lotId: number; n: number | string }>>,
  ]);
  const charges = new Map(counts.map((c) => [c.lotId, Number(c.n)]));
  return lots.map((lo) => {
    const r = lo as LacquerLot & { Lacquer: Lacquer; creator: User | null };
    return {
      id: lo.id,
      lacquerId: lo.lacquerId,
      lacquer: r.Lacquer.name,
      lotCode: lo.lotCode,
      receivedOn: lo.receivedOn,
      expiresOn: lo.expiresOn,
      solidsPct: lo.solidsPct,
      note: lo.note,
      createdBy: r.creator?.username ?? null,
      charges: charges.get(lo.id) ?? 0,
    };
  });
}

// --- writes -----------------------------------------------------------------------------

export interface RecordedCheck {
  check: CheckRow;
  computation: BathCheckComputation;
  window: ProcessWindowInForce | null;
}

/** Store a check with the viscosity computed HERE from the raw reading; an out-of-range cup is refused. */
export async function recordBathCheck(
  sequelize: Sequelize,
  actor: AuditActor,
  author: EntryAuthor,
  input: BathCheckInput,
  nowMs: number,
): Promise<RecordedCheck> {
  const at = entryTime(input.at, nowMs);
  return withTransaction(sequelize, async (t) => {
    const tank = await tankOrThrow(input.tankAssetId, t);
    const { charge, window, ctx } = await bathContext(sequelize, tank.id, at, t);
    const density = input.densityGCm3 ?? charge?.densityGCm3;
    const computation = computeBathCheck({ ...input, ...(density !== undefined ? { densityGCm3: density } : {}) }, ctx);
    const v = computation.viscosity;
    if (!v.ok) {
      throw new DomainError('invalid', 'Out of range — use another cup', v.message, {
        errors: [{ path: 'effluxSeconds', message: v.message }],
        validSeconds: v.validSeconds,
        ...(v.suggestedCup ? { suggestedCup: v.suggestedCup } : {}),
      });
    }
    const row = await BathCheck.create(
      {
        tankAssetId: tank.id,
        chargeId: charge?.id ?? null,
        at,
        byUser: author.userId,
        byLabel: author.label,
        cup: input.cup ?? null,
        effluxSeconds: input.effluxSeconds ?? null,
        measuredMm2s: input.measuredMm2S ?? null,
        kinematicMm2s: v.kinematicMm2S,
        method: v.source,
        densityGCm3: density ?? null,
        dynamicMpas: v.dynamicMPaS ?? null,
        bathTempC: input.bathTempC ?? null,
        solidsPct: input.solidsPct ?? null,
        windowId: window?.id ?? null,
        note: input.note ?? null,
      },
      { transaction: t },
    );
    const check = checkView((await BathCheck.findByPk(row.id, { include: [TANK], transaction: t }))!);
    await auditIn(t, actor, {
      action: 'bath.check',
      entity: 'bath_check',
      entityId: check.id,
      after: { ...check, band: computation.band, addition: computation.addition },
    });
    return { check, computation, window };
  });
}

export async function recordBathAddition(
  sequelize: Sequelize,
  actor: AuditActor,
  author: EntryAuthor,
  input: BathAdditionEntry,
  nowMs: number,
): Promise<AdditionRow> {
  const at = entryTime(input.at, nowMs);
  return withTransaction(sequelize, async (t) => {
    const tank = await tankOrThrow(input.tankAssetId, t);
    const charge = await chargeAt(sequelize, tank.id, at, t);
    let recommendation: unknown = null;
    if (input.checkId !== undefined) {
      const check = await BathCheck.findByPk(input.checkId, { transaction: t });
      if (!check || check.tankAssetId !== tank.id) throw fieldError('checkId', 'No such check on this tank.');
      if (check.solidsPct !== null) {
        const { ctx } = await bathContext(sequelize, tank.id, check.at, t);
        recommendation = recommendAddition(check.solidsPct, undefined, ctx).addition;
      }
    }
    let lotId = input.lotId ?? null;
    if (input.kind === 'fresh-lacquer' && lotId === null) lotId = charge?.lotId ?? null;
    if (input.kind === 'solvent' && input.lotId !== undefined)
      throw fieldError('lotId', 'A lacquer lot goes with fresh-lacquer additions only.');
    if (lotId !== null && !(await LacquerLot.findByPk(lotId, { attributes: ['id'], transaction: t })))
      throw fieldError('lotId', 'No such lot.');
    const row = await BathAddition.create(
      {
        tankAssetId: tank.id,
        chargeId: charge?.id ?? null,
        at,
        byUser: author.userId,
        byLabel: author.label,
        kind: input.kind,
        massKg: input.massKg,
        lotId,
        checkId: input.checkId ?? null,
        recommendation,
        note: input.note ?? null,
      },
      { transaction: t },
    );
    const added = additionView(
      (await BathAddition.findByPk(row.id, {
        include: [TANK, { model: LacquerLot, as: 'lot', attributes: ['lotCode'] }],
        transaction: t,
      }))!,
    );
    await auditIn(t, actor, { action: 'bath.addition', entity: 'bath_addition', entityId: added.id, after: added });
    return added;
  });
}

export async function recordFilterChangeRecord(
  sequelize: Sequelize,
  actor: AuditActor,
  author: EntryAuthor,
  input: FilterChangeInput,
  nowMs: number,
): Promise<FilterRow> {
  const at = entryTime(input.at, nowMs);
  return withTransaction(sequelize, async (t) => {
    const tank = await tankOrThrow(input.tankAssetId, t);
    const row = await FilterChange.create(
      {
        tankAssetId: tank.id,
        at,
        byUser: author.userId,
        byLabel: author.label,
        filterType: input.filterType,
        ratingUm: input.ratingUm ?? null,
        note: input.note ?? null,
      },
      { transaction: t },
    );
    const f = filterView((await FilterChange.findByPk(row.id, { include: [TANK], transaction: t }))!);
    await auditIn(t, actor, { action: 'bath.filter', entity: 'filter_change', entityId: f.id, after: f });
    return f;
  });
}

export async function createLotRecord(
  sequelize: Sequelize,
  actor: AuditActor,
  author: EntryAuthor,
  input: LotCreate,
): Promise<LotRow> {
  return withTransaction(sequelize, async (t) => {
    if (!(await Lacquer.findByPk(input.lacquerId, { attributes: ['id'], transaction: t })))
      throw fieldError('lacquerId', 'No such lacquer.');
    const dup = await LacquerLot.findOne({
      attributes: ['id'],
      where: { lacquerId: input.lacquerId, lotCode: input.lotCode },
      transaction: t,
    });
    if (dup)
      throw new DomainError('conflict', 'Already recorded', `Lot ${input.lotCode} of this lacquer is already recorded.`, {
        errors: [{ path: 'lotCode', message: 'This lot is already recorded.' }],
      });
    const row = await LacquerLot.create(
      {
        lacquerId: input.lacquerId,
        lotCode: input.lotCode,
        receivedOn: input.receivedOn,
        expiresOn: input.expiresOn,
        solidsPct: input.solidsPct,
        note: input.note ?? null,
        createdBy: author.userId,
      },
      { transaction: t },
    );
    await auditIn(t, actor, { action: 'lot.create', entity: 'lacquer_lot', entityId: row.id, after: input });
    return (await listLots(sequelize, row.id, t))[0]!;
  });
}

export async function createChargeRecord(
  sequelize: Sequelize,
  actor: AuditActor,
  author: EntryAuthor,
  input: ChargeCreate,
  nowMs: number,
): Promise<ChargeRow> {
  const at = input.chargedAt ? new Date(input.chargedAt) : new Date(nowMs);
  if (at.getTime() > nowMs + MAX_AHEAD_MS) throw fieldError('chargedAt', 'The time is in the future.');
  return withTransaction(sequelize, async (t) => {
    const tank = await tankOrThrow(input.tankAssetId, t);
    const lot = await LacquerLot.findByPk(input.lotId, { transaction: t });
    if (!lot) throw fieldError('lotId', 'No such lot.');
    if (lot.expiresOn < at.toISOString().slice(0, 10))
      throw fieldError('lotId', `This lot expired on ${lot.expiresOn}; it cannot charge a bath.`);
    const row = await BathCharge.create(
      {
        tankAssetId: tank.id,
        lotId: lot.id,
        chargedAt: at,
        massKg: input.massKg,
        potLifeDays: input.potLifeDays,
        note: input.note ?? null,
        createdBy: author.userId,
      },
      { transaction: t },
    );
    const charge = chargeView((await BathCharge.findByPk(row.id, { include: CHARGE_INCLUDE, transaction: t }))!);
    await auditIn(t, actor, { action: 'bath.charge', entity: 'bath_charge', entityId: charge.id, after: charge });
    return charge;
  });
}
