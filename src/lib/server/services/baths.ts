/**
 * The bath log: lacquer lots, bath charges, checks (viscosity recomputed here from the raw
 * reading — the browser's number is never trusted — and stored with the check), additions
 * and filter changes; bath age and pot-life state. Every entry attributed and audited.
 */
import type { Transaction } from 'sequelize';
import { bathAge, type BathAge } from '../../domain/film/bath-maintenance.ts';
import {
  computeBathCheck,
  recommendAddition,
  type BathAdditionEntry,
  type BathCheckComputation,
  type BathCheckContext,
  type BathCheckInput,
  type ChargeCreate,
  type FilterChange,
  type LotCreate,
} from '../../shared/baths.ts';
import type { ProcessWindowInForce } from '../../shared/windows.ts';
import { audit } from '../audit.ts';
import type { SessionUser } from '../auth.ts';
import { db, pgPool } from '../db.ts';
import { actorOf } from '../guard.ts';
import { HttpProblem } from '../http.ts';
import { windowInForce } from '../../core/window-store.ts';
import { q } from './windows.ts';

const iso = (d: Date | string | null | undefined): string | null => (d == null ? null : new Date(d).toISOString());
const bad = (path: string, message: string) =>
  new HttpProblem(400, 'Invalid input', `${path}: ${message}`, { errors: [{ path, message }] });

/** Entries may be back-dated up to two days (a check written up at the end of a shift), not post-dated. */
const MAX_BACKDATE_MS = 48 * 3_600_000;
const MAX_AHEAD_MS = 5 * 60_000;

function entryTime(at: string | undefined, nowMs: number): Date {
  if (!at) return new Date(nowMs);
  const ms = Date.parse(at);
  if (ms > nowMs + MAX_AHEAD_MS) throw bad('at', 'The time is in the future.');
  if (ms < nowMs - MAX_BACKDATE_MS) throw bad('at', 'Entries can be back-dated by at most 48 hours.');
  return new Date(ms);
}

export interface TankRow {
  id: number;
  code: string;
  name: string;
  role: string | null;
  volumeL: number | null;
  lineId: number | null;
  lineName: string | null;
}

export async function listTanks(): Promise<TankRow[]> {
  return q<TankRow>(
    `select a.id, a.code, a.name, a.details->>'role' as role, (a.details->>'volumeL')::float8 as "volumeL", p.id as "lineId", p.name as "lineName"
       from assets a left join assets p on p.id = a.parent_id
      where a.kind = 'tank' order by a.code`,
  );
}

