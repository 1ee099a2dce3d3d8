/**
 * SPC persistence shared by the ingest worker, the web services and the seed: characteristics,
 * versioned limit sets and plotted points. Worker-safe — takes the Sequelize instance or a
 * transaction of it, imports no Astro env.
 *
 * Characteristics and limit sets are written through their models (`Characteristic`,
 * `LimitSet`). Point storage and the reads the judge loop runs for every subgroup stay SQL through
 * `sequelize.query` with bind parameters: points go in as one `jsonb_to_recordset` statement per
 * batch and come back with epoch milliseconds computed in the server (half the cost of turning
 * every timestamptz into a Date, measured in stack.md).
 *
 * Judging new subgroups (`recordSubgroups`) runs in one transaction under a per-characteristic
 * advisory lock, so two workers (or the worker and a closing oven load) never number points twice;
 * each subgroup is judged against the limit set in force when it closed (latest approved or
 * superseded set with `effective_from ≤ t`) — limits are never re-estimated here.
 */
import type { Transaction } from 'sequelize';
import { Characteristic, LimitSet } from '../../../db/models/index.ts';
import { judgeSubgroups, historyNeeded } from '../domain/control/phase2.ts';
import { formSubgroups, type FormedSubgroup, type SourceReading } from '../domain/control/subgroups.ts';
import { mean, range, sampleSd } from '../domain/spc/math.ts';
import { limitSetAt } from '../domain/series/limit-steps.ts';
import {
  CharacteristicInputSchema,
  type ChartParams,
  type ChartPoint,
  type CharacteristicChart,
  type CharacteristicFields,
  type LimitSetView,
  type SpecLimits,
  type SpecSource,
  type SubgroupRule,
} from '../shared/characteristics.ts';
import type { SpcLimitSet, SpcRuleId } from '../shared/spc.ts';
import { windowInForce } from './window-store.ts';
import { execute, inTransaction, select, txOpt, type AnyDb, type Db } from './db.ts';

type Queryable = AnyDb;

/** Lock namespace for per-characteristic advisory locks ("SPC" on a phone keypad). */
const LOCK_NS = 772;

/** A characteristic as stored (the worker's view). */
export interface CharacteristicRecord {
  id: number;
  name: string;
  description: string;
  assetId: number;
  channelIds: number[];
  subgroupRule: SubgroupRule;
  subgroupSize: number;
  chart: CharacteristicChart;
  chartParams: ChartParams;
  rules: SpcRuleId[];
  spec: SpecSource;
  unit: string;
  active: boolean;
  createdAt: string;
  updatedAt: string;
}

const CHAR_ATTRIBUTES = [
  'id',
  'name',
  'description',
  'assetId',
  'channelIds',
  'subgroupRule',
  'subgroupSize',
  'chart',
  'chartParams',
  'rules',
  'spec',
  'unit',
  'active',
  'createdAt',
  'updatedAt',
] as const;

function toCharacteristic(r: Record<string, unknown>): CharacteristicRecord {
  return {
    ...(r as unknown as CharacteristicRecord),
    createdAt: (r['createdAt'] as Date).toISOString(),
    updatedAt: (r['updatedAt'] as Date).toISOString(),
  };
}

export async function listCharacteristicRecords(db: Db, opts: { activeOnly?: boolean } = {}): Promise<CharacteristicRecord[]> {
  const rows = await Characteristic.findAll({
    attributes: [...CHAR_ATTRIBUTES],
    ...(opts.activeOnly ? { where: { active: true } } : {}),
    order: [['name', 'ASC']],
    raw: true,
    ...txOpt(db),
  });
  return rows.map((r) => toCharacteristic(r as unknown as Record<string, unknown>));
}

export async function getCharacteristicRecord(db: Db, id: number): Promise<CharacteristicRecord | null> {
  const r = await Characteristic.findByPk(id, { attributes: [...CHAR_ATTRIBUTES], raw: true, ...txOpt(db) });
  return r ? toCharacteristic(r as unknown as Record<string, unknown>) : null;
}

/**
 * The top-level asset (line, oven or coater) above a channel's asset — the asset a
 * characteristic belongs to for grouping and alarm context.
 */
export async function topAssetOfChannel(pool: Queryable, channelId: number): Promise<number | null> {
  const rows = await select<{ id: number }>(
    pool,
    `with recursive up as (
       select a.id, a.parent_id, 0 as depth from channels c join assets a on a.id = c.asset_id where c.id = $1
       union all
       select a.id, a.parent_id, up.depth + 1 from assets a join up on a.id = up.parent_id)
     select id from up order by (parent_id is null) desc, depth desc limit 1`,
    [channelId],
  );
  return rows[0]?.id ?? null;
}

