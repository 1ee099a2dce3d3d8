/**
 * The study form: the gauge, a title and the method, then a data-entry grid (appraisers ×
 * parts × trials) filled by hand or from a CSV file (`appraiser,part,trial,value`); bias and
 * linearity studies take their readings as lines. The server computes and stores; the page
 * then opens the printable report.
 */
import { useState, type ChangeEvent, type SyntheticEvent } from 'react';
import { apiFetch, ApiError } from '../../lib/client/api.ts';
import { StudyCsvError, parseGaugeRrCsv } from '../../lib/shared/msa.ts';

interface GaugeOption {
  id: number;
  name: string;
  unit: string;
}

type Kind = 'grr' | 'bias' | 'linearity';

const numOrNull = (s: string) => (s.trim() === '' ? null : Number(s.trim().replace(',', '.')));

export function GaugeStudyEditor({ gauges }: { gauges: GaugeOption[] }) {
  const [gaugeId, setGaugeId] = useState(String(gauges[0]?.id ?? ''));
  const [title, setTitle] = useState('');
  const [kind, setKind] = useState<Kind>('grr');
  const [method, setMethod] = useState<'anova' | 'average-range'>('anova');
  const [tolerance, setTolerance] = useState('');
  const [appraisers, setAppraisers] = useState(['A', 'B', 'C']);
  const [parts, setParts] = useState(10);
  const [trials, setTrials] = useState(3);
  const [cells, setCells] = useState<Record<string, string>>({});
  const [reference, setReference] = useState('');
  const [lines, setLines] = useState('');
  const [messages, setMessages] = useState<string[]>([]);
  const [busy, setBusy] = useState(false);
  const key = (a: number, p: number, t: number) => `${a}:${p}:${t}`;

  function importCsv(e: ChangeEvent<HTMLInputElement>) {
    const file = e.target.files?.[0];
    if (!file) return;
    void file.text().then((text) => {
      try {
        const rows = parseGaugeRrCsv(text);
        const names = [...new Set(rows.map((r) => r.appraiser))];
        const next: Record<string, string> = {};
        for (const r of rows) next[key(names.indexOf(r.appraiser), r.part, r.trial)] = String(r.value);
        setAppraisers(names);
        setParts(Math.max(...rows.map((r) => r.part)));
        setTrials(Math.max(...rows.map((r) => r.trial)));
        setCells(next);
        setMessages([`${rows.length} readings imported from ${file.name}.`]);
      } catch (err) {
        setMessages(err instanceof StudyCsvError ? err.errors.map((x) => `line ${x.line}: ${x.message}`) : [String(err)]);
      }
    });
  }

  function body() {
    const common = { gaugeId: Number(gaugeId), title: title.trim() };
    if (kind === 'grr') {
      const readings = [];
      for (let a = 0; a < appraisers.length; a += 1)
        for (let p = 1; p <= parts; p += 1)
          for (let t = 1; t <= trials; t += 1) {
            const v = numOrNull(cells[key(a, p, t)] ?? '');
            if (v !== null) readings.push({ appraiser: appraisers[a]!, part: p, trial: t, value: v });
          }
      return { ...common, kind, method, ...(numOrNull(tolerance) === null ? {} : { tolerance: numOrNull(tolerance) }), readings };
    }
    const rows = lines
      .split(/\r?\n/)
      .map((l) => l.trim())
      .filter(Boolean)
      .map((l) => l.split(/[,;\t ]+/).map((c) => Number(c.replace(',', '.'))));
    if (kind === 'bias') return { ...common, kind, reference: numOrNull(reference), readings: rows.flat() };
    return { ...common, kind, points: rows.map(([reference, reading]) => ({ reference, reading })) };
  }

  async function save(e: SyntheticEvent) {
    e.preventDefault();
    setBusy(true);
    setMessages([]);
    try {
      const r = await apiFetch<{ id: number }>('/api/v1/gauges/studies', { body: body() });
      window.location.href = `/gauges/studies/${r.id}`;
    } catch (err) {
      setMessages(
        err instanceof ApiError ? [err.detail ?? err.title, ...err.errors.map((x) => `${x.path}: ${x.message}`)] : [String(err)],
      );
    } finally {
      setBusy(false);
    }
  }

  return (
    <form onSubmit={save} className="space-y-3" aria-label="New gauge study">
      <div className="flex flex-wrap gap-3">
        <label>
          Gauge{' '}
          <select value={gaugeId} onChange={(e) => setGaugeId(e.target.value)} name="gaugeId">
            {gauges.map((g) => (
              <option key={g.id} value={g.id}>
                {g.name} ({g.unit})
              </option>
            ))}
          </select>
        </label>
        <label>
          Title <input name="title" value={title} onChange={(e) => setTitle(e.target.value)} required maxLength={120} />
        </label>
        <label>
          Study{' '}
          <select name="kind" value={kind} onChange={(e) => setKind(e.target.value as Kind)}>
            <option value="grr">Gauge R&amp;R</option>
            <option value="bias">Bias</option>
            <option value="linearity">Linearity</option>
          </select>
        </label>
      </div>
      {kind === 'grr' ? (
        <>
          <div className="flex flex-wrap items-end gap-3">
            <label>
              Method{' '}
              <select name="method" value={method} onChange={(e) => setMethod(e.target.value as 'anova' | 'average-range')}>
                <option value="anova">ANOVA</option>
                <option value="average-range">Average and range</option>
              </select>
            </label>
            <label>
              Tolerance (USL − LSL, optional){' '}
              <input name="tolerance" value={tolerance} onChange={(e) => setTolerance(e.target.value)} inputMode="decimal" />
            </label>
            <label>
              Appraisers (comma-separated){' '}
              <input
                name="appraisers"
                value={appraisers.join(', ')}
                onChange={(e) =>
                  setAppraisers(
                    e.target.value
                      .split(',')
                      .map((s) => s.trim())
                      .filter(Boolean),
                  )
                }
              />
            </label>
            <label>
              Parts{' '}
              <input
                name="parts"
                type="number"
                min={2}
                max={50}
                value={parts}
                onChange={(e) => setParts(Number(e.target.value))}
              />
            </label>
            <label>
              Trials{' '}
              <input
                name="trials"
                type="number"
                min={2}
                max={10}
                value={trials}
                onChange={(e) => setTrials(Number(e.target.value))}
              />
            </label>
            <label>
              Import CSV (appraiser,part,trial,value){' '}
              <input type="file" accept=".csv,text/csv,text/plain" onChange={importCsv} name="csv" />
            </label>
          </div>
          <div className="overflow-x-auto">
            <table className="text-sm" aria-label="Readings">
              <thead>
                <tr>
                  <th>Appraiser</th>
                  <th>Trial</th>
                  {Array.from({ length: parts }, (_, p) => (
                    <th key={p}>Part {p + 1}</th>
                  ))}
                </tr>
              </thead>
              <tbody>
                {appraisers.flatMap((name, a) =>
                  Array.from({ length: trials }, (_, t) => (
                    <tr key={`${a}-${t}`}>
                      <td>{name}</td>
                      <td>{t + 1}</td>
                      {Array.from({ length: parts }, (_, p) => (
                        <td key={p}>
                          <input
                            aria-label={`${name} trial ${t + 1} part ${p + 1}`}
                            className="w-20"
                            inputMode="decimal"
                            value={cells[key(a, p + 1, t + 1)] ?? ''}
                            onChange={(e) => setCells({ ...cells, [key(a, p + 1, t + 1)]: e.target.value })}
                          />
                        </td>
                      ))}
                    </tr>
                  )),
                )}
              </tbody>
            </table>
          </div>
        </>
      ) : (
        <div className="flex flex-wrap gap-3">
          {kind === 'bias' && (
            <label>
              Reference value{' '}
              <input name="reference" value={reference} onChange={(e) => setReference(e.target.value)} inputMode="decimal" />
            </label>
          )}
          <label className="block">
            {kind === 'bias' ? 'Readings of the reference part, one per line' : 'One “reference, reading” pair per line'}
            <textarea name="lines" rows={10} cols={40} value={lines} onChange={(e) => setLines(e.target.value)} />
          </label>
        </div>
      )}
      <button type="submit" className="btn" disabled={busy || !gaugeId}>
        {busy ? 'Computing…' : 'Compute and save'}
      </button>
      {messages.length > 0 && (
        <ul role="status" className="text-sm">
          {messages.map((m, i) => (
            <li key={i}>{m}</li>
          ))}
        </ul>
      )}
    </form>
  );
}

