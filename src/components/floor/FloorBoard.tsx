/**
 * The Floor: every dip line, oven and coater as a tile with its current values against the
 * process window (ISA-101 style: grey while normal; an abnormal value gets colour, a shape and
 * a word), a 60-minute sparkline, the time since the last reading, the oven load in progress,
 * open alarms and device state. Live: readings arrive over the server's event stream and are
 * drawn as they come; alarm, load and device events refresh the snapshot.
 */
import { useCallback, useEffect, useMemo, useRef, useState } from 'react';
import { apiFetch, subscribeLive } from '../../lib/client/api.ts';
import {
  appendSpark,
  applyLatest,
  formatValue,
  PHASE_WORDS,
  sparkPaths,
  STALE_AFTER_MS,
  type FloorChannel,
  type FloorDevice,
  type FloorSnapshot,
  type FloorTile,
  type LiveReading,
} from '../../lib/shared/floor.ts';
import type { ReadingsResponse } from '../../lib/shared/telemetry.ts';
import { formatAge, formatClock, formatMinutes, formatSiteTime, siteDate } from '../../lib/shared/time.ts';
import { placeOnBand, shapeReadings, type ChartPoint } from '../../lib/shared/trend.ts';
import { PALETTE } from '../../styles/palette.mjs';

const SPARK_MS = 60 * 60_000;
const SPARK_POINTS = 120;

type Latest = ReadonlyMap<number, { tMs: number; value: number }>;

interface Props {
  initial: FloorSnapshot;
  /** Wall display: bigger type, dark-neutral background, no navigation. */
  wall?: boolean;
}

/** Colours for abnormal states only; the normal state stays grey. Two palettes: paper and wall. */
const TONE = {
  paper: {
    high: PALETTE.alertHigh,
    med: PALETTE.alertMed,
    low: PALETTE.alertLow,
    normal: PALETTE.inkSoft,
    faint: PALETTE.inkFaint,
    track: '#e2e3de',
    band: '#c4c8c6',
    ink: PALETTE.ink,
  },
  wall: {
    high: '#ff8a80',
    med: '#ffb74d',
    low: '#e6cf6a',
    normal: '#b8c0c5',
    faint: '#8a949a',
    track: '#2b3338',
    band: '#4d585e',
    ink: '#eef1f2',
  },
} as const;
type Tone = (typeof TONE)[keyof typeof TONE];

const PRIORITY_SHAPE = { high: '▲', medium: '◆', low: '■' } as const;
const PRIORITY_WORD = { high: 'high', medium: 'medium', low: 'low' } as const;

