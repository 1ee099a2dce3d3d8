/**
 * The siblings of a traced job — every job that shared its oven load, or was dipped from the
 * same bath charge within the sibling window — with their test status, and ONE action: hold the
 * selected jobs (quality), with a reason. Quick selections: the whole load, the failed, the
 * untested. Sortable, filterable, CSV of what is shown.
 */
import { useMemo, useState, type SyntheticEvent } from 'react';
import { apiFetch, ApiError } from '../../lib/client/api.ts';
import { formatSiteTime } from '../../lib/shared/site-time.ts';
import { TEST_KIND_LABELS } from '../../lib/shared/quality.ts';
import type { TraceSibling } from '../../lib/shared/trace-views.ts';
import { downloadCsv, SortTh, sortRows, useSort } from '../admin/table.tsx';
import { JobStatusTag } from './marks.tsx';

export interface SiblingHoldProps {
  jobNumber: string;
  siblings: TraceSibling[];
  hours: number;
  timeZone: string;
  canHold: boolean;
  /** The job itself may also be held from here (when it is not already). */
  selfHoldable: boolean;
  defaultReason: string;
  /** The traced job's own dip runs (a sibling on one of them shared its rack). */
  ownDipRunIds: number[];
}

type Key = 'job' | 'relation' | 'tests' | 'failed' | 'last' | 'status';
type Placed = { placed: { holdId: number; jobNumber: string }[]; alreadyHeld: string[] };

