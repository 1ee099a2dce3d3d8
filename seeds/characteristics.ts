/**
 * Demo SPC: the three characteristics a hard-coat lab watches most, each with control limits
 * studied on the first week of the seeded history and approved (seeded signature of the demo
 * engineer, meaning "approved", marked `seeded`), and every historical point judged and stored —
 * so the control charts mean something on first start.
 *
 * - Line 1 withdrawal speed: one point per dip stroke (the line gateway publishes one mean per
 *   stroke), individuals chart, Western Electric rules 1–4, spec from the process window.
 * - Line 1 bath viscosity: one point per 10-minute check of the in-line viscometer, individuals
 *   chart, rule 1 only, σ from the overall spread of the baseline: the bath drifts by design
 *   between solvent top-ups (a sawtooth), so limits from the short-term σ would flag nearly every
 *   check; these limits flag an excursion beyond the usual sawtooth (a missed top-up). The
 *   capability panel's autocorrelation warning says why. Spec from the window.
 * - Oven A soak temperature: one point per oven load, the mean of both zone thermocouples over
 *   the soak (from the loads' cure records when loads are seeded, else from the plant model's
 *   cycle list that generated the history), individuals chart, WE 1–4.
 *
 * The limits take effect at the first baseline point, so the baseline is drawn against the limits
 * it produced (the Phase I picture) and later points are Phase II. Points the Phase I iteration
 * suggests excluding are excluded with that reason (the study says they were suggestions).
 *
 * Idempotent (does nothing when any of the three exists); `unseedCharacteristics` reverses it.
 * Runs after the history seed (it needs the readings).
 */
import type { Sequelize } from 'sequelize';
import type { SignatureRecord } from '../db/models/index.ts';
import { auditIn, withTransaction } from '../db/transaction.ts';
import { execute, select, type Db } from '../src/lib/core/db.ts';
import { runStudy } from '../src/lib/domain/control/study.ts';
import { formSubgroups, type FormedSubgroup, type SourceReading } from '../src/lib/domain/control/subgroups.ts';
import type { CharacteristicFields } from '../src/lib/shared/characteristics.ts';
import { CharacteristicInputSchema } from '../src/lib/shared/characteristics.ts';
import {
  getCharacteristicRecord,
  insertCharacteristic,
  insertDraftLimitSet,
  insertPointRows,
  judgeForStorage,
  resolveSpec,
  topAssetOfChannel,
  approveLimitSetRow,
  type NewSubgroup,
} from '../src/lib/core/spc-store.ts';
import { demoOvenCycles } from './plant-model.ts';

/** Length of the Phase I baseline at the start of the history. */
export const BASELINE_DAYS = 7;

interface DemoCharacteristic {
  fields: CharacteristicFields;
  channels: { asset: string; key: string }[];
}

export const DEMO_CHARACTERISTICS: DemoCharacteristic[] = [
  {
    channels: [{ asset: 'dip-1-hc', key: 'withdrawal-speed' }],
    fields: CharacteristicInputSchema.parse({
      name: 'Line 1 withdrawal speed',
      description:
        'Mean withdrawal speed of each dip stroke on line 1 (hard-coat bath). Film thickness follows it (Landau–Levich).',
      channelIds: [1],
      subgroupRule: { kind: 'per-dip-stroke' },
      subgroupSize: 1,
      chart: 'imr',
      rules: ['we1', 'we2', 'we3', 'we4'],
      spec: { mode: 'window', key: 'withdrawalSpeedMmS' },
      unit: 'mm/s',
    }),
  },
  {
    channels: [{ asset: 'dip-1-hc', key: 'viscosity' }],
    fields: CharacteristicInputSchema.parse({
      name: 'Line 1 bath viscosity',
      description:
        'Kinematic viscosity of the line 1 hard-coat bath at each 10-minute check (in-line viscometer). It creeps up as solvent evaporates until a top-up.',
      channelIds: [1],
      subgroupRule: { kind: 'per-manual-check', minSpacingMinutes: 10 },
      subgroupSize: 1,
      chart: 'imr',
      chartParams: { sigmaBasis: 'overall' },
      rules: ['we1'],
      spec: { mode: 'window', key: 'viscosityMm2S' },
      unit: 'mm²/s',
    }),
  },
  {
    channels: [
      { asset: 'oven-a-z1', key: 'air-temp' },
      { asset: 'oven-a-z2', key: 'air-temp' },
    ],
    fields: CharacteristicInputSchema.parse({
      name: 'Oven A soak temperature',
      description: 'Mean air temperature of both oven A zones over each load’s soak.',
      channelIds: [1, 2],
      subgroupRule: { kind: 'per-oven-load' },
      subgroupSize: 1,
      chart: 'imr',
      rules: ['we1', 'we2', 'we3', 'we4'],
      spec: { mode: 'window', key: 'cureSetpointC' },
      unit: '°C',
    }),
  },
];