export function GaugeCreateForm() {
  const [name, setName] = useState('');
  const [kind, setKind] = useState('thickness');
  const [unit, setUnit] = useState('µm');
  const [message, setMessage] = useState<string | null>(null);
  async function save(e: SyntheticEvent) {
    e.preventDefault();
    try {
      await apiFetch('/api/v1/gauges', { body: { name: name.trim(), kind, unit: unit.trim() } });
      window.location.reload();
    } catch (err) {
      setMessage(err instanceof ApiError ? (err.errors[0]?.message ?? err.detail ?? err.title) : String(err));
    }
  }
  return (
    <form onSubmit={save} className="flex flex-wrap items-end gap-3" aria-label="New gauge">
      <label>
        Name <input name="name" value={name} onChange={(e) => setName(e.target.value)} required maxLength={80} />
      </label>
      <label>
        Kind{' '}
        <select name="kind" value={kind} onChange={(e) => setKind(e.target.value)}>
          <option value="thickness">Thickness gauge</option>
          <option value="haze">Haze meter</option>
          <option value="viscosity-cup">Viscosity cup</option>
          <option value="other">Other</option>
        </select>
      </label>
      <label>
        Unit <input name="unit" value={unit} onChange={(e) => setUnit(e.target.value)} required maxLength={20} />
      </label>
      <button type="submit" className="btn">
        Add gauge
      </button>
      {message && <p role="alert">{message}</p>}
    </form>
  );
}

