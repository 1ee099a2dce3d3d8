/**
 * The embedded aedes broker: per-device credentials (argon2id hashes in PostgreSQL),
 * service accounts for the worker and the web server, publish/subscribe authorisation,
 * and device online/offline recorded from connection events and last wills.
 *
 * Identity rules (each refusal is logged with its reason):
 * - a client id is bound to its credential: a device connects as `{username}` or
 *   `{username}-{suffix}`, `svc-ingest` as `coatrail-ingest-…`, `svc-web` as `coatrail-web-…`
 *   (so no credential can take over, or wipe the session of, another identity's client id);
 * - service secrets are compared in constant time (SHA-256 digests, `timingSafeEqual`), one
 *   secret per account when `servicePasswords` gives them;
 * - packets are capped while they are parsed (before CONNECT: 64 KiB; a device: `maxPacketBytes`,
 *   1 MiB by default, above a full 10 000-sample batch; a service account: 4 MiB), and a publish
 *   over the cap is refused in `authorizePublish` as well;
 * - retain only on a device's own `{prefix}/status` topic;
 * - failed CONNECTs are throttled by token buckets per address and per username (a key out of
 *   tokens is refused before any password work); an unknown username is
 *   verified against a dummy hash, so a refusal takes the same work whether or not it exists;
 * - every few seconds (`revokeCheckMs`) the rows of the connected devices are read again: a
 *   device that was disabled, deleted or given a new password is disconnected at once.
 */
import { createHash, timingSafeEqual } from 'node:crypto';
import fs from 'node:fs';
import { createServer, type Server, type Socket } from 'node:net';
import http from 'node:http';
import tls from 'node:tls';
import { Aedes, type Client } from 'aedes';
import { WebSocketServer, createWebSocketStream } from 'ws';
import type pg from 'pg';
import { dummyHash, verifyPassword } from '../src/lib/server/passwords.ts';
import { memoryPersistence } from './broker-persistence.ts';
import { LIVE_ROOT, TOPIC_ROOT, isUnder } from '../src/lib/shared/topics.ts';

export interface BrokerOptions {
  pool: pg.Pool;
  host: string;
  port: number;
  wsPort?: number;
  /** The service accounts' secret (both accounts), unless `servicePasswords` gives one of its own. */
  servicePassword: string;
  /** A secret per service account (e.g. from MQTT_INGEST_PASSWORD / MQTT_WEB_PASSWORD). */
  servicePasswords?: Partial<Record<ServiceAccount, string>>;
  /** An optional MQTT-over-TLS listener (plant networks: device passwords cross them in clear otherwise). */
  tls?: { port: number; cert: Buffer | string; key: Buffer | string };
  /** The largest packet a device may send (bytes); default 1 MiB. */
  maxPacketBytes?: number;
  /** CONNECT token buckets: burst and refill per second, per address and per username. */
  connectRate?: { perAddress?: Bucket; perUsername?: Bucket };
  /** How often the connected devices' rows are re-read to cut off disabled or rotated ones (ms). */
  revokeCheckMs?: number;
  log?: (line: string) => void;
  /**
   * A folder for durable broker state (sessions, their queued QoS 1 deliveries, retained
   * messages) in LevelDB: a broker that is killed and restarted still hands the worker every
   * reading it acknowledged to a device. Without it the state is in memory (tests, benchmarks).
   */
  stateDir?: string;
  /**
   * Persistent sessions the broker holds from its first moment, before their client connects:
   * the ingest worker's (client id and QoS 1 topics). What a device publishes while the worker
   * is still connecting — at first start or after the broker was restarted — is queued for it
   * instead of being dropped for want of a subscriber.
   */
  presetSessions?: { clientId: string; topics: string[] }[];
}

type ServiceAccount = 'svc-ingest' | 'svc-web';

interface Identity {
  kind: 'device' | ServiceAccount;
  deviceId?: number;
  prefix?: string;
  /** The password hash the device authenticated against: a rotation changes it. */
  passwordHash?: string;
}

export interface Bucket {
  burst: number;
  perSecond: number;
}

