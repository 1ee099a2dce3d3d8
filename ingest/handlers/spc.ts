/**
 * Live SPC in the ingest worker: after each committed batch, every active characteristic fed by
 * one of the batch's channels forms whatever subgroups are now complete (its subgroup rule, see
 * `lib/domain/control/subgroups.ts`), judges each against the limit set in force when it closed
 * and the characteristic's run rules (Phase II — nothing is re-estimated), stores the point with
 * its violations, raises an SPC alarm for a violation (medium priority, source `char:{id}`; the
 * next in-control point returns it to normal) and publishes the `points` live event.
 *
 * Timing: a subgroup that closes on a reading is judged in the same post-commit call (well within
 * a second of the commit); a `per-n-minutes` window in `means` mode closes by the clock and is
 * judged on the first tick after its end (ticks are about 1 s apart); oven loads are looked for
 * every few seconds once their cure record is computed.
 *
 * Restarts and scale-out: no subgroup state is held in memory — each call re-reads the readings
 * after the characteristic's last stored point — and points are numbered under a
 * per-characteristic advisory lock, so a restart loses nothing and two workers never clash.
 */
import { getAlarm, liveAlarmPayload, raiseAlarm, clearAlarmReturning } from '../../src/lib/core/alarm-store.ts';
import {
  advanceCharacteristic,
  lastPointOf,
  listCharacteristicRecords,
  pendingLoadSubgroups,
  recordSubgroups,
  type CharacteristicRecord,
} from '../../src/lib/core/spc-store.ts';
import { windowStart } from '../../src/lib/domain/control/subgroups.ts';
import { CHART_STATISTIC, violationLabel, type ChartPoint, type LivePointEvent } from '../../src/lib/shared/characteristics.ts';
import type { PostCommitHandler, WorkerContext } from './index.ts';

/** How often the list of characteristics is re-read (new or edited ones), ms. */
const REFRESH_MS = 5_000;
/** How often closed oven loads are looked for, ms. */
const LOADS_EVERY_MS = 5_000;

let characteristics: CharacteristicRecord[] = [];
let byChannel = new Map<number, CharacteristicRecord[]>();
let refreshedAt = 0;
let loadsCheckedAt = 0;
/** Per `means` characteristic: when its current clock window ends. */
const nextWindowEnd = new Map<number, number>();

async function refresh(ctx: WorkerContext, nowMs: number, force = false): Promise<void> {
  if (!force && nowMs - refreshedAt < REFRESH_MS) return;
  refreshedAt = nowMs;
  characteristics = await listCharacteristicRecords(ctx.sequelize, { activeOnly: true });
  byChannel = new Map();
  for (const c of characteristics) {
    for (const ch of c.channelIds) {
      const list = byChannel.get(ch);
      if (list) list.push(c);
      else byChannel.set(ch, [c]);
    }
  }
}

const fmt = (x: number | null | undefined) =>
  x === null || x === undefined || !Number.isFinite(x) ? '—' : Number(x.toPrecision(5)).toString();

/** The alarm message: rule ids and plain words, the value, and the limits it was judged against. */
export function violationMessage(c: Pick<CharacteristicRecord, 'chart' | 'unit'>, p: ChartPoint): string {
  const what = CHART_STATISTIC[c.chart].value.toLowerCase();
  const rules = p.violations.map((v) => `${v} (${violationLabel(v).replace(/^[^:]+:\s*/, '')})`).join('; ');
  if (c.chart === 'cusum') {
    return `${rules} at point ${p.index}: C⁺ ${fmt(p.extra.cPlus)}, C⁻ ${fmt(p.extra.cMinus)} ${c.unit} against the decision interval ${fmt(p.ucl)} ${c.unit}`;
  }
  return `${rules} at point ${p.index}: ${what} ${fmt(p.value)} ${c.unit} (centre ${fmt(p.center)}, UCL ${fmt(p.ucl)}, LCL ${fmt(p.lcl)} ${c.unit})`;
}

