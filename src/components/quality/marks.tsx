/**
 * Status marks for loads, tests, jobs and holds: colour only for abnormal states, and always a
 * shape and words beside it (ISA-101 style), so the state reads in grey print too.
 */
import type { CureVerdictName } from '../../lib/shared/jobs.ts';
import { JOB_STATUS_LABELS, VERDICT_LABELS, type JobStatus } from '../../lib/shared/jobs.ts';

const VERDICT: Record<CureVerdictName, { shape: string; cls: string }> = {
  complete: { shape: '✓', cls: 'text-ink-soft border-slate-line' },
  'under-cured': { shape: '▼', cls: 'text-alert-high border-alert-high bg-alert-bg' },
  'over-temperature': { shape: '▲', cls: 'text-alert-med border-alert-med bg-[#fff6e8]' },
  unverifiable: { shape: '?', cls: 'text-alert-low border-alert-low bg-[#fbf6e0]' },
};

export function VerdictBadge({
  verdict,
  status,
  large = false,
}: {
  verdict: CureVerdictName | null;
  status?: 'open' | 'closed';
  large?: boolean;
}) {
  const size = large ? ' !text-base !px-3 !py-1' : '';
  if (!verdict) {
    return (
      <span className={`tag border-slate-line text-ink-soft${size}`}>
        {status === 'open' ? '◌ In progress' : '— Not computed'}
      </span>
    );
  }
  const v = VERDICT[verdict];
  return (
    <span className={`tag whitespace-nowrap ${v.cls}${size}`}>
      <span aria-hidden="true">{v.shape}</span> {VERDICT_LABELS[verdict]}
    </span>
  );
}

export function ResultBadge({ result }: { result: 'pass' | 'fail' }) {
  return result === 'fail' ? (
    <span className="tag whitespace-nowrap border-alert-high bg-alert-bg text-alert-high">
      <span aria-hidden="true">✕</span> Fail
    </span>
  ) : (
    <span className="tag whitespace-nowrap border-slate-line text-ink-soft">
      <span aria-hidden="true">✓</span> Pass
    </span>
  );
}

const JOB: Record<JobStatus, { shape: string; cls: string }> = {
  active: { shape: '·', cls: 'text-ink-soft border-slate-line' },
  held: { shape: '‖', cls: 'text-alert-med border-alert-med bg-[#fff6e8]' },
  released: { shape: '✓', cls: 'text-ink-soft border-slate-line' },
  recoat: { shape: '↺', cls: 'text-ink border-ink-soft' },
  scrapped: { shape: '✕', cls: 'text-ink border-ink-soft' },
};

export function JobStatusTag({ status }: { status: string }) {
  const s = JOB[status as JobStatus] ?? JOB.active;
  return (
    <span className={`tag whitespace-nowrap ${s.cls}`}>
      <span aria-hidden="true">{s.shape}</span> {JOB_STATUS_LABELS[status as JobStatus] ?? status}
    </span>
  );
}

const PHASE: Record<string, string> = { ramp: '↗ Ramp', soak: '▬ Soak', cool: '↘ Cool', idle: '· Idle', closed: '■ Closed' };

export function PhaseTag({ phase }: { phase: string | null }) {
  if (!phase) return <span className="text-ink-faint">—</span>;
  return <span className="tag border-slate-line text-ink">{PHASE[phase] ?? phase}</span>;
}
