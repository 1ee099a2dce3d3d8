/**
 * Characteristics, control-limit studies and chart data for the web app (pages and API). The
 * persistence is `core/spc-store.ts` (shared with the ingest worker) and the audited changes
 * `core/spc-commands.ts` (change and audit row in one transaction); this layer adds the checks,
 * the study and the electronic signature.
 */
import { runStudy, StudyError } from '../../domain/control/study.ts';
import { dataFor } from '../../domain/control/phase2.ts';
import { capabilityStudy } from '../../domain/spc/capability.ts';
import { estimateShewhartLimits, shewhartStatistics, type ShewhartChart } from '../../domain/spc/shewhart.ts';
import {
  CharacteristicInputSchema,
  type ApproveLimitSet,
  type Characteristic,
  type CharacteristicFields,
  type ChartData,
  type ChartPoint,
  type LimitSetView,
  type SpecLimits,
  type StudyResult,
} from '../../shared/characteristics.ts';
import type { SpcCapability } from '../../shared/spc.ts';
import { signWithPassword, type SessionUser } from '../auth.ts';
import { sequelize } from '../db.ts';
import { select } from '../../core/db.ts';
import { siteTimeZone as siteZoneOf } from '../../core/settings-store.ts';
import {
  approveLimitSetAudited,
  createCharacteristicAudited,
  discardDraftAudited,
  draftLimitSetAudited,
  updateCharacteristicAudited,
} from '../../core/spc-commands.ts';
import { actorOf } from '../guard.ts';
import { HttpProblem } from '../http.ts';
import {
  backfillCharacteristic,
  baselineOf,
  countPoints,
  getCharacteristicRecord,
  getLimitSet,
  lastPointOf,
  limitSetsOf,
  listCharacteristicRecords,
  pointById,
  pointsOf,
  resolveSpec,
  setInForceAt,
  setsInForceOrder,
  topAssetOfChannel,
  type CharacteristicRecord,
} from '../../core/spc-store.ts';

const invalid = (path: string, message: string) =>
  new HttpProblem(400, 'Invalid input', `${path}: ${message}`, { errors: [{ path, message }] });

/** The site's time zone (the demo's is Europe/London). */
export async function siteTimeZone(): Promise<string> {
  return siteZoneOf(sequelize());
}

async function decorate(records: CharacteristicRecord[]): Promise<Characteristic[]> {
  if (records.length === 0) return [];
  const ids = [...new Set(records.flatMap((r) => r.channelIds))];
  const chans = await select<{ id: number; name: string; unit: string; assetId: number }>(
    sequelize(),
    `select id, name, unit, asset_id as "assetId" from channels where id = any($1::int[])`,
    [ids],
  );
  const assets = await select<{ id: number; name: string }>(
    sequelize(),
    `select id, name from assets where id = any($1::int[])`,
    [records.map((r) => r.assetId)],
  );
  const chanById = new Map(chans.map((c) => [c.id, c]));
  const assetName = new Map(assets.map((a) => [a.id, a.name]));
  return records.map((r) => ({
    ...r,
    assetName: assetName.get(r.assetId) ?? '',
    channels: r.channelIds.map((id) => chanById.get(id)).filter((c): c is NonNullable<typeof c> => !!c),
  }));
}

export async function listCharacteristics(): Promise<Characteristic[]> {
  return decorate(await listCharacteristicRecords(sequelize()));
}

/** One row of the characteristics list: the characteristic and how its chart stands. */
export interface CharacteristicSummary extends Characteristic {
  limitsVersion: number | null;
  limitsEffectiveFrom: string | null;
  draftCount: number;
  points: number;
  lastPoint: { tMs: number; value: number; violations: string[] } | null;
  recentViolations: number;
}

