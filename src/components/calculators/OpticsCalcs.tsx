/**
 * Calculator islands for AR coatings: the stack editor with its modelled reflectance curve and
 * residual colour, the colour of a pasted spectrum, and the colour difference of two CIELAB
 * colours. The server computes (POST /api/v1/calc/…); the browser only formats, draws and
 * shows a display swatch.
 */
import { useId, useState, type SyntheticEvent } from 'react';
import { apiFetch, ApiError } from '../../lib/client/api.ts';
import { swatchHex } from '../../lib/domain/colour/colorimetry.ts';
import { DEFAULT_MATERIALS, indexAt } from '../../lib/domain/optics/materials.ts';
import {
  MAX_SPECTRUM_POINTS,
  MAX_STACK_LAYERS,
  type ColourDifferenceOutput,
  type SpectrumColourOutput,
  type StackReflectanceOutput,
} from '../../lib/shared/optics.ts';
import CalcForm, { num, numberRows, opt, Out, sig, Warnings } from './CalcForm.tsx';

const COATINGS = DEFAULT_MATERIALS.filter((m) => m.role === 'coating');
const SUBSTRATES = DEFAULT_MATERIALS.filter((m) => m.role === 'substrate');

/** One editable row: a material of the table or a constant n, k. */
interface LayerRow {
  key: number;
  material: string; // material id or '' for a constant index
  n: string;
  k: string;
  thicknessNm: string;
}

let nextKey = 1;
const row = (material: string, thicknessNm: number, n = '1.5', k = ''): LayerRow => ({
  key: nextKey++,
  material,
  n,
  k,
  thicknessNm: String(thicknessNm),
});

/** A common four-layer AR shape (illustrative; not any maker's recipe). */
const EXAMPLE_STACK = () => [row('zro2', 15), row('sio2', 32), row('zro2', 115), row('sio2', 88)];

export const MODEL_NOTE =
  'These are modelled values from the design and the material table, not measurements. Film indices in your chamber differ from the table’s (several are marked “from memory”); judge real lenses by their measured spectra.';

/** Colour readout: swatch, L*a*b*, C*, h°, luminous reflectance, x, y. */
function ColourPanel({ c }: { c: SpectrumColourOutput }) {
  const hex = swatchHex(c.X, c.Y, c.Z);
  return (
    <div
      className="flex flex-wrap items-start gap-4"
      data-testid="colour-panel"
      data-luminous-pct={c.luminousReflectancePct.toFixed(2)}
    >
      <figure className="text-center">
        <div
          className="h-20 w-20 rounded border border-slate-line"
          style={{ backgroundColor: hex }}
          role="img"
          aria-label={`Display swatch of the reflected colour, hue ${c.hueDeg.toFixed(0)}°`}
          data-testid="colour-swatch"
        />
        <figcaption className="mt-1 max-w-[7rem] text-xs text-ink-soft">
          Hue shown brighter than it is; screens are not calibrated.
        </figcaption>
      </figure>
      <dl className="min-w-[14rem] flex-1">
        <Out label="Luminous reflectance ρv (ISO 13666, D65)" value={sig(c.luminousReflectancePct, 3)} unit="%" strong />
        <Out label="L*" value={c.L.toFixed(2)} />
        <Out label="a*" value={c.a.toFixed(2)} />
        <Out label="b*" value={c.b.toFixed(2)} />
        <Out label="Chroma C*ab" value={c.chroma.toFixed(2)} />
        <Out label="Hue angle h°" value={c.hueDeg.toFixed(1)} unit="°" />
        <Out label="Chromaticity x, y" value={`${c.x.toFixed(4)}, ${c.y.toFixed(4)}`} />
      </dl>
    </div>
  );
}

