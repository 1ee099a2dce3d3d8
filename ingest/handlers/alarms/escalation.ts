/**
 * Escalation e-mail for unacknowledged alarms by the rules per priority (`dueEscalations`): one
 * message per alarm per step, the step recorded in `escalation_steps_sent` before sending (so
 * two workers never both send it) and released again if the relay refuses.
 */
import nodemailer, { type Transporter } from 'nodemailer';
import { dueEscalations } from '../../../src/lib/domain/alarms/escalation.ts';
import type { EscalationSettings } from '../../../src/lib/shared/alarm-views.ts';
import { alarmsAwaitingAck, recordEscalation, releaseEscalation } from '../../../src/lib/core/alarm-store.ts';
import { escalationSettings, rulesByPriority } from '../../../src/lib/core/alarm-config-store.ts';
import { select } from '../../../src/lib/core/db.ts';
import type { WorkerContext } from '../index.ts';
import { publish, type AlarmsRuntime } from './runtime.ts';

const SETTINGS_TTL_MS = 5_000;

export interface MailSettings {
  /** The relay (`SMTP_URL`); null: escalation e-mail is not sent. */
  smtpUrl: string | null;
  /** Where the links in the e-mail point. */
  publicOrigin: string;
}

/** The mail side of escalation: one transport per worker, made when first needed. */
export interface Mailer {
  settings: MailSettings;
  transport: Transporter | null;
  warnedNoSmtp: boolean;
}

export function createMailer(settings: MailSettings): Mailer {
  return { settings, transport: null, warnedNoSmtp: false };
}

function transportOf(m: Mailer, ctx: WorkerContext): Transporter | null {
  if (!m.settings.smtpUrl) {
    if (!m.warnedNoSmtp) ctx.log('alarms: SMTP_URL is not set; escalation e-mail is not sent');
    m.warnedNoSmtp = true;
    return null;
  }
  m.transport ??= nodemailer.createTransport(m.settings.smtpUrl);
  return m.transport;
}

async function recipients(ctx: WorkerContext, notify: string, s: EscalationSettings): Promise<string[]> {
  if (notify === 'on-shift-engineer') return [s.onShiftEngineerEmail];
  const role = /^role-(viewer|operator|engineer|quality|admin)$/.exec(notify)?.[1];
  if (role) {
    const rows = await select<{ email: string }>(
      ctx.sequelize,
      `select email from users where role = $1 and active and email is not null order by id`,
      [role],
    );
    return rows.map((r) => r.email);
  }
  return [];
}

function hostOf(origin: string): string {
  try {
    return new URL(origin).hostname || 'localhost';
  } catch {
    return 'localhost';
  }
}

export async function escalate(rt: AlarmsRuntime, mailer: Mailer, ctx: WorkerContext, nowMs: number): Promise<void> {
  if (!rt.settings || nowMs - rt.settings.at > SETTINGS_TTL_MS) {
    rt.settings = { value: await escalationSettings(ctx.sequelize), at: nowMs };
  }
  const s = rt.settings.value;
  const rules = rulesByPriority(s.rules);
  if (Object.values(rules).every((steps) => !steps || steps.length === 0)) return;
  const waiting = await alarmsAwaitingAck(ctx.sequelize);
  if (waiting.length === 0) return;
  const origin = mailer.settings.publicOrigin.replace(/\/$/, '');
  const zone = rt.siteZone;
  for (const a of waiting) {
    const due = dueEscalations(
      { priority: a.priority, state: a.state, raisedAtMs: a.lastActivatedAtMs, escalationStepsSent: a.escalationStepsSent },
      rules,
      nowMs,
    );
    for (const d of due) {
      const to = await recipients(ctx, d.notify, s);
      const mail = transportOf(mailer, ctx);
      if (to.length === 0) {
        await recordEscalation(ctx.sequelize, a.id, d.stepIndex, nowMs, `step ${d.stepIndex + 1}: no address for "${d.notify}"`);
        ctx.log(`alarms: escalation of alarm ${a.id} step ${d.stepIndex + 1}: no address for "${d.notify}"`);
        continue;
      }
      if (!mail) return;
      const claimed = await recordEscalation(
        ctx.sequelize,
        a.id,
        d.stepIndex,
        nowMs,
        `step ${d.stepIndex + 1} e-mailed to ${to.join(', ')}`,
      );
      if (!claimed) continue;
      const raised = new Date(a.lastActivatedAtMs).toLocaleString('en-GB', { timeZone: zone, timeZoneName: 'short' });
      const text = [
        `A ${a.priority}-priority alarm has not been acknowledged for ${d.afterMinutes} min.`,
        '',
        `Source:  ${a.sourceLabel}`,
        `Alarm:   ${a.message}`,
        `Raised:  ${raised} (${zone})`,
        `State:   ${a.state === 'unacked' ? 'needs acknowledgement' : 'cleared, not yet acknowledged'}`,
        '',
        `Open it: ${origin}/alarms?focus=${a.id}`,
        '',
        'These alarms are advisory. They are not a safety-instrumented function; oven over-temperature',
        'protection and interlocks stay in the equipment.',
      ].join('\n');
      try {
        await mail.sendMail({
          from: `Coatrail <coatrail@${hostOf(origin)}>`,
          to: to.join(', '),
          subject: `Coatrail: ${a.priority}-priority alarm unacknowledged ${d.afterMinutes} min — ${a.sourceLabel}`,
          text,
        });
        await publish(ctx, a.id);
      } catch (e) {
        await releaseEscalation(ctx.sequelize, a.id, d.stepIndex);
        ctx.log(`alarms: escalation e-mail for alarm ${a.id} failed (${(e as Error).message}); will retry`);
      }
    }
  }
}
