/**
 * The plant as the alarm sources see it: channels with their asset and oven, whether an asset
 * runs, and the words alarm messages use.
 */
import { OVEN_RUNNING_SETPOINT_C, RECENT_DATA_MS } from '../../../src/lib/shared/alarm-views.ts';
import { select } from '../../../src/lib/core/db.ts';
import type { WorkerContext } from '../index.ts';
import type { AlarmsRuntime, ChannelInfo } from './runtime.ts';

/**
 * The channel's name, prefixed by its asset's when the name alone does not say where it is
 * (fewer than two words in common: "Spin speed" → "UV spin coater 1: Spin speed", while
 * "Line 2 bath viscosity" under "Line 2 hard-coat bath" stays as it is).
 */
export function sourceLabelOf(ch: { name: string; assetName: string }): string {
  const words = (t: string) =>
    new Set(
      t
        .toLowerCase()
        .split(/[^a-z0-9]+/)
        .filter(Boolean),
    );
  const asset = words(ch.assetName);
  const shared = [...words(ch.name)].filter((w) => asset.has(w)).length;
  return shared >= 2 ? ch.name : `${ch.assetName}: ${ch.name}`;
}

export function fmt(v: number): string {
  const a = Math.abs(v);
  if (a >= 100) return v.toFixed(0);
  if (a >= 10) return v.toFixed(1);
  return v.toFixed(2);
}

/** Read every channel with its asset and oven into the runtime. */
export async function loadChannels(rt: AlarmsRuntime, ctx: WorkerContext, nowMs: number): Promise<void> {
  const rows = await select<{
    id: number;
    name: string;
    kind: string;
    unit: string;
    asset_id: number;
    asset_name: string;
    asset_kind: string;
    parent_id: number | null;
    parent_kind: string | null;
    device_id: number;
  }>(
    ctx.sequelize,
    `select c.id, c.name, c.kind, c.unit, c.asset_id, a.name as asset_name, a.kind as asset_kind, a.parent_id,
            p.kind as parent_kind, c.device_id
       from channels c join assets a on a.id = c.asset_id left join assets p on p.id = a.parent_id`,
  );
  rt.channels.clear();
  for (const r of rows) {
    const ovenAssetId = r.asset_kind === 'oven' ? r.asset_id : r.parent_kind === 'oven' ? r.parent_id : null;
    rt.channels.set(r.id, {
      id: r.id,
      name: r.name,
      kind: r.kind,
      unit: r.unit,
      assetId: r.asset_id,
      assetName: r.asset_name,
      deviceId: r.device_id,
      ovenAssetId,
    });
  }
  rt.channelsAt = nowMs;
}

/**
 * Does the channel's asset run at `nowMs`? An oven (and its zones) runs while its last setpoint
 * is ≥ 50 °C; any other asset while the channel had data in the last hour.
 */
export function running(rt: AlarmsRuntime, ch: ChannelInfo, nowMs: number): boolean {
  if (ch.ovenAssetId !== null) {
    const sp = rt.setpoints.get(ch.ovenAssetId);
    return sp !== undefined && sp >= OVEN_RUNNING_SETPOINT_C;
  }
  const seen = rt.lastSeen.get(ch.id);
  return seen !== undefined && nowMs - seen <= RECENT_DATA_MS;
}