async function tankOrThrow(id: number, t?: Transaction): Promise<TankRow> {
  const [tank] = await q<TankRow>(
    `select a.id, a.code, a.name, a.details->>'role' as role, (a.details->>'volumeL')::float8 as "volumeL", p.id as "lineId", p.name as "lineName"
       from assets a left join assets p on p.id = a.parent_id where a.id = $1 and a.kind = 'tank'`,
    [id],
    t,
  );
  if (!tank) throw bad('tankAssetId', 'No such tank.');
  return tank;
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

const CHARGE_SELECT = `
  select c.id, c.tank_asset_id as "tankAssetId", a.code as "tankCode", c.lot_id as "lotId", lo.lot_code as "lotCode",
         lo.solids_pct as "lotSolidsPct", to_char(lo.expires_on, 'YYYY-MM-DD') as "lotExpiresOn", l.id as "lacquerId", l.name as lacquer,
         l.solids_pct as "lacquerSolidsPct", l.density_g_cm3 as "densityGCm3", c.charged_at as "chargedAt", c.mass_kg as "massKg",
         c.pot_life_days as "potLifeDays", c.note, u.username as "createdBy"
    from bath_charges c
    join assets a on a.id = c.tank_asset_id
    join lacquer_lots lo on lo.id = c.lot_id
    join lacquers l on l.id = lo.lacquer_id
    left join users u on u.id = c.created_by`;

const toCharge = (r: ChargeRow & { chargedAt: any }): ChargeRow => ({ ...r, chargedAt: iso(r.chargedAt)! });

/** The charge in the tank at a time (the latest charged at or before it). */
export async function chargeAt(tankId: number, at: Date, t?: Transaction): Promise<ChargeRow | null> {
  const [row] = await q<ChargeRow>(
    `${CHARGE_SELECT} where c.tank_asset_id = $1 and c.charged_at <= $2 order by c.charged_at desc limit 1`,
    [tankId, at],
    t,
  );
  return row ? toCharge(row) : null;
}

export async function listCharges(tankId?: number, limit = 200): Promise<ChargeRow[]> {
  const rows = await q<ChargeRow>(
    `${CHARGE_SELECT} where ($1::int is null or c.tank_asset_id = $1) order by c.charged_at desc limit $2`,
    [tankId ?? null, limit],
  );
  return rows.map(toCharge);
}

/** What a check on this tank at this time is computed against. */
export async function bathContext(
  tankId: number,
  at: Date,
  t?: Transaction,
): Promise<{ charge: ChargeRow | null; window: ProcessWindowInForce | null; ctx: BathCheckContext }> {
  const charge = await chargeAt(tankId, at, t);
  const window = await windowInForce(pgPool(), tankId, at.getTime());
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

const CHECK_SELECT = `
  select k.id, k.tank_asset_id as "tankAssetId", a.code as "tankCode", k.at, k.by_label as by, k.cup, k.efflux_seconds as "effluxSeconds",
         k.measured_mm2s as "measuredMm2S", k.kinematic_mm2s as "kinematicMm2S", k.method, k.dynamic_mpas as "dynamicMPaS",
         k.bath_temp_c as "bathTempC", k.solids_pct as "solidsPct", k.window_id as "windowId", k.note
    from bath_checks k join assets a on a.id = k.tank_asset_id`;

const withAt = <T extends { at: any }>(r: T): T => ({ ...r, at: iso(r.at)! });

export async function listChecks(tankId?: number, limit = 100): Promise<CheckRow[]> {
  return (
    await q<CheckRow>(`${CHECK_SELECT} where ($1::int is null or k.tank_asset_id = $1) order by k.at desc, k.id desc limit $2`, [
      tankId ?? null,
      limit,
    ])
  ).map(withAt);
}

export interface RecordedCheck {
  check: CheckRow;
  computation: BathCheckComputation;
  window: ProcessWindowInForce | null;
}

/** Store a check with the viscosity computed HERE from the raw reading; an out-of-range cup is refused. */
export async function recordCheck(user: SessionUser, input: BathCheckInput, address: string | null): Promise<RecordedCheck> {
  const at = entryTime(input.at, Date.now());
  return db().transaction(async (t) => {
    const tank = await tankOrThrow(input.tankAssetId, t);
    const { charge, window, ctx } = await bathContext(tank.id, at, t);
    const density = input.densityGCm3 ?? charge?.densityGCm3;
    const computation = computeBathCheck({ ...input, ...(density !== undefined ? { densityGCm3: density } : {}) }, ctx);
    const v = computation.viscosity;
    if (!v.ok) {
      throw new HttpProblem(400, 'Out of range — use another cup', v.message, {
        errors: [{ path: 'effluxSeconds', message: v.message }],
        validSeconds: v.validSeconds,
        ...(v.suggestedCup ? { suggestedCup: v.suggestedCup } : {}),
      });
    }
    const [row] = await q<{ id: number }>(
      `insert into bath_checks (tank_asset_id, charge_id, at, by_user, by_label, cup, efflux_seconds, measured_mm2s, kinematic_mm2s, method,
                                density_g_cm3, dynamic_mpas, bath_temp_c, solids_pct, window_id, note)
       values ($1,$2,$3,$4,$5,$6,$7,$8,$9,$10,$11,$12,$13,$14,$15,$16) returning id`,
      [
        tank.id,
        charge?.id ?? null,
        at,
        user.id,
        user.username,
        input.cup ?? null,
        input.effluxSeconds ?? null,
        input.measuredMm2S ?? null,
        v.kinematicMm2S,
        v.source,
        density ?? null,
        v.dynamicMPaS ?? null,
        input.bathTempC ?? null,
        input.solidsPct ?? null,
        window?.id ?? null,
        input.note ?? null,
      ],
      t,
    );
    const [check] = (await q<CheckRow>(`${CHECK_SELECT} where k.id = $1`, [row!.id], t)).map(withAt);
    await audit(
      actorOf(user, address),
      {
        action: 'bath.check',
        entity: 'bath_check',
        entityId: row!.id,
        after: { ...check, band: computation.band, addition: computation.addition },
      },
      t,
    );
    return { check: check!, computation, window };
  });
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

const ADDITION_SELECT = `
  select ad.id, ad.tank_asset_id as "tankAssetId", a.code as "tankCode", ad.at, ad.by_label as by, ad.kind, ad.mass_kg as "massKg",
         ad.lot_id as "lotId", lo.lot_code as "lotCode", ad.check_id as "checkId", ad.recommendation, ad.note
    from bath_additions ad join assets a on a.id = ad.tank_asset_id left join lacquer_lots lo on lo.id = ad.lot_id`;

export async function listAdditions(tankId?: number, limit = 100): Promise<AdditionRow[]> {
  return (
    await q<AdditionRow>(
      `${ADDITION_SELECT} where ($1::int is null or ad.tank_asset_id = $1) order by ad.at desc, ad.id desc limit $2`,
      [tankId ?? null, limit],
    )
  ).map(withAt);
}

export async function recordAddition(user: SessionUser, input: BathAdditionEntry, address: string | null): Promise<AdditionRow> {
  const at = entryTime(input.at, Date.now());
  return db().transaction(async (t) => {
    const tank = await tankOrThrow(input.tankAssetId, t);
    const charge = await chargeAt(tank.id, at, t);
    let recommendation: unknown = null;
    if (input.checkId !== undefined) {
      const [check] = await q<{ id: number; tank: number; solids: number | null; at: Date }>(
        `select id, tank_asset_id as tank, solids_pct as solids, at from bath_checks where id = $1`,
        [input.checkId],
        t,
      );
      if (!check || check.tank !== tank.id) throw bad('checkId', 'No such check on this tank.');
      if (check.solids !== null) {
        const { ctx } = await bathContext(tank.id, check.at, t);
        recommendation = recommendAddition(check.solids, undefined, ctx).addition;
      }
    }
    let lotId = input.lotId ?? null;
    if (input.kind === 'fresh-lacquer' && lotId === null) lotId = charge?.lotId ?? null;
    if (input.kind === 'solvent' && input.lotId !== undefined)
      throw bad('lotId', 'A lacquer lot goes with fresh-lacquer additions only.');
    if (lotId !== null) {
      const [lot] = await q<{ id: number }>(`select id from lacquer_lots where id = $1`, [lotId], t);
      if (!lot) throw bad('lotId', 'No such lot.');
    }
    const [row] = await q<{ id: number }>(
      `insert into bath_additions (tank_asset_id, charge_id, at, by_user, by_label, kind, mass_kg, lot_id, check_id, recommendation, note)
       values ($1,$2,$3,$4,$5,$6,$7,$8,$9,$10::jsonb,$11) returning id`,
      [
        tank.id,
        charge?.id ?? null,
        at,
        user.id,
        user.username,
        input.kind,
        input.massKg,
        lotId,
        input.checkId ?? null,
        recommendation === null ? null : JSON.stringify(recommendation),
        input.note ?? null,
      ],
      t,
    );
    const [added] = (await q<AdditionRow>(`${ADDITION_SELECT} where ad.id = $1`, [row!.id], t)).map(withAt);
    await audit(actorOf(user, address), { action: 'bath.addition', entity: 'bath_addition', entityId: row!.id, after: added }, t);
    return added!;
  });
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

const FILTER_SELECT = `
  select f.id, f.tank_asset_id as "tankAssetId", a.code as "tankCode", f.at, f.by_label as by, f.filter_type as "filterType", f.rating_um as "ratingUm", f.note
    from filter_changes f join assets a on a.id = f.tank_asset_id`;

export async function listFilterChanges(tankId?: number, limit = 100): Promise<FilterRow[]> {
  return (
    await q<FilterRow>(
      `${FILTER_SELECT} where ($1::int is null or f.tank_asset_id = $1) order by f.at desc, f.id desc limit $2`,
      [tankId ?? null, limit],
    )
  ).map(withAt);
}

export async function recordFilterChange(user: SessionUser, input: FilterChange, address: string | null): Promise<FilterRow> {
  const at = entryTime(input.at, Date.now());
  return db().transaction(async (t) => {
    const tank = await tankOrThrow(input.tankAssetId, t);
    const [row] = await q<{ id: number }>(
      `insert into filter_changes (tank_asset_id, at, by_user, by_label, filter_type, rating_um, note) values ($1,$2,$3,$4,$5,$6,$7) returning id`,
      [tank.id, at, user.id, user.username, input.filterType, input.ratingUm ?? null, input.note ?? null],
      t,
    );
    const [f] = (await q<FilterRow>(`${FILTER_SELECT} where f.id = $1`, [row!.id], t)).map(withAt);
    await audit(actorOf(user, address), { action: 'bath.filter', entity: 'filter_change', entityId: row!.id, after: f }, t);
    return f!;
  });
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

export async function listLots(): Promise<LotRow[]> {
  return q<LotRow>(
    `select lo.id, lo.lacquer_id as "lacquerId", l.name as lacquer, lo.lot_code as "lotCode", to_char(lo.received_on, 'YYYY-MM-DD') as "receivedOn",
            to_char(lo.expires_on, 'YYYY-MM-DD') as "expiresOn", lo.solids_pct as "solidsPct", lo.note, u.username as "createdBy",
            (select count(*)::int from bath_charges c where c.lot_id = lo.id) as charges
       from lacquer_lots lo join lacquers l on l.id = lo.lacquer_id left join users u on u.id = lo.created_by
      order by lo.received_on desc, lo.id desc`,
  );
}

export async function createLot(user: SessionUser, input: LotCreate, address: string | null): Promise<LotRow> {
  return db().transaction(async (t) => {
    const [lacquer] = await q<{ id: number }>(`select id from lacquers where id = $1`, [input.lacquerId], t);
    if (!lacquer) throw bad('lacquerId', 'No such lacquer.');
    const [dup] = await q(
      `select 1 from lacquer_lots where lacquer_id = $1 and lot_code = $2`,
      [input.lacquerId, input.lotCode],
      t,
    );
    if (dup)
      throw new HttpProblem(409, 'Already recorded', `Lot ${input.lotCode} of this lacquer is already recorded.`, {
        errors: [{ path: 'lotCode', message: 'This lot is already recorded.' }],
      });
    const [row] = await q<{ id: number }>(
      `insert into lacquer_lots (lacquer_id, lot_code, received_on, expires_on, solids_pct, note, created_by) values ($1,$2,$3,$4,$5,$6,$7) returning id`,
      [input.lacquerId, input.lotCode, input.receivedOn, input.expiresOn, input.solidsPct, input.note ?? null, user.id],
      t,
    );
    await audit(actorOf(user, address), { action: 'lot.create', entity: 'lacquer_lot', entityId: row!.id, after: input }, t);
    const lots = await q<LotRow>(
      `select lo.id, lo.lacquer_id as "lacquerId", l.name as lacquer, lo.lot_code as "lotCode", to_char(lo.received_on, 'YYYY-MM-DD') as "receivedOn",
              to_char(lo.expires_on, 'YYYY-MM-DD') as "expiresOn", lo.solids_pct as "solidsPct", lo.note, $2::text as "createdBy", 0 as charges
         from lacquer_lots lo join lacquers l on l.id = lo.lacquer_id where lo.id = $1`,
      [row!.id, user.username],
      t,
    );
    return lots[0]!;
  });
}

export async function createCharge(user: SessionUser, input: ChargeCreate, address: string | null): Promise<ChargeRow> {
  const at = input.chargedAt ? new Date(input.chargedAt) : new Date();
  if (at.getTime() > Date.now() + MAX_AHEAD_MS) throw bad('chargedAt', 'The time is in the future.');
  return db().transaction(async (t) => {
    const tank = await tankOrThrow(input.tankAssetId, t);
    const [lot] = await q<{ id: number; expires: string }>(
      `select id, to_char(expires_on, 'YYYY-MM-DD') as expires from lacquer_lots where id = $1`,
      [input.lotId],
      t,
    );
    if (!lot) throw bad('lotId', 'No such lot.');
    if (lot.expires < at.toISOString().slice(0, 10))
      throw bad('lotId', `This lot expired on ${lot.expires}; it cannot charge a bath.`);
    const [row] = await q<{ id: number }>(
      `insert into bath_charges (tank_asset_id, lot_id, charged_at, mass_kg, pot_life_days, note, created_by) values ($1,$2,$3,$4,$5,$6,$7) returning id`,
      [tank.id, lot.id, at, input.massKg, input.potLifeDays, input.note ?? null, user.id],
      t,
    );
    const [charge] = (await q<ChargeRow>(`${CHARGE_SELECT} where c.id = $1`, [row!.id], t)).map(toCharge);
    await audit(actorOf(user, address), { action: 'bath.charge', entity: 'bath_charge', entityId: row!.id, after: charge }, t);
    return charge!;
  });
}

export interface BathState {
  tank: TankRow;
  charge: ChargeRow | null;
  age: BathAge | null;
  lotExpired: boolean;
  window: ProcessWindowInForce | null;
  lastCheck: CheckRow | null;
  /** The last check's computation (band, addition) against the window and charge in force now. */
  lastComputation: BathCheckComputation | null;
  recentChecks: CheckRow[];
  recentAdditions: AdditionRow[];
  lastFilterChange: FilterRow | null;
  context: BathCheckContext;
}

/** Every hard-coat tank (and any tank with a charge) with its current state. */
export async function listBaths(nowMs = Date.now()): Promise<BathState[]> {
  const tanks = await listTanks();
  const now = new Date(nowMs);
  const today = now.toISOString().slice(0, 10);
  const out: BathState[] = [];
  for (const tank of tanks) {
    const { charge, window, ctx } = await bathContext(tank.id, now);
    if (tank.role !== 'hard-coat' && !charge) continue;
    const [recentChecks, recentAdditions, filters] = await Promise.all([
      listChecks(tank.id, 12),
      listAdditions(tank.id, 5),
      listFilterChanges(tank.id, 1),
    ]);
    const lastCheck = recentChecks[0] ?? null;
    const lastComputation = lastCheck
      ? computeBathCheck(
          lastCheck.cup && lastCheck.effluxSeconds !== null
            ? {
                cup: lastCheck.cup as never,
                effluxSeconds: lastCheck.effluxSeconds,
                ...(lastCheck.solidsPct !== null ? { solidsPct: lastCheck.solidsPct } : {}),
              }
            : {
                measuredMm2S: lastCheck.kinematicMm2S,
                ...(lastCheck.solidsPct !== null ? { solidsPct: lastCheck.solidsPct } : {}),
              },
          ctx,
        )
      : null;
    out.push({
      tank,
      charge,
      age: charge ? bathAge({ chargedAtMs: Date.parse(charge.chargedAt), nowMs, potLifeDays: charge.potLifeDays }) : null,
      lotExpired: !!charge && charge.lotExpiresOn < today,
      window,
      lastCheck,
      lastComputation,
      recentChecks,
      recentAdditions,
      lastFilterChange: filters[0] ?? null,
      context: ctx,
    });
  }
  return out;
}