export default function SiblingHold({
  jobNumber,
  siblings,
  hours,
  timeZone,
  canHold,
  selfHoldable,
  defaultReason,
  ownDipRunIds,
}: SiblingHoldProps) {
  const [selected, setSelected] = useState<Set<string>>(new Set());
  const [includeSelf, setIncludeSelf] = useState(selfHoldable);
  const [reason, setReason] = useState(defaultReason);
  const [text, setText] = useState('');
  const [show, setShow] = useState<'all' | 'load' | 'bath'>('all');
  const [busy, setBusy] = useState(false);
  const [result, setResult] = useState<Placed | null>(null);
  const [error, setError] = useState<string | null>(null);
  const { sort, toggle } = useSort<Key>({ key: 'relation', dir: 1 });

  const shown = useMemo(() => {
    const q = text.trim().toLowerCase();
    let f = siblings.filter((s) =>
      show === 'load' ? s.sameLoads.length > 0 : show === 'bath' ? s.sameBathRuns.length > 0 : true,
    );
    if (q) f = f.filter((s) => s.jobNumber.toLowerCase().includes(q) || s.status.includes(q));
    const rel = (s: TraceSibling) => (s.sameLoads.length && s.sameBathRuns.length ? 0 : s.sameLoads.length ? 1 : 2);
    const get = (s: TraceSibling) =>
      ({
        job: s.jobNumber,
        relation: rel(s) * 1e6 + (s.sameBathRuns[0]?.hoursApart ?? 0),
        tests: s.tests,
        failed: s.failed,
        last: s.lastTest?.testedAt ?? null,
        status: s.status,
      })[sort.key];
    return sortRows(f, get, sort.dir);
  }, [siblings, text, show, sort]);

  const holdable = (s: TraceSibling) => s.activeHoldId === null && s.status !== 'scrapped';
  const toggleOne = (n: string) =>
    setSelected((cur) => {
      const next = new Set(cur);
      if (next.has(n)) next.delete(n);
      else next.add(n);
      return next;
    });
  const selectWhere = (pred: (s: TraceSibling) => boolean) =>
    setSelected(new Set(siblings.filter((s) => holdable(s) && pred(s)).map((s) => s.jobNumber)));
  const count = selected.size + (includeSelf && selfHoldable ? 1 : 0);

  async function hold(e: SyntheticEvent) {
    e.preventDefault();
    setError(null);
    if (count === 0) return setError('Select at least one job to hold.');
    if (reason.trim().length < 3) return setError('Give the reason for the hold.');
    setBusy(true);
    try {
      const jobNumbers = [...(includeSelf && selfHoldable ? [jobNumber] : []), ...selected];
      const r = await apiFetch<Placed>('/api/v1/holds', { body: { jobNumbers, reason: reason.trim() } });
      setResult(r);
      setSelected(new Set());
      setIncludeSelf(false);
      setTimeout(() => window.location.reload(), 1500);
    } catch (err) {
      setError(
        err instanceof ApiError
          ? err.errors.map((f) => f.message).join(' ') || err.detail || err.title
          : 'The hold was not placed.',
      );
    } finally {
      setBusy(false);
    }
  }

  const t = (s: string) => formatSiteTime(s, timeZone);
  const apart = (h: number) => (h < 1 ? `${Math.round(h * 60)} min` : `${h.toFixed(1)} h`);
  const bathText = (s: TraceSibling) =>
    s.sameBathRuns.some((b) => ownDipRunIds.includes(b.dipRunId))
      ? 'same rack (same dip)'
      : `same bath charge, dipped ${s.sameBathRuns.map((b) => apart(b.hoursApart)).join(', ')} apart`;
  const relation = (s: TraceSibling) =>
    [s.sameLoads.length ? `same load ${s.sameLoads.join(', ')}` : '', s.sameBathRuns.length ? bathText(s) : '']
      .filter(Boolean)
      .join('; ');
  const csv = () =>
    downloadCsv(
      `siblings-of-${jobNumber}.csv`,
      ['job', 'relation', 'tests', 'failed', 'last test', `last tested (${timeZone})`, 'status', 'on hold'],
      shown.map((s) => [
        s.jobNumber,
        relation(s),
        s.tests,
        s.failed,
        s.lastTest ? `${TEST_KIND_LABELS[s.lastTest.kind]} ${s.lastTest.result}` : '',
        s.lastTest ? t(s.lastTest.testedAt) : '',
        s.status,
        s.activeHoldId ? 'yes' : 'no',
      ]),
    );
  const nLoad = siblings.filter((s) => s.sameLoads.length > 0).length;
  const nBath = siblings.filter((s) => s.sameBathRuns.length > 0).length;

  return (
    <div className="space-y-3">
      <p className="text-sm text-ink-soft">
        {siblings.length} sibling job(s): {nLoad} shared an oven load with {jobNumber}; {nBath} were dipped from the same bath
        charge within ±{hours} h.
      </p>
      {canHold && (
        <form onSubmit={hold} className="panel space-y-2 border-alert-med" aria-labelledby="hold-h">
          <h3 id="hold-h" className="font-bold">
            Hold selected jobs
          </h3>
          <div className="flex flex-wrap gap-2 text-sm">
            <span className="self-center text-ink-soft">Select:</span>
            <button type="button" className="btn-quiet" onClick={() => selectWhere((s) => s.sameLoads.length > 0)}>
              Everything in the same load ({nLoad})
            </button>
            <button type="button" className="btn-quiet" onClick={() => selectWhere((s) => s.failed > 0)}>
              Failed a test
            </button>
            <button type="button" className="btn-quiet" onClick={() => selectWhere((s) => s.tests === 0)}>
              Never tested
            </button>
            <button type="button" className="btn-quiet" onClick={() => selectWhere(() => true)}>
              All siblings
            </button>
            <button type="button" className="btn-quiet" onClick={() => setSelected(new Set())}>
              None
            </button>
          </div>
          {selfHoldable && (
            <label className="flex items-center gap-2 font-normal">
              <input
                type="checkbox"
                className="w-auto"
                checked={includeSelf}
                onChange={(e) => setIncludeSelf(e.target.checked)}
              />{' '}
              Also hold {jobNumber} itself
            </label>
          )}
          <label htmlFor="hold-reason">Reason for the hold</label>
          <textarea
            id="hold-reason"
            rows={2}
            value={reason}
            onChange={(e) => setReason(e.target.value)}
            maxLength={1000}
            required
          />
          <div className="flex flex-wrap items-center gap-3">
            <button className="btn" disabled={busy || count === 0}>
              {busy ? 'Placing holds…' : `Hold ${count} selected job${count === 1 ? '' : 's'}`}
            </button>
            <span className="text-xs text-ink-soft">
              A hold stops the jobs from shipping until quality releases or dispositions them (signed).
            </span>
          </div>
          {error && (
            <p role="alert" className="rounded border-l-4 border-alert-high bg-alert-bg p-2 text-sm">
              <strong>✕ Not done. </strong>
              {error}
            </p>
          )}
          {result && (
            <p role="status" className="rounded border-l-4 border-lacquer bg-lacquer-light/60 p-2 text-sm">
              <strong>✓ Done. </strong>
              {result.placed.length} job(s) put on hold
              {result.alreadyHeld.length ? `; ${result.alreadyHeld.length} were already on hold` : ''}.{' '}
              <a href="/quality/holds">See the hold list</a>.
            </p>
          )}
        </form>
      )}
      <div className="flex flex-wrap items-end gap-3">
        <div>
          <label htmlFor="sib-q">Filter</label>
          <input
            id="sib-q"
            type="search"
            value={text}
            onChange={(e) => setText(e.target.value)}
            className="w-48"
            placeholder="job number…"
          />
        </div>
        <div>
          <label htmlFor="sib-show">Show</label>
          <select id="sib-show" value={show} onChange={(e) => setShow(e.target.value as typeof show)} className="w-56">
            <option value="all">All siblings ({siblings.length})</option>
            <option value="load">Same oven load ({nLoad})</option>
            <option value="bath">
              Same bath charge ±{hours} h ({nBath})
            </option>
          </select>
        </div>
        <button type="button" className="btn-quiet" onClick={csv}>
          CSV of these {shown.length} rows
        </button>
        {canHold && (
          <span className="text-sm" aria-live="polite">
            {selected.size} selected
          </span>
        )}
      </div>
      {shown.length === 0 ? (
        <div className="empty" role="status">
          No sibling jobs{' '}
          {siblings.length ? 'match the filter' : `— nothing else shared this job’s load or its bath charge within ±${hours} h`}.
        </div>
      ) : (
        <div className="max-h-[32rem] overflow-auto rounded-md border border-slate-line bg-white">
          <table>
            <thead className="sticky top-0">
              <tr>
                {canHold && (
                  <th scope="col">
                    <span className="sr-only">Select</span>
                  </th>
                )}
                <SortTh k="job" sort={sort} toggle={toggle}>
                  Job
                </SortTh>
                <SortTh k="relation" sort={sort} toggle={toggle}>
                  Shared with {jobNumber}
                </SortTh>
                <SortTh k="tests" sort={sort} toggle={toggle} className="text-right">
                  Tests
                </SortTh>
                <SortTh k="failed" sort={sort} toggle={toggle} className="text-right">
                  Failed
                </SortTh>
                <SortTh k="last" sort={sort} toggle={toggle}>
                  Last test
                </SortTh>
                <SortTh k="status" sort={sort} toggle={toggle}>
                  Status
                </SortTh>
              </tr>
            </thead>
            <tbody>
              {shown.map((s) => (
                <tr key={s.jobNumber} className={s.failed > 0 ? 'bg-alert-bg/40' : ''}>
                  {canHold && (
                    <td>
                      <input
                        type="checkbox"
                        className="w-auto"
                        aria-label={`Select ${s.jobNumber}`}
                        disabled={!holdable(s)}
                        checked={selected.has(s.jobNumber)}
                        onChange={() => toggleOne(s.jobNumber)}
                      />
                    </td>
                  )}
                  <td className="num">
                    <a href={`/quality/trace/${encodeURIComponent(s.jobNumber)}`}>{s.jobNumber}</a>
                  </td>
                  <td className="text-sm">{relation(s)}</td>
                  <td className="num text-right">{s.tests}</td>
                  <td className={`num text-right ${s.failed ? 'font-bold text-alert-high' : ''}`}>
                    {s.failed ? `✕ ${s.failed}` : 0}
                  </td>
                  <td className="text-sm">
                    {s.lastTest ? (
                      `${TEST_KIND_LABELS[s.lastTest.kind]}: ${s.lastTest.result} · ${t(s.lastTest.testedAt)}`
                    ) : (
                      <span className="text-ink-faint">never tested</span>
                    )}
                  </td>
                  <td>
                    <JobStatusTag status={s.status} />
                  </td>
                </tr>
              ))}
            </tbody>
          </table>
        </div>
      )}
    </div>
  );
}
