/**
 * Demo process windows and bath log for the invented plant: one example lacquer, effective
 * windows for CR-39-type and polycarbonate (approved 30 days ago so the seeded history is
 * covered), their assignment to the dip lines and ovens, two lacquer lots, a charge per
 * hard-coat bath and a few weeks of bath checks (cup seconds → viscosity), solvent top-ups and
 * filter changes. EVERY VALUE HERE IS AN EXAMPLE — replace it with the lacquer maker's data
 * sheet and the lab's own validation. Idempotent: does nothing when the lacquer exists.
 */
import { QueryTypes, type Sequelize, type Transaction } from 'sequelize';
import { bathAddition } from '../src/lib/domain/film/bath-maintenance.ts';
import { viscosityFromCup, type CupId } from '../src/lib/domain/film/viscosity-cups.ts';
import type { ProcessWindowLimits } from '../src/lib/shared/windows.ts';

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

/** Deterministic pseudo-random numbers (mulberry32) so every seeded plant tells the same story. */
function rng(seed: number): () => number {
  let a = seed >>> 0;
  return () => {
    a = (a + 0x6d2b79f5) >>> 0;
    let t = a;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

export async function seedWindows(sequelize: Sequelize, opts: { nowMs?: number; log?: (line: string) => void } = {}): Promise<boolean> {
  const run = <T extends object>(sql: string, bind: unknown[], transaction: Transaction) =>
    sequelize.query<T>(sql, { bind, type: QueryTypes.SELECT, transaction });
  const [exists] = await sequelize.query<{ n: number }>(`select count(*)::int as n from lacquers where name = $1`, { bind: [EXAMPLE_LACQUER], type: QueryTypes.SELECT });
  if ((exists?.n ?? 0) > 0) return false;
  const [site] = await sequelize.query<{ id: number }>(`select id from sites where code = 'fernhollow'`, { type: QueryTypes.SELECT });
  if (!site) return false;
  const log = opts.log ?? (() => {});
  log('Seeding example process windows and the bath log…');
  const now = opts.nowMs ?? Date.now();
  const t0 = new Date(now - 30 * DAY);
  await sequelize.transaction(async (t) => {
    const users = await run<{ id: number; username: string; display_name: string }>(`select id, username, display_name from users where username in ('engineer','operator')`, [], t);
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
    const materials = await run<{ id: number; code: string; name: string }>(`select id, code, name from materials where code in ('cr39-1.50','pc-1.59')`, [], t);
    const windowIds = new Map<string, number>();
    for (const [code, maxPart] of [['cr39-1.50', 125], ['pc-1.59', 130]] as const) {
      const m = materials.find((x) => x.code === code);
      if (!m) continue;
      const signature = engineer
        ? { userId: engineer.id, username: engineer.username, displayName: engineer.display_name, meaning: 'approved', signedAt: t0.toISOString() }
        : { userId: 0, username: 'seed', displayName: 'Demo seed', meaning: 'approved', signedAt: t0.toISOString() };
      const [w] = await run<{ id: number }>(
        `insert into process_windows (lacquer_id, material_id, version, name, status, limits, note, created_by, created_at, updated_at, approved_by, approved_signature, effective_from)
         values ($1, $2, 1, $3, 'effective', $4::jsonb, $5, $6, $7, $7, $6, $8::jsonb, $7) returning id`,
        [lacquer!.id, m.id, `FH-Siloxane 30 on ${m.name} (example)`, JSON.stringify(exampleLimits(maxPart)), EXAMPLE_NOTE, engineer?.id ?? null, t0, JSON.stringify(signature)],
        t,
      );
      windowIds.set(code, w!.id);
      await run(
        `insert into audit_log (at, actor_id, actor_label, action, entity, entity_id, after, signature) values ($1, $2, 'demo seed', 'window.approve', 'process_window', $3, $4::jsonb, $5::jsonb) returning id`,
        [t0, engineer?.id ?? null, String(w!.id), JSON.stringify({ status: 'effective', note: EXAMPLE_NOTE }), JSON.stringify(signature)],
        t,
      );
    }
    const plan: [string, string][] = [
      ['dip-1', 'cr39-1.50'], ['oven-a', 'cr39-1.50'], ['oven-b', 'cr39-1.50'],
      ['dip-2', 'pc-1.59'], ['oven-c', 'pc-1.59'],
    ];
    for (const [code, mat] of plan) {
      const a = asset(code);
      const w = windowIds.get(mat);
      if (!a || !w) continue;
      await run(`insert into window_assignments (asset_id, window_id, valid_from, assigned_by, note) values ($1, $2, $3, $4, 'demo seed') returning id`, [a, w, t0, engineer?.id ?? null], t);
    }

    // Lots (the maker's lot numbers are invented) and one charge per hard-coat bath.
    const dayStr = (ms: number) => new Date(ms).toISOString().slice(0, 10);
    const lots: { id: number; solids: number }[] = [];
    for (const [code, ago, solids] of [['FHS30-L0411', 45, 30.4], ['FHS30-L0587', 20, 30.2]] as const) {
      const [lot] = await run<{ id: number }>(
        `insert into lacquer_lots (lacquer_id, lot_code, received_on, expires_on, solids_pct, note, created_by) values ($1, $2, $3, $4, $5, 'demo seed', $6) returning id`,
        [lacquer!.id, code, dayStr(now - ago * DAY), dayStr(now - ago * DAY + 180 * DAY), solids, engineer?.id ?? null],
        t,
      );
      lots.push({ id: lot!.id, solids });
    }
    const baths: { tank: string; lot: (typeof lots)[number]; chargedDaysAgo: number; cup: CupId; seed: number }[] = [
      { tank: 'dip-1-hc', lot: lots[0]!, chargedDaysAgo: 26, cup: 'zahn-1', seed: 11 },
      { tank: 'dip-2-hc', lot: lots[1]!, chargedDaysAgo: 9, cup: 'shell-1', seed: 29 },
    ];
    const by = operator ?? { id: null, username: 'operator' };
    for (const b of baths) {
      const tank = asset(b.tank);
      if (!tank) continue;
      const chargedAt = now - b.chargedDaysAgo * DAY;
      const massKg = 38;
      const [charge] = await run<{ id: number }>(
        `insert into bath_charges (tank_asset_id, lot_id, charged_at, mass_kg, pot_life_days, note, created_by) values ($1, $2, $3, $4, 30, 'demo seed', $5) returning id`,
        [tank, b.lot.id, new Date(chargedAt), massKg, engineer?.id ?? null],
        t,
      );
      const rand = rng(b.seed);
      let solids = b.lot.solids;
      let bathMass = massKg;
      // Checks every 8 h; solvent evaporates (solids creep up, viscosity with them) until a top-up.
      for (let at = chargedAt + 2 * 3_600_000; at < now - 3_600_000; at += 8 * 3_600_000) {
        const evaporated = bathMass * (1 - solids / (solids + 0.12 + rand() * 0.08));
        solids = (solids * bathMass) / (bathMass - evaporated);
        bathMass -= evaporated;
        const tempC = 12 + (rand() - 0.5) * 1.2;
        // Example viscosity–solids relation of the invented lacquer: 9.0 mm²/s at 30 %, +1.6 mm²/s per % solids.
        const nu = 9.0 + 1.6 * (solids - 30) + (rand() - 0.5) * 0.3;
        const spec = b.cup === 'zahn-1' ? { k: 1.1, c: 29 } : { k: 0.226, c: 13 };
        const seconds = Math.round((nu / spec.k + spec.c) * 10) / 10;
        const cup = viscosityFromCup({ cup: b.cup, seconds, densityGCm3: 0.95 });
        if (!cup.inRange || cup.kinematicMm2S === undefined) continue;
        const solidsRead = Math.round(solids * 10) / 10;
        const [check] = await run<{ id: number }>(
          `insert into bath_checks (tank_asset_id, charge_id, at, by_user, by_label, cup, efflux_seconds, kinematic_mm2s, method, density_g_cm3, dynamic_mpas, bath_temp_c, solids_pct, window_id, note)
           values ($1, $2, $3, $4, $5, $6, $7, $8, $9, 0.95, $10, $11, $12, (select window_id from window_assignments wa join assets a on a.parent_id = wa.asset_id where a.id = $1 limit 1), 'demo seed') returning id`,
          [tank, charge!.id, new Date(at), by.id, by.username, b.cup, seconds, cup.kinematicMm2S, cup.source, cup.dynamicMPaS ?? null, Math.round(tempC * 10) / 10, solidsRead],
          t,
        );
        if (solidsRead >= 30.9) {
          const rec = bathAddition({ bathMassKg: bathMass, solidsNowPct: solidsRead, solidsTargetPct: 30 });
          if (rec.ok && rec.kind === 'solvent') {
            const added = Math.round(rec.massKg * 100) / 100;
            await run(
              `insert into bath_additions (tank_asset_id, charge_id, at, by_user, by_label, kind, mass_kg, check_id, recommendation, note)
               values ($1, $2, $3, $4, $5, 'solvent', $6, $7, $8::jsonb, 'demo seed') returning id`,
              [tank, charge!.id, new Date(at + 15 * 60_000), by.id, by.username, added, check!.id, JSON.stringify(rec)],
              t,
            );
            solids = (solids * bathMass) / (bathMass + added);
            bathMass += added;
          }
        }
      }
      for (let at = chargedAt + 7 * DAY; at < now; at += 7 * DAY) {
        await run(
          `insert into filter_changes (tank_asset_id, at, by_user, by_label, filter_type, rating_um, note) values ($1, $2, $3, $4, 'Pleated cartridge (example)', 1, 'demo seed') returning id`,
          [tank, new Date(at), by.id, by.username],
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
    for (const table of ['filter_changes', 'bath_additions', 'bath_checks', 'bath_charges', 'lacquer_lots', 'window_assignments', 'process_windows', 'lacquers']) {
      await sequelize.query(`delete from ${table}`, { transaction });
    }
  });
}