/** Insert a characteristic (validated fields); returns its id. */
export async function insertCharacteristic(
  db: Db,
  fields: CharacteristicFields,
  assetId: number,
  createdBy: number | null,
): Promise<number> {
  const f = CharacteristicInputSchema.parse(fields);
  const row = await Characteristic.create(
    {
      name: f.name,
      description: f.description,
      assetId,
      channelIds: f.channelIds,
      subgroupRule: f.subgroupRule,
      subgroupSize: f.subgroupSize,
      chart: f.chart,
      chartParams: f.chartParams,
      rules: f.rules,
      spec: f.spec,
      unit: f.unit,
      active: f.active,
      createdBy,
    },
    { ...txOpt(db) },
  );
  return row.id;
}

/** Replace a characteristic's fields (validated by the caller). Returns false when it does not exist. */
export async function updateCharacteristicRow(
  db: Db,
  id: number,
  fields: Omit<CharacteristicFields, 'backfillDays'>,
  assetId: number,
): Promise<boolean> {
  const [n] = await Characteristic.update(
    {
      name: fields.name,
      description: fields.description,
      assetId,
      channelIds: fields.channelIds,
      subgroupRule: fields.subgroupRule,
      subgroupSize: fields.subgroupSize,
      chart: fields.chart,
      chartParams: fields.chartParams,
      rules: fields.rules,
      spec: fields.spec,
      unit: fields.unit,
      active: fields.active,
      updatedAt: new Date(),
    },
    { where: { id }, ...txOpt(db) },
  );
  return n > 0;
}

// --- limit sets -----------------------------------------------------------------------------

function iso(d: unknown): string | null {
  return d instanceof Date ? d.toISOString() : null;
}

function toLimitSet(r: Record<string, unknown>): LimitSetView {
  const dc = r['dispersionCenter'] as number | null;
  const eff = r['effectiveFrom'] as Date | null;
  return {
    id: r['id'] as number,
    characteristicId: r['characteristicId'] as number,
    version: r['version'] as number,
    status: r['status'] as LimitSetView['status'],
    chart: r['chart'] as CharacteristicChart,
    center: r['center'] as number,
    ucl: r['ucl'] as number,
    lcl: r['lcl'] as number,
    dispersion: dc === null ? null : { center: dc, ucl: r['dispersionUcl'] as number, lcl: r['dispersionLcl'] as number },
    sigma: r['sigma'] as number | null,
    n: r['n'] as number,
    params: r['params'] as ChartParams,
    baselineFrom: iso(r['baselineFrom'])!,
    baselineTo: iso(r['baselineTo'])!,
    baselineFirstIndex: r['baselineFirstIndex'] as number | null,
    baselineLastIndex: r['baselineLastIndex'] as number | null,
    baselinePoints: r['baselinePoints'] as number,
    excluded: r['excluded'] as LimitSetView['excluded'],
    suggested: r['suggested'] as LimitSetView['suggested'],
    capability: r['capability'] as LimitSetView['capability'],
    note: r['note'] as string,
    effectiveFrom: iso(eff),
    effectiveFromMs: eff ? eff.getTime() : null,
    approvedSignature: r['approvedSignature'] as LimitSetView['approvedSignature'],
    approvedAt: iso(r['approvedAt']),
    seeded: r['seeded'] as boolean,
    createdAt: iso(r['createdAt'])!,
  };
}

/** Every limit set of a characteristic (drafts included), newest version first. */
export async function limitSetsOf(db: Db, characteristicId: number): Promise<LimitSetView[]> {
  const rows = await LimitSet.findAll({
    where: { characteristicId },
    attributes: { exclude: ['createdBy'] },
    order: [['version', 'DESC']],
    raw: true,
    ...txOpt(db),
  });
  return rows.map((r) => toLimitSet(r as unknown as Record<string, unknown>));
}

export async function getLimitSet(db: Db, id: number): Promise<LimitSetView | null> {
  const r = await LimitSet.findByPk(id, { attributes: { exclude: ['createdBy'] }, raw: true, ...txOpt(db) });
  return r ? toLimitSet(r as unknown as Record<string, unknown>) : null;
}

