/**
 * Demo process windows and bath log for the invented plant: one example lacquer, effective
 * windows for CR-39-type and polycarbonate (approved 30 days ago so the seeded history is
 * covered), their assignment to the dip lines and ovens, two lacquer lots, a charge per
 * hard-coat bath and its bath log since the charge: the operator's hourly checks (cup seconds →
 * viscosity), solvent and fresh-lacquer additions and filter changes, all taken from the shared
 * plant model (seeds/plant-model.ts) so they agree with the seeded viscosity readings. EVERY VALUE HERE IS AN EXAMPLE — replace it with the lacquer maker's data
 * sheet and the lab's own validation. Idempotent: does nothing when the lacquer exists.
 */
import { QueryTypes, type Sequelize, type Transaction } from 'sequelize';
import { auditIn } from '../db/transaction.ts';
import { bathAddition } from '../src/lib/domain/film/bath-maintenance.ts';
import { viscosityFromCup, type CupId } from '../src/lib/domain/film/viscosity-cups.ts';
import type { ProcessWindowLimits } from '../src/lib/shared/windows.ts';
import {
  BATH_CHARGES,
  BATH_RATES,
  DIP_LINES,
  MINUTE_MS,
  anchorOf,
  atLocal,
  bathStateAt,
  bathTempC,
  bathViscosityAt,
  buildPlantModel,
  demoBathEvents,
  isShift,
  localDayKey,
  localHour,
  type DipLineCode,
} from './plant-model.ts';

export const EXAMPLE_LACQUER = 'FH-Siloxane 30 (example)';
export const EXAMPLE_NOTE = 'Example values — replace with the lacquer maker’s data sheet.';
const DAY = 86_400_000;

/** Example limits shared by both substrates (maximum part temperature differs). */
export function exampleLimits(maxPartTempC: number): ProcessWindowLimits {
  return {
    withdrawalSpeedMmS: { min: 1.8, max: 2.2, target: 2.0 },
    viscosityMm2S: { min: 7.0, max: 12.5, target: 9.5 },
    bathTempC: { min: 10, max: 14, target: 12 },
    roomRhPct: { min: 30, max: 55 },
    flashOffMin: { min: 5, max: 20 },
    cureSetpointC: { min: 105, max: 115, target: 110 },
    minCureTempC: 100,
    minEquivalentMinutes: 150,
    referenceC: 110,
    // From memory: 70–80 kJ/mol is typical of thermally cured siloxane hard coats.
    activationEnergyKJMol: 75,
    maxPartTempC,
    maxRampCPerMin: 5,
    targetDryThicknessUm: 2.0,
    maxGapSeconds: 120,
  };
}