export async function characteristicSummaries(): Promise<CharacteristicSummary[]> {
  const list = await listCharacteristics();
  if (list.length === 0) return [];
  const ids = list.map((c) => c.id);
  const pool = sequelize();
  const [sets, stats, lasts] = await Promise.all([
    select<{ cid: number; version: number | null; eff: Date | null; drafts: number }>(
      pool,
      `select characteristic_id as cid, max(version) filter (where status = 'approved') as version,
              max(effective_from) filter (where status = 'approved') as eff, count(*) filter (where status = 'draft')::int as drafts
         from limit_sets where characteristic_id = any($1::int[]) group by characteristic_id`,
      [ids],
    ),
    select<{ cid: number; n: number }>(
      pool,
      `select characteristic_id as cid, count(*)::int as n from spc_points where characteristic_id = any($1::int[]) group by 1`,
      [ids],
    ),
    select<{ cid: number; tMs: number; value: number; violations: string[]; recent: number }>(
      pool,
      `select c.id as cid, p."tMs", p.value, p.violations, r.recent
         from unnest($1::int[]) as c(id)
         cross join lateral (select (extract(epoch from t) * 1000)::float8 as "tMs", value, violations from spc_points where characteristic_id = c.id order by idx desc limit 1) p
         cross join lateral (select count(*) filter (where cardinality(violations) > 0)::int as recent
                               from (select violations from spc_points where characteristic_id = c.id order by idx desc limit 50) q) r`,
      [ids],
    ),
  ]);
  const setBy = new Map(sets.map((r) => [r.cid, r]));
  const countBy = new Map(stats.map((r) => [r.cid, r.n]));
  const lastBy = new Map(lasts.map((r) => [r.cid, r]));
  return list.map((c) => {
    const s = setBy.get(c.id);
    const l = lastBy.get(c.id);
    return {
      ...c,
      limitsVersion: s?.version ?? null,
      limitsEffectiveFrom: s?.eff ? s.eff.toISOString() : null,
      draftCount: s?.drafts ?? 0,
      points: countBy.get(c.id) ?? 0,
      lastPoint: l ? { tMs: l.tMs, value: l.value, violations: l.violations } : null,
      recentViolations: l?.recent ?? 0,
    };
  });
}

export async function getCharacteristic(id: number): Promise<Characteristic> {
  const r = await getCharacteristicRecord(sequelize(), id);
  if (!r) throw new HttpProblem(404, 'Not found', 'No such characteristic.');
  return (await decorate([r]))[0]!;
}

async function checkChannels(fields: CharacteristicFields): Promise<number> {
  const rows = await select<{ id: number; unit: string; kind: string }>(
    sequelize(),
    `select id, unit, kind from channels where id = any($1::int[])`,
    [fields.channelIds],
  );
  const found = new Map(rows.map((r) => [r.id, r]));
  fields.channelIds.forEach((id, i) => {
    if (!found.has(id)) throw invalid(`channelIds.${i}`, `There is no channel ${id}.`);
  });
  const units = new Set(rows.map((r) => r.unit));
  if (units.size > 1)
    throw invalid(
      'channelIds',
      `The source channels measure in different units (${[...units].join(', ')}); a subgroup must pool like with like.`,
    );
  if (rows.some((r) => r.kind === 'door'))
    throw invalid('channelIds', 'A door switch (open/closed) is not a measurement to chart.');
  const top = await topAssetOfChannel(sequelize(), fields.channelIds[0]!);
  if (top === null) throw invalid('channelIds.0', 'The channel has no asset.');
  return top;
}

async function checkName(name: string, exceptId: number | null): Promise<void> {
  const rows = await select<Record<string, unknown>>(
    sequelize(),
    `select id from characteristics where lower(name) = lower($1) and id is distinct from $2`,
    [name, exceptId],
  );
  if (rows.length > 0) throw invalid('name', 'Another characteristic has this name.');
}