export function FloorBoard({ initial, wall = false }: Props) {
  const tone = wall ? TONE.wall : TONE.paper;
  const [snap, setSnap] = useState<FloorSnapshot>(initial);
  const [latest, setLatest] = useState<Latest>(
    () => new Map(initial.tiles.flatMap((t) => t.channels.flatMap((c) => (c.latest ? [[c.id, c.latest] as const] : [])))),
  );
  const [sparks, setSparks] = useState<ReadonlyMap<number, ChartPoint[]>>(new Map());
  const [sparkState, setSparkState] = useState<'loading' | 'ready' | 'error'>('loading');
  const [now, setNow] = useState(initial.atMs);
  const [lastLive, setLastLive] = useState<number | null>(null);
  const [refreshError, setRefreshError] = useState<string | null>(null);
  const refreshTimer = useRef<ReturnType<typeof setTimeout> | null>(null);
  const tz = snap.timeZone;

  // The ticking clock (time since last reading, elapsed soak).
  useEffect(() => {
    setNow(Date.now());
    const t = setInterval(() => setNow(Date.now()), 1000);
    return () => clearInterval(t);
  }, []);

  const refresh = useCallback(async () => {
    try {
      const s = await apiFetch<FloorSnapshot>('/api/v1/floor');
      setSnap(s);
      setLatest((cur) =>
        applyLatest(
          cur,
          s.tiles.flatMap((t) => t.channels.flatMap((c) => (c.latest ? [{ channelId: c.id, ...c.latest }] : []))),
        ),
      );
      setRefreshError(null);
    } catch (e) {
      setRefreshError((e as Error).message);
    }
  }, []);
  const refreshSoon = useCallback(() => {
    if (refreshTimer.current) return;
    refreshTimer.current = setTimeout(() => {
      refreshTimer.current = null;
      void refresh();
    }, 400);
  }, [refresh]);

  // Sparklines: the last hour once from the readings endpoint, then appended from live readings.
  useEffect(() => {
    const ac = new AbortController();
    const to = Date.now();
    const ids = initial.tiles.flatMap((t) => t.channels.map((c) => c.id));
    Promise.all(
      ids.map(async (id) => {
        const r = await apiFetch<ReadingsResponse>(
          `/api/v1/channels/${id}/readings?from=${to - SPARK_MS}&to=${to + 1}&maxPoints=${SPARK_POINTS}`,
          { signal: ac.signal },
        );
        return [id, shapeReadings(r).line] as const;
      }),
    )
      .then((pairs) => {
        setSparks((cur) => {
          const next = new Map(pairs);
          // Keep live points that arrived while the history loaded.
          for (const [id, live] of cur) {
            let pts = next.get(id) ?? [];
            for (const p of live) pts = appendSpark(pts, p, SPARK_MS);
            next.set(id, pts);
          }
          return next;
        });
        setSparkState('ready');
      })
      .catch((e) => {
        if (!ac.signal.aborted) {
          console.error(e);
          setSparkState('error');
        }
      });
    return () => ac.abort();
  }, [initial]);

  // Live updates.
  useEffect(() => {
    const stop = subscribeLive(['readings', 'alarms', 'devices', 'loads'], (kind, payload) => {
      setLastLive(Date.now());
      if (kind === 'readings') {
        const batch = (Array.isArray(payload) ? payload : [payload]) as LiveReading[];
        setLatest((cur) => applyLatest(cur, batch));
        setSparks((cur) => {
          const next = new Map(cur);
          for (const r of batch)
            next.set(r.channelId, appendSpark(next.get(r.channelId) ?? [], { x: r.tMs, y: r.value }, SPARK_MS));
          return next;
        });
      } else {
        refreshSoon();
      }
    });
    // Load phases and windows move slowly; refresh the rest once a minute.
    const t = setInterval(() => void refresh(), 60_000);
    return () => {
      stop();
      clearInterval(t);
    };
  }, [refresh, refreshSoon]);

  const devices = useMemo(() => new Map(snap.devices.map((d) => [d.id, d])), [snap.devices]);
  const liveAge = lastLive === null ? null : now - lastLive;

  return (
    <div className={wall ? 'floor-wall' : ''} data-floor-ready="true" data-sparks={sparkState}>
      <div
        className={`mb-3 flex flex-wrap items-center gap-x-5 gap-y-1 ${wall ? 'text-lg' : 'text-sm'}`}
        style={{ color: tone.normal }}
      >
        <span aria-live="polite">
          {liveAge !== null && liveAge < 30_000 ? (
            <>
              <span aria-hidden="true">●</span> Live — last update {formatAge(liveAge)} ago
            </>
          ) : (
            <>
              <span aria-hidden="true">○</span> Waiting for live data…
            </>
          )}
        </span>
        <span>
          Times in {tz} ({formatClock(now, tz, { seconds: true })})
        </span>
        <span className="flex flex-wrap gap-x-3" aria-label="Legend">
          <span>
            <span aria-hidden="true">▲</span> HIGH
          </span>
          <span>
            <span aria-hidden="true">▼</span> LOW
          </span>
          <span>
            <span aria-hidden="true">◌</span> NO DATA
          </span>
          <span>
            <span aria-hidden="true">⊘</span> OFFLINE
          </span>
        </span>
        {refreshError && (
          <span role="alert" style={{ color: tone.med }}>
            <span aria-hidden="true">◆</span> Could not refresh alarms and loads: {refreshError}
          </span>
        )}
      </div>
      {snap.tiles.length === 0 ? (
        <div className="empty" role="status">
          <p className="font-bold text-ink">No dip lines, ovens or coaters are set up yet.</p>
          <p className="mt-1 text-sm">An engineer adds them under Admin → Plant set-up.</p>
        </div>
      ) : (
        <div
          className={`grid gap-4 ${wall ? 'md:grid-cols-2 xl:grid-cols-3 min-[1800px]:grid-cols-4' : 'md:grid-cols-2 xl:grid-cols-3'}`}
        >
          {snap.tiles.map((t) => (
            <Tile
              key={t.id}
              tile={t}
              latest={latest}
              sparks={sparks}
              sparkState={sparkState}
              devices={devices}
              now={now}
              tz={tz}
              wall={wall}
              tone={tone}
            />
          ))}
        </div>
      )}
    </div>
  );
}