export interface SeedCharacteristicsOptions {
  log?: (line: string) => void;
  nowMs?: number;
}

async function channelId(pool: Db, asset: string, key: string): Promise<number | null> {
  const rows = await select<{ id: number }>(
    pool,
    `select c.id from channels c join assets a on a.id = c.asset_id where a.code = $1 and c.key = $2`,
    [asset, key],
  );
  return rows[0]?.id ?? null;
}

async function readingsOf(pool: Db, ids: number[]): Promise<SourceReading[]> {
  const rows = await select<SourceReading>(
    pool,
    `select channel_id as "channelId", (extract(epoch from ts) * 1000)::float8 as "tMs", value from readings
      where channel_id = any($1::int[]) and quality = 0 order by ts, channel_id`,
    [ids],
  );
  return rows;
}

/** Oven A's soak means: from seeded loads when they exist, else from the plant model's cycles. */
async function soakSubgroups(pool: Db, ids: number[], nowMs: number): Promise<NewSubgroup[]> {
  const spans: { fromMs: number; toMs: number; endMs: number; key: string; loadId: number | null }[] = [];
  const hasLoads = (await select<{ ok: boolean }>(pool, `select to_regclass('oven_loads') is not null as ok`))[0]?.ok === true;
  if (hasLoads) {
    const rows = await select<{ id: number; fromMs: number; toMs: number; endMs: number }>(
      pool,
      `select l.id, (l.record->'soak'->>'startMs')::float8 as "fromMs", (l.record->'soak'->>'endMs')::float8 as "toMs",
              (extract(epoch from l.closed_at) * 1000)::float8 as "endMs"
         from oven_loads l join assets a on a.id = l.oven_asset_id
        where a.code = 'oven-a' and l.status = 'closed' and l.record->'soak'->>'startMs' is not null order by l.closed_at`,
    );
    for (const r of rows) spans.push({ fromMs: r.fromMs, toMs: r.toMs, endMs: r.endMs, key: `load:${r.id}`, loadId: r.id });
  }
  if (spans.length === 0) {
    for (const c of demoOvenCycles(nowMs).filter((x) => x.oven === 'oven-a')) {
      spans.push({ fromMs: c.soakStartMs, toMs: c.soakEndMs, endMs: c.loadEndMs, key: `cycle:${c.code}`, loadId: null });
    }
  }
  if (spans.length === 0) return [];
  const rows = await select<{ i: number; n: number; avg: number | null }>(
    pool,
    `select s.i, r.n::int as n, r.avg
       from unnest($2::float8[], $3::float8[]) with ordinality as s(f, t, i)
       cross join lateral (select count(*) as n, avg(value) as avg from readings
                            where channel_id = any($1::int[]) and ts >= to_timestamp(s.f / 1000) and ts <= to_timestamp(s.t / 1000) and quality = 0) r
      order by s.i`,
    [ids, spans.map((s) => s.fromMs), spans.map((s) => s.toMs)],
  );
  const out: NewSubgroup[] = [];
  for (const r of rows) {
    const s = spans[Number(r.i) - 1];
    if (!s || r.avg === null || r.n === 0) continue;
    out.push({
      values: [r.avg],
      tFromMs: s.fromMs,
      tMs: s.endMs,
      readings: [{ n: r.n, mean: r.avg, soakFromMs: s.fromMs, soakToMs: s.toMs }],
      key: s.key,
      ovenLoadId: s.loadId,
    });
  }
  return out;
}