/** The library's limit-set shape of a stored set. */
export function toSpcLimitSet(ls: LimitSetView): SpcLimitSet {
  const base: SpcLimitSet = {
    chart: ls.chart,
    center: ls.center,
    ucl: ls.ucl,
    lcl: ls.lcl,
    sigma: ls.sigma,
    subgroupSize: ls.n,
    dispersion: ls.dispersion,
  };
  if (ls.chart === 'ewma') return { ...base, lambda: ls.params.lambda, L: ls.params.L, ewmaLimits: ls.params.limits };
  if (ls.chart === 'cusum') return { ...base, k: ls.params.k, h: ls.params.h, headStart: ls.params.headStart };
  return base;
}

/** Sets that have been in force (approved or superseded), oldest effective first. */
export function setsInForceOrder(sets: readonly LimitSetView[]): LimitSetView[] {
  return sets
    .filter((s) => s.status !== 'draft' && s.effectiveFromMs !== null)
    .sort((a, b) => a.effectiveFromMs! - b.effectiveFromMs! || a.version - b.version);
}

/**
 * The set in force at `tMs` among `ordered` (from `setsInForceOrder`), or null: the domain's
 * tested `limitSetAt` (latest effective-from ≤ t; at a tie the later in the order, i.e. the
 * higher version, wins).
 */
export function setInForceAt(ordered: readonly LimitSetView[], tMs: number): LimitSetView | null {
  return limitSetAt(ordered as readonly (LimitSetView & { effectiveFromMs: number })[], tMs);
}

export interface NewLimitSet {
  characteristicId: number;
  chart: CharacteristicChart;
  limitSet: SpcLimitSet;
  params: ChartParams;
  baselineFromMs: number;
  baselineToMs: number;
  baselineFirstIndex: number | null;
  baselineLastIndex: number | null;
  baselinePoints: number;
  excluded: { index: number; reason: string }[];
  suggested: unknown[];
  capability: unknown;
  note: string;
  createdBy: number | null;
}

/** Store a drafted set as the next version (numbered under a per-characteristic lock); returns it. */
export async function insertDraftLimitSet(db: Db, s: NewLimitSet): Promise<LimitSetView> {
  return inTransaction(db, async (t) => {
    await execute(t, 'select pg_advisory_xact_lock($1, $2)', [LOCK_NS + 1, s.characteristicId]);
    const latest = await LimitSet.max<number | null, LimitSet>('version', {
      where: { characteristicId: s.characteristicId },
      transaction: t,
    });
    const ls = s.limitSet;
    const row = await LimitSet.create(
      {
        characteristicId: s.characteristicId,
        version: (latest ?? 0) + 1,
        status: 'draft',
        chart: s.chart,
        center: ls.center,
        ucl: ls.ucl,
        lcl: ls.lcl,
        dispersionCenter: ls.dispersion?.center ?? null,
        dispersionUcl: ls.dispersion?.ucl ?? null,
        dispersionLcl: ls.dispersion?.lcl ?? null,
        sigma: ls.sigma,
        n: ls.subgroupSize,
        params: s.params,
        baselineFrom: new Date(s.baselineFromMs),
        baselineTo: new Date(s.baselineToMs),
        baselineFirstIndex: s.baselineFirstIndex,
        baselineLastIndex: s.baselineLastIndex,
        baselinePoints: s.baselinePoints,
        excluded: s.excluded,
        suggested: s.suggested,
        capability: s.capability,
        note: s.note,
        effectiveFrom: null,
        approvedSignature: null,
        approvedAt: null,
        createdBy: s.createdBy,
      },
      { transaction: t },
    );
    return (await getLimitSet(t, row.id))!;
  });
}

/**
 * Approve a draft: the previous approved set becomes superseded (it stays readable and keeps its
 * effective-from), the draft's excluded points are marked on the chart. Runs inside `t`.
 */