function Tile(props: {
  tile: FloorTile;
  latest: Latest;
  sparks: ReadonlyMap<number, ChartPoint[]>;
  sparkState: 'loading' | 'ready' | 'error';
  devices: ReadonlyMap<number, FloorDevice>;
  now: number;
  tz: string;
  wall: boolean;
  tone: Tone;
}) {
  const { tile, tone, wall, now, tz } = props;
  const devs = tile.deviceIds.map((id) => props.devices.get(id)).filter((d): d is FloorDevice => !!d);
  const offline = devs.filter((d) => !d.online);
  const inSoak = tile.load?.phase === 'soak';
  const inLoad = tile.load !== null;
  const topPriority = tile.alarms[0]?.priority ?? null;
  const border =
    tile.alarmCount > 0 && topPriority
      ? tone[topPriority === 'medium' ? 'med' : topPriority === 'high' ? 'high' : 'low']
      : wall
        ? '#3a4449'
        : PALETTE.slateLine;
  return (
    <section
      className={`rounded-md border p-3 ${wall ? 'bg-[#242b30]' : 'bg-white'}`}
      style={{ borderColor: border, borderWidth: tile.alarmCount > 0 ? 3 : 1 }}
      aria-labelledby={`tile-${tile.id}`}
      data-tile={tile.code}
    >
      <header className="flex flex-wrap items-baseline justify-between gap-x-3 gap-y-1">
        <h2 id={`tile-${tile.id}`} className={wall ? 'text-3xl font-bold' : 'text-lg font-bold'} style={{ color: tone.ink }}>
          {tile.name}
        </h2>
        <div className={`flex flex-wrap items-center gap-x-3 ${wall ? 'text-xl' : 'text-sm'}`}>
          <AlarmBadge tile={tile} tone={tone} />
          {devs.length === 0 ? null : offline.length === 0 ? (
            <span style={{ color: tone.normal }} title={devs.map((d) => d.name).join(', ')}>
              <span aria-hidden="true">●</span> Online
            </span>
          ) : (
            <span className="font-bold" style={{ color: tone.high }} title={offline.map((d) => d.name).join(', ')}>
              <span aria-hidden="true">⊘</span> OFFLINE
              {offline[0]?.lastSeenMs ? (
                <span className="font-normal"> · last seen {formatClock(offline[0].lastSeenMs, tz)}</span>
              ) : null}
            </span>
          )}
        </div>
      </header>
      {tile.kind === 'oven' && <LoadLine tile={tile} now={now} tz={tz} wall={wall} tone={tone} />}
      {tile.alarms.length > 0 && (
        <ul className={`mt-2 space-y-0.5 ${wall ? 'text-lg' : 'text-sm'}`} aria-label={`Open alarms on ${tile.name}`}>
          {tile.alarms.slice(0, wall ? 1 : 3).map((a) => (
            <li
              key={a.id}
              className={wall ? 'truncate' : ''}
              style={{ color: tone[a.priority === 'medium' ? 'med' : a.priority] }}
              title={a.message}
            >
              <span aria-hidden="true">{PRIORITY_SHAPE[a.priority]}</span>{' '}
              <span className="font-bold">{PRIORITY_WORD[a.priority].toUpperCase()}</span>{' '}
              <span style={{ color: tone.ink }}>{a.message}</span>
              {a.state === 'unacked' || a.state === 'rtn-unacked' ? (
                <span style={{ color: tone.normal }}> · not acknowledged</span>
              ) : null}
            </li>
          ))}
        </ul>
      )}
      {tile.channels.length === 0 ? (
        <p className="mt-2 text-sm" style={{ color: tone.normal }}>
          No channels on this asset.
        </p>
      ) : (
        <ul className="mt-2 divide-y" style={{ borderColor: wall ? '#333c41' : '#e4e5e1' }}>
          {tile.channels.map((c) => (
            <ChannelRow
              key={c.id}
              c={c}
              latest={props.latest.get(c.id) ?? null}
              spark={props.sparks.get(c.id) ?? []}
              sparkState={props.sparkState}
              now={now}
              tz={tz}
              wall={wall}
              tone={tone}
              inSoak={inSoak}
              inLoad={inLoad}
            />
          ))}
        </ul>
      )}
    </section>
  );
}

