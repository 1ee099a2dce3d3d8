/**
 * Device offline (`device`, source key `device:{id}`): an enabled device that has been seen at
 * least once and has been offline (`devices.online = false`) for more than 60 s. A device never
 * seen is not commissioned yet and raises nothing.
 */
import { DEVICE_OFFLINE_MS } from '../../../src/lib/shared/alarm-views.ts';
import { select } from '../../../src/lib/core/db.ts';
import type { WorkerContext } from '../index.ts';
import { clear, raise, type AlarmsRuntime } from './runtime.ts';

export async function checkDevices(rt: AlarmsRuntime, ctx: WorkerContext, nowMs: number): Promise<void> {
  const rows = await select<{
    id: number;
    name: string;
    username: string;
    online: boolean;
    enabled: boolean;
    last_seen_at: Date | null;
    offline_at: Date | null;
  }>(
    ctx.sequelize,
    `select d.id, d.name, d.username, d.online, d.enabled, d.last_seen_at,
            (select max(e.at) from device_events e where e.device_id = d.id and e.kind = 'offline') as offline_at
       from devices d`,
  );
  for (const d of rows) {
    const key = `device:${d.id}`;
    const since = d.offline_at ?? d.last_seen_at;
    const offline =
      d.enabled && !d.online && d.last_seen_at !== null && since !== null && nowMs - since.getTime() > DEVICE_OFFLINE_MS;
    if (offline && !rt.deviceActive.has(d.id)) {
      rt.deviceActive.add(d.id);
      await raise(rt, ctx, {
        sourceKind: 'device',
        sourceKey: key,
        sourceLabel: `${d.name} (${d.username})`,
        priority: 'medium',
        message: `Device ${d.username} offline for ${Math.round((nowMs - since.getTime()) / 1000)} s: its channels are not being recorded`,
        atMs: nowMs,
      });
    } else if (!offline && rt.deviceActive.has(d.id)) {
      rt.deviceActive.delete(d.id);
      await clear(rt, ctx, key, nowMs);
    }
  }
}
