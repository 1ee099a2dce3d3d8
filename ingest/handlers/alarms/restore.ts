/**
 * After a restart: the held conditions of open alarms (so nothing is raised twice and clears
 * still happen), the latest reading per channel in the last hour (stale checks), each oven's
 * last setpoint, and the site's time zone.
 */
import { initialDetectorState, type LimitSide } from '../../../src/lib/domain/alarms/limit-detector.ts';
import { select } from '../../../src/lib/core/db.ts';
import { siteTimeZone } from '../../../src/lib/core/settings-store.ts';
import type { WorkerContext } from '../index.ts';
import type { AlarmsRuntime } from './runtime.ts';

export async function restore(rt: AlarmsRuntime, ctx: WorkerContext): Promise<void> {
  const open = await select<{ source_key: string; state: string; active: boolean }>(
    ctx.sequelize,
    `select source_key, state, active from alarms where state <> 'normal' and source_kind in ('limit','stale','device','system')`,
  );
  for (const { source_key: key, state, active } of open) {
    const suppressed = state === 'suppressed';
    let m = /^channel:(\d+):(high|low)$/.exec(key);
    if (m) {
      const prev = rt.detectors.get(Number(m[1]));
      rt.detectors.set(Number(m[1]), {
        det: { ...initialDetectorState(), alarm: active ? (m[2] as LimitSide) : (prev?.det.alarm ?? null) },
        sig: '\u0000restored',
        lastValue: null,
        ...(suppressed || prev?.running === false ? { running: false } : {}),
      });
      continue;
    }
    if ((m = /^stale:channel:(\d+)$/.exec(key))) {
      if (active) rt.staleActive.add(Number(m[1]));
      if (suppressed) rt.staleSuppressed.add(Number(m[1]));
      continue;
    }
    if (!active) continue;
    if ((m = /^device:(\d+)$/.exec(key))) rt.deviceActive.add(Number(m[1]));
    else if (key.startsWith('system:')) rt.systemActive.add(key);
  }
  const latest = await select<{ channel_id: number; t_ms: number; value: number }>(
    ctx.sequelize,
    `select c.id as channel_id, r.t_ms, r.value from channels c
       cross join lateral (select (extract(epoch from ts) * 1000)::float8 as t_ms, value from readings
                            where channel_id = c.id and ts > now() - interval '1 hour' order by ts desc limit 1) r`,
  );
  for (const r of latest) {
    rt.lastSeen.set(r.channel_id, r.t_ms);
    const ch = rt.channels.get(r.channel_id);
    if (ch && ch.kind === 'setpoint' && ch.ovenAssetId !== null) rt.setpoints.set(ch.ovenAssetId, r.value);
  }
  rt.siteZone = await siteTimeZone(ctx.sequelize);
}