export async function approveLimitSetRow(
  t: Transaction,
  id: number,
  signature: object,
  effectiveFromMs: number,
  seeded = false,
): Promise<LimitSetView> {
  const draft = await LimitSet.findByPk(id, { transaction: t, lock: t.LOCK.UPDATE });
  if (!draft) throw new Error(`limit set ${id} not found`);
  if (draft.status !== 'draft') throw new Error(`limit set ${id} is not a draft`);
  await LimitSet.update(
    { status: 'superseded' },
    { where: { characteristicId: draft.characteristicId, status: 'approved' }, transaction: t },
  );
  await draft.update(
    {
      status: 'approved',
      effectiveFrom: new Date(effectiveFromMs),
      approvedSignature: signature,
      approvedAt: new Date(),
      seeded,
    },
    { transaction: t },
  );
  const approved = (await getLimitSet(t, id))!;
  if (approved.excluded.length > 0 && approved.baselineFirstIndex !== null) {
    // Exclusion indexes are 1-based within the baseline; the baseline starts at baselineFirstIndex.
    const idx = approved.excluded.map((e) => approved.baselineFirstIndex! + e.index - 1);
    const reasons = approved.excluded.map((e) => `${e.reason} (limit set v${approved.version})`);
    await execute(
      t,
      `update spc_points p set excluded = true, exclusion_reason = x.reason
         from unnest($2::int[], $3::text[]) as x(idx, reason)
        where p.characteristic_id = $1 and p.idx = x.idx`,
      [approved.characteristicId, idx, reasons],
    );
  }
  return approved;
}

/** Delete a draft limit set (approved and superseded sets are permanent). Returns false when it was not a draft. */
export async function deleteDraftLimitSet(db: Db, id: number): Promise<boolean> {
  return (await LimitSet.destroy({ where: { id, status: 'draft' }, ...txOpt(db) })) > 0;
}

// --- points ---------------------------------------------------------------------------------

const POINT_COLUMNS = `id, idx as "index", (extract(epoch from t) * 1000)::float8 as "tMs", (extract(epoch from t_from) * 1000)::float8 as "tFromMs",
  value, observation, dispersion, n, center, ucl, lcl, violations, limit_set_id as "limitSetId", excluded,
  exclusion_reason as "exclusionReason", dip_run_id as "dipRunId", oven_load_id as "ovenLoadId", extra`;

function toPoint(r: Record<string, unknown>): ChartPoint {
  return { ...(r as unknown as ChartPoint), id: Number(r['id']) };
}

export async function lastPointOf(
  pool: Queryable,
  characteristicId: number,
): Promise<{ index: number; tMs: number; key: string | null; observation: number } | null> {
  const rows = await select<{ index: number; tMs: number; key: string | null; observation: number }>(
    pool,
    `select idx as "index", (extract(epoch from t) * 1000)::float8 as "tMs", subgroup_key as key, observation
       from spc_points where characteristic_id = $1 order by idx desc limit 1`,
    [characteristicId],
  );
  return rows[0] ?? null;
}

/** Points in a time range (inclusive), or the most recent `last` points, in index order. */
export async function pointsOf(
  pool: Queryable,
  characteristicId: number,
  q: { fromMs?: number; toMs?: number; last?: number },
): Promise<ChartPoint[]> {
  if (q.fromMs !== undefined || q.toMs !== undefined) {
    const rows = await select<Record<string, unknown>>(
      pool,
      `select ${POINT_COLUMNS} from spc_points where characteristic_id = $1 and t >= $2 and t <= $3 order by idx limit 20000`,
      [characteristicId, new Date(q.fromMs ?? 0), new Date(q.toMs ?? 8.64e15)],
    );
    return rows.map(toPoint);
  }
  const rows = await select<Record<string, unknown>>(
    pool,
    `select * from (select ${POINT_COLUMNS} from spc_points where characteristic_id = $1 order by idx desc limit $2) p order by "index"`,
    [characteristicId, q.last ?? 200],
  );
  return rows.map(toPoint);
}

/** Members (subgroup values) of the points in a time range, in index order, with their index. */
export async function baselineOf(
  pool: Queryable,
  characteristicId: number,
  fromMs: number,
  toMs: number,
): Promise<(ChartPoint & { members: number[] })[]> {
  const rows = await select<Record<string, unknown>>(
    pool,
    `select ${POINT_COLUMNS}, members from spc_points where characteristic_id = $1 and t >= $2 and t <= $3 order by idx limit 20000`,
    [characteristicId, new Date(fromMs), new Date(toMs)],
  );
  return rows.map((r) => ({ ...toPoint(r), members: r.members as number[] }));
}

export async function pointById(
  pool: Queryable,
  characteristicId: number,
  pointId: number,
): Promise<(ChartPoint & { members: number[]; readings: unknown[]; key: string | null }) | null> {
  const rows = await select<Record<string, unknown>>(
    pool,
    `select ${POINT_COLUMNS}, members, readings, subgroup_key as key from spc_points where characteristic_id = $1 and id = $2`,
    [characteristicId, pointId],
  );
  const r = rows[0];
  return r
    ? { ...toPoint(r), members: r.members as number[], readings: r.readings as unknown[], key: r.key as string | null }
    : null;
}

