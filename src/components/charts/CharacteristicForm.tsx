/**
 * The engineer's form to create or edit a characteristic: source channel(s), how subgroups are
 * formed, the chart and its run rules, and the specification (fixed, or from the process window
 * in force). Validated in the browser with the same schema the API uses.
 */
import { useMemo, useState, type SyntheticEvent } from 'react';
import { apiFetch, ApiError } from '../../lib/client/api.ts';
import {
  CHARACTERISTIC_CHARTS,
  CHART_LABELS,
  CharacteristicInputSchema,
  describeSubgroupRule,
  RULE_LABELS,
  SUBGROUP_RULE_LABELS,
  SubgroupRuleSchema,
  WINDOW_SPEC_KEYS,
  WINDOW_SPEC_LABELS,
  type Characteristic,
  type CharacteristicChart,
  type SubgroupRuleKind,
  type WindowSpecKey,
} from '../../lib/shared/characteristics.ts';
import { SPC_RULE_IDS, type SpcRuleId } from '../../lib/shared/spc.ts';

export interface ChannelOption {
  id: number;
  name: string;
  unit: string;
  kind: string;
  assetName: string;
}

interface Props {
  channels: ChannelOption[];
  /** Editing an existing characteristic (null: a new one). */
  existing: Characteristic | null;
  /** Whether the existing chart holds points (then how points are formed is fixed). */
  hasPoints: boolean;
}

const num = (s: string): number | undefined => (s.trim() === '' ? undefined : Number(s));
const str = (n: number | undefined) => (n === undefined ? '' : String(n));

