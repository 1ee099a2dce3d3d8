/**
 * Alarm sources evaluated in the ingest worker, after each committed batch and on the worker's
 * tick. Everything goes through the alarm store (`raiseAlarm` / `clearAlarm` /
 * `transitionAlarm`), and every raise or state change is published as a live `alarms` event.
 * The parts, one module each (ANSI/ISA-18.2 / IEC 62682 alarm design ideas: deadband,
 * on-delay, off-delay, suppression by design):
 *
 * - `limits.ts` process limits per channel (alarm settings or the process window in force);
 * - `suppression.ts` only-while-running channels of an idle oven;
 * - `stale.ts` no data while the asset runs;
 * - `devices.ts` device offline; `system.ts` ingest lag and a growing journal;
 * - `escalation.ts` e-mail for unacknowledged alarms; `restore.ts` state after a restart;
 * - `runtime.ts` the state they share and the writers that publish.
 *
 * Duties on the tick: shelf expiry (system event `shelf-expired`), the stale / device / system
 * checks (every 5 s), and escalation.
 *
 * Scale-out note: the limit detector and the stale check assume one worker sees all of a
 * channel's readings (the default single worker). With several workers on a shared
 * subscription, run alarm evaluation on one of them (`INGEST_ALARMS=off` on the others).
 * Store operations are safe to repeat (one open alarm per source, escalation steps claimed
 * atomically), so tick duties running in several workers do not duplicate alarms or e-mail.
 *
 * These alarms are advisory. They are not a safety-instrumented function; oven
 * over-temperature protection and interlocks stay in the equipment.
 */
import { expireShelves } from '../../../src/lib/core/alarm-store.ts';
import type { PostCommitHandler, StoredReading, WorkerContext } from '../index.ts';
import { loadChannels } from './channels.ts';
import { checkDevices } from './devices.ts';
import { createMailer, escalate, type MailSettings } from './escalation.ts';
import { CONFIGS_EVERY_MS, evaluateReadings, loadConfigs } from './limits.ts';
import { restore } from './restore.ts';
import { createRuntime, publish, type AlarmsRuntime } from './runtime.ts';
import { checkStale } from './stale.ts';
import { checkSystem } from './system.ts';

export { fmt, sourceLabelOf } from './channels.ts';

const CHECK_EVERY_MS = 5_000;
/** Readings waiting to be judged before the worker is made to wait for the alarm handler. */
const MAX_BACKLOG_ROWS = 20_000;
const CHANNELS_EVERY_MS = 60_000;

export interface AlarmsHandlerOptions extends MailSettings {
  /** `INGEST_ALARMS=off`: this worker evaluates no alarms (another one does). */
  disabled: boolean;
}

/** The options from the worker's environment (the variable names the web app uses). */
export function alarmsOptionsFromEnv(env: NodeJS.ProcessEnv = process.env): AlarmsHandlerOptions {
  return {
    disabled: (env['INGEST_ALARMS'] ?? 'on') === 'off',
    smtpUrl: env['SMTP_URL'] || null,
    publicOrigin: env['PUBLIC_ORIGIN'] ?? 'http://127.0.0.1:4321',
  };
}

export function createAlarmsHandler(options: AlarmsHandlerOptions = alarmsOptionsFromEnv()): PostCommitHandler & {
  /** The handler's state (tests read it). */
  runtime: AlarmsRuntime;
} {
  const rt = createRuntime();
  const mailer = createMailer(options);
  let lastCheck = 0;
  let chain: Promise<unknown> = Promise.resolve();
  let backlog = 0;

  /** Run one piece of work at a time (detector state is shared between readings and ticks). */
  function serial<T>(fn: () => Promise<T>): Promise<T> {
    const next = chain.then(fn, fn);
    chain = next.catch(() => {});
    return next;
  }

  async function onReadings(ctx: WorkerContext, rows: StoredReading[]): Promise<void> {
    if (options.disabled || rows.length === 0) return;
    const started = performance.now();
    try {
      await evaluateReadings(rt, ctx, rows, Date.now());
    } finally {
      const load = rt.load;
      load.rows += rows.length;
      load.busyMs += performance.now() - started;
      if (Date.now() - load.since >= 60_000) {
        ctx.log(
          `alarms: ${load.rows} readings judged in ${((Date.now() - load.since) / 1000).toFixed(0)} s ` +
            `(${load.raises} raises, ${load.clears} clears, ${(load.busyMs / 1000).toFixed(1)} s busy)`,
        );
        Object.assign(load, { rows: 0, busyMs: 0, raises: 0, clears: 0, since: Date.now() });
      }
    }
  }

  return {
    name: 'alarms',
    runtime: rt,
    async init(ctx) {
      if (options.disabled) {
        ctx.log('alarms: evaluation off in this worker (INGEST_ALARMS=off)');
        return;
      }
      await serial(async () => {
        const now = Date.now();
        await loadChannels(rt, ctx, now);
        await loadConfigs(rt, ctx, now);
        await restore(rt, ctx);
      });
    },
    onReadings(ctx, rows) {
      // Judge in the background, in order, so the other post-commit handlers need not wait for
      // the alarm writes; past a backlog, hold the worker back instead of growing without bound.
      backlog += rows.length;
      const done = serial(() => onReadings(ctx, rows))
        .catch((e: Error) => ctx.log(`alarms: judging ${rows.length} readings failed: ${e.stack ?? e.message}`))
        .finally(() => (backlog -= rows.length));
      return backlog > MAX_BACKLOG_ROWS ? done : Promise.resolve();
    },
    onTick(ctx, nowMs) {
      if (options.disabled) return Promise.resolve();
      return serial(async () => {
        for (const a of await expireShelves(ctx.sequelize, nowMs)) await publish(ctx, null, a);
        if (nowMs - lastCheck < CHECK_EVERY_MS) return;
        lastCheck = nowMs;
        if (nowMs - rt.channelsAt > CHANNELS_EVERY_MS) await loadChannels(rt, ctx, nowMs);
        if (nowMs - rt.configsAt > CONFIGS_EVERY_MS) await loadConfigs(rt, ctx, nowMs);
        // Each duty on its own: one failing must not starve the others.
        const duties: [string, () => Promise<void>][] = [
          ['stale data', () => checkStale(rt, ctx, nowMs)],
          ['devices', () => checkDevices(rt, ctx, nowMs)],
          ['system', () => checkSystem(rt, ctx, nowMs)],
          ['escalation', () => escalate(rt, mailer, ctx, nowMs)],
        ];
        for (const [what, duty] of duties) {
          try {
            await duty();
          } catch (e) {
            ctx.log(`alarms: ${what} check failed: ${(e as Error).message}`);
          }
        }
      });
    },
  };
}

export const alarmsHandler: PostCommitHandler = createAlarmsHandler();