export async function countPoints(pool: Queryable, characteristicId: number): Promise<number> {
  const rows = await select<{ n: number }>(pool, `select count(*)::int as n from spc_points where characteristic_id = $1`, [
    characteristicId,
  ]);
  return rows[0]?.n ?? 0;
}

/** A subgroup to be judged and stored. */
export interface NewSubgroup extends Omit<FormedSubgroup, 'readings'> {
  readings: unknown[];
  dipRunId?: number | null;
  ovenLoadId?: number | null;
}

/** A point as judged, before it is stored (also what the seed inserts in bulk). */
export interface PointRow {
  characteristicId: number;
  index: number;
  tMs: number;
  tFromMs: number | null;
  value: number;
  observation: number;
  dispersion: number | null;
  n: number;
  members: number[];
  readings: unknown[];
  extra: Record<string, unknown>;
  center: number | null;
  ucl: number | null;
  lcl: number | null;
  violations: string[];
  limitSetId: number | null;
  excluded: boolean;
  exclusionReason: string | null;
  key: string | null;
  dipRunId: number | null;
  ovenLoadId: number | null;
}

/** Statistic of a subgroup with no limit set in force (plotted, not judged). */
function unjudged(
  chart: CharacteristicChart,
  members: readonly number[],
  previousObservation: number | null,
): { value: number; dispersion: number | null } {
  const value = mean(members);
  if (members.length > 1) return { value, dispersion: chart === 'xbar-s' ? sampleSd(members) : range(members) };
  return { value, dispersion: chart === 'imr' && previousObservation !== null ? Math.abs(value - previousObservation) : null };
}

/**
 * Judge subgroups (oldest first) for a characteristic, continuing after `after` (its last point)
 * against `sets` (all its limit sets). `historyFor(setId, keep)` supplies the members of the points
 * already judged under a set (oldest first; the last `keep` when keep is a number). Pure apart from
 * that callback, so the seed can run it in memory.
 */
export async function judgeForStorage(
  c: Pick<CharacteristicRecord, 'id' | 'chart' | 'rules'>,
  subgroups: readonly NewSubgroup[],
  after: { index: number; observation: number } | null,
  sets: readonly LimitSetView[],
  historyFor: (setId: number, keep: number | null) => Promise<number[][]>,
): Promise<PointRow[]> {
  const ordered = setsInForceOrder(sets);
  const out: PointRow[] = [];
  let index = after?.index ?? 0;
  let prevObs = after?.observation ?? null;
  // Group consecutive subgroups that fall under the same set.
  let i = 0;
  while (i < subgroups.length) {
    const set = setInForceAt(ordered, subgroups[i]!.tMs);
    let j = i + 1;
    while (j < subgroups.length && setInForceAt(ordered, subgroups[j]!.tMs)?.id === set?.id) j += 1;
    const group = subgroups.slice(i, j);
    if (set) {
      const spcSet = toSpcLimitSet(set);
      const history = await historyFor(set.id, historyNeeded(set.chart));
      // Members judged earlier in this same call are history too.
      const local = out.filter((p) => p.limitSetId === set.id).map((p) => p.members);
      const judged = judgeSubgroups(
        spcSet,
        c.rules,
        [...history, ...local],
        group.map((g) => g.values),
      );
      judged.forEach((p, k) => {
        const g = group[k]!;
        index += 1;
        const observation = p.observation ?? mean(g.values);
        out.push(
          row(c.id, index, g, {
            value: p.value,
            observation: set.chart === 'ewma' ? observation : set.chart === 'cusum' ? p.value : p.value,
            dispersion: p.dispersionValue,
            center: p.center,
            ucl: p.ucl,
            lcl: p.lcl,
            violations: p.violations,
            limitSetId: set.id,
            extra:
              set.chart === 'cusum'
                ? { cPlus: p.cPlus, cMinus: p.cMinus, nPlus: p.nPlus, nMinus: p.nMinus, shiftEstimate: p.shiftEstimate ?? null }
                : {},
          }),
        );
        prevObs = set.chart === 'ewma' ? observation : p.value;
      });
    } else {
      for (const g of group) {
        index += 1;
        const u = unjudged(c.chart, g.values, prevObs);
        out.push(
          row(c.id, index, g, {
            value: u.value,
            observation: u.value,
            dispersion: u.dispersion,
            center: null,
            ucl: null,
            lcl: null,
            violations: [],
            limitSetId: null,
            extra: {},
          }),
        );
        prevObs = u.value;
      }
    }
    i = j;
  }
  return out;
}