function AlarmBadge({ tile, tone }: { tile: FloorTile; tone: Tone }) {
  if (tile.alarmCount === 0) {
    return (
      <a href="/alarms" className="no-underline" style={{ color: tone.normal }}>
        No open alarms{tile.shelvedCount ? ` · ${tile.shelvedCount} shelved` : ''}
      </a>
    );
  }
  const p = tile.alarms[0]?.priority ?? 'low';
  return (
    <a href="/alarms" className="font-bold no-underline" style={{ color: tone[p === 'medium' ? 'med' : p] }}>
      <span aria-hidden="true">{PRIORITY_SHAPE[p]}</span> {tile.alarmCount} open alarm{tile.alarmCount === 1 ? '' : 's'}
      {tile.shelvedCount ? <span className="font-normal"> · {tile.shelvedCount} shelved</span> : null}
    </a>
  );
}

function LoadLine({ tile, now, tz, wall, tone }: { tile: FloorTile; now: number; tz: string; wall: boolean; tone: Tone }) {
  const l = tile.load;
  const cls = `mt-1 ${wall ? 'text-xl' : 'text-sm'}`;
  if (!l) {
    return (
      <p className={cls} style={{ color: tone.normal }}>
        No load in progress
      </p>
    );
  }
  const soakMin = l.soakStartMs !== null ? (now - l.soakStartMs) / 60_000 : null;
  return (
    <p className={cls} style={{ color: tone.ink }} data-load-phase={l.phase}>
      <a href={`/loads/${l.id}`} className="font-bold" style={{ color: tone.ink }}>
        Load {l.id}
      </a>{' '}
      · <span className="font-bold">{PHASE_WORDS[l.phase]}</span>
      {l.setpointC !== null ? <> at setpoint {l.setpointC.toFixed(0)} °C</> : null}
      {l.phase === 'soak' && soakMin !== null ? <> · soak {formatMinutes(soakMin)}</> : null}
      {l.predictedEndMs !== null ? (
        <>
          {' '}
          · predicted end{' '}
          {siteDate(l.predictedEndMs, tz) === siteDate(now, tz)
            ? formatClock(l.predictedEndMs, tz)
            : formatSiteTime(l.predictedEndMs, tz)}
        </>
      ) : null}
      <span style={{ color: tone.normal }}>
        {' '}
        · open {formatMinutes((now - l.openedAtMs) / 60_000)} · {l.jobs} job{l.jobs === 1 ? '' : 's'}
      </span>
    </p>
  );
}