/** Client-id prefixes of the service accounts (ingest/subscriber.ts, src/lib/server/broker-link.ts). */
export const SERVICE_CLIENT_PREFIX: Record<ServiceAccount, string> = {
  'svc-ingest': 'coatrail-ingest-',
  'svc-web': 'coatrail-web-',
};
const SUFFIX = /^[A-Za-z0-9._-]{1,64}$/;

/** Whether `clientId` belongs to the identity that authenticated as `username`. */
export function clientIdAllowed(username: string, clientId: string): boolean {
  if (username === 'svc-ingest' || username === 'svc-web') {
    const p = SERVICE_CLIENT_PREFIX[username];
    return clientId.startsWith(p) && SUFFIX.test(clientId.slice(p.length));
  }
  // A device never takes a service account's client-id space, whatever its username.
  if (Object.values(SERVICE_CLIENT_PREFIX).some((p) => clientId.startsWith(p))) return false;
  if (clientId === username) return true;
  return clientId.startsWith(username + '-') && SUFFIX.test(clientId.slice(username.length + 1));
}

export const DEFAULT_MAX_PACKET_BYTES = 1 << 20;
const SERVICE_MAX_PACKET_BYTES = 4 << 20;
const PRE_CONNECT_MAX_PACKET_BYTES = 64 << 10;
/** Failed CONNECTs: an address may fail 60 times at once, then 2 a second; a username 10, then 1 every 2 s. */
const DEFAULT_RATE = { perAddress: { burst: 60, perSecond: 2 }, perUsername: { burst: 10, perSecond: 0.5 } };

/**
 * Token buckets by key (bounded: full buckets are dropped when the map grows). A failed CONNECT
 * takes a token; while a key has none, its CONNECTs are refused before any password work.
 */
class Buckets {
  private m = new Map<string, { tokens: number; at: number }>();
  constructor(private b: Bucket) {}
  private entry(key: string, now: number) {
    let e = this.m.get(key);
    if (!e) {
      if (this.m.size > 10_000) this.sweep(now);
      this.m.set(key, (e = { tokens: this.b.burst, at: now }));
    }
    e.tokens = Math.min(this.b.burst, e.tokens + ((now - e.at) / 1000) * this.b.perSecond);
    e.at = now;
    return e;
  }
  allows(key: string, now = Date.now()): boolean {
    return this.entry(key, now).tokens >= 1;
  }
  take(key: string, now = Date.now()): void {
    const e = this.entry(key, now);
    e.tokens = Math.max(0, e.tokens - 1);
  }
  private sweep(now: number) {
    for (const [k, e] of this.m) if (e.tokens + ((now - e.at) / 1000) * this.b.perSecond >= this.b.burst) this.m.delete(k);
  }
}

const digest = (s: string) => createHash('sha256').update(s, 'utf8').digest();
/** Constant-time equality of two secrets (equal-length SHA-256 digests). */
function secretEquals(given: string, expected: string): boolean {
  return timingSafeEqual(digest(given), digest(expected));
}

/**
 * Cap the size of every packet a client sends while it is being parsed, before its body is
 * buffered (mqtt-packet reads the remaining length first). Uses the parser aedes 1.x keeps on
 * the client (`_parser`); if a later aedes drops it, the publish check in authorizePublish
 * still refuses oversized messages.
 */
function capPacketSize(client: Client, limit: () => number, log: (s: string) => void) {
  const parser = (client as unknown as { _parser?: { _parseLength?: () => boolean; packet: { length: number } } })._parser;
  const original = parser?._parseLength;
  if (!parser || typeof original !== 'function') return;
  parser._parseLength = function (this: typeof parser) {
    const ok = original.call(this);
    const max = limit();
    if (ok && this.packet.length > max) {
      log(`refused a ${this.packet.length}-byte packet from ${client.id ?? 'a new connection'} (cap ${max} bytes)`);
      (client as unknown as { conn: Socket }).conn.destroy();
      return false;
    }
    return ok;
  } as () => boolean;
}

export interface RunningBroker {
  aedes: Aedes;
  port: number;
  /** The TLS listener's port when one was asked for. */
  tlsPort: number | null;
  close(): Promise<void>;
}