/** Seed the three demo characteristics with approved limits and their history. Returns true when it seeded. */
export async function seedCharacteristics(sequelize: Sequelize, opts: SeedCharacteristicsOptions = {}): Promise<boolean> {
  const log = opts.log ?? (() => {});
  const nowMs = opts.nowMs ?? Date.now();
  const pool = sequelize;
  {
    const names = DEMO_CHARACTERISTICS.map((d) => d.fields.name);
    const existing = await select<Record<string, unknown>>(pool, `select 1 from characteristics where name = any($1::text[])`, [
      names,
    ]);
    if (existing.length > 0) return false;
    const eng = await select<{ id: number; username: string; displayName: string }>(
      pool,
      `select id, username, display_name as "displayName" from users where username = 'engineer'`,
    );
    const engineer = eng[0];
    if (!engineer) return false;
    const started = Date.now();
    for (const d of DEMO_CHARACTERISTICS) {
      const ids: number[] = [];
      for (const ch of d.channels) {
        const id = await channelId(pool, ch.asset, ch.key);
        if (id === null) return false;
        ids.push(id);
      }
      const fields: CharacteristicFields = { ...d.fields, channelIds: ids };
      const assetId = (await topAssetOfChannel(pool, ids[0]!))!;
      const seedActor = { id: engineer.id, label: `${engineer.username} (demo seed)` };
      await withTransaction(sequelize, async (t) => {
        const id = await insertCharacteristic(t, fields, assetId, engineer.id);
        const c = (await getCharacteristicRecord(t, id))!;
        let subgroups: NewSubgroup[];
        if (fields.subgroupRule.kind === 'per-oven-load') {
          subgroups = await soakSubgroups(pool, ids, nowMs);
        } else {
          const formed: FormedSubgroup[] = formSubgroups(
            fields.subgroupRule,
            fields.subgroupSize,
            await readingsOf(pool, ids),
            null,
            nowMs,
          );
          subgroups = formed.map((f) => ({ ...f, readings: f.readings.map((r) => ({ c: r.channelId, t: r.tMs, v: r.value })) }));
        }
        await auditIn(t, seedActor, { action: 'characteristic.create', entity: 'characteristic', entityId: id, after: fields });
        if (subgroups.length < 2) {
          log(`SPC seed: ${fields.name} has no history to study (${subgroups.length} points).`);
          return;
        }
        const firstMs = subgroups[0]!.tMs;
        const baselineEnd = firstMs + BASELINE_DAYS * 86_400_000;
        const baseline = subgroups.filter((s) => s.tMs <= baselineEnd);
        const { spec } = await resolveSpec(pool, c, baselineEnd);
        const first = runStudy(
          { chart: c.chart, params: c.chartParams, rules: c.rules, spec },
          baseline.map((s) => s.values),
          new Set(),
        );
        const exclusions = first.suggested.map((s) => ({
          index: s.index,
          reason: `Suggested by the Phase I iteration (round ${s.iteration}): ${s.reason}. Excluded in the seeded demo study.`,
        }));
        const study = runStudy(
          { chart: c.chart, params: c.chartParams, rules: c.rules, spec },
          baseline.map((s) => s.values),
          new Set(exclusions.map((e) => e.index)),
        );
        const draft = await insertDraftLimitSet(t, {
          characteristicId: id,
          chart: c.chart,
          limitSet: study.limitSet,
          params: c.chartParams,
          baselineFromMs: firstMs,
          baselineToMs: baseline[baseline.length - 1]!.tMs,
          baselineFirstIndex: 1,
          baselineLastIndex: baseline.length,
          baselinePoints: baseline.length,
          excluded: exclusions,
          suggested: first.suggested,
          capability: study.capability,
          note: `Seeded demo study on the first ${BASELINE_DAYS} days of history.`,
          createdBy: engineer.id,
        });
        const signature = {
          userId: engineer.id,
          username: engineer.username,
          displayName: engineer.displayName,
          meaning: 'approved',
          signedAt: new Date(nowMs).toISOString(),
          seeded: true,
        };
        const approved = await approveLimitSetRow(t, draft.id, signature, firstMs, true);
        const rows = await judgeForStorage(c, subgroups, null, [approved], async () => []);
        for (let i = 0; i < rows.length; i += 2000) await insertPointRows(t, rows.slice(i, i + 2000));
        await execute(
          t,
          `update spc_points p set excluded = true, exclusion_reason = x.reason from unnest($2::int[], $3::text[]) as x(idx, reason)
            where p.characteristic_id = $1 and p.idx = x.idx`,
          [id, exclusions.map((e) => e.index), exclusions.map((e) => `${e.reason} (limit set v${approved.version})`)],
        );
        await auditIn(t, seedActor, {
          action: 'limits.approve',
          entity: 'limit-set',
          entityId: approved.id,
          after: {
            characteristicId: id,
            version: approved.version,
            center: approved.center,
            ucl: approved.ucl,
            lcl: approved.lcl,
            sigma: approved.sigma,
            effectiveFrom: approved.effectiveFrom,
            excluded: exclusions.length,
            seeded: true,
          },
          signature: signature as SignatureRecord,
        });
        log(
          `SPC seed: ${fields.name}: ${rows.length} points, limits v${approved.version} from ${baseline.length} baseline points (${exclusions.length} excluded).`,
        );
      });
    }
    log(`SPC seed took ${Date.now() - started} ms.`);
    return true;
  }
}

/** Remove what `seedCharacteristics` created (its characteristics, their limit sets and points). */
export async function unseedCharacteristics(sequelize: Sequelize): Promise<void> {
  await execute(sequelize, `delete from characteristics where name = any($1::text[])`, [
    DEMO_CHARACTERISTICS.map((d) => d.fields.name),
  ]);
}