function ChannelRow(props: {
  c: FloorChannel;
  latest: { tMs: number; value: number } | null;
  spark: ChartPoint[];
  sparkState: 'loading' | 'ready' | 'error';
  now: number;
  tz: string;
  wall: boolean;
  tone: Tone;
  inSoak: boolean;
  inLoad: boolean;
}) {
  const { c, latest, tone, wall, now } = props;
  const stale = !latest || now - latest.tMs > STALE_AFTER_MS;
  const band = latest ? placeOnBand(latest.value, c.window, c, { inSoak: props.inSoak, inLoad: props.inLoad }) : null;
  const span = c.window ? c.window.max - c.window.min : c.max - c.min;
  const doorOpenInSoak = c.kind === 'door' && latest !== null && latest.value >= 0.5 && props.inSoak;
  const state = band?.state ?? 'no-window';
  const abnormal = state === 'high' || state === 'low' || doorOpenInSoak;
  const colour = abnormal ? tone.high : tone.ink;
  const valueText = latest ? formatValue(latest.value, c.unit, c.kind, span) : '—';
  const ageText = latest ? `${formatAge(now - latest.tMs)} ago` : 'no reading yet';
  const stateWords = (
    <>
      {state === 'high' && !stale && <StateWord shape="▲" word="HIGH" colour={tone.high} wall={wall} />}
      {state === 'low' && !stale && <StateWord shape="▼" word="LOW" colour={tone.high} wall={wall} />}
      {doorOpenInSoak && !stale && <StateWord shape="◆" word="OPEN IN SOAK" colour={tone.high} wall={wall} />}
      {stale && <StateWord shape="◌" word={latest ? 'NO DATA' : 'NO DATA YET'} colour={tone.med} wall={wall} />}
    </>
  );
  const valueEl = (
    <span
      className={`num font-bold leading-tight ${wall ? 'text-4xl' : 'text-2xl'}`}
      style={{ color: stale ? tone.faint : colour, textDecoration: stale && latest ? 'line-through' : undefined }}
      data-value={latest ? String(latest.value) : ''}
    >
      {valueText}
    </span>
  );
  if (wall) {
    // Wall display: the name on one line; band, the value (large) and the trend on the next.
    return (
      <li className="py-1" data-channel={c.id}>
        <div className="flex flex-wrap items-baseline gap-x-2 text-base leading-tight">
          <span className="font-bold" style={{ color: tone.normal }}>
            {c.shortName}
          </span>
          <span style={{ color: tone.faint }} data-age>
            {ageText}
          </span>
          {c.alarms > 0 && c.alarmPriority && (
            <span className="font-bold" style={{ color: tone[c.alarmPriority === 'medium' ? 'med' : c.alarmPriority] }}>
              <span aria-hidden="true">{PRIORITY_SHAPE[c.alarmPriority]}</span> alarm
            </span>
          )}
          {stateWords}
        </div>
        <div className="grid grid-cols-[minmax(0,1fr)_auto_auto] items-center gap-x-3">
          <div className="min-w-[60px]">
            {c.kind !== 'door' && band && latest && (
              <Band c={c} band={band} value={latest.value} tone={tone} wall={wall} abnormal={abnormal && !stale} />
            )}
          </div>
          <div className="text-right">{valueEl}</div>
          <Spark c={c} points={props.spark} state={props.sparkState} now={now} tone={tone} wall={wall} />
        </div>
      </li>
    );
  }
  return (
    <li className="grid grid-cols-[minmax(0,1fr)_auto] items-center gap-x-3 py-2" data-channel={c.id}>
      <div className="min-w-0">
        <div className="flex flex-wrap items-baseline gap-x-2 text-sm">
          <a href={`/charts/channel/${c.id}`} className="truncate font-bold" style={{ color: tone.normal }} title={c.name}>
            {c.shortName}
          </a>
          {c.alarms > 0 && c.alarmPriority && (
            <span className="font-bold" style={{ color: tone[c.alarmPriority === 'medium' ? 'med' : c.alarmPriority] }}>
              <span aria-hidden="true">{PRIORITY_SHAPE[c.alarmPriority]}</span> alarm
            </span>
          )}
        </div>
        <div className="flex flex-wrap items-baseline gap-x-2">
          {valueEl}
          {stateWords}
        </div>
        {c.kind !== 'door' && band && latest && (
          <Band c={c} band={band} value={latest.value} tone={tone} wall={wall} abnormal={abnormal && !stale} />
        )}
        <div className="text-xs" style={{ color: tone.normal }}>
          {c.window ? (
            <>
              window {c.window.min}–{c.window.max} {c.unit}
              {c.window.target !== undefined ? ` (target ${c.window.target})` : ''}
              {c.window.lowApplies === 'soak'
                ? ' · low limit in soak only'
                : c.window.lowApplies === 'load'
                  ? ' · low limit while loaded'
                  : ''}
            </>
          ) : c.kind === 'door' ? (
            'door switch'
          ) : (
            'no window for this channel'
          )}{' '}
          · <span data-age>{ageText}</span>
        </div>
      </div>
      <Spark c={c} points={props.spark} state={props.sparkState} now={now} tone={tone} wall={wall} />
    </li>
  );
}

function StateWord({ shape, word, colour, wall }: { shape: string; word: string; colour: string; wall: boolean }) {
  return (
    <span className={`font-bold ${wall ? 'text-lg' : 'text-sm'}`} style={{ color: colour }}>
      <span aria-hidden="true">{shape}</span> {word}
    </span>
  );
}