export async function createCharacteristic(
  user: SessionUser,
  input: CharacteristicFields,
  address: string | null,
): Promise<Characteristic> {
  const fields = CharacteristicInputSchema.parse(input);
  await checkName(fields.name, null);
  const assetId = await checkChannels(fields);
  const { backfillDays = 14, ...stored } = fields;
  const id = await createCharacteristicAudited(sequelize(), actorOf(user, address), stored, assetId);
  if (backfillDays > 0 && stored.active) {
    const record = await getCharacteristicRecord(sequelize(), id);
    if (record) {
      const now = Date.now();
      await backfillCharacteristic(sequelize(), record, now - backfillDays * 86_400_000, now);
    }
  }
  return getCharacteristic(id);
}

/** Fields that define how points are formed; they cannot change once points exist. */
const STRUCTURAL = ['chart', 'subgroupSize', 'subgroupRule', 'channelIds'] as const;

export async function updateCharacteristic(
  user: SessionUser,
  id: number,
  input: CharacteristicFields,
  address: string | null,
): Promise<Characteristic> {
  const before = await getCharacteristic(id);
  const { backfillDays: _ignored, ...fields } = CharacteristicInputSchema.parse(input);
  void _ignored;
  await checkName(fields.name, id);
  const assetId = await checkChannels(fields);
  const points = await countPoints(sequelize(), id);
  if (points > 0) {
    for (const k of STRUCTURAL) {
      if (JSON.stringify(before[k]) !== JSON.stringify(fields[k])) {
        throw new HttpProblem(
          409,
          'Cannot change how points are formed',
          `The chart already holds ${points} points formed with the current ${k}; create a new characteristic instead (this one stays readable).`,
          {
            errors: [{ path: k, message: 'Fixed once the chart has points.' }],
          },
        );
      }
    }
  }
  const b = {
    name: before.name,
    description: before.description,
    channelIds: before.channelIds,
    subgroupRule: before.subgroupRule,
    subgroupSize: before.subgroupSize,
    chart: before.chart,
    chartParams: before.chartParams,
    rules: before.rules,
    spec: before.spec,
    unit: before.unit,
    active: before.active,
  };
  await updateCharacteristicAudited(sequelize(), actorOf(user, address), id, fields, assetId, b);
  const after = await getCharacteristic(id);
  return after;
}

// --- chart data ------------------------------------------------------------------------------

function underlyingChart(c: { chart: Characteristic['chart']; subgroupSize: number }): ShewhartChart {
  return c.chart === 'imr' || c.chart === 'xbar-r' || c.chart === 'xbar-s' ? c.chart : c.subgroupSize > 1 ? 'xbar-r' : 'imr';
}

/**
 * Capability of the points shown (excluded points left out): σ_within from the limit set in force
 * at the newest point when there is one, else estimated from these points' chart.
 */
function capabilityOfPoints(
  c: Characteristic,
  points: (ChartPoint & { members?: number[] })[],
  sets: LimitSetView[],
  spec: SpecLimits | null,
): { capability: SpcCapability | null; basis: string | null } {
  if (!spec || (spec.lsl === undefined && spec.usl === undefined)) return { capability: null, basis: null };
  const used = points.filter((p) => !p.excluded && p.members && p.members.length > 0);
  if (used.length < 2) return { capability: null, basis: 'Too few points for a capability estimate.' };
  const newest = used[used.length - 1]!;
  const set = setInForceAt(setsInForceOrder(sets), newest.tMs);
  // With an overall σ basis the set's σ is not the within-subgroup σ that Cp needs: estimate it.
  const withinFromSet = c.chartParams.sigmaBasis !== 'overall';
  let sigma = withinFromSet ? (set?.sigma ?? null) : null;
  let sigmaFrom = set && withinFromSet ? `limit set v${set.version}` : '';
  if (sigma === null || !(sigma > 0)) {
    const u = underlyingChart(c);
    const groups = used.map((p) => p.members!);
    const stats = shewhartStatistics(u, dataFor(u, groups));
    const est = estimateShewhartLimits(
      u,
      stats,
      stats.map((_, i) => i),
    );
    sigma = est.sigma;
    sigmaFrom = 'these points';
  }
  if (!(sigma !== null && sigma > 0)) return { capability: null, basis: 'The points show no spread.' };
  const observations = used.flatMap((p) => p.members!);
  const capability = capabilityStudy(observations, sigma, spec, { series: used.map((p) => p.observation) });
  return { capability, basis: `${used.length} points (${observations.length} observations), σ within from ${sigmaFrom}.` };
}