export function CharacteristicForm({ channels, existing, hasPoints }: Props) {
  const e = existing;
  const [name, setName] = useState(e?.name ?? '');
  const [description, setDescription] = useState(e?.description ?? '');
  const [channelIds, setChannelIds] = useState<number[]>(e?.channelIds ?? []);
  const [ruleKind, setRuleKind] = useState<SubgroupRuleKind>(e?.subgroupRule.kind ?? 'per-dip-stroke');
  const [minutes, setMinutes] = useState(e?.subgroupRule.kind === 'per-n-minutes' ? String(e.subgroupRule.minutes) : '10');
  const [mode, setMode] = useState<'first' | 'means'>(e?.subgroupRule.kind === 'per-n-minutes' ? e.subgroupRule.mode : 'first');
  const [spacing, setSpacing] = useState(
    e?.subgroupRule.kind === 'per-manual-check' ? String(e.subgroupRule.minSpacingMinutes) : '60',
  );
  const [size, setSize] = useState(String(e?.subgroupSize ?? 1));
  const [chart, setChart] = useState<CharacteristicChart>(e?.chart ?? 'imr');
  const [lambda, setLambda] = useState(str(e?.chartParams.lambda));
  const [L, setL] = useState(str(e?.chartParams.L));
  const [ewmaLimits, setEwmaLimits] = useState<'' | 'exact' | 'asymptotic'>(e?.chartParams.limits ?? '');
  const [k, setK] = useState(str(e?.chartParams.k));
  const [h, setH] = useState(str(e?.chartParams.h));
  const [headStart, setHeadStart] = useState(str(e?.chartParams.headStart));
  const [sigmaBasis, setSigmaBasis] = useState<'within' | 'overall'>(e?.chartParams.sigmaBasis ?? 'within');
  const [rules, setRules] = useState<SpcRuleId[]>(e?.rules ?? ['we1', 'we2', 'we3', 'we4']);
  const [specMode, setSpecMode] = useState<'none' | 'fixed' | 'window'>(e?.spec.mode ?? 'window');
  const [lsl, setLsl] = useState(e?.spec.mode === 'fixed' ? str(e.spec.lsl) : '');
  const [usl, setUsl] = useState(e?.spec.mode === 'fixed' ? str(e.spec.usl) : '');
  const [target, setTarget] = useState(e?.spec.mode === 'fixed' ? str(e.spec.target) : '');
  const [windowKey, setWindowKey] = useState<WindowSpecKey>(e?.spec.mode === 'window' ? e.spec.key : 'withdrawalSpeedMmS');
  const [unit, setUnit] = useState(e?.unit ?? '');
  const [active, setActive] = useState(e?.active ?? true);
  const [backfillDays, setBackfillDays] = useState('14');
  const [errors, setErrors] = useState<Record<string, string>>({});
  const [busy, setBusy] = useState(false);
  const [failure, setFailure] = useState<string | null>(null);
  const fixed = !!e && hasPoints;

  const byAsset = useMemo(() => {
    const m = new Map<string, ChannelOption[]>();
    for (const c of channels) {
      if (c.kind === 'door') continue;
      const l = m.get(c.assetName) ?? [];
      l.push(c);
      m.set(c.assetName, l);
    }
    return [...m.entries()];
  }, [channels]);

  const body = () => {
    const subgroupRule =
      ruleKind === 'per-n-minutes'
        ? { kind: ruleKind, minutes: Number(minutes), mode }
        : ruleKind === 'per-manual-check'
          ? { kind: ruleKind, minSpacingMinutes: Number(spacing) }
          : { kind: ruleKind };
    const chartParams: Record<string, unknown> = sigmaBasis === 'overall' ? { sigmaBasis } : {};
    if (chart === 'ewma') {
      if (num(lambda) !== undefined) chartParams['lambda'] = num(lambda);
      if (num(L) !== undefined) chartParams['L'] = num(L);
      if (ewmaLimits) chartParams['limits'] = ewmaLimits;
    }
    if (chart === 'cusum') {
      if (num(k) !== undefined) chartParams['k'] = num(k);
      if (num(h) !== undefined) chartParams['h'] = num(h);
      if (num(headStart) !== undefined) chartParams['headStart'] = num(headStart);
    }
    const spec =
      specMode === 'none'
        ? { mode: 'none' }
        : specMode === 'window'
          ? { mode: 'window', key: windowKey }
          : {
              mode: 'fixed',
              ...(num(lsl) !== undefined ? { lsl: num(lsl) } : {}),
              ...(num(usl) !== undefined ? { usl: num(usl) } : {}),
              ...(num(target) !== undefined ? { target: num(target) } : {}),
            };
    return {
      name,
      description,
      channelIds,
      subgroupRule,
      subgroupSize: Number(size),
      chart,
      chartParams,
      rules: SPC_RULE_IDS.filter((r) => rules.includes(r)),
      spec,
      unit,
      active,
      ...(e ? {} : { backfillDays: Number(backfillDays) }),
    };
  };

  async function submit(ev: SyntheticEvent<HTMLFormElement>) {
    ev.preventDefault();
    setFailure(null);
    const b = body();
    const parsed = CharacteristicInputSchema.safeParse(b);
    if (!parsed.success) {
      const m: Record<string, string> = {};
      for (const i of parsed.error.issues) m[i.path.join('.')] ??= i.message;
      setErrors(m);
      return;
    }
    setErrors({});
    setBusy(true);
    try {
      const saved = await apiFetch<Characteristic>(e ? `/api/v1/characteristics/${e.id}` : '/api/v1/characteristics', {
        method: e ? 'PUT' : 'POST',
        body: b,
      });
      window.location.href = `/charts/control/${saved.id}`;
    } catch (err) {
      if (err instanceof ApiError) {
        const m: Record<string, string> = {};
        for (const f of err.errors) m[f.path] ??= f.message;
        setErrors(m);
        setFailure(err.errors.length ? 'Some fields need attention.' : (err.detail ?? err.title));
      } else setFailure('The characteristic was not saved.');
    } finally {
      setBusy(false);
    }
  }

  const err = (path: string) =>
    errors[path] ? (
      <p className="mt-1 text-sm text-alert-high" id={`err-${path}`}>
        ✕ {errors[path]}
      </p>
    ) : null;
  const firstUnit = channels.find((c) => c.id === channelIds[0])?.unit;

  return (
    <form onSubmit={submit} noValidate className="max-w-4xl space-y-5">
      {failure && (
        <p role="alert" className="rounded border-l-4 border-alert-high bg-alert-bg p-2 text-sm">
          <strong>Not saved.</strong> {failure}
        </p>
      )}
      <fieldset className="panel space-y-3">
        <legend className="px-1 font-bold">What is charted</legend>
        <div>
          <label htmlFor="cf-name">Name</label>
          <input
            id="cf-name"
            value={name}
            onChange={(x) => setName(x.target.value)}
            maxLength={120}
            aria-describedby={errors['name'] ? 'err-name' : undefined}
          />
          {err('name')}
        </div>
        <div>
          <label htmlFor="cf-desc">Description (optional)</label>
          <textarea id="cf-desc" rows={2} value={description} onChange={(x) => setDescription(x.target.value)} maxLength={2000} />
        </div>
        <div>
          <span className="mb-1 block text-sm font-bold text-ink-soft" id="cf-ch-l">
            Source channel(s){fixed && ' — fixed: the chart already has points'}
          </span>
          <div
            className="grid max-h-72 gap-x-6 gap-y-1 overflow-auto rounded border border-slate-line bg-white p-2 sm:grid-cols-2"
            role="group"
            aria-labelledby="cf-ch-l"
          >
            {byAsset.map(([asset, list]) => (
              <div key={asset}>
                <p className="text-xs font-bold uppercase text-ink-faint">{asset}</p>
                {list.map((c) => (
                  <label key={c.id} className="flex items-center gap-2 font-normal text-ink">
                    <input
                      type="checkbox"
                      className="w-auto"
                      disabled={fixed}
                      checked={channelIds.includes(c.id)}
                      onChange={(x) => {
                        const next = x.target.checked ? [...channelIds, c.id] : channelIds.filter((i) => i !== c.id);
                        setChannelIds(next);
                        if (!unit && x.target.checked) setUnit(c.unit);
                      }}
                    />
                    {c.name} <span className="text-ink-soft">({c.unit})</span>
                  </label>
                ))}
              </div>
            ))}
          </div>
          {err('channelIds') ?? err('channelIds.0')}
          <p className="mt-1 text-xs text-ink-soft">Several channels of the same unit are pooled (e.g. both zones of an oven).</p>
        </div>
        <div className="max-w-xs">
          <label htmlFor="cf-unit">Unit</label>
          <input
            id="cf-unit"
            value={unit}
            onChange={(x) => setUnit(x.target.value)}
            placeholder={firstUnit ?? 'e.g. mm/s'}
            maxLength={20}
          />
          {err('unit')}
        </div>
      </fieldset>

      <fieldset className="panel space-y-3">
        <legend className="px-1 font-bold">Subgroups</legend>
        <div className="grid gap-3 sm:grid-cols-3">
          <div>
            <label htmlFor="cf-rule">Formed</label>
            <select
              id="cf-rule"
              value={ruleKind}
              disabled={fixed}
              onChange={(x) => setRuleKind(x.target.value as SubgroupRuleKind)}
            >
              {(Object.keys(SUBGROUP_RULE_LABELS) as SubgroupRuleKind[]).map((r) => (
                <option key={r} value={r}>
                  {SUBGROUP_RULE_LABELS[r]}
                </option>
              ))}
            </select>
          </div>
          {ruleKind === 'per-n-minutes' && (
            <>
              <div>
                <label htmlFor="cf-min">Window (minutes)</label>
                <input
                  id="cf-min"
                  type="number"
                  min={1}
                  max={1440}
                  value={minutes}
                  disabled={fixed}
                  onChange={(x) => setMinutes(x.target.value)}
                />
                {err('subgroupRule.minutes')}
              </div>
              <div>
                <label htmlFor="cf-mode">Members</label>
                <select id="cf-mode" value={mode} disabled={fixed} onChange={(x) => setMode(x.target.value as 'first' | 'means')}>
                  <option value="first">first n readings of the window</option>
                  <option value="means">means of n consecutive blocks</option>
                </select>
              </div>
            </>
          )}
          {ruleKind === 'per-manual-check' && (
            <div>
              <label htmlFor="cf-spacing">Checks at least (minutes apart)</label>
              <input
                id="cf-spacing"
                type="number"
                min={0}
                max={1440}
                value={spacing}
                disabled={fixed}
                onChange={(x) => setSpacing(x.target.value)}
              />
              {err('subgroupRule.minSpacingMinutes')}
            </div>
          )}
          <div>
            <label htmlFor="cf-size">Subgroup size n</label>
            <input
              id="cf-size"
              type="number"
              min={1}
              max={25}
              value={size}
              disabled={fixed}
              onChange={(x) => setSize(x.target.value)}
              aria-describedby={errors['subgroupSize'] ? 'err-subgroupSize' : undefined}
            />
            {err('subgroupSize')}
          </div>
        </div>
        <p className="text-sm text-ink-soft">
          {(() => {
            const p = SubgroupRuleSchema.safeParse(body().subgroupRule);
            return p.success ? `Each point: ${describeSubgroupRule(p.data, Number(size) || 1)}.` : '';
          })()}
        </p>
      </fieldset>

      <fieldset className="panel space-y-3">
        <legend className="px-1 font-bold">Chart and rules</legend>
        <div className="max-w-md">
          <label htmlFor="cf-chart">Chart</label>
          <select id="cf-chart" value={chart} disabled={fixed} onChange={(x) => setChart(x.target.value as CharacteristicChart)}>
            {CHARACTERISTIC_CHARTS.map((c) => (
              <option key={c} value={c}>
                {CHART_LABELS[c]}
              </option>
            ))}
          </select>
        </div>
        <div className="max-w-xl">
          <label htmlFor="cf-sb">σ for the limits</label>
          <select id="cf-sb" value={sigmaBasis} onChange={(x) => setSigmaBasis(x.target.value as 'within' | 'overall')}>
            <option value="within">within subgroups (R̄/d2, s̄/c4 or MR̄/d2) — the usual choice</option>
            <option value="overall">
              overall spread of the baseline — only for a characteristic that drifts by design between adjustments
            </option>
          </select>
        </div>
        {chart === 'ewma' && (
          <div className="grid gap-3 sm:grid-cols-3">
            <div>
              <label htmlFor="cf-lambda">λ (weight, default 0.2)</label>
              <input id="cf-lambda" type="number" step="0.01" value={lambda} onChange={(x) => setLambda(x.target.value)} />
              {err('chartParams.lambda')}
            </div>
            <div>
              <label htmlFor="cf-L">L (limit width, default 3)</label>
              <input id="cf-L" type="number" step="0.1" value={L} onChange={(x) => setL(x.target.value)} />
              {err('chartParams.L')}
            </div>
            <div>
              <label htmlFor="cf-el">Limits</label>
              <select
                id="cf-el"
                value={ewmaLimits}
                onChange={(x) => setEwmaLimits(x.target.value as '' | 'exact' | 'asymptotic')}
              >
                <option value="">exact, time-varying (default)</option>
                <option value="exact">exact, time-varying</option>
                <option value="asymptotic">asymptotic</option>
              </select>
            </div>
          </div>
        )}
        {chart === 'cusum' && (
          <div className="grid gap-3 sm:grid-cols-3">
            <div>
              <label htmlFor="cf-k">k (σ units, default 0.5)</label>
              <input id="cf-k" type="number" step="0.05" value={k} onChange={(x) => setK(x.target.value)} />
              {err('chartParams.k')}
            </div>
            <div>
              <label htmlFor="cf-h">h (σ units, default 5)</label>
              <input id="cf-h" type="number" step="0.1" value={h} onChange={(x) => setH(x.target.value)} />
              {err('chartParams.h')}
            </div>
            <div>
              <label htmlFor="cf-hs">Head start (σ units, optional)</label>
              <input id="cf-hs" type="number" step="0.1" value={headStart} onChange={(x) => setHeadStart(x.target.value)} />
              {err('chartParams.headStart')}
            </div>
          </div>
        )}
        <div role="group" aria-labelledby="cf-rules-l">
          <span id="cf-rules-l" className="mb-1 block text-sm font-bold text-ink-soft">
            Run rules{' '}
            {(chart === 'ewma' || chart === 'cusum') &&
              '(EWMA and CUSUM report their own signal; run rules do not apply to them)'}
          </span>
          <div className="grid gap-x-6 sm:grid-cols-2">
            {SPC_RULE_IDS.map((r) => (
              <label key={r} className="flex items-center gap-2 font-normal text-ink">
                <input
                  type="checkbox"
                  className="w-auto"
                  checked={rules.includes(r)}
                  onChange={(x) => setRules(x.target.checked ? [...rules, r] : rules.filter((y) => y !== r))}
                />
                {RULE_LABELS[r]}
              </label>
            ))}
          </div>
          {err('rules')}
        </div>
      </fieldset>

      <fieldset className="panel space-y-3">
        <legend className="px-1 font-bold">Specification (for capability and the LSL/USL lines)</legend>
        <div className="flex flex-wrap gap-4">
          {(['window', 'fixed', 'none'] as const).map((m) => (
            <label key={m} className="flex items-center gap-2 font-normal text-ink">
              <input type="radio" name="spec-mode" className="w-auto" checked={specMode === m} onChange={() => setSpecMode(m)} />
              {m === 'window' ? 'From the process window in force' : m === 'fixed' ? 'Fixed limits' : 'None'}
            </label>
          ))}
        </div>
        {specMode === 'window' && (
          <div className="max-w-md">
            <label htmlFor="cf-wkey">Window range</label>
            <select id="cf-wkey" value={windowKey} onChange={(x) => setWindowKey(x.target.value as WindowSpecKey)}>
              {WINDOW_SPEC_KEYS.map((w) => (
                <option key={w} value={w}>
                  {WINDOW_SPEC_LABELS[w]}
                </option>
              ))}
            </select>
          </div>
        )}
        {specMode === 'fixed' && (
          <div className="grid gap-3 sm:grid-cols-3">
            <div>
              <label htmlFor="cf-lsl">LSL ({unit || 'unit'})</label>
              <input id="cf-lsl" type="number" step="any" value={lsl} onChange={(x) => setLsl(x.target.value)} />
              {err('spec.lsl')}
            </div>
            <div>
              <label htmlFor="cf-usl">USL ({unit || 'unit'})</label>
              <input id="cf-usl" type="number" step="any" value={usl} onChange={(x) => setUsl(x.target.value)} />
              {err('spec.usl')}
            </div>
            <div>
              <label htmlFor="cf-target">Target (optional)</label>
              <input id="cf-target" type="number" step="any" value={target} onChange={(x) => setTarget(x.target.value)} />
              {err('spec.target')}
            </div>
          </div>
        )}
      </fieldset>

      <div className="flex flex-wrap items-end gap-4">
        <label className="flex items-center gap-2 font-normal text-ink">
          <input type="checkbox" className="w-auto" checked={active} onChange={(x) => setActive(x.target.checked)} />
          Active (new points are formed and judged)
        </label>
        {!e && (
          <div>
            <label htmlFor="cf-bf">Plot history from the last (days)</label>
            <input
              id="cf-bf"
              type="number"
              min={0}
              max={60}
              value={backfillDays}
              onChange={(x) => setBackfillDays(x.target.value)}
              className="w-28"
            />
            {err('backfillDays')}
          </div>
        )}
      </div>
      <div className="flex gap-2">
        <button type="submit" className="btn" disabled={busy} aria-busy={busy}>
          {busy ? (e ? 'Saving…' : 'Creating and plotting history…') : e ? 'Save changes' : 'Create characteristic'}
        </button>
        <a className="btn-quiet" href={e ? `/charts/control/${e.id}` : '/charts'}>
          Cancel
        </a>
      </div>
    </form>
  );
}