/** Where the value sits between its window limits (or in the channel range when there is no window). */
function Band({
  c,
  band,
  value,
  tone,
  wall,
  abnormal,
}: {
  c: FloorChannel;
  band: ReturnType<typeof placeOnBand>;
  value: number;
  tone: Tone;
  wall: boolean;
  abnormal: boolean;
}) {
  const W = 100;
  const H = wall ? 20 : 12;
  const x = band.at * W;
  const label = c.window
    ? `${c.shortName} ${value} ${c.unit}; window ${c.window.min} to ${c.window.max} ${c.unit}; ${band.state === 'normal' ? 'inside the window' : band.state === 'high' ? 'above the window' : 'below the window'}`
    : `${c.shortName} ${value} ${c.unit} in the channel range ${c.min} to ${c.max} ${c.unit}; no window`;
  return (
    <svg
      viewBox={`0 0 ${W} ${H}`}
      preserveAspectRatio="none"
      className="mt-1 block w-full"
      style={{ height: H }}
      role="img"
      aria-label={label}
    >
      <rect x={0} y={H * 0.3} width={W} height={H * 0.4} fill={tone.track} />
      {band.windowFrom !== null && band.windowTo !== null && (
        <rect
          x={band.windowFrom * W}
          y={H * 0.15}
          width={(band.windowTo - band.windowFrom) * W}
          height={H * 0.7}
          fill={tone.band}
        />
      )}
      {band.targetAt !== null && (
        <rect x={band.targetAt * W - 0.3} y={H * 0.05} width={0.6} height={H * 0.9} fill={tone.normal} />
      )}
      <rect x={Math.min(W - 1.6, Math.max(0, x - 0.8))} y={0} width={1.6} height={H} fill={abnormal ? tone.high : tone.ink} />
      {band.offScale && (
        <text
          x={band.offScale === 'above' ? W - 3 : 3}
          y={H * 0.8}
          fontSize={H * 0.8}
          textAnchor={band.offScale === 'above' ? 'end' : 'start'}
          fill={abnormal ? tone.high : tone.normal}
        >
          {band.offScale === 'above' ? '»' : '«'}
        </text>
      )}
    </svg>
  );
}

function Spark({
  c,
  points,
  state,
  now,
  tone,
  wall,
}: {
  c: FloorChannel;
  points: ChartPoint[];
  state: 'loading' | 'ready' | 'error';
  now: number;
  tone: Tone;
  wall: boolean;
}) {
  const W = wall ? 130 : 120;
  const H = wall ? 40 : 40;
  const ys = points.flatMap((p) => (p.y === null ? [] : [p.y]));
  if (ys.length === 0) {
    return (
      <div className={`text-right ${wall ? 'text-base' : 'text-xs'}`} style={{ width: W, color: tone.faint }}>
        {state === 'loading' ? 'loading trend…' : state === 'error' ? 'trend unavailable' : 'no data in the last hour'}
      </div>
    );
  }
  let lo = Math.min(...ys);
  let hi = Math.max(...ys);
  if (c.window) {
    lo = Math.min(lo, c.window.min);
    hi = Math.max(hi, c.window.max);
  }
  const pad = (hi - lo) * 0.08 || Math.abs(hi) * 0.05 || 1;
  lo -= pad;
  hi += pad;
  const from = now - SPARK_MS;
  const paths = sparkPaths(points, from, now, lo, hi, W, H);
  const yOf = (v: number) => H - ((v - lo) / (hi - lo)) * H;
  return (
    <a href={`/charts/channel/${c.id}`} aria-label={`Trend of ${c.name}, last 60 minutes`} className="block">
      <svg width={W} height={H} viewBox={`0 0 ${W} ${H}`} role="img" aria-hidden="true">
        {c.window && (
          <rect
            x={0}
            y={yOf(c.window.max)}
            width={W}
            height={Math.max(1, yOf(c.window.min) - yOf(c.window.max))}
            fill={tone.track}
          />
        )}
        {paths.map((p, i) => (
          <polyline key={i} points={p} fill="none" stroke={tone.normal} strokeWidth={wall ? 2 : 1.5} strokeLinejoin="round" />
        ))}
      </svg>
      {!wall && (
        <span className="block text-right text-[10px]" style={{ color: tone.faint }}>
          60 min
        </span>
      )}
    </a>
  );
}