/** Reflectance (%) against wavelength (nm) as an SVG line, with a values table beneath. */
export function SpectrumChart({
  wavelengthsNm,
  valuesPct,
  label,
}: {
  wavelengthsNm: number[];
  valuesPct: number[];
  label: string;
}) {
  const W = 640;
  const H = 260;
  const m = { l: 48, r: 12, t: 12, b: 36 };
  const x0 = wavelengthsNm[0]!;
  const x1 = wavelengthsNm[wavelengthsNm.length - 1]!;
  const yMax = Math.max(1, ...valuesPct.map((v) => Math.ceil(v * 1.1)));
  const sx = (x: number) => m.l + ((x - x0) / Math.max(1e-9, x1 - x0)) * (W - m.l - m.r);
  const sy = (y: number) => H - m.b - (Math.max(0, y) / yMax) * (H - m.t - m.b);
  const points = wavelengthsNm.map((w, i) => `${sx(w).toFixed(1)},${sy(valuesPct[i]!).toFixed(1)}`).join(' ');
  const xTicks: number[] = [];
  for (let t = Math.ceil(x0 / 50) * 50; t <= x1; t += 50) xTicks.push(t);
  const yStep = yMax <= 2 ? 0.5 : yMax <= 5 ? 1 : yMax <= 20 ? 5 : 10;
  const yTicks: number[] = [];
  for (let t = 0; t <= yMax + 1e-9; t += yStep) yTicks.push(t);
  const csv = 'wavelength_nm,reflectance_pct\n' + wavelengthsNm.map((w, i) => `${w},${valuesPct[i]}`).join('\n');
  return (
    <figure>
      <svg viewBox={`0 0 ${W} ${H}`} className="w-full" role="img" aria-label={label} data-testid="reflectance-chart">
        {yTicks.map((t) => (
          <g key={`y${t}`}>
            <line x1={m.l} x2={W - m.r} y1={sy(t)} y2={sy(t)} stroke="#c9cdcf" strokeWidth={0.5} />
            <text x={m.l - 6} y={sy(t) + 4} textAnchor="end" fontSize={11} fill="#4a545b">
              {t}
            </text>
          </g>
        ))}
        {xTicks.map((t) => (
          <text key={`x${t}`} x={sx(t)} y={H - m.b + 16} textAnchor="middle" fontSize={11} fill="#4a545b">
            {t}
          </text>
        ))}
        <text x={(m.l + W - m.r) / 2} y={H - 4} textAnchor="middle" fontSize={11} fill="#4a545b">
          wavelength (nm)
        </text>
        <text
          x={12}
          y={(m.t + H - m.b) / 2}
          textAnchor="middle"
          fontSize={11}
          fill="#4a545b"
          transform={`rotate(-90 12 ${(m.t + H - m.b) / 2})`}
        >
          reflectance (%)
        </text>
        <polyline points={points} fill="none" stroke="#2f6f73" strokeWidth={2} />
      </svg>
      <figcaption className="mt-1 flex gap-3 text-xs text-ink-soft">
        <span>{label}</span>
        <a download="reflectance.csv" href={`data:text/csv;charset=utf-8,${encodeURIComponent(csv)}`}>
          Export CSV
        </a>
      </figcaption>
    </figure>
  );
}

function problemText(err: unknown): { title: string; lines: string[] } {
  if (err instanceof ApiError) return { title: err.detail ?? err.title, lines: err.errors.map((e) => `${e.path}: ${e.message}`) };
  return { title: 'The calculation could not be run (network error).', lines: [] };
}

