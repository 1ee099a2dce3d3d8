/** Calculator islands for quality and ovens: fringes (two extrema or a spectrum upload), cross-cut, abrasion, uniformity. */
import { useId, useState, type SyntheticEvent } from 'react';
import { MAX_SPECTRUM_BYTES, SpectrumOptionsSchema } from '../../lib/shared/spectrum.ts';
import CalcForm, { num, opt, Out, sig } from './CalcForm.tsx';

export function FringeThicknessCalc() {
  return (
    <CalcForm<{ thicknessNm: number }>
      endpoint="/api/v1/calc/fringe-thickness"
      fields={[
        { name: 'lambda1Nm', label: 'Longer-wavelength extremum λ1', unit: 'nm', initial: '600' },
        { name: 'lambda2Nm', label: 'Shorter-wavelength extremum λ2', unit: 'nm', initial: '500' },
        { name: 'refractiveIndex', label: 'Coat refractive index n', initial: '1.5' },
        {
          name: 'fringes',
          label: 'Fringe orders between them (optional)',
          unit: 'count',
          hint: '1 for adjacent maxima (or minima).',
        },
      ]}
      build={(v) => ({
        ...opt('lambda1Nm', num(v['lambda1Nm'])),
        ...opt('lambda2Nm', num(v['lambda2Nm'])),
        ...opt('refractiveIndex', num(v['refractiveIndex'])),
        ...opt('fringes', num(v['fringes'])),
      })}
      render={(r) => (
        <dl>
          <Out label="Thickness d = N·λ1·λ2 / (2n(λ1 − λ2))" value={sig(r.thicknessNm)} unit="nm" strong />
          <Out label="In micrometres" value={sig(r.thicknessNm / 1000)} unit="µm" />
        </dl>
      )}
    />
  );
}

interface Extremum {
  wavelengthNm: number;
  kind: string;
}
interface SpectrumResult {
  thicknessNm: number;
  sdNm: number;
  count: number;
  contrast: number;
  points: number;
  maxima: Extremum[];
  minima: Extremum[];
}

export function SpectrumUpload() {
  const id = useId();
  const [file, setFile] = useState<File | null>(null);
  const [n, setN] = useState('1.5');
  const [busy, setBusy] = useState(false);
  const [result, setResult] = useState<SpectrumResult | null>(null);
  const [problem, setProblem] = useState<{ title: string; lines: string[] } | null>(null);

  async function submit(e: SyntheticEvent) {
    e.preventDefault();
    setResult(null);
    setProblem(null);
    if (!file) return setProblem({ title: 'Choose a CSV file first.', lines: [] });
    if (file.size > MAX_SPECTRUM_BYTES)
      return setProblem({ title: `The file is ${(file.size / 1048576).toFixed(2)} MB; the limit is 1 MB.`, lines: [] });
    const opts = SpectrumOptionsSchema.safeParse({ refractiveIndex: n });
    if (!opts.success) return setProblem({ title: opts.error.issues.map((i) => i.message).join(' '), lines: [] });
    const form = new FormData();
    form.set('file', file);
    form.set('refractiveIndex', n);
    setBusy(true);
    try {
      const r = await fetch('/api/v1/calc/fringe-thickness/spectrum', { method: 'POST', body: form, credentials: 'same-origin' });
      const data = await r.json().catch(() => null);
      if (!r.ok) {
        setProblem({
          title: data?.title ? `${data.title}.` : `HTTP ${r.status}`,
          lines: (data?.errors ?? []).map(
            (x: { path: string; message: string }) => `${x.path.replace('file:', '')}: ${x.message}`,
          ),
        });
      } else setResult(data as SpectrumResult);
    } catch {
      setProblem({ title: 'The upload failed (network error).', lines: [] });
    } finally {
      setBusy(false);
    }
  }

  return (
    <div className="grid gap-6 lg:grid-cols-2">
      <form onSubmit={submit} noValidate className="space-y-3">
        <div>
          <label htmlFor={`${id}-file`}>Reflectance spectrum (CSV: wavelength nm, reflectance; at most 1 MB)</label>
          <input
            id={`${id}-file`}
            type="file"
            accept=".csv,text/csv,text/plain"
            onChange={(e) => setFile(e.target.files?.[0] ?? null)}
          />
        </div>
        <div>
          <label htmlFor={`${id}-n`}>Coat refractive index n</label>
          <input id={`${id}-n`} inputMode="decimal" className="num" value={n} onChange={(e) => setN(e.target.value)} />
        </div>
        <button type="submit" className="btn" disabled={busy} aria-busy={busy}>
          {busy ? 'Reading the spectrum…' : 'Find the fringes'}
        </button>
      </form>
      <section aria-live="polite" aria-label="Spectrum result" className="panel bg-slate-panel/40">
        <h2 className="mb-2">From the spectrum</h2>
        {problem ? (
          <div role="alert" className="rounded border-l-4 border-alert-high bg-alert-bg p-2">
            <p>
              <strong>✕ {problem.title}</strong>
            </p>
            {problem.lines.length > 0 && (
              <ul className="mt-1 list-disc pl-5 text-sm">
                {problem.lines.map((l) => (
                  <li key={l}>{l}</li>
                ))}
              </ul>
            )}
          </div>
        ) : result ? (
          <dl>
            <Out label="Thickness (mean of adjacent pairs)" value={sig(result.thicknessNm)} unit="nm" strong />
            <Out label="Spread (SD)" value={sig(result.sdNm, 3)} unit="nm" />
            <Out label="Pairs used" value={result.count} />
            <Out label="Fringe contrast" value={sig(result.contrast, 3)} />
            <Out label="Maxima at" value={result.maxima.map((m) => m.wavelengthNm.toFixed(1)).join(', ')} unit="nm" />
            <Out label="Minima at" value={result.minima.map((m) => m.wavelengthNm.toFixed(1)).join(', ')} unit="nm" />
            <Out label="Rows read" value={result.points} />
          </dl>
        ) : (
          <p className="text-ink-soft">Upload a spectrum to find its extrema.</p>
        )}
      </section>
    </div>
  );
}