function row(
  characteristicId: number,
  index: number,
  g: NewSubgroup,
  j: Pick<PointRow, 'value' | 'observation' | 'dispersion' | 'center' | 'ucl' | 'lcl' | 'violations' | 'limitSetId' | 'extra'>,
): PointRow {
  return {
    characteristicId,
    index,
    tMs: g.tMs,
    tFromMs: g.tFromMs,
    n: g.values.length,
    members: [...g.values],
    readings: g.readings,
    excluded: false,
    exclusionReason: null,
    key: g.key,
    dipRunId: g.dipRunId ?? null,
    ovenLoadId: g.ovenLoadId ?? null,
    ...j,
  };
}

/** Insert judged points in one statement (idempotent on the subgroup key); returns the stored points. */
export async function insertPointRows(client: Queryable, rows: readonly PointRow[]): Promise<ChartPoint[]> {
  if (rows.length === 0) return [];
  const payload = rows.map((r) => ({
    characteristic_id: r.characteristicId,
    idx: r.index,
    t: new Date(r.tMs).toISOString(),
    t_from: r.tFromMs === null ? null : new Date(r.tFromMs).toISOString(),
    value: r.value,
    observation: r.observation,
    dispersion: r.dispersion,
    n: r.n,
    members: r.members,
    readings: r.readings,
    extra: r.extra,
    center: r.center,
    ucl: r.ucl,
    lcl: r.lcl,
    violations: r.violations,
    limit_set_id: r.limitSetId,
    excluded: r.excluded,
    exclusion_reason: r.exclusionReason,
    subgroup_key: r.key,
    dip_run_id: r.dipRunId,
    oven_load_id: r.ovenLoadId,
  }));
  const stored = await select<Record<string, unknown>>(
    client,
    `insert into spc_points (characteristic_id, idx, t, t_from, value, observation, dispersion, n, members, readings, extra, center, ucl, lcl,
        violations, limit_set_id, excluded, exclusion_reason, subgroup_key, dip_run_id, oven_load_id)
     select characteristic_id, idx, t, t_from, value, observation, dispersion, n, members, readings, extra, center, ucl, lcl,
        violations, limit_set_id, excluded, exclusion_reason, subgroup_key, dip_run_id, oven_load_id
       from jsonb_to_recordset($1::jsonb) as x(characteristic_id int, idx int, t timestamptz, t_from timestamptz, value float8, observation float8,
        dispersion float8, n int, members float8[], readings jsonb, extra jsonb, center float8, ucl float8, lcl float8, violations text[],
        limit_set_id int, excluded boolean, exclusion_reason text, subgroup_key text, dip_run_id int, oven_load_id int)
     on conflict do nothing
     returning ${POINT_COLUMNS}`,
    [JSON.stringify(payload)],
  );
  return stored.map(toPoint).sort((a, b) => a.index - b.index);
}

/**
 * Judge and store new subgroups of a characteristic (oldest first). Subgroups that close at or
 * before the last stored point, or whose key is already stored, are ignored. Returns the stored points.
 */
export async function recordSubgroups(db: Db, c: CharacteristicRecord, subgroups: readonly NewSubgroup[]): Promise<ChartPoint[]> {
  if (subgroups.length === 0) return [];
  return inTransaction(db, async (t) => {
    await execute(t, 'select pg_advisory_xact_lock($1, $2)', [LOCK_NS, c.id]);
    const last = await lastPointOf(t, c.id);
    let fresh = [...subgroups].sort((a, b) => a.tMs - b.tMs).filter((s) => last === null || s.tMs > last.tMs);
    if (fresh.length > 0) {
      const keys = fresh.map((s) => s.key).filter((k): k is string => !!k);
      if (keys.length > 0) {
        const rows = await select<{ k: string }>(
          t,
          `select subgroup_key as k from spc_points where characteristic_id = $1 and subgroup_key = any($2)`,
          [c.id, keys],
        );
        const seen = new Set(rows.map((r) => r.k));
        fresh = fresh.filter((s) => !s.key || !seen.has(s.key));
      }
    }
    if (fresh.length === 0) return [];
    const sets = await limitSetsOf(t, c.id);
    const rows = await judgeForStorage(c, fresh, last, sets, async (setId, keep) => {
      const r = await select<{ members: number[] }>(
        t,
        keep === null
          ? `select members from spc_points where characteristic_id = $1 and limit_set_id = $2 order by idx`
          : `select members from (select idx, members from spc_points where characteristic_id = $1 and limit_set_id = $2 order by idx desc limit $3) h order by idx`,
        keep === null ? [c.id, setId] : [c.id, setId, keep],
      );
      return r.map((x) => x.members);
    });
    return insertPointRows(t, rows);
  });
}

