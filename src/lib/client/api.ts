/**
 * Typed fetch wrapper for islands: JSON in and out, RFC 9457 problems turned into an
 * `ApiError` that carries the field errors for forms.
 */
export interface FieldError {
  path: string;
  message: string;
}

export class ApiError extends Error {
  constructor(
    public status: number,
    public title: string,
    public detail: string | undefined,
    public errors: FieldError[] = [],
  ) {
    super(detail ?? title);
  }
}

export async function apiFetch<T>(
  path: string,
  init: { method?: string; body?: unknown; signal?: AbortSignal } = {},
): Promise<T> {
  const r = await fetch(path, {
    method: init.method ?? (init.body === undefined ? 'GET' : 'POST'),
    headers:
      init.body === undefined
        ? { accept: 'application/json' }
        : { 'content-type': 'application/json', accept: 'application/json' },
    body: init.body === undefined ? null : JSON.stringify(init.body),
    credentials: 'same-origin',
    signal: init.signal ?? null,
  });
  const text = await r.text();
  const data = text ? JSON.parse(text) : null;
  if (!r.ok) {
    if (r.status === 401 && typeof window !== 'undefined') {
      window.location.href = `/login?next=${encodeURIComponent(window.location.pathname + window.location.search)}`;
    }
    throw new ApiError(r.status, data?.title ?? `HTTP ${r.status}`, data?.detail, data?.errors ?? []);
  }
  return data as T;
}

/**
 * Subscribe to the server's live stream (server-sent events from /api/v1/stream).
 * `kinds` filters the event names (readings, alarms, points, devices, loads).
 *
 * While a stream is open, `<html data-live-open="n">` counts the page's open streams: the server
 * has subscribed a stream by the time its response opens, so browser tests wait on this
 * attribute before they publish instead of sleeping.
 */
export function subscribeLive(kinds: string[], onEvent: (kind: string, payload: any) => void): () => void {
  const es = new EventSource(`/api/v1/stream?kinds=${encodeURIComponent(kinds.join(','))}`);
  let open = false;
  const count = (by: 1 | -1) => {
    const root = document.documentElement;
    root.dataset['liveOpen'] = String(Math.max(0, Number(root.dataset['liveOpen'] ?? 0) + by));
  };
  es.addEventListener('open', () => {
    if (!open) count(1);
    open = true;
  });
  es.addEventListener('error', () => {
    if (open && es.readyState !== EventSource.OPEN) count(-1);
    open = es.readyState === EventSource.OPEN;
  });
  for (const k of kinds) es.addEventListener(k, (e) => onEvent(k, JSON.parse(e.data)));
  return () => {
    if (open) count(-1);
    open = false;
    es.close();
  };
}
