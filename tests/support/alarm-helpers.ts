/**
 * Helpers for the alarm tests: publish readings as a demo device over MQTT to the test
 * stack's broker, read the live SSE stream with fetch and a stream reader, configure a
 * channel's alarm settings through the API, and look things up in the database.
 */
import mqtt, { type MqttClient } from 'mqtt';
import pg from 'pg';
import { inject } from 'vitest';
import { demoDevicePassword, demoTopic } from '../../seeds/demo-plant.ts';
import { TEST_DEVICE_SECRET } from './test-stack.ts';
import { api, base, signIn, type Session } from './http.ts';
import { within } from './ingest-harness.ts';

let pool: pg.Pool | null = null;

/** A small pool on the test database (closed by {@link closeAlarmHelpers}). */
export function testDb(): pg.Pool {
  pool ??= new pg.Pool({ connectionString: inject('stack').databaseUrl, max: 2 });
  return pool;
}

export async function closeAlarmHelpers(): Promise<void> {
  await pool?.end();
  pool = null;
}

/** Id of a demo channel by asset code and channel key. */
export async function channelIdOf(assetCode: string, key: string): Promise<number> {
  const r = await testDb().query<{ id: number }>(
    `select c.id from channels c join assets a on a.id = c.asset_id where a.code = $1 and c.key = $2`,
    [assetCode, key],
  );
  if (!r.rows[0]) throw new Error(`no channel ${assetCode}/${key}`);
  return r.rows[0].id;
}

export interface DeviceLink {
  client: MqttClient;
  /** Publish one reading (QoS 1, resolves on PUBACK, i.e. after the worker committed it). */
  publish(assetCode: string, key: string, v: number, tMs?: number): Promise<void>;
  close(): Promise<void>;
}

/** Connect as a demo device (username like 'gw-uv-1') with its demo password. */
export async function connectDevice(username: string): Promise<DeviceLink> {
  const client = mqtt.connect(`mqtt://127.0.0.1:${inject('stack').mqttPort}`, {
    username,
    password: demoDevicePassword(TEST_DEVICE_SECRET, username),
    clientId: `${username}-test-${process.pid}-${Math.random().toString(36).slice(2, 8)}`,
    protocolVersion: 4,
    reconnectPeriod: 0,
    connectTimeout: 5000,
  });
  await new Promise<void>((resolve, reject) => {
    client.once('connect', () => resolve());
    client.once('error', reject);
  });
  return {
    client,
    publish: (assetCode, key, v, tMs = Date.now()) =>
      client.publishAsync(demoTopic(username, assetCode, key), JSON.stringify({ t: tMs, v }), { qos: 1 }).then(() => {}),
    close: () => client.endAsync(),
  };
}

export interface SseEvent {
  event: string;
  data: any;
}

export interface LiveStream {
  /**
   * Resolve with the first matching event received at or after position `from` (default: the
   * last {@link mark}; events already received count), or reject after `timeoutMs`.
   */
  next(match: (e: SseEvent) => boolean, timeoutMs?: number, from?: number): Promise<SseEvent>;
  /** Remember "now": later `next()` calls only look at events received from here on. */
  mark(): number;
  /** The events received from position `from` (default: the last {@link mark}) until now. */
  since(from?: number): SseEvent[];
  close(): void;
}

/** Open `/api/v1/stream?kinds=…` with a session cookie and parse the server-sent events. */
export async function openStream(session: Session, kinds: string[]): Promise<LiveStream> {
  const ac = new AbortController();
  const r = await fetch(`${base()}/api/v1/stream?kinds=${kinds.join(',')}`, {
    headers: { cookie: session.cookie, accept: 'text/event-stream' },
    signal: ac.signal,
  });
  if (r.status !== 200 || !r.body) throw new Error(`stream answered ${r.status}`);
  const reader = r.body.getReader();
  const seen: SseEvent[] = [];
  const waiters: { match: (e: SseEvent) => boolean; resolve: (e: SseEvent) => void }[] = [];
  let marked = 0;
  const dec = new TextDecoder();
  let buf = '';
  // The server writes `: connected` once it has subscribed this stream: the readiness signal.
  let ready!: () => void;
  const connected = new Promise<void>((r) => (ready = r));
  void (async () => {
    try {
      for (;;) {
        const { value, done } = await reader.read();
        if (done) break;
        buf += dec.decode(value, { stream: true });
        if (buf.includes(': connected')) ready();
        let i: number;
        while ((i = buf.indexOf('\n\n')) >= 0) {
          const block = buf.slice(0, i);
          buf = buf.slice(i + 2);
          let event = 'message';
          const data: string[] = [];
          for (const line of block.split('\n')) {
            if (line.startsWith('event: ')) event = line.slice(7);
            else if (line.startsWith('data: ')) data.push(line.slice(6));
          }
          if (data.length === 0) continue;
          const e = { event, data: JSON.parse(data.join('\n')) };
          seen.push(e);
          for (const w of [...waiters]) {
            if (w.match(e)) {
              waiters.splice(waiters.indexOf(w), 1);
              w.resolve(e);
            }
          }
        }
      }
    } catch {
      /* aborted */
    }
  })();
  await within(connected, 10_000, 'the live stream to connect');
  return {
    mark() {
      marked = seen.length;
      return marked;
    },
    since: (from = marked) => seen.slice(from),
    next(match, timeoutMs = 10_000, from = marked) {
      const hit = seen.slice(from).find(match);
      if (hit) return Promise.resolve(hit);
      return new Promise((resolve, reject) => {
        const w = { match, resolve };
        waiters.push(w);
        setTimeout(() => {
          const at = waiters.indexOf(w);
          if (at >= 0) {
            waiters.splice(at, 1);
            reject(new Error(`no matching live event within ${timeoutMs} ms (saw ${seen.length} events)`));
          }
        }, timeoutMs);
      });
    },
    close: () => ac.abort(),
  };
}

/** Set a channel's alarm settings through the API as the demo engineer. */
export async function configureChannel(channelId: number, config: Record<string, unknown>): Promise<void> {
  const engineer = await signIn('engineer');
  const r = await api(`/api/v1/alarm-configs/${channelId}`, {
    method: 'PUT',
    session: engineer,
    json: { enabled: true, ...config },
  });
  if (r.status !== 200) throw new Error(`configure channel ${channelId}: ${r.status} ${JSON.stringify(r.body)}`);
  // The worker re-reads alarm settings every 2 s.
  await new Promise((r2) => setTimeout(r2, 2_500));
}

/** Poll until `fn` returns a truthy value, or throw after `timeoutMs`. */
export async function eventually<T>(
  fn: () => Promise<T | null | undefined | false>,
  timeoutMs = 10_000,
  what = 'condition',
): Promise<T> {
  const until = Date.now() + timeoutMs;
  for (;;) {
    const v = await fn();
    if (v) return v;
    if (Date.now() > until) throw new Error(`timed out waiting for ${what}`);
    await new Promise((r) => setTimeout(r, 200));
  }
}

/** The open alarm of a source key (via SQL), or null. */
export async function openAlarmId(sourceKey: string): Promise<number | null> {
  const r = await testDb().query<{ id: number }>(`select id from alarms where source_key = $1 and state <> 'normal'`, [
    sourceKey,
  ]);
  return r.rows[0]?.id ?? null;
}
