/**
 * The channel trend's data: readings for each channel over the view (the chart draws as soon as
 * they arrive) and, beside them, the window stretches and events. The first load asks exactly
 * what the page preloaded; later ones about one point per pixel. A quiet reload (the live view
 * following the clock) keeps the progress bar hidden.
 */
import { useEffect, useRef, useState, type RefObject } from 'react';
import { apiFetch, ApiError } from '../../lib/client/api.ts';
import type { ReadingsResponse } from '../../lib/shared/telemetry.ts';
import { INITIAL_MAX_POINTS, maxPointsFor, shapeReadings, type AnnotationsResponse } from '../../lib/shared/trend.ts';
import type { Note, SeriesState } from './trend-chart-config.ts';

export function useTrendData({
  ids,
  fromMs,
  toMs,
  reloadKey,
  boxRef,
  silent,
}: {
  ids: readonly number[];
  fromMs: number;
  toMs: number;
  /** Bumped by "Try again". */
  reloadKey: number;
  /** The plot's box: its width sets the points asked for. */
  boxRef: RefObject<HTMLDivElement | null>;
  /** Set by the caller before a quiet reload; read and reset here. */
  silent: RefObject<boolean>;
}) {
  const [series, setSeries] = useState<ReadonlyMap<number, SeriesState>>(new Map());
  const [notes, setNotes] = useState<ReadonlyMap<number, Note>>(new Map());
  const [loading, setLoading] = useState<{ done: number; total: number } | null>({ done: 0, total: ids.length });
  const firstLoad = useRef(true);

  useEffect(() => {
    const ac = new AbortController();
    const quiet = silent.current;
    silent.current = false;
    const first = firstLoad.current;
    firstLoad.current = false;
    const from = Math.round(fromMs);
    const to = Math.round(toMs);
    // The first load asks exactly what the page preloaded; later ones about one point per pixel (≤ 2 000).
    const maxPoints = first ? INITIAL_MAX_POINTS : maxPointsFor((boxRef.current?.clientWidth ?? 1000) - 120);
    const message = (e: unknown) =>
      e instanceof ApiError ? `${e.title}${e.detail ? `: ${e.detail}` : ''}` : e instanceof Error ? e.message : String(e);
    const run = async () => {
      if (!quiet) setLoading({ done: 0, total: ids.length });
      void Promise.all(
        ids.map(async (id): Promise<[number, Note]> => {
          try {
            return [
              id,
              {
                a: await apiFetch<AnnotationsResponse>(`/api/v1/channels/${id}/annotations?from=${from}&to=${to}`, {
                  signal: ac.signal,
                }),
              },
            ];
          } catch (e) {
            return [id, { a: null, error: message(e) }];
          }
        }),
      ).then((r) => {
        if (!ac.signal.aborted) setNotes(new Map(r));
      });
      let done = 0;
      const results = await Promise.all(
        ids.map(async (id): Promise<[number, SeriesState]> => {
          try {
            const resp = await apiFetch<ReadingsResponse>(
              `/api/v1/channels/${id}/readings?from=${from}&to=${to}&maxPoints=${maxPoints}`,
              { signal: ac.signal },
            );
            return [id, { status: 'ok', shaped: shapeReadings(resp) }];
          } catch (e) {
            return [id, { status: 'error', error: message(e) }];
          } finally {
            done++;
            if (!quiet && !ac.signal.aborted) setLoading({ done, total: ids.length });
          }
        }),
      );
      if (ac.signal.aborted) return;
      setSeries(new Map(results));
      setLoading(null);
    };
    const timer = setTimeout(() => void run(), first ? 0 : 80);
    return () => {
      clearTimeout(timer);
      ac.abort();
    };
  }, [ids, fromMs, toMs, reloadKey, boxRef, silent]);

  return { series, notes, loading };
}
