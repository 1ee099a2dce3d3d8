/**
 * The bath log: lacquer lots, bath charges, checks (viscosity recomputed from the raw reading
 * and stored with the check), additions and filter changes; bath age and pot-life state. The
 * records and their audit rows are written by `core/bath-store.ts`; this service attributes
 * each entry to the signed-in user and shapes the bath overview.
 */
import { bathAge, type BathAge } from '../../domain/film/bath-maintenance.ts';
import {
  computeBathCheck,
  type BathAdditionEntry,
  type BathCheckComputation,
  type BathCheckContext,
  type BathCheckInput,
  type ChargeCreate,
  type FilterChange,
  type LotCreate,
} from '../../shared/baths.ts';
import type { ProcessWindowInForce } from '../../shared/windows.ts';
import * as store from '../../core/bath-store.ts';
import type { AdditionRow, ChargeRow, CheckRow, FilterRow, LotRow, RecordedCheck, TankRow } from '../../core/bath-store.ts';
import type { SessionUser } from '../auth.ts';
import { db } from '../db.ts';
import { actorOf } from '../guard.ts';

export type { AdditionRow, ChargeRow, CheckRow, FilterRow, LotRow, RecordedCheck, TankRow };

const author = (user: SessionUser): store.EntryAuthor => ({ userId: user.id, label: user.username });

export const listTanks = (): Promise<TankRow[]> => store.listTanks(db());
export const listCharges = (tankId?: number, limit = 200): Promise<ChargeRow[]> => store.listCharges(db(), tankId, limit);
export const listChecks = (tankId?: number, limit = 100): Promise<CheckRow[]> => store.listChecks(db(), tankId, limit);
export const listAdditions = (tankId?: number, limit = 100): Promise<AdditionRow[]> => store.listAdditions(db(), tankId, limit);
export const listFilterChanges = (tankId?: number, limit = 100): Promise<FilterRow[]> =>
  store.listFilterChanges(db(), tankId, limit);
export const listLots = (): Promise<LotRow[]> => store.listLots(db());

/** Store a check with the viscosity computed on the server from the raw reading; an out-of-range cup is refused. */
export function recordCheck(user: SessionUser, input: BathCheckInput, address: string | null): Promise<RecordedCheck> {
  return store.recordBathCheck(db(), actorOf(user, address), author(user), input, Date.now());
}

export function recordAddition(user: SessionUser, input: BathAdditionEntry, address: string | null): Promise<AdditionRow> {
  return store.recordBathAddition(db(), actorOf(user, address), author(user), input, Date.now());
}

export function recordFilterChange(user: SessionUser, input: FilterChange, address: string | null): Promise<FilterRow> {
  return store.recordFilterChangeRecord(db(), actorOf(user, address), author(user), input, Date.now());
}

export function createLot(user: SessionUser, input: LotCreate, address: string | null): Promise<LotRow> {
  return store.createLotRecord(db(), actorOf(user, address), author(user), input);
}

export function createCharge(user: SessionUser, input: ChargeCreate, address: string | null): Promise<ChargeRow> {
  return store.createChargeRecord(db(), actorOf(user, address), author(user), input, Date.now());
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
    const { charge, window, ctx } = await store.bathContext(db(), tank.id, now);
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
