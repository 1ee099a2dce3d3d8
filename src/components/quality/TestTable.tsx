/**
 * Quality tests (failed first, as the server sends them): sortable, a quick filter over what is
 * shown, CSV of the rows shown; each failed test links to its trace.
 */
import { useMemo, useState } from 'react';
import { formatSiteTime } from '../../lib/shared/site-time.ts';
import { TEST_KIND_LABELS, type TestListItem } from '../../lib/shared/quality.ts';
import { downloadCsv, SortTh, sortRows, useSort } from '../admin/table.tsx';
import { JobStatusTag, ResultBadge } from './marks.tsx';

type Key = 'result' | 'tested' | 'job' | 'kind' | 'summary' | 'oven' | 'status';

export default function TestTable({ initial, timeZone }: { initial: TestListItem[]; timeZone: string }) {
  const [text, setText] = useState('');
  const { sort, toggle } = useSort<Key>({ key: 'result', dir: 1 });
  const shown = useMemo(() => {
    const q = text.trim().toLowerCase();
    const f = q
      ? initial.filter((r) =>
          [r.jobNumber, r.kind, TEST_KIND_LABELS[r.kind], r.summary, r.ovenCode ?? '', r.testedBy, r.result].some((s) =>
            s.toLowerCase().includes(q),
          ),
        )
      : initial;
    if (sort.key === 'result' && sort.dir === 1) return f; // the server's order: failed first, newest first
    const get = (r: TestListItem) =>
      ({
        result: r.result,
        tested: r.testedAt,
        job: r.jobNumber,
        kind: r.kind,
        summary: r.summary,
        oven: r.ovenCode,
        status: r.jobStatus,
      })[sort.key];
    return sortRows(f, get, sort.dir);
  }, [initial, text, sort]);
  const t = (s: string) => formatSiteTime(s, timeZone);
  const csv = () =>
    downloadCsv(
      'quality-tests.csv',
      ['test', 'job', 'kind', `tested (${timeZone})`, 'result', 'summary', 'tested by', 'load', 'oven', 'job status'],
      shown.map((r) => [
        r.id,
        r.jobNumber,
        TEST_KIND_LABELS[r.kind],
        t(r.testedAt),
        r.result,
        r.summary,
        r.testedBy,
        r.loadId ?? '',
        r.ovenCode ?? '',
        r.jobStatus,
      ]),
    );
  return (
    <div className="space-y-2">
      <div className="flex flex-wrap items-end gap-3">
        <div>
          <label htmlFor="test-q">Filter the rows shown</label>
          <input
            id="test-q"
            type="search"
            value={text}
            onChange={(e) => setText(e.target.value)}
            placeholder="job, kind, oven…"
            className="w-64"
          />
        </div>
        <button type="button" className="btn-quiet" onClick={csv}>
          CSV of these {shown.length} rows
        </button>
      </div>
      {shown.length === 0 ? (
        <div className="empty" role="status">
          No tests match.
        </div>
      ) : (
        <div className="max-h-[36rem] overflow-auto rounded-md border border-slate-line bg-white">
          <table>
            <thead className="sticky top-0">
              <tr>
                <SortTh k="result" sort={sort} toggle={toggle}>
                  Result
                </SortTh>
                <SortTh k="tested" sort={sort} toggle={toggle}>
                  Tested ({timeZone})
                </SortTh>
                <SortTh k="job" sort={sort} toggle={toggle}>
                  Job
                </SortTh>
                <SortTh k="kind" sort={sort} toggle={toggle}>
                  Test
                </SortTh>
                <SortTh k="summary" sort={sort} toggle={toggle}>
                  Outcome
                </SortTh>
                <SortTh k="oven" sort={sort} toggle={toggle}>
                  Cured in
                </SortTh>
                <SortTh k="status" sort={sort} toggle={toggle}>
                  Job status
                </SortTh>
                <th scope="col">Trace</th>
              </tr>
            </thead>
            <tbody>
              {shown.map((r) => (
                <tr key={r.id} className={r.result === 'fail' ? 'bg-alert-bg/40' : ''}>
                  <td>
                    <ResultBadge result={r.result} />
                  </td>
                  <td className="num">
                    <a href={`/quality/tests/${r.id}`}>{t(r.testedAt)}</a>
                  </td>
                  <td className="num">{r.jobNumber}</td>
                  <td>{TEST_KIND_LABELS[r.kind]}</td>
                  <td>{r.summary}</td>
                  <td className="num">
                    {r.loadId ? (
                      <a href={`/loads/${r.loadId}`}>
                        {r.ovenCode} · load {r.loadId}
                      </a>
                    ) : (
                      '—'
                    )}
                  </td>
                  <td>
                    <JobStatusTag status={r.jobStatus} />
                  </td>
                  <td>
                    <a href={`/quality/trace/${encodeURIComponent(r.jobNumber)}`} aria-label={`Trace job ${r.jobNumber}`}>
                      Trace →
                    </a>
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