async function afterPoints(ctx: WorkerContext, c: CharacteristicRecord, points: ChartPoint[]): Promise<void> {
  for (const p of points) {
    const event: LivePointEvent = {
      characteristicId: c.id,
      index: p.index,
      value: p.value,
      violations: p.violations,
      tMs: p.tMs,
      point: p,
    };
    ctx.publishLive('points', event);
    const sourceKey = `char:${c.id}`;
    if (p.violations.length > 0) {
      const above = p.ucl !== null && p.value > p.ucl;
      const below = p.lcl !== null && p.value < p.lcl;
      const raised = await raiseAlarm(ctx.sequelize, {
        sourceKind: 'spc',
        sourceKey,
        sourceLabel: c.name,
        assetId: c.assetId,
        channelId: c.channelIds[0] ?? null,
        characteristicId: c.id,
        priority: 'medium',
        message: violationMessage(c, p),
        value: c.chart === 'cusum' ? (p.extra.cPlus ?? null) : p.value,
        limit: above ? p.ucl : below ? p.lcl : null,
        atMs: p.tMs,
      });
      const view = await getAlarm(ctx.sequelize, raised.id);
      if (view) ctx.publishLive('alarms', liveAlarmPayload(view));
    } else if (p.limitSetId !== null) {
      const cleared = await clearAlarmReturning(ctx.sequelize, sourceKey, p.tMs);
      if (cleared) ctx.publishLive('alarms', liveAlarmPayload(cleared));
    }
  }
}

async function advance(ctx: WorkerContext, c: CharacteristicRecord, nowMs: number): Promise<void> {
  const points = await advanceCharacteristic(ctx.sequelize, c, nowMs);
  if (points.length > 0) await afterPoints(ctx, c, points);
}

async function advanceLoads(ctx: WorkerContext, c: CharacteristicRecord): Promise<void> {
  const last = await lastPointOf(ctx.sequelize, c.id);
  // Without points yet, only loads closed since the characteristic was created (its back-fill
  // plotted the earlier ones it was asked for).
  const pending = await pendingLoadSubgroups(ctx.sequelize, c, last?.tMs ?? Date.parse(c.createdAt));
  if (pending.length === 0) return;
  const points = await recordSubgroups(ctx.sequelize, c, pending);
  if (points.length > 0) await afterPoints(ctx, c, points);
}

export const spcHandler: PostCommitHandler = {
  name: 'spc',
  async init(ctx) {
    await refresh(ctx, Date.now(), true);
  },
  async onReadings(ctx, rows) {
    const nowMs = Date.now();
    await refresh(ctx, nowMs);
    const touched = new Map<number, CharacteristicRecord>();
    for (const r of rows)
      for (const c of byChannel.get(r.channelId) ?? []) if (c.subgroupRule.kind !== 'per-oven-load') touched.set(c.id, c);
    for (const c of touched.values()) {
      try {
        await advance(ctx, c, nowMs);
      } catch (e) {
        ctx.log(`spc: ${c.name}: ${(e as Error).message}`);
      }
    }
  },
  async onTick(ctx, nowMs) {
    await refresh(ctx, nowMs);
    const checkLoads = nowMs - loadsCheckedAt >= LOADS_EVERY_MS;
    if (checkLoads) loadsCheckedAt = nowMs;
    for (const c of characteristics) {
      try {
        const rule = c.subgroupRule;
        if (rule.kind === 'per-n-minutes' && rule.mode === 'means') {
          const end = nextWindowEnd.get(c.id);
          if (end === undefined) nextWindowEnd.set(c.id, windowStart(nowMs, rule.minutes) + rule.minutes * 60_000);
          else if (nowMs >= end) {
            nextWindowEnd.set(c.id, windowStart(nowMs, rule.minutes) + rule.minutes * 60_000);
            await advance(ctx, c, nowMs);
          }
        } else if (rule.kind === 'per-oven-load' && checkLoads) {
          await advanceLoads(ctx, c);
        }
      } catch (e) {
        ctx.log(`spc: ${c.name}: ${(e as Error).message}`);
      }
    }
  },
};
