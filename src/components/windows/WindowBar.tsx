import { PALETTE } from '../../styles/palette.mjs';

/**
 * A value against its window (ISA-101 style): a grey track, the window as a band, the target as
 * a tick and the value as a marker. Inside the window everything stays grey; outside it the
 * marker turns into a coloured triangle pointing the way out AND the text says "above/below the
 * window" — never colour alone. Renders on the server too (no client state). Without a window
 * (no limits, or a record from before one was assigned) only the value is shown, with "(no window)".
 */
export interface WindowBarProps {
  value: number | null;
  /** The window's low and high limits; absent when nothing was in force. */
  min: number | null | undefined;
  max: number | null | undefined;
  target?: number | undefined;
  unit: string;
  /** Accessible name, e.g. "Line 1 bath viscosity". */
  label: string;
  digits?: number;
  /** Larger for the tablet form. */
  size?: 'sm' | 'lg';
}

export default function WindowBar(props: WindowBarProps) {
  const { value, min, max, unit, digits = 1 } = props;
  const v = value !== null && Number.isFinite(value) ? value : null;
  if (typeof min !== 'number' || typeof max !== 'number' || !(max > min)) {
    return (
      <span className="num">
        {v === null ? 'no value' : `${v.toFixed(digits)} ${unit}`} <span className="text-xs text-ink-soft">(no window)</span>
      </span>
    );
  }
  return <Bar {...props} value={v} min={min} max={max} />;
}

function Bar({
  value,
  min,
  max,
  target,
  unit,
  label,
  digits = 1,
  size = 'sm',
}: WindowBarProps & { value: number | null; min: number; max: number }) {
  const span = max - min;
  const lo = min - span * 0.5;
  const hi = max + span * 0.5;
  const at = (v: number) => Math.min(1, Math.max(0, (v - lo) / (hi - lo)));
  const state = value === null ? 'none' : value < min ? 'low' : value > max ? 'high' : 'in';
  const W = 100;
  const H = size === 'lg' ? 14 : 10;
  const f = (v: number) => v.toFixed(digits);
  const words =
    state === 'none'
      ? 'no value'
      : state === 'in'
        ? `inside the window ${f(min)}–${f(max)} ${unit}`
        : state === 'high'
          ? `above the window high ${f(max)} ${unit}`
          : `below the window low ${f(min)} ${unit}`;
  const x = value === null ? 0 : at(value) * W;
  const colour = state === 'high' || state === 'low' ? PALETTE.alertHigh : PALETTE.ink;
  return (
    <div className={size === 'lg' ? 'text-base' : 'text-sm'}>
      <svg
        role="img"
        aria-label={`${label}: ${value === null ? 'no value' : `${f(value)} ${unit}`}, ${words}`}
        viewBox={`0 0 ${W} ${H}`}
        preserveAspectRatio="none"
        className={size === 'lg' ? 'h-7 w-full' : 'h-4 w-full'}
      >
        <rect x={0} y={H * 0.35} width={W} height={H * 0.3} fill="#e2e3de" />
        <rect x={at(min) * W} y={H * 0.15} width={(at(max) - at(min)) * W} height={H * 0.7} fill="#c4c8c6" />
        {target !== undefined && (
          <rect x={at(target) * W - 0.25} y={H * 0.05} width={0.5} height={H * 0.9} fill={PALETTE.inkSoft} />
        )}
        {value !== null &&
          (state === 'in' ? (
            <rect x={x - 0.6} y={0} width={1.2} height={H} fill={colour} />
          ) : (
            <polygon
              points={
                state === 'high' ? `${x - 2.4},0 ${x - 2.4},${H} ${x},${H / 2}` : `${x + 2.4},0 ${x + 2.4},${H} ${x},${H / 2}`
              }
              fill={colour}
            />
          ))}
      </svg>
      <p className="mt-0.5 flex flex-wrap items-baseline gap-x-2">
        <span className="num font-bold">{value === null ? '—' : `${f(value)} ${unit}`}</span>
        {state === 'high' || state === 'low' ? (
          <span className="font-bold text-alert-high">
            <span aria-hidden="true">{state === 'high' ? '▲ ' : '▼ '}</span>
            {words}
          </span>
        ) : (
          <span className="text-ink-soft">{words}</span>
        )}
        {target !== undefined && (
          <span className="text-ink-faint">
            target {f(target)} {unit}
          </span>
        )}
      </p>
    </div>
  );
}