export async function chartData(id: number, q: { fromMs?: number; toMs?: number; last?: number }): Promise<ChartData> {
  const characteristic = await getCharacteristic(id);
  const pool = sequelize();
  const [points, limitSets, totalPoints, timeZone] = await Promise.all([
    q.fromMs !== undefined || q.toMs !== undefined
      ? baselineOf(pool, id, q.fromMs ?? 0, q.toMs ?? 8.64e15)
      : pointsWithMembers(id, q.last ?? 200),
    limitSetsOf(pool, id),
    countPoints(pool, id),
    siteTimeZone(),
  ]);
  const { spec, note } = await resolveSpec(pool, characteristic, points[points.length - 1]?.tMs ?? Date.now());
  const cap = capabilityOfPoints(characteristic, points, limitSets, spec);
  return {
    characteristic,
    points: points.map(({ members: _m, ...p }) => p),
    limitSets,
    spec,
    specNote: note,
    capability: cap.capability,
    capabilityBasis: cap.basis,
    totalPoints,
    timeZone,
  };
}

async function pointsWithMembers(id: number, last: number): Promise<(ChartPoint & { members: number[] })[]> {
  const recent = await pointsOf(sequelize(), id, { last });
  if (recent.length === 0) return [];
  return baselineOf(sequelize(), id, recent[0]!.tMs, recent[recent.length - 1]!.tMs);
}

/** Everything behind one plotted point: raw readings with their channels, and the records it belongs to. */
export async function pointDetail(id: number, pointId: number) {
  const c = await getCharacteristic(id);
  const pool = sequelize();
  const p = await pointById(pool, id, pointId);
  if (!p) throw new HttpProblem(404, 'Not found', 'No such point on this chart.');
  const limitSet = p.limitSetId ? await getLimitSet(pool, p.limitSetId) : null;
  const from = new Date((p.tFromMs ?? p.tMs) - 60_000);
  const to = new Date(p.tMs + 60_000);
  const channelAssets = c.channels.map((ch) => ch.assetId);
  // Records the subgroup belongs to: dip runs on the same line around the stroke, oven loads in progress.
  const dipRuns = await select<{ id: number; dippedAt: Date; speed: number | null }>(
    pool,
    `select d.id, d.dipped_at as "dippedAt", d.withdrawal_speed_mm_s as speed from dip_runs d
        where ($1::int is not null and d.id = $1) or (
          (d.line_asset_id = $2 or d.tank_asset_id = any($3::int[]))
          and coalesce(d.stroke_ended_at, d.dipped_at) >= $4 and coalesce(d.stroke_started_at, d.dipped_at) <= $5)
        order by d.dipped_at limit 20`,
    [p.dipRunId, c.assetId, channelAssets, from, to],
  ).catch(() => []);
  const ovenLoads = await select<{ id: number; openedAt: Date; closedAt: Date | null; verdict: string | null }>(
    pool,
    `select l.id, l.opened_at as "openedAt", l.closed_at as "closedAt", l.verdict from oven_loads l
        where ($1::int is not null and l.id = $1) or (l.oven_asset_id = $2 and l.opened_at <= $4 and coalesce(l.closed_at, now()) >= $3)
        order by l.opened_at limit 10`,
    [p.ovenLoadId, c.assetId, new Date(p.tFromMs ?? p.tMs), new Date(p.tMs)],
  ).catch(() => []);
  return {
    characteristicId: id,
    point: { ...p, readings: undefined, members: undefined, key: undefined },
    members: p.members,
    readings: p.readings,
    channels: c.channels,
    limitSet,
    dipRuns: dipRuns.map((d) => ({ id: d.id, dippedAt: d.dippedAt.toISOString(), withdrawalSpeedMmS: d.speed })),
    ovenLoads: ovenLoads.map((l) => ({
      id: l.id,
      openedAt: l.openedAt.toISOString(),
      closedAt: l.closedAt?.toISOString() ?? null,
      verdict: l.verdict,
    })),
  };
}

