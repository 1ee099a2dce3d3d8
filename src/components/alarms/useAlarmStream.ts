/**
 * The alarm queue's data: the alarms the page rendered with, kept live from the server's event
 * stream (a change that calls for it sounds through `beep`), reconciled with the server every
 * minute and whenever the view changes, and the focused alarm (from an e-mail link) fetched when
 * it is not in the first list.
 */
import { useCallback, useEffect, useRef, useState } from 'react';
import { apiFetch, subscribeLive } from '../../lib/client/api.ts';
import type { AlarmPriority } from '../../lib/shared/alarms.ts';
import type { AlarmView } from '../../lib/shared/alarm-views.ts';
import { mergeAlarm, shouldSound, type QueueView } from '../../lib/shared/alarm-queue.ts';

export function useAlarmStream({
  initial,
  view,
  focusId,
  beep,
  setNotice,
}: {
  initial: readonly AlarmView[];
  view: QueueView;
  focusId: number | null;
  beep: (priority: AlarmPriority) => void;
  setNotice: (text: string | null) => void;
}) {
  const [alarms, setAlarms] = useState<Map<number, AlarmView>>(() => new Map(initial.map((a) => [a.id, a])));
  const [live, setLive] = useState<{ lastMs: number | null }>({ lastMs: null });
  const [loading, setLoading] = useState(false);
  const [loadError, setLoadError] = useState<string | null>(null);
  const alarmsRef = useRef(alarms);
  alarmsRef.current = alarms;

  // Live updates.
  useEffect(() => {
    const stop = subscribeLive(['alarms'], (_kind, payload: AlarmView) => {
      if (!payload || typeof payload.id !== 'number') return;
      const before = alarmsRef.current.get(payload.id);
      if (shouldSound(before, payload)) beep(payload.priority);
      setAlarms((m) => mergeAlarm(m, payload));
      setLive({ lastMs: Date.now() });
    });
    return stop;
  }, [beep]);

  // Reconcile with the server now and then (and whenever the view changes).
  const reload = useCallback(async (v: QueueView) => {
    setLoading(true);
    setLoadError(null);
    try {
      const state = v === 'open' ? 'open' : v === 'held' ? 'shelved,suppressed,out-of-service' : '';
      const list = await apiFetch<AlarmView[]>(`/api/v1/alarms?limit=500${state ? `&state=${state}` : ''}`);
      setAlarms((m) => list.reduce((acc, a) => mergeAlarm(acc, a), m));
    } catch (e) {
      setLoadError(e instanceof Error ? e.message : String(e));
    } finally {
      setLoading(false);
    }
  }, []);
  useEffect(() => {
    void reload(view);
    const t = setInterval(() => void reload(view), 60_000);
    return () => clearInterval(t);
  }, [view, reload]);

  // A focused alarm (from an e-mail link) that is not in the first list: fetch it.
  useEffect(() => {
    if (focusId === null || alarmsRef.current.has(focusId)) return;
    apiFetch<AlarmView>(`/api/v1/alarms/${focusId}`)
      .then((a) => setAlarms((m) => mergeAlarm(m, a)))
      .catch(() => setNotice(`Alarm ${focusId} was not found.`));
  }, [focusId, setNotice]);

  return { alarms, setAlarms, live, loading, loadError, reload };
}