/** aedes-persistence-level over a ClassicLevel database in `dir` (created when absent). */
async function levelPersistence(dir: string): Promise<unknown> {
  fs.mkdirSync(dir, { recursive: true, mode: 0o700 });
  const { ClassicLevel } = await import('classic-level');
  // @ts-expect-error -- the package ships no type declarations; its export is (db) => persistence.
  const mod = (await import('aedes-persistence-level')) as { default: (db: unknown) => unknown };
  return mod.default(new ClassicLevel(dir));
}

/**
 * Password checks are argon2 (≈ 100 ms): remember recent successes for reconnect storms, keyed
 * by a digest (never the password itself), expiring, and bounded.
 */
const verified = new Map<string, number>();
const VERIFIED_MAX = 5_000;
function remember(key: string, until: number) {
  if (verified.size >= VERIFIED_MAX) {
    const now = Date.now();
    for (const [k, t] of verified) if (t <= now) verified.delete(k);
    if (verified.size >= VERIFIED_MAX) verified.delete(verified.keys().next().value!);
  }
  verified.set(key, until);
}

export async function startBroker(opts: BrokerOptions): Promise<RunningBroker> {
  const log = opts.log ?? (() => {});
  // Durable sessions on disk when a state folder is given (npm start); otherwise in-memory
  // sessions with O(1) look-ups for the worker's many unacknowledged deliveries (broker-persistence.ts).
  const persistence = opts.stateDir ? await levelPersistence(opts.stateDir) : memoryPersistence();
  const aedes = await Aedes.createBroker({ heartbeatInterval: 30_000, persistence: persistence as never });
  for (const preset of opts.presetSessions ?? []) {
    // Only where no session exists yet (a durable state folder may already hold the worker's).
    const store = persistence as unknown as {
      subscriptionsByClient(c: { id: string }): Promise<unknown[] | null>;
      addSubscriptions(c: { id: string }, subs: { topic: string; qos: 0 | 1 | 2 }[]): Promise<void>;
    };
    const existing = await store.subscriptionsByClient({ id: preset.clientId });
    if (!existing || existing.length === 0)
      await store.addSubscriptions(
        { id: preset.clientId },
        preset.topics.map((topic) => ({ topic, qos: 1 as const })),
      );
  }
  const ids = new WeakMap<Client, Identity>();
  const connectedDevices = new Set<Client>();
  const maxPacket = opts.maxPacketBytes ?? DEFAULT_MAX_PACKET_BYTES;
  const byAddress = new Buckets(opts.connectRate?.perAddress ?? DEFAULT_RATE.perAddress);
  const byUsername = new Buckets(opts.connectRate?.perUsername ?? DEFAULT_RATE.perUsername);
  const dummy = await dummyHash();
  const serviceSecret = (u: ServiceAccount) => opts.servicePasswords?.[u] || opts.servicePassword;
  const packetLimit = (client: Client) => {
    const id = ids.get(client);
    if (!id) return PRE_CONNECT_MAX_PACKET_BYTES;
    return id.kind === 'device' ? maxPacket : SERVICE_MAX_PACKET_BYTES;
  };
  const addressOf = (client: Client) =>
    (client as unknown as { conn?: { remoteAddress?: string } }).conn?.remoteAddress ?? 'unknown';

  const deviceEvent = async (deviceId: number, kind: 'online' | 'offline', reason: string) => {
    try {
      await opts.pool.query(
        `with e as (insert into device_events(device_id, kind, reason) values ($1, $2, $3))
         update devices set online = $4, last_seen_at = now() where id = $1`,
        [deviceId, kind, reason, kind === 'online'],
      );
    } catch (e) {
      log(`could not record device ${kind}: ${(e as Error).message}`);
    }
  };

  aedes.authenticate = (client, username, password, done) => {
    const pw = password ? password.toString('utf8') : '';
    const refuse = (returnCode: number, message: string, why: string) => {
      log(`refused CONNECT of ${client.id || '(no id)'} as ${username || '(no username)'} from ${addressOf(client)}: ${why}`);
      done(Object.assign(new Error(message), { returnCode }) as never, false);
    };
    const address = addressOf(client);
    const fail = () => {
      byAddress.take(address);
      if (username) byUsername.take(username);
      refuse(4, 'Bad username or password', 'bad username or password');
    };
    if (!byAddress.allows(address)) return refuse(3, 'Too many failed connection attempts', 'address throttled');
    if (!username || !pw) return fail();
    if (!byUsername.allows(username)) return refuse(3, 'Too many failed connection attempts', 'username throttled');
    if (!clientIdAllowed(username, client.id ?? '')) {
      byAddress.take(address);
      return refuse(2, 'Client identifier not allowed for this identity', `client id not bound to ${username}`);
    }
    if (username === 'svc-ingest' || username === 'svc-web') {
      if (!secretEquals(pw, serviceSecret(username))) return fail();
      ids.set(client, { kind: username });
      return done(null, true);
    }
    opts.pool
      .query<{ id: number; password_hash: string; topic_prefix: string; enabled: boolean }>(
        'select id, password_hash, topic_prefix, enabled from devices where username = $1',
        [username],
      )
      .then(async ({ rows }) => {
        const d = rows[0];
        const hash = d?.password_hash ?? dummy;
        const cacheKey = digest(`${username}\0${pw}\0${hash}`).toString('base64');
        // Same argon2 work for an unknown or disabled device as for a wrong password.
        const ok = (verified.get(cacheKey) ?? 0) > Date.now() || (await verifyPassword(hash, pw));
        if (!d || !d.enabled || !ok) return fail();
        if (client.id !== username) {
          // `gw-a-b-1` fits both `gw-a` and `gw-a-b`: the id belongs to the longest username it fits.
          const owner = await opts.pool.query<{ username: string }>(
            `select username from devices where $1 = username or starts_with($1, username || '-')
              order by length(username) desc limit 1`,
            [client.id],
          );
          if (owner.rows[0]?.username !== username) {
            byAddress.take(address);
            return refuse(
              2,
              'Client identifier not allowed for this identity',
              `client id belongs to ${owner.rows[0]?.username}`,
            );
          }
        }
        remember(cacheKey, Date.now() + 10 * 60_000);
        ids.set(client, { kind: 'device', deviceId: d.id, prefix: d.topic_prefix, passwordHash: d.password_hash });
        done(null, true);
      })
      .catch((e: Error) => {
        log(`authenticate: ${e.message}`);
        const err = Object.assign(new Error('Server unavailable'), { returnCode: 3 });
        done(err as never, false);
      });
  };

  aedes.authorizePublish = (client, packet, done) => {
    const id = client ? ids.get(client) : undefined;
    const topic = packet.topic;
    if (!id) return done(new Error('not authenticated'));
    const size = packet.payload ? packet.payload.length : 0;
    const cap = id.kind === 'device' ? maxPacket : SERVICE_MAX_PACKET_BYTES;
    const refuse = (why: string) => {
      log(`refused a publish by ${client?.id} to ${topic}: ${why}`);
      done(new Error(why));
    };
    if (size > cap) return refuse(`payload of ${size} bytes is over the ${cap}-byte cap`);
    if (id.kind === 'device' && id.prefix && isUnder(topic, id.prefix)) {
      if (packet.retain && topic !== `${id.prefix}/status`) return refuse(`retain is allowed only on ${id.prefix}/status`);
      return done(null);
    }
    if ((id.kind === 'svc-ingest' || id.kind === 'svc-web') && isUnder(topic, LIVE_ROOT)) {
      if (packet.retain) return refuse('service accounts do not publish retained messages');
      return done(null);
    }
    refuse(`publishing to ${topic} is not allowed for this identity`);
  };

  aedes.authorizeSubscribe = (client, sub, done) => {
    const id = client ? ids.get(client) : undefined;
    const t = sub.topic.replace(/^\$share\/[^/]+\//, '');
    const plant = t === '#' ? false : t.startsWith(TOPIC_ROOT + '/') || t === TOPIC_ROOT + '/#';
    if (id?.kind === 'svc-ingest' && plant) return done(null, sub);
    // The web server needs only the live fan-out, not the plant's raw topics (least privilege).
    if (id?.kind === 'svc-web' && (t === LIVE_ROOT + '/#' || isUnder(t, LIVE_ROOT))) return done(null, sub);
    done(new Error('subscription not allowed'), null);
  };

  aedes.on('clientReady', (client) => {
    const id = ids.get(client);
    if (id?.kind === 'device' && id.deviceId) {
      connectedDevices.add(client);
      void deviceEvent(id.deviceId, 'online', 'connected');
    }
  });
  aedes.on('clientDisconnect', (client) => {
    connectedDevices.delete(client);
    const id = ids.get(client);
    if (id?.kind === 'device' && id.deviceId) void deviceEvent(id.deviceId, 'offline', 'disconnected');
  });
  aedes.on('clientError', (client, err) => {
    connectedDevices.delete(client);
    const id = ids.get(client);
    if (id?.kind === 'device' && id.deviceId) void deviceEvent(id.deviceId, 'offline', `connection lost: ${err.message}`);
  });

  // Cut off devices disabled, deleted or rotated since they connected: a broker-side poll of
  // the connected devices' rows (no notification from the web service is needed, and a change
  // made straight in the database is caught as well).
  let revoking = false;
  const revokeCheck = async () => {
    if (revoking || connectedDevices.size === 0) return;
    revoking = true;
    try {
      const clients = [...connectedDevices];
      const deviceIds = [...new Set(clients.map((c) => ids.get(c)!.deviceId!))];
      const { rows } = await opts.pool.query<{ id: number; enabled: boolean; password_hash: string }>(
        'select id, enabled, password_hash from devices where id = any($1::int[])',
        [deviceIds],
      );
      const now = new Map(rows.map((r) => [r.id, r]));
      for (const c of clients) {
        const id = ids.get(c)!;
        const row = now.get(id.deviceId!);
        const why = !row
          ? 'deleted'
          : !row.enabled
            ? 'disabled'
            : row.password_hash !== id.passwordHash
              ? 'password rotated'
              : null;
        if (!why) continue;
        log(`closing ${c.id}: device ${why}`);
        connectedDevices.delete(c);
        c.close();
      }
    } catch (e) {
      log(`device revocation check: ${(e as Error).message}`);
    } finally {
      revoking = false;
    }
  };
  const revokeTimer = setInterval(() => void revokeCheck(), opts.revokeCheckMs ?? 3_000);
  revokeTimer.unref();

  const handle = (conn: never, req?: never) => {
    const client = aedes.handle(conn, req as never) as unknown as Client;
    capPacketSize(client, () => packetLimit(client), log);
    return client;
  };
  const server: Server = createServer((socket) => handle(socket as never));
  await new Promise<void>((resolve, reject) => {
    server.once('error', reject);
    server.listen(opts.port, opts.host, () => resolve());
  });
  const port = (server.address() as { port: number }).port;
  let wsHttp: http.Server | null = null;
  if (opts.wsPort !== undefined && opts.wsPort > 0) {
    wsHttp = http.createServer();
    const wss = new WebSocketServer({ server: wsHttp });
    wss.on('connection', (socket, req) => handle(createWebSocketStream(socket) as never, req as never));
    await new Promise<void>((resolve) => wsHttp!.listen(opts.wsPort, opts.host, resolve));
  }
  let tlsServer: tls.Server | null = null;
  let tlsPort: number | null = null;
  if (opts.tls) {
    tlsServer = tls.createServer({ cert: opts.tls.cert, key: opts.tls.key, minVersion: 'TLSv1.2' }, (socket) =>
      handle(socket as never),
    );
    await new Promise<void>((resolve, reject) => {
      tlsServer!.once('error', reject);
      tlsServer!.listen(opts.tls!.port, opts.host, () => resolve());
    });
    tlsPort = (tlsServer.address() as { port: number }).port;
    log(`MQTT over TLS on ${opts.host}:${tlsPort}`);
  }
  log(`MQTT broker on ${opts.host}:${port}`);
  return {
    aedes,
    port,
    tlsPort,
    async close() {
      clearInterval(revokeTimer);
      await new Promise<void>((r) => aedes.close(() => r()));
      await new Promise<void>((r) => server.close(() => r()));
      if (wsHttp) await new Promise<void>((r) => wsHttp!.close(() => r()));
      if (tlsServer) await new Promise<void>((r) => tlsServer!.close(() => r()));
    },
  };
}