export async function seedWindows(
  sequelize: Sequelize,
  opts: { nowMs?: number; log?: (line: string) => void } = {},
): Promise<boolean> {
  const run = <T extends object>(sql: string, bind: unknown[], transaction: Transaction) =>
    sequelize.query<T>(sql, { bind, type: QueryTypes.SELECT, transaction });
  const [exists] = await sequelize.query<{ n: number }>(`select count(*)::int as n from lacquers where name = $1`, {
    bind: [EXAMPLE_LACQUER],
    type: QueryTypes.SELECT,
  });
  if ((exists?.n ?? 0) > 0) return false;
  const [site] = await sequelize.query<{ id: number }>(`select id from sites where code = 'fernhollow'`, {
    type: QueryTypes.SELECT,
  });
  if (!site) return false;
  const log = opts.log ?? (() => {});
  log('Seeding example process windows and the bath log…');
  const now = opts.nowMs ?? Date.now();
  const t0 = new Date(now - 30 * DAY);
  await sequelize.transaction(async (t) => {
    const users = await run<{ id: number; username: string; display_name: string }>(
      `select id, username, display_name from users where username in ('engineer','operator')`,
      [],
      t,
    );
    const engineer = users.find((u) => u.username === 'engineer');
    const operator = users.find((u) => u.username === 'operator') ?? engineer;
    const assets = await run<{ id: number; code: string }>(`select id, code from assets where site_id = $1`, [site.id], t);
    const asset = (code: string) => assets.find((a) => a.code === code)?.id;
    const [lacquer] = await run<{ id: number }>(
      `insert into lacquers (name, maker, solids_pct, density_g_cm3, activation_energy_kj_mol, note)
       values ($1, 'Example maker (invented)', 30, 0.95, 75, $2) returning id`,
      [EXAMPLE_LACQUER, EXAMPLE_NOTE],
      t,
    );
    const materials = await run<{ id: number; code: string; name: string }>(
      `select id, code, name from materials where code in ('cr39-1.50','pc-1.59')`,
      [],
      t,
    );
    const windowIds = new Map<string, number>();
    for (const [code, maxPart] of [
      ['cr39-1.50', 125],
      ['pc-1.59', 130],
    ] as const) {
      const m = materials.find((x) => x.code === code);
      if (!m) continue;
      const signature = engineer
        ? {
            userId: engineer.id,
            username: engineer.username,
            displayName: engineer.display_name,
            meaning: 'approved',
            signedAt: t0.toISOString(),
          }
        : { userId: 0, username: 'seed', displayName: 'Demo seed', meaning: 'approved', signedAt: t0.toISOString() };
      const [w] = await run<{ id: number }>(
        `insert into process_windows (lacquer_id, material_id, version, name, status, limits, note, created_by, created_at, updated_at, approved_by, approved_signature, effective_from)
         values ($1, $2, 1, $3, 'effective', $4::jsonb, $5, $6, $7, $7, $6, $8::jsonb, $7) returning id`,
        [
          lacquer!.id,
          m.id,
          `FH-Siloxane 30 on ${m.name} (example)`,
          JSON.stringify(exampleLimits(maxPart)),
          EXAMPLE_NOTE,
          engineer?.id ?? null,
          t0,
          JSON.stringify(signature),
        ],
        t,
      );
      windowIds.set(code, w!.id);
      await auditIn(
        t,
        { id: engineer?.id ?? null, label: 'demo seed' },
        {
          action: 'window.approve',
          entity: 'process_window',
          entityId: w!.id,
          after: { status: 'effective', note: EXAMPLE_NOTE },
          signature,
          at: t0,
        },
      );
    }
    const plan: [string, string][] = [
      ['dip-1', 'cr39-1.50'],
      ['oven-a', 'cr39-1.50'],
      ['oven-b', 'cr39-1.50'],
      ['dip-2', 'pc-1.59'],
      ['oven-c', 'pc-1.59'],
    ];
    for (const [code, mat] of plan) {
      const a = asset(code);
      const w = windowIds.get(mat);
      if (!a || !w) continue;
      await run(
        `insert into window_assignments (asset_id, window_id, valid_from, assigned_by, note) values ($1, $2, $3, $4, 'demo seed') returning id`,
        [a, w, t0, engineer?.id ?? null],
        t,
      );
    }

    // Lots (the maker's lot numbers are invented) and one charge per hard-coat bath, at the times
    // and solids the plant model (seeds/plant-model.ts) charges them, so the bath log matches the
    // seeded viscosity readings.
    const anchor = anchorOf(now);
    const dayStr = (ms: number) => new Date(ms).toISOString().slice(0, 10);
    const by = operator ?? { id: null, username: 'operator' };
    const model = buildPlantModel(now);
    const events = demoBathEvents(now, { days: 30 });
    const cups: Record<DipLineCode, { cup: CupId; k: number; c: number }> = {
      // ν = k(t − c): ASTM D4212 Zahn 1 and Shell 1 (their windows hold the example viscosity window).
      'dip-1': { cup: 'zahn-1', k: 1.1, c: 29 },
      'dip-2': { cup: 'shell-1', k: 0.226, c: 13 },
    };
    for (const line of DIP_LINES) {
      const tank = asset(`${line}-hc`);
      if (!tank) continue;
      const spec = BATH_CHARGES[line];
      const chargedAt = atLocal(localDayKey(anchor) - spec.daysBack, 6.25);
      const [lot] = await run<{ id: number }>(
        `insert into lacquer_lots (lacquer_id, lot_code, received_on, expires_on, solids_pct, note, created_by) values ($1, $2, $3, $4, $5, 'demo seed', $6) returning id`,
        [
          lacquer!.id,
          `FHS30-L${line === 'dip-1' ? '0411' : '0587'}`,
          dayStr(chargedAt - 12 * DAY),
          dayStr(chargedAt + 168 * DAY),
          Math.round(spec.solids * 1000) / 10,
          engineer?.id ?? null,
        ],
        t,
      );
      const [charge] = await run<{ id: number }>(
        `insert into bath_charges (tank_asset_id, lot_id, charged_at, mass_kg, pot_life_days, note, created_by) values ($1, $2, $3, $4, 30, 'demo seed', $5) returning id`,
        [tank, lot!.id, new Date(chargedAt), BATH_RATES.chargeMassKg, engineer?.id ?? null],
        t,
      );
      const windowId = windowIds.get(line === 'dip-1' ? 'cr39-1.50' : 'pc-1.59') ?? null;
      const bath = model.baths[line];
      const cup = cups[line];
      // The operator's hourly check at hh:20 during the shift (as the plant model has it).
      const checks: { at: number; id: number; solidsPct: number; massKg: number }[] = [];
      const grid = 10 * MINUTE_MS;
      for (let at = Math.ceil((chargedAt + 1) / grid) * grid; at <= anchor; at += grid) {
        const h = localHour(at);
        if (!isShift(at) || Math.abs(h - Math.floor(h) - 20 / 60) > 1e-6) continue;
        const state = bathStateAt(bath, at);
        const seconds = Math.round((bathViscosityAt(bath, at) / cup.k + cup.c) * 10) / 10;
        const result = viscosityFromCup({ cup: cup.cup, seconds, densityGCm3: 0.95 });
        if (!result.inRange || result.kinematicMm2S === undefined) continue;
        const solidsPct = Math.round(state.solids * 1000) / 10;
        const [check] = await run<{ id: number }>(
          `insert into bath_checks (tank_asset_id, charge_id, at, by_user, by_label, cup, efflux_seconds, kinematic_mm2s, method, density_g_cm3, dynamic_mpas, bath_temp_c, solids_pct, window_id, note)
           values ($1, $2, $3, $4, $5, $6, $7, $8, $9, 0.95, $10, $11, $12, $13, 'demo seed') returning id`,
          [
            tank,
            charge!.id,
            new Date(at),
            by.id,
            by.username,
            cup.cup,
            seconds,
            result.kinematicMm2S,
            result.source,
            result.dynamicMPaS ?? null,
            Math.round(bathTempC(line, at) * 10) / 10,
            solidsPct,
            windowId,
          ],
          t,
        );
        checks.push({ at, id: check!.id, solidsPct, massKg: state.massKg });
      }
      for (const e of events) {
        if (e.tank !== `${line}-hc` || e.tMs < chargedAt || e.kind === 'charge') continue;
        if (e.kind === 'filter-change') {
          await run(
            `insert into filter_changes (tank_asset_id, at, by_user, by_label, filter_type, rating_um, note) values ($1, $2, $3, $4, 'Pleated cartridge (example)', 1, 'demo seed') returning id`,
            [tank, new Date(e.tMs), by.id, by.username],
            t,
          );
          continue;
        }
        if (e.massKg === null || e.massKg <= 0) continue;
        const check = [...checks].reverse().find((c) => c.at <= e.tMs) ?? null;
        const recommendation = check
          ? bathAddition({
              bathMassKg: check.massKg,
              solidsNowPct: check.solidsPct,
              solidsTargetPct: 30,
              lacquerSolidsPct: spec.solids * 100,
            })
          : null;
        await run(
          `insert into bath_additions (tank_asset_id, charge_id, at, by_user, by_label, kind, mass_kg, lot_id, check_id, recommendation, note)
           values ($1, $2, $3, $4, $5, $6, $7, $8, $9, $10::jsonb, 'demo seed') returning id`,
          [
            tank,
            charge!.id,
            new Date(e.tMs),
            by.id,
            by.username,
            e.kind === 'solvent-addition' ? 'solvent' : 'fresh-lacquer',
            e.massKg,
            e.kind === 'solvent-addition' ? null : lot!.id,
            check?.id ?? null,
            recommendation ? JSON.stringify(recommendation) : null,
          ],
          t,
        );
      }
    }
  });
  return true;
}

/** Reverse {@link seedWindows} on a database that holds nothing else of these tables. */
export async function unseedWindows(sequelize: Sequelize): Promise<void> {
  await sequelize.transaction(async (transaction) => {
    for (const table of [
      'filter_changes',
      'bath_additions',
      'bath_checks',
      'bath_charges',
      'lacquer_lots',
      'window_assignments',
      'process_windows',
      'lacquers',
    ]) {
      await sequelize.query(`delete from ${table}`, { transaction });
    }
  });
}