// --- studies and limit sets ------------------------------------------------------------------

async function studyFor(c: Characteristic, fromMs: number, toMs: number, exclusions: { index: number; reason: string }[]) {
  const pool = sequelize();
  const baseline = await baselineOf(pool, c.id, fromMs, toMs);
  if (baseline.length === 0) throw invalid('baselineFrom', 'There are no points in this period.');
  const sizes = new Set(baseline.map((p) => p.members.length));
  if (sizes.size > 1) throw invalid('baselineFrom', 'The points in this period have different subgroup sizes.');
  const { spec } = await resolveSpec(pool, c, toMs);
  try {
    const outcome = runStudy(
      { chart: c.chart, params: c.chartParams, rules: c.rules, spec },
      baseline.map((p) => p.members),
      new Set(exclusions.map((e) => e.index)),
    );
    return { baseline, outcome, spec };
  } catch (e) {
    if (e instanceof StudyError) throw invalid(e.path, e.message);
    throw e;
  }
}

/** A trial study: nothing is stored. */
export async function trialStudy(
  id: number,
  input: { baselineFrom: string; baselineTo: string; exclusions: { index: number; reason: string }[] },
): Promise<StudyResult> {
  const c = await getCharacteristic(id);
  const fromMs = Date.parse(input.baselineFrom);
  const toMs = Date.parse(input.baselineTo);
  const { baseline, outcome, spec } = await studyFor(c, fromMs, toMs, input.exclusions);
  const excluded = new Set(input.exclusions.map((e) => e.index));
  return {
    characteristicId: id,
    baselineFrom: new Date(fromMs).toISOString(),
    baselineTo: new Date(toMs).toISOString(),
    points: baseline.map(({ members: _m, ...p }, i) => {
      const j = outcome.points[i]!;
      return {
        ...p,
        value: j.value,
        dispersion: j.dispersionValue,
        center: j.center,
        ucl: j.ucl,
        lcl: j.lcl,
        trialViolations: j.violations,
        excludedInStudy: excluded.has(i + 1),
      };
    }),
    limits: { center: outcome.limitSet.center, ucl: outcome.limitSet.ucl, lcl: outcome.limitSet.lcl },
    dispersion: outcome.limitSet.dispersion,
    sigma: outcome.limitSet.sigma,
    n: outcome.limitSet.subgroupSize,
    params: c.chartParams,
    suggested: outcome.suggested,
    exclusions: input.exclusions,
    capability: outcome.capability,
    spec,
    includedPoints: outcome.includedPoints,
    notes: outcome.notes,
    evaluation: outcome.evaluation,
  };
}

/** Save a study as a draft limit set (the next version); nothing is in force until it is approved. */
export async function draftLimitSet(
  user: SessionUser,
  id: number,
  input: { baselineFrom: string; baselineTo: string; exclusions: { index: number; reason: string }[]; note: string },
  address: string | null,
): Promise<LimitSetView> {
  const c = await getCharacteristic(id);
  const fromMs = Date.parse(input.baselineFrom);
  const toMs = Date.parse(input.baselineTo);
  const { baseline, outcome } = await studyFor(c, fromMs, toMs, input.exclusions);
  return draftLimitSetAudited(sequelize(), actorOf(user, address), {
    characteristicId: id,
    chart: c.chart,
    limitSet: outcome.limitSet,
    params: c.chartParams,
    baselineFromMs: fromMs,
    baselineToMs: toMs,
    baselineFirstIndex: baseline[0]?.index ?? null,
    baselineLastIndex: baseline[baseline.length - 1]?.index ?? null,
    baselinePoints: baseline.length,
    excluded: input.exclusions,
    suggested: outcome.suggested,
    capability: outcome.capability,
    note: input.note,
    createdBy: user.id,
  });
}