/** Readings of the source channels strictly after `afterMs` (at most `limit`, oldest first). */
export async function sourceReadingsAfter(
  pool: Queryable,
  channelIds: readonly number[],
  afterMs: number,
  limit = 5000,
): Promise<SourceReading[]> {
  const rows = await select<SourceReading>(
    pool,
    `select channel_id as "channelId", (extract(epoch from ts) * 1000)::float8 as "tMs", value
       from readings where channel_id = any($1::int[]) and ts > $2 and quality = 0 order by ts, channel_id limit $3`,
    [channelIds, new Date(afterMs), limit],
  );
  return rows;
}

/** Most readings a back-fill reads (the newest ones when there are more). */
export const BACKFILL_MAX_READINGS = 200_000;

/**
 * Plot a new characteristic's points from stored history since `fromMs` (readings, or closed oven
 * loads), unjudged unless a limit set is in force. Returns the number of points stored.
 */
export async function backfillCharacteristic(pool: Db, c: CharacteristicRecord, fromMs: number, nowMs: number): Promise<number> {
  if (c.subgroupRule.kind === 'per-oven-load') {
    const pending = await pendingLoadSubgroups(pool, c, fromMs);
    return (await recordSubgroups(pool, c, pending)).length;
  }
  const rows = await select<SourceReading>(
    pool,
    `select * from (select channel_id as "channelId", (extract(epoch from ts) * 1000)::float8 as "tMs", value
       from readings where channel_id = any($1::int[]) and ts > $2 and quality = 0 order by ts desc limit $3) r order by "tMs", "channelId"`,
    [c.channelIds, new Date(fromMs), BACKFILL_MAX_READINGS],
  );
  const formed = formSubgroups(c.subgroupRule, c.subgroupSize, rows, null, nowMs);
  const stored = await recordSubgroups(
    pool,
    c,
    formed.map((f) => ({ ...f, readings: f.readings.map((r) => ({ c: r.channelId, t: r.tMs, v: r.value })) })),
  );
  return stored.length;
}

/** How far back a characteristic looks for readings when it has no point yet. */
export function firstLookbackMs(rule: SubgroupRule): number {
  if (rule.kind === 'per-n-minutes') return 2 * rule.minutes * 60_000;
  if (rule.kind === 'per-manual-check') return Math.max(rule.minSpacingMinutes, 10) * 60_000;
  return 10 * 60_000;
}

/**
 * Form and record whatever subgroups of `c` are complete at `nowMs` from its source readings.
 * Stateless: re-reads the readings after the last point every time.
 */
export async function advanceCharacteristic(pool: Db, c: CharacteristicRecord, nowMs: number): Promise<ChartPoint[]> {
  if (c.subgroupRule.kind === 'per-oven-load') return [];
  const last = await lastPointOf(pool, c.id);
  const after = last?.tMs ?? nowMs - firstLookbackMs(c.subgroupRule);
  const readings = await sourceReadingsAfter(pool, c.channelIds, after);
  const formed = formSubgroups(c.subgroupRule, c.subgroupSize, readings, last ? { tMs: last.tMs, key: last.key } : null, nowMs);
  if (formed.length === 0) return [];
  return recordSubgroups(
    pool,
    c,
    formed.map((f) => ({ ...f, readings: f.readings.map((r) => ({ c: r.channelId, t: r.tMs, v: r.value })) })),
  );
}

/**
 * One subgroup per closed oven load (for the loads service): `values` are the soak readings (or
 * per-zone soak means) of the load; the plotted observation is their mean. Idempotent per load.
 * Returns the stored point, or null when the load was already recorded or is older than the last point.
 */
export async function recordLoadSubgroup(
  pool: Db,
  characteristicId: number,
  loadId: number,
  values: readonly number[],
  opts: { tMs?: number; tFromMs?: number | null } = {},
): Promise<ChartPoint | null> {
  const c = await getCharacteristicRecord(pool, characteristicId);
  if (!c || values.length === 0) return null;
  const tMs = opts.tMs ?? Date.now();
  const stored = await recordSubgroups(pool, c, [
    {
      values: [mean(values)],
      tFromMs: opts.tFromMs ?? tMs,
      tMs,
      readings: values.length <= 2000 ? values.map((v) => ({ v })) : [{ n: values.length }],
      key: `load:${loadId}`,
      ovenLoadId: loadId,
    },
  ]);
  return stored[0] ?? null;
}