/** The stack editor: layers in deposition order, the modelled reflectance curve and its colour. */
export function StackReflectanceCalc() {
  const id = useId();
  const [layers, setLayers] = useState<LayerRow[]>(EXAMPLE_STACK);
  const [substrate, setSubstrate] = useState('hi-160');
  const [substrateN, setSubstrateN] = useState('1.6');
  const [incidentN, setIncidentN] = useState('1');
  const [angleDeg, setAngleDeg] = useState('0');
  const [polarization, setPolarization] = useState<'average' | 's' | 'p'>('average');
  const [bothFaces, setBothFaces] = useState(false);
  const [range, setRange] = useState({ from: '380', to: '780', step: '5' });
  const [busy, setBusy] = useState(false);
  const [problem, setProblem] = useState<{ title: string; lines: string[] } | null>(null);
  const [result, setResult] = useState<{
    wavelengthsNm: number[];
    spectrum: StackReflectanceOutput;
    colour: SpectrumColourOutput | null;
    colourNote?: string;
  } | null>(null);

  const update = (key: number, patch: Partial<LayerRow>) =>
    setLayers((ls) => ls.map((l) => (l.key === key ? { ...l, ...patch } : l)));
  const move = (i: number, d: -1 | 1) =>
    setLayers((ls) => {
      const j = i + d;
      if (j < 0 || j >= ls.length) return ls;
      const copy = [...ls];
      [copy[i], copy[j]] = [copy[j]!, copy[i]!];
      return copy;
    });

  function wavelengths(): number[] | string {
    const from = num(range.from);
    const to = num(range.to);
    const step = num(range.step);
    if (from === undefined || to === undefined || step === undefined || !(step > 0) || !(to > from))
      return 'Give a wavelength range with from < to and a step above 0.';
    const count = Math.floor((to - from) / step + 1e-9) + 1;
    if (count > MAX_SPECTRUM_POINTS)
      return `That range has ${count} points; the limit is ${MAX_SPECTRUM_POINTS}. Use a larger step.`;
    return Array.from({ length: count }, (_, i) => Number((from + i * step).toFixed(6)));
  }

  async function submit(e: SyntheticEvent) {
    e.preventDefault();
    setProblem(null);
    const wl = wavelengths();
    if (typeof wl === 'string') return setProblem({ title: wl, lines: [] });
    const body = {
      layers: layers.map((l) =>
        l.material
          ? { material: l.material, thicknessNm: num(l.thicknessNm) ?? Number.NaN }
          : { n: num(l.n) ?? Number.NaN, ...opt('k', num(l.k)), thicknessNm: num(l.thicknessNm) ?? Number.NaN },
      ),
      substrateN: num(substrateN),
      ...opt('incidentN', num(incidentN)),
      wavelengthsNm: wl,
      ...opt('angleDeg', num(angleDeg)),
      polarization,
      bothFaces,
    };
    setBusy(true);
    try {
      const spectrum = await apiFetch<StackReflectanceOutput>('/api/v1/calc/stack-reflectance', { body });
      let colour: SpectrumColourOutput | null = null;
      let colourNote: string | undefined;
      if (wl.length >= 2 && wl[0]! <= 400 && wl[wl.length - 1]! >= 700) {
        colour = await apiFetch<SpectrumColourOutput>('/api/v1/calc/spectrum-colour', {
          body: { wavelengthsNm: wl, reflectancePct: spectrum.reflectancePct },
        });
      } else colourNote = 'The colour needs a range covering at least 400–700 nm.';
      setResult({ wavelengthsNm: wl, spectrum, colour, ...(colourNote ? { colourNote } : {}) });
    } catch (err) {
      setResult(null);
      setProblem(problemText(err));
    } finally {
      setBusy(false);
    }
  }

  return (
    <div className="space-y-6">
      <form onSubmit={submit} noValidate className="space-y-4" aria-label="Stack design">
        <fieldset>
          <legend className="font-bold">Layers in deposition order (layer 1 lies on the lens)</legend>
          <table className="mt-2 w-full text-sm">
            <thead>
              <tr className="text-left text-ink-soft">
                <th className="py-1 pr-2">#</th>
                <th className="pr-2">Material</th>
                <th className="pr-2">n</th>
                <th className="pr-2">k</th>
                <th className="pr-2">Thickness (nm)</th>
                <th>
                  <span className="sr-only">Actions</span>
                </th>
              </tr>
            </thead>
            <tbody>
              {layers.map((l, i) => {
                const mat = DEFAULT_MATERIALS.find((m) => m.id === l.material);
                const at550 = mat ? indexAt(mat.model, 550) : null;
                return (
                  <tr key={l.key} className="border-t border-slate-line" data-testid="layer-row">
                    <td className="py-1 pr-2 num">{i + 1}</td>
                    <td className="pr-2">
                      <select
                        aria-label={`Layer ${i + 1} material`}
                        value={l.material}
                        onChange={(e) => update(l.key, { material: e.target.value })}
                      >
                        {COATINGS.map((m) => (
                          <option key={m.id} value={m.id}>
                            {m.name}
                            {m.provenance === 'from memory' ? ' — from memory' : ''}
                          </option>
                        ))}
                        <option value="">Constant n, k</option>
                      </select>
                    </td>
                    <td className="pr-2">
                      {mat ? (
                        <span className="num text-ink-soft" title="at 550 nm">
                          {at550!.n.toFixed(3)}
                        </span>
                      ) : (
                        <input
                          aria-label={`Layer ${i + 1} n`}
                          className="num w-20"
                          inputMode="decimal"
                          value={l.n}
                          onChange={(e) => update(l.key, { n: e.target.value })}
                        />
                      )}
                    </td>
                    <td className="pr-2">
                      {mat ? (
                        <span className="num text-ink-soft">{at550!.k ? at550!.k.toFixed(3) : '0'}</span>
                      ) : (
                        <input
                          aria-label={`Layer ${i + 1} k`}
                          className="num w-20"
                          inputMode="decimal"
                          value={l.k}
                          placeholder="0"
                          onChange={(e) => update(l.key, { k: e.target.value })}
                        />
                      )}
                    </td>
                    <td className="pr-2">
                      <input
                        aria-label={`Layer ${i + 1} thickness (nm)`}
                        className="num w-24"
                        inputMode="decimal"
                        value={l.thicknessNm}
                        onChange={(e) => update(l.key, { thicknessNm: e.target.value })}
                      />
                    </td>
                    <td className="whitespace-nowrap">
                      <button
                        type="button"
                        className="btn-quiet px-2 py-0.5"
                        onClick={() => move(i, -1)}
                        aria-label={`Move layer ${i + 1} nearer the lens`}
                      >
                        ↑
                      </button>{' '}
                      <button
                        type="button"
                        className="btn-quiet px-2 py-0.5"
                        onClick={() => move(i, 1)}
                        aria-label={`Move layer ${i + 1} nearer the air`}
                      >
                        ↓
                      </button>{' '}
                      <button
                        type="button"
                        className="btn-quiet px-2 py-0.5"
                        onClick={() => setLayers((ls) => ls.filter((x) => x.key !== l.key))}
                        aria-label={`Remove layer ${i + 1}`}
                      >
                        ✕
                      </button>
                    </td>
                  </tr>
                );
              })}
            </tbody>
          </table>
          <p className="mt-2 flex flex-wrap gap-2">
            <button
              type="button"
              className="btn-quiet"
              disabled={layers.length >= MAX_STACK_LAYERS}
              onClick={() => setLayers((ls) => [...ls, row('sio2', 90)])}
            >
              Add a layer on top
            </button>
            <button type="button" className="btn-quiet" onClick={() => setLayers([])}>
              Clear (uncoated lens)
            </button>
            <button type="button" className="btn-quiet" onClick={() => setLayers(EXAMPLE_STACK())}>
              Example four-layer AR
            </button>
          </p>
          <p className="mt-1 text-xs text-ink-soft">
            Up to {MAX_STACK_LAYERS} layers. Table indices at 550 nm are shown; the calculation uses each material’s dispersion.
          </p>
        </fieldset>

        <div className="grid gap-3 sm:grid-cols-2 lg:grid-cols-4">
          <div>
            <label htmlFor={`${id}-sub`}>Lens material</label>
            <select
              id={`${id}-sub`}
              value={substrate}
              onChange={(e) => {
                setSubstrate(e.target.value);
                const m = SUBSTRATES.find((s) => s.id === e.target.value);
                if (m) setSubstrateN(indexAt(m.model, 550).n.toFixed(4));
              }}
            >
              {SUBSTRATES.map((m) => (
                <option key={m.id} value={m.id}>
                  {m.name}
                </option>
              ))}
              <option value="">Other (type n)</option>
            </select>
          </div>
          <div>
            <label htmlFor={`${id}-sn`}>Lens index n (at 550 nm, constant)</label>
            <input
              id={`${id}-sn`}
              className="num"
              inputMode="decimal"
              value={substrateN}
              onChange={(e) => {
                setSubstrate('');
                setSubstrateN(e.target.value);
              }}
            />
          </div>
          <div>
            <label htmlFor={`${id}-in`}>Incident medium n</label>
            <input
              id={`${id}-in`}
              className="num"
              inputMode="decimal"
              value={incidentN}
              onChange={(e) => setIncidentN(e.target.value)}
            />
          </div>
          <div>
            <label htmlFor={`${id}-ang`}>
              Angle of incidence <span className="font-normal text-ink-soft">(°)</span>
            </label>
            <input
              id={`${id}-ang`}
              className="num"
              inputMode="decimal"
              value={angleDeg}
              onChange={(e) => setAngleDeg(e.target.value)}
            />
          </div>
          <div>
            <label htmlFor={`${id}-pol`}>Polarisation</label>
            <select
              id={`${id}-pol`}
              value={polarization}
              onChange={(e) => setPolarization(e.target.value as 'average' | 's' | 'p')}
            >
              <option value="average">Unpolarised (average of s and p)</option>
              <option value="s">s</option>
              <option value="p">p</option>
            </select>
          </div>
          <div className="flex items-end">
            <label htmlFor={`${id}-both`} className="flex items-center gap-2 pb-2 font-normal">
              <input id={`${id}-both`} type="checkbox" checked={bothFaces} onChange={(e) => setBothFaces(e.target.checked)} />
              Both faces coated with this stack
            </label>
          </div>
          <fieldset className="sm:col-span-2">
            <legend>
              Wavelengths <span className="font-normal text-ink-soft">(nm: from, to, step)</span>
            </legend>
            <div className="flex gap-2">
              {(['from', 'to', 'step'] as const).map((k) => (
                <input
                  key={k}
                  aria-label={`Wavelength ${k} (nm)`}
                  className="num w-24"
                  inputMode="decimal"
                  value={range[k]}
                  onChange={(e) => setRange({ ...range, [k]: e.target.value })}
                />
              ))}
            </div>
          </fieldset>
        </div>
        <button type="submit" className="btn" disabled={busy} aria-busy={busy}>
          {busy ? 'Calculating…' : 'Calculate'}
        </button>
      </form>

      <section aria-live="polite" aria-label="Result" className="panel bg-slate-panel/40" data-testid="stack-result">
        <h2 className="mb-2">Modelled result</h2>
        {problem ? (
          <div role="alert" className="rounded border-l-4 border-alert-high bg-alert-bg p-2">
            <p>
              <strong>✕ No result.</strong> {problem.title}
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
          <div className="grid gap-4 lg:grid-cols-[3fr_2fr]">
            <SpectrumChart
              wavelengthsNm={result.wavelengthsNm}
              valuesPct={result.spectrum.reflectancePct}
              label={`Modelled reflectance, ${bothFaces ? 'both faces' : 'one face'}, ${angleDeg || 0}°, ${polarization}`}
            />
            <div>
              {result.colour ? <ColourPanel c={result.colour} /> : <p className="text-ink-soft">{result.colourNote}</p>}
              <Warnings items={[...(result.spectrum.warnings ?? []), ...(result.colour?.warnings ?? [])]} />
            </div>
          </div>
        ) : (
          <p className="text-ink-soft">Edit the stack and press Calculate.</p>
        )}
        <p className="caution mt-3">
          <strong>Model, not measurement.</strong> {MODEL_NOTE}
        </p>
      </section>
    </div>
  );
}