export function CrosscutCalc() {
  return (
    <CalcForm<{ iso2409: number; astmD3359: string }>
      endpoint="/api/v1/calc/crosscut"
      fields={[{ name: 'percentRemoved', label: 'Area of the lattice removed', unit: '%', initial: '0' }]}
      build={(v) => ({ ...opt('percentRemoved', num(v['percentRemoved'])) })}
      render={(r) => (
        <dl>
          <Out label="ISO 2409 class" value={r.iso2409} strong />
          <Out label="ASTM D3359 (method B)" value={r.astmD3359} strong />
        </dl>
      )}
    />
  );
}

export function AbrasionCalc() {
  return (
    <CalcForm<{ bayerRatio: number; premium: boolean }>
      endpoint="/api/v1/calc/abrasion"
      fields={[
        { name: 'referenceHazeGainPct', label: 'Haze gain of the uncoated CR-39 reference', unit: 'haze %', initial: '20' },
        { name: 'testHazeGainPct', label: 'Haze gain of the test lens', unit: 'haze %', initial: '5' },
      ]}
      build={(v) => ({
        ...opt('referenceHazeGainPct', num(v['referenceHazeGainPct'])),
        ...opt('testHazeGainPct', num(v['testHazeGainPct'])),
      })}
      render={(r) => (
        <dl>
          <Out label="Bayer ratio" value={sig(r.bayerRatio, 3)} strong />
          <Out label="Premium (≥ 4, common practice)" value={r.premium ? 'yes' : 'no'} />
        </dl>
      )}
    />
  );
}

export function UniformityCalc() {
  return (
    <CalcForm<{
      hottestDeviationC: number;
      coldestDeviationC: number;
      hottestSensor: string;
      coldestSensor: string;
      uniformityClass: number | null;
      classToleranceC: number | null;
      message?: string;
    }>
      endpoint="/api/v1/calc/uniformity"
      fields={[
        { name: 'setpointC', label: 'Setpoint', unit: '°C', initial: '110' },
        {
          name: 'sensors',
          label: 'Sensors, one per line: name: readings… (optionally "name [correction]: readings")',
          unit: '°C',
          type: 'textarea',
          rows: 8,
          initial:
            'front-left: 111.2, 111.8, 112.0\nfront-right: 109.5, 109.9, 110.3\nback-left: 108.9, 109.2, 109.0\nback-right: 110.8, 111.1, 110.7\ncentre: 110.1, 110.4, 110.2',
        },
        { name: 'stabilisedFromIndex', label: 'First reading of the stabilised soak (optional)', unit: 'index from 0' },
      ]}
      build={(v) => ({
        ...opt('setpointC', num(v['setpointC'])),
        sensors: (v['sensors'] ?? '')
          .split(/\r?\n/)
          .map((l) => l.trim())
          .filter((l) => l && !l.startsWith('#'))
          .map((l) => {
            const [head = '', rest = ''] = l.split(/:(.*)/s);
            const m = head.match(/^(.*?)\s*\[([-+0-9.,]+)\]\s*$/);
            const name = (m ? m[1] : head)?.trim() ?? '';
            const correction = m ? Number(m[2]!.replace(',', '.')) : undefined;
            const readingsC = rest
              .split(/[,;\s]+/)
              .filter(Boolean)
              .map((x) => Number(x.replace(',', '.')));
            return { name, readingsC, ...opt('correctionC', correction) };
          }),
        ...opt('stabilisedFromIndex', num(v['stabilisedFromIndex'])),
      })}
      render={(r) => (
        <dl>
          <Out
            label="Hottest deviation"
            value={`${r.hottestDeviationC >= 0 ? '+' : ''}${sig(r.hottestDeviationC, 3)}`}
            unit={`°C (${r.hottestSensor})`}
            strong
          />
          <Out
            label="Coldest deviation"
            value={`${r.coldestDeviationC >= 0 ? '+' : ''}${sig(r.coldestDeviationC, 3)}`}
            unit={`°C (${r.coldestSensor})`}
            strong
          />
          <Out
            label="Uniformity class (AMS2750F Table 11 template)"
            value={r.uniformityClass === null ? '✕ outside every class' : `class ${r.uniformityClass} (±${r.classToleranceC} °C)`}
            strong
          />
        </dl>
      )}
    />
  );
}