/**
 * Approve a draft with the engineer's electronic signature. The previous approved set is
 * superseded but stays readable and keeps governing the points before the new effective-from.
 */
export async function approveLimitSet(
  user: SessionUser,
  id: number,
  setId: number,
  input: ApproveLimitSet,
  address: string | null,
): Promise<LimitSetView> {
  const pool = sequelize();
  const draft = await getLimitSet(pool, setId);
  if (!draft || draft.characteristicId !== id)
    throw new HttpProblem(404, 'Not found', 'No such limit set for this characteristic.');
  if (draft.status !== 'draft')
    throw new HttpProblem(
      409,
      'Already decided',
      `Limit set v${draft.version} is ${draft.status}; study again to make a new draft.`,
    );
  const c = await getCharacteristic(id);
  if (c.chart !== draft.chart)
    throw new HttpProblem(409, 'Chart changed', 'The characteristic’s chart type changed since this draft; study again.');
  const last = await lastPointOf(pool, id);
  const sets = setsInForceOrder(await limitSetsOf(pool, id));
  const previous = sets[sets.length - 1];
  const floorMs = Math.max(
    last ? last.tMs + 1 : 0,
    previous?.effectiveFromMs !== null && previous ? previous.effectiveFromMs! + 1 : 0,
  );
  let effectiveFromMs: number;
  if (input.effectiveFrom) {
    effectiveFromMs = Date.parse(input.effectiveFrom);
    if (effectiveFromMs < floorMs) {
      throw invalid(
        'effectiveFrom',
        `Limits cannot take effect before points already judged (the latest is at ${new Date(floorMs - 1).toISOString()}); past points are never re-judged.`,
      );
    }
  } else {
    effectiveFromMs = Math.max(Date.now(), floorMs);
  }
  const signature = await signWithPassword(user, input.password, input.meaning, address);
  return approveLimitSetAudited(sequelize(), actorOf(user, address), setId, signature, effectiveFromMs, previous ?? null);
}

/** Discard a draft that will not be approved (approved and superseded sets are permanent). */
export async function discardDraft(user: SessionUser, id: number, setId: number, address: string | null): Promise<void> {
  await discardDraftAudited(sequelize(), actorOf(user, address), id, setId);
}

export async function limitSetsFor(id: number): Promise<LimitSetView[]> {
  await getCharacteristic(id);
  return limitSetsOf(sequelize(), id);
}

export async function limitSetFor(id: number, setId: number): Promise<LimitSetView> {
  const s = await getLimitSet(sequelize(), setId);
  if (!s || s.characteristicId !== id) throw new HttpProblem(404, 'Not found', 'No such limit set for this characteristic.');
  return s;
}

/** What the printable capability report needs: the observations behind the capability summary. */
export async function capabilityReport(id: number, last: number) {
  const c = await getCharacteristic(id);
  const pool = sequelize();
  const [points, sets, timeZone] = await Promise.all([pointsWithMembers(id, last), limitSetsOf(pool, id), siteTimeZone()]);
  const newest = points[points.length - 1];
  const { spec, note } = await resolveSpec(pool, c, newest?.tMs ?? Date.now());
  const cap = capabilityOfPoints(c, points, sets, spec);
  const used = points.filter((p) => !p.excluded);
  return {
    characteristic: c,
    observations: used.flatMap((p) => p.members),
    pointsUsed: used.length,
    excludedPoints: points.length - used.length,
    fromMs: points[0]?.tMs ?? null,
    toMs: newest?.tMs ?? null,
    spec,
    specNote: note,
    capability: cap.capability,
    basis: cap.basis,
    inForce: setInForceAt(setsInForceOrder(sets), newest?.tMs ?? Date.now()),
    timeZone,
  };
}