/** Link a characteristic to the gauge that measures it (or clear the link). */
export function CharacteristicGaugeForm({
  characteristics,
  gauges,
}: {
  characteristics: { id: number; name: string; gaugeId: number | null }[];
  gauges: GaugeOption[];
}) {
  const [characteristicId, setCharacteristicId] = useState(String(characteristics[0]?.id ?? ''));
  const current = characteristics.find((c) => String(c.id) === characteristicId);
  const [gaugeId, setGaugeId] = useState(String(current?.gaugeId ?? ''));
  const [message, setMessage] = useState<string | null>(null);
  async function save(e: SyntheticEvent) {
    e.preventDefault();
    try {
      await apiFetch(`/api/v1/characteristics/${characteristicId}/gauge`, {
        method: 'PUT',
        body: { gaugeId: gaugeId === '' ? null : Number(gaugeId) },
      });
      setMessage('Saved.');
    } catch (err) {
      setMessage(err instanceof ApiError ? (err.errors[0]?.message ?? err.detail ?? err.title) : String(err));
    }
  }
  return (
    <form onSubmit={save} className="flex flex-wrap items-end gap-3" aria-label="Gauge of a characteristic">
      <label>
        Characteristic{' '}
        <select
          name="characteristicId"
          value={characteristicId}
          onChange={(e) => {
            setCharacteristicId(e.target.value);
            setGaugeId(String(characteristics.find((c) => String(c.id) === e.target.value)?.gaugeId ?? ''));
          }}
        >
          {characteristics.map((c) => (
            <option key={c.id} value={c.id}>
              {c.name}
            </option>
          ))}
        </select>
      </label>
      <label>
        Measured with{' '}
        <select name="linkGaugeId" value={gaugeId} onChange={(e) => setGaugeId(e.target.value)}>
          <option value="">— no gauge —</option>
          {gauges.map((g) => (
            <option key={g.id} value={g.id}>
              {g.name}
            </option>
          ))}
        </select>
      </label>
      <button type="submit" className="btn">
        Save link
      </button>
      {message && <p role="status">{message}</p>}
    </form>
  );
}
