/**
 * The computation a bath check makes, used live by the entry form and again by the server
 * (which never trusts the browser's number): efflux seconds → kinematic viscosity by the cup's
 * equation (viscosity-cups.ts: ASTM D4212, ASTM D1200, ISO 2431, DIN 53211), the value against
 * the window in force, and the solvent / fresh-lacquer addition by solids mass balance
 * (bath-maintenance.ts). Pure.
 */
import type {
  BathCheckComputation,
  BathCheckContext,
  BathCheckInput,
  BathAddition,
  BathAdditionRefusal,
  CheckViscosity,
} from '../../shared/baths.ts';
import { againstRange } from '../../shared/windows.ts';
import { bathAddition } from './bath-maintenance.ts';
import { viscosityFromCup } from './viscosity-cups.ts';

/**
 * The computation of one bath check (the same in the browser and the server):
 * - cup + seconds → ν by the cup's equation, only inside its valid efflux window
 *   ("out of range — use another cup" otherwise, no viscosity); or a measured ν as given;
 * - η = ν·ρ when a density is known;
 * - the window band (low / in / high) of `viscosityMm2S`;
 * - with solids: the addition that returns solids to target by mass balance
 *   (solvent m = M(s/s_t − 1); fresh lacquer m = M(s_t − s)/(s_l − s_t)).
 */
export function computeBathCheck(
  input: Pick<BathCheckInput, 'cup' | 'effluxSeconds' | 'measuredMm2S' | 'solidsPct' | 'densityGCm3' | 'bathMassKg'>,
  ctx: BathCheckContext,
): BathCheckComputation {
  let viscosity: CheckViscosity;
  if (input.measuredMm2S !== undefined) {
    viscosity = { ok: true, method: 'measured', kinematicMm2S: input.measuredMm2S, source: 'measured kinematic viscosity' };
    if (input.densityGCm3 !== undefined) viscosity.dynamicMPaS = input.measuredMm2S * input.densityGCm3;
  } else if (input.cup !== undefined && input.effluxSeconds !== undefined) {
    const r = viscosityFromCup({ cup: input.cup, seconds: input.effluxSeconds, densityGCm3: input.densityGCm3 });
    if (r.inRange && r.kinematicMm2S !== undefined) {
      viscosity = { ok: true, method: 'cup', kinematicMm2S: r.kinematicMm2S, source: r.source, validSeconds: r.validSeconds };
      if (r.dynamicMPaS !== undefined) viscosity.dynamicMPaS = r.dynamicMPaS;
    } else {
      viscosity = { ok: false, message: r.message ?? 'out of range — use another cup', validSeconds: r.validSeconds };
      if (r.suggestedCup) viscosity.suggestedCup = r.suggestedCup;
    }
  } else {
    viscosity = {
      ok: false,
      message: 'Give a cup and its efflux seconds, or a measured viscosity.',
      validSeconds: { min: 0, max: 0 },
    };
  }
  const band = viscosity.ok ? againstRange(viscosity.kinematicMm2S, ctx.limits?.viscosityMm2S) : null;
  const rec = input.solidsPct !== undefined ? recommendAddition(input.solidsPct, input.bathMassKg, ctx) : null;
  const out: BathCheckComputation = {
    viscosity,
    band,
    addition: rec?.addition ?? null,
    bathMassKg: rec?.bathMassKg ?? input.bathMassKg ?? ctx.estimatedBathMassKg,
  };
  if (rec?.note) out.additionNote = rec.note;
  return out;
}

/**
 * Solids within this many wt % of the target call for no addition: ±0.2 wt %, about the
 * repeatability of a gravimetric solids test (an invented default; see the lacquer maker's data).
 */
export const SOLIDS_DEADBAND_PCT = 0.2;

/**
 * The addition that returns the bath's solids to target, by solids mass balance
 * (lib/domain/film/bath-maintenance `bathAddition`), on the weighed bath mass or, without one,
 * the working estimate (the charged mass). Inside ±{@link SOLIDS_DEADBAND_PCT} wt % nothing is
 * suggested.
 */
export function recommendAddition(
  solidsPct: number,
  bathMassKg: number | undefined,
  ctx: BathCheckContext,
): { addition: BathAddition | BathAdditionRefusal | null; bathMassKg: number | null; note?: string } {
  const mass = bathMassKg ?? ctx.estimatedBathMassKg;
  if (ctx.targetSolidsPct === null)
    return { addition: null, bathMassKg: mass, note: 'No solids target: the tank has no charge on record.' };
  if (mass === null) return { addition: null, bathMassKg: null, note: 'Enter the bath mass to get an addition.' };
  if (Math.abs(solidsPct - ctx.targetSolidsPct) <= SOLIDS_DEADBAND_PCT + 1e-9) {
    return {
      addition: null,
      bathMassKg: mass,
      note: `Solids ${solidsPct} % are within ±${SOLIDS_DEADBAND_PCT} wt % of the ${ctx.targetSolidsPct} % target: no addition.`,
    };
  }
  const addition = bathAddition({
    bathMassKg: mass,
    solidsNowPct: solidsPct,
    solidsTargetPct: ctx.targetSolidsPct,
    lacquerSolidsPct: ctx.lotSolidsPct ?? undefined,
  });
  return { addition, bathMassKg: mass };
}
