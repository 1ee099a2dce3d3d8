/**
 * A value against its window: a thin band from the window's low to high limit with a marker
 * where the value sits (ISA-101 style "value against its limits"), plus the numbers in words.
 * Outside the window the marker turns to the alert colour and the words say which side.
 */
export interface WindowBarProps {
  value: number | null;
  min: number | null | undefined;
  max: number | null | undefined;
  unit: string;
  digits?: number;
  label: string;
}

export default function WindowBar({ value, min, max, unit, digits = 2, label }: WindowBarProps) {
  const hasWindow = typeof min === 'number' && typeof max === 'number' && max > min;
  if (value === null || !Number.isFinite(value)) return <span className="text-ink-faint">no value</span>;
  const v = value.toFixed(digits);
  if (!hasWindow)
    return (
      <span className="num">
        {v} {unit} <span className="text-xs text-ink-soft">(no window)</span>
      </span>
    );
  const lo = min;
  const hi = max;
  const pad = (hi - lo) * 0.25;
  const from = lo - pad;
  const to = hi + pad;
  const pos = Math.min(100, Math.max(0, ((value - from) / (to - from)) * 100));
  const out = value < lo ? 'low' : value > hi ? 'high' : null;
  const band = { left: `${((lo - from) / (to - from)) * 100}%`, width: `${((hi - lo) / (to - from)) * 100}%` };
  return (
    <span
      className="inline-flex flex-col gap-0.5"
      aria-label={`${label}: ${v} ${unit}, window ${lo}–${hi} ${unit}${out ? `, ${out === 'low' ? 'below' : 'above'} the window` : ', within the window'}`}
    >
      <span className={`num ${out ? 'font-bold text-alert-high' : ''}`}>
        {out ? (out === 'low' ? '▼ ' : '▲ ') : ''}
        {v} {unit}
      </span>
      <span aria-hidden="true" className="relative block h-2 w-32 rounded bg-slate-panel">
        <span className="absolute top-0 h-2 rounded bg-lacquer-light" style={band} />
        <span
          className={`absolute -top-0.5 h-3 w-1 rounded ${out ? 'bg-alert-high' : 'bg-ink'}`}
          style={{ left: `calc(${pos}% - 2px)` }}
        />
      </span>
      <span className="text-xs text-ink-soft num">
        window {lo}–{hi} {unit}
      </span>
    </span>
  );
}
