/** The measurement-system calculators: gauge R&R, bias and linearity (the server computes, AIAG MSA 4th ed.). */
import CalcForm, { num, numberRows, opt } from './CalcForm.tsx';
import { StudyCsvError, parseGaugeRrCsv } from '../../lib/shared/msa.ts';

const f = (x: number | null | undefined, d = 4) =>
  x === null || x === undefined || !Number.isFinite(x) ? '—' : Number(x.toPrecision(d)).toString();

interface Component {
  variance: number;
  sd: number;
  pctTotalVariation: number;
  pctTolerance: number | null;
}

// An invented example: 5 lenses, 2 appraisers, 2 trials (µm).
const EXAMPLE = [
  'appraiser,part,trial,value',
  ...[3.1, 3.6, 2.8, 4.0, 3.3].flatMap((v, p) =>
    ['A', 'B'].flatMap((a, ai) =>
      [1, 2].map((t) => `${a},${p + 1},${t},${(v + ai * 0.05 + (t === 2 ? 0.04 : -0.03) * (p % 2 ? 1 : -1)).toFixed(2)}`),
    ),
  ),
].join('\n');

export function GaugeRrCalc() {
  return (
    <CalcForm<{
      verdict: string;
      reasons: string[];
      grr: {
        repeatability: Component;
        reproducibility: Component;
        grr: Component;
        partVariation: Component;
        totalVariation: Component;
        ndc: number;
      };
    }>
      endpoint="/api/v1/calc/gauge-rr"
      fields={[
        {
          name: 'method',
          label: 'Method',
          type: 'select',
          options: [
            { value: 'anova', label: 'ANOVA' },
            { value: 'average-range', label: 'Average and range' },
          ],
          initial: 'anova',
        },
        { name: 'tolerance', label: 'Tolerance USL − LSL (optional)' },
        { name: 'readings', label: 'Readings as CSV: appraiser,part,trial,value', type: 'textarea', rows: 12, initial: EXAMPLE },
      ]}
      build={(v) => {
        let readings: unknown[] = [];
        try {
          readings = parseGaugeRrCsv(v['readings'] ?? '');
        } catch (e) {
          if (!(e instanceof StudyCsvError)) throw e;
        }
        return { method: v['method'], ...opt('tolerance', num(v['tolerance'])), readings };
      }}
      render={(r) => (
        <div>
          <p>
            Verdict: <strong data-verdict={r.verdict}>{r.verdict}</strong> · ndc {r.grr.ndc}
          </p>
          <table className="text-sm">
            <thead>
              <tr>
                <th>Source</th>
                <th>σ</th>
                <th>% of TV</th>
                <th>% of tolerance</th>
              </tr>
            </thead>
            <tbody>
              {(
                [
                  ['Repeatability (EV)', r.grr.repeatability],
                  ['Reproducibility (AV)', r.grr.reproducibility],
                  ['GRR', r.grr.grr],
                  ['Part variation (PV)', r.grr.partVariation],
                  ['Total (TV)', r.grr.totalVariation],
                ] as const
              ).map(([name, c]) => (
                <tr key={name}>
                  <td>{name}</td>
                  <td>{f(c.sd)}</td>
                  <td>{c.pctTotalVariation.toFixed(1)}</td>
                  <td>{c.pctTolerance === null ? '—' : c.pctTolerance.toFixed(1)}</td>
                </tr>
              ))}
            </tbody>
          </table>
          <ul className="list-disc pl-5 text-sm">
            {r.reasons.map((x) => (
              <li key={x}>{x}</li>
            ))}
          </ul>
        </div>
      )}
    />
  );
}

export function GaugeBiasCalc() {
  return (
    <CalcForm<{ verdict: string; reasons: string[]; bias: { bias: number; t: number; p: number; ci: [number, number] } }>
      endpoint="/api/v1/calc/gauge-bias"
      fields={[
        { name: 'reference', label: 'Reference value', initial: '3.00' },
        {
          name: 'readings',
          label: 'Readings, one per line or comma-separated',
          type: 'textarea',
          rows: 6,
          initial: '3.02, 2.98, 3.05, 3.01, 2.97, 3.03, 3.00, 3.04, 2.99, 3.02',
        },
      ]}
      build={(v) => ({ ...opt('reference', num(v['reference'])), readings: numberRows(v['readings'] ?? '').flat() })}
      render={(r) => (
        <p>
          Bias {f(r.bias.bias)} (t {f(r.bias.t)}, p {f(r.bias.p, 3)}); 95 % interval {f(r.bias.ci[0])} to {f(r.bias.ci[1])} →{' '}
          <strong data-verdict={r.verdict}>{r.verdict}</strong>
        </p>
      )}
    />
  );
}

export function GaugeLinearityCalc() {
  return (
    <CalcForm<{ verdict: string; reasons: string[] }>
      endpoint="/api/v1/calc/gauge-linearity"
      fields={[
        {
          name: 'points',
          label: 'One “reference, reading” pair per line',
          type: 'textarea',
          rows: 10,
          initial: '1, 1.02\n1, 1.01\n2, 2.03\n2, 2.01\n3, 3.02\n3, 3.04\n4, 4.03\n4, 4.05',
        },
      ]}
      build={(v) => ({ points: numberRows(v['points'] ?? '').map(([reference, reading]) => ({ reference, reading })) })}
      render={(r) => (
        <div>
          <p>
            Verdict: <strong data-verdict={r.verdict}>{r.verdict}</strong>
          </p>
          <ul className="list-disc pl-5 text-sm">
            {r.reasons.map((x) => (
              <li key={x}>{x}</li>
            ))}
          </ul>
        </div>
      )}
    />
  );
}