/** Colour of a pasted reflectance spectrum (wavelength nm, reflectance %). */
export function SpectrumColourCalc() {
  const example = Array.from({ length: 41 }, (_, i) => {
    const w = 380 + i * 10;
    return `${w}, ${(0.6 + 2.5 * ((w - 530) / 250) ** 2).toFixed(3)}`;
  }).join('\n');
  return (
    <CalcForm<SpectrumColourOutput>
      endpoint="/api/v1/calc/spectrum-colour"
      fields={[
        {
          name: 'spectrum',
          label: 'Spectrum, one row per wavelength: wavelength (nm), reflectance (%)',
          type: 'textarea',
          rows: 12,
          initial: example,
          hint: `Wavelengths increasing, covering at least 400–700 nm (380–780 preferred), at most ${MAX_SPECTRUM_POINTS} rows.`,
        },
      ]}
      build={(v) => {
        const rows = numberRows(v['spectrum'] ?? '');
        return { wavelengthsNm: rows.map((r) => r[0]), reflectancePct: rows.map((r) => r[1]) };
      }}
      render={(c) => (
        <>
          <ColourPanel c={c} />
          <Warnings items={c.warnings} />
        </>
      )}
    />
  );
}

/** ΔE76 and CIEDE2000 between two CIELAB colours (e.g. the two lenses of a pair). */
export function ColourDifferenceCalc() {
  const f = (name: string, label: string, initial: string) => ({ name, label, initial });
  return (
    <CalcForm<ColourDifferenceOutput>
      endpoint="/api/v1/calc/colour-difference"
      fields={[
        f('L1', 'Colour 1 L*', '50'),
        f('a1', 'Colour 1 a*', '2.6772'),
        f('b1', 'Colour 1 b*', '-79.7751'),
        f('L2', 'Colour 2 L*', '50'),
        f('a2', 'Colour 2 a*', '0'),
        f('b2', 'Colour 2 b*', '-82.7485'),
      ]}
      build={(v) => ({
        lab1: [num(v['L1']), num(v['a1']), num(v['b1'])],
        lab2: [num(v['L2']), num(v['a2']), num(v['b2'])],
      })}
      render={(r) => (
        <dl>
          <Out label="ΔE00 (CIEDE2000)" value={r.deltaE2000.toFixed(4)} strong />
          <Out label="ΔE*ab (CIE 1976)" value={r.deltaE76.toFixed(4)} />
        </dl>
      )}
    />
  );
}