/**
 * Closed oven loads of a per-oven-load characteristic that have no point yet, each with the mean
 * of the source channels over the load's soak (the span the cure record gives: the coldest
 * thermocouple at or above the recipe's minimum cure temperature). Uses the loads service's
 * `oven_loads` table; a load whose record is not computed yet stops the scan (points stay in
 * time order), a load without a soak (never reached temperature, or no window) gives no point —
 * its cure alarm tells that story.
 */
export async function pendingLoadSubgroups(pool: Queryable, c: CharacteristicRecord, afterMs: number): Promise<NewSubgroup[]> {
  const rows = await select<{
    id: number;
    computed: boolean;
    fromMs: number | null;
    toMs: number | null;
    tMs: number;
    n: number | null;
    avg: number | null;
  }>(
    pool,
    `with oven as (
       select a.id from assets a where a.id = $1 and a.kind = 'oven'
       union select a.parent_id from assets a where a.id = $1 and a.kind = 'zone'),
     loads as (
       select l.id, l.closed_at, l.computed_at is not null as computed,
              (l.record->'soak'->>'startMs')::float8 as s_from, (l.record->'soak'->>'endMs')::float8 as s_to
         from oven_loads l
        where l.oven_asset_id in (select id from oven) and l.status = 'closed' and l.closed_at > $2
          and not exists (select 1 from spc_points p where p.characteristic_id = $3 and p.subgroup_key = 'load:' || l.id)
        order by l.closed_at limit 50)
     select l.id, l.computed, l.s_from as "fromMs", l.s_to as "toMs", (extract(epoch from l.closed_at) * 1000)::float8 as "tMs", r.n::int as n, r.avg
       from loads l
       left join lateral (select count(*) as n, avg(value) as avg from readings
                           where l.s_from is not null and channel_id = any($4::int[])
                             and ts >= to_timestamp(l.s_from / 1000) and ts <= to_timestamp(l.s_to / 1000)) r on true
      order by l.closed_at`,
    [c.assetId, new Date(afterMs), c.id, c.channelIds],
  );
  const out: NewSubgroup[] = [];
  for (const r of rows) {
    if (!r.computed) break;
    if (r.fromMs === null || r.toMs === null || r.avg === null || !r.n) continue;
    out.push({
      values: [r.avg],
      tFromMs: r.fromMs,
      tMs: r.tMs,
      readings: [{ n: r.n, mean: r.avg, soakFromMs: r.fromMs, soakToMs: r.toMs }],
      key: `load:${r.id}`,
      ovenLoadId: r.id,
    });
  }
  return out;
}

// --- specification --------------------------------------------------------------------------

/** The specification of a characteristic at `atMs` (fixed, or from the process window in force). */
export async function resolveSpec(
  pool: Queryable,
  c: Pick<CharacteristicRecord, 'spec' | 'channelIds' | 'assetId'>,
  atMs: number,
): Promise<{ spec: SpecLimits | null; note: string | null }> {
  const s = c.spec;
  if (s.mode === 'none') return { spec: null, note: 'No specification is set for this characteristic.' };
  if (s.mode === 'fixed') {
    const spec: SpecLimits = {};
    if (s.lsl !== undefined) spec.lsl = s.lsl;
    if (s.usl !== undefined) spec.usl = s.usl;
    if (s.target !== undefined) spec.target = s.target;
    return { spec, note: null };
  }
  const rows = await select<{ asset_id: number }>(pool, `select asset_id from channels where id = $1`, [c.channelIds[0]]);
  const assetId = rows[0]?.asset_id ?? c.assetId;
  const w = await windowInForce(pool, assetId, atMs);
  if (!w)
    return { spec: null, note: 'The specification comes from the process window, but no window is in force for this asset.' };
  const range = (w.limits as unknown as Record<string, { min: number; max: number; target?: number } | undefined>)[s.key];
  if (!range) return { spec: null, note: `The process window in force (${w.name} v${w.version}) sets no ${s.key} range.` };
  const spec: SpecLimits = { lsl: range.min, usl: range.max };
  if (range.target !== undefined) spec.target = range.target;
  return { spec, note: `From the process window ${w.name} v${w.version} (in force since ${w.effectiveFrom}).` };
}
