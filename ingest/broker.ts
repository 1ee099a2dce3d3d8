/**
 * The embedded aedes broker: per-device credentials (argon2id hashes in PostgreSQL),
 * service accounts for the worker and the web server, publish/subscribe authorisation,
 * and device online/offline recorded from connection events and last wills.
 */
import fs from 'node:fs';
import { createServer, type Server } from 'node:net';
import http from 'node:http';
import { Aedes, type Client } from 'aedes';
import { WebSocketServer, createWebSocketStream } from 'ws';
import type { Sequelize } from 'sequelize';
import { Device, DeviceEvent } from '../db/models/index.ts';
import { verifyPassword } from '../src/lib/server/passwords.ts';
import { memoryPersistence } from './broker-persistence.ts';
import { LIVE_ROOT, TOPIC_ROOT, isUnder } from '../src/lib/shared/topics.ts';

export interface BrokerOptions {
  /** The process's Sequelize instance (models initialised): device look-ups and device events. */
  sequelize: Sequelize;
  host: string;
  port: number;
  wsPort?: number;
  servicePassword: string;
  log?: (line: string) => void;
  /**
   * A folder for durable broker state (sessions, their queued QoS 1 deliveries, retained
   * messages) in LevelDB: a broker that is killed and restarted still hands the worker every
   * reading it acknowledged to a device. Without it the state is in memory (tests, benchmarks).
   */
  stateDir?: string;
}

interface Identity {
  kind: 'device' | 'svc-ingest' | 'svc-web';
  deviceId?: number;
  prefix?: string;
}

export interface RunningBroker {
  aedes: Aedes;
  port: number;
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

/** Password checks are argon2 (≈ 100 ms): remember recent successes for reconnect storms. */
const verified = new Map<string, number>();

export async function startBroker(opts: BrokerOptions): Promise<RunningBroker> {
  const log = opts.log ?? (() => {});
  // Durable sessions on disk when a state folder is given (npm start); otherwise in-memory
  // sessions with O(1) look-ups for the worker's many unacknowledged deliveries (broker-persistence.ts).
  const persistence = opts.stateDir ? await levelPersistence(opts.stateDir) : memoryPersistence();
  const aedes = await Aedes.createBroker({ heartbeatInterval: 30_000, persistence: persistence as never });
  const ids = new WeakMap<Client, Identity>();

  const deviceEvent = async (deviceId: number, kind: 'online' | 'offline', reason: string) => {
    try {
      await opts.sequelize.transaction(async (transaction) => {
        await DeviceEvent.create({ deviceId, kind, reason }, { transaction });
        await Device.update(
          { online: kind === 'online', lastSeenAt: opts.sequelize.fn('now') as unknown as Date },
          { where: { id: deviceId }, transaction },
        );
      });
    } catch (e) {
      log(`could not record device ${kind}: ${(e as Error).message}`);
    }
  };

  aedes.authenticate = (client, username, password, done) => {
    const pw = password ? password.toString('utf8') : '';
    const fail = () => {
      const err = Object.assign(new Error('Bad username or password'), { returnCode: 4 });
      done(err as never, false);
    };
    if (!username || !pw) return fail();
    if (username === 'svc-ingest' || username === 'svc-web') {
      if (pw !== opts.servicePassword) return fail();
      ids.set(client, { kind: username });
      return done(null, true);
    }
    Device.findOne({ attributes: ['id', 'passwordHash', 'topicPrefix', 'enabled'], where: { username }, raw: true })
      .then(async (d) => {
        if (!d || !d.enabled) return fail();
        const cacheKey = `${username}\0${pw}\0${d.passwordHash}`;
        const ok = (verified.get(cacheKey) ?? 0) > Date.now() || (await verifyPassword(d.passwordHash, pw));
        if (!ok) return fail();
        verified.set(cacheKey, Date.now() + 10 * 60_000);
        ids.set(client, { kind: 'device', deviceId: d.id, prefix: d.topicPrefix });
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
    if (id.kind === 'device' && id.prefix && isUnder(topic, id.prefix)) return done(null);
    if ((id.kind === 'svc-ingest' || id.kind === 'svc-web') && isUnder(topic, LIVE_ROOT)) return done(null);
    done(new Error(`publishing to ${topic} is not allowed for this identity`));
  };

  aedes.authorizeSubscribe = (client, sub, done) => {
    const id = client ? ids.get(client) : undefined;
    const t = sub.topic.replace(/^\$share\/[^/]+\//, '');
    const plant = t === '#' ? false : t.startsWith(TOPIC_ROOT + '/') || t === TOPIC_ROOT + '/#';
    if (id?.kind === 'svc-ingest' && plant) return done(null, sub);
    if (id?.kind === 'svc-web' && (t.startsWith(LIVE_ROOT) || plant)) return done(null, sub);
    done(new Error('subscription not allowed'), null);
  };

  aedes.on('clientReady', (client) => {
    const id = ids.get(client);
    if (id?.kind === 'device' && id.deviceId) void deviceEvent(id.deviceId, 'online', 'connected');
  });
  aedes.on('clientDisconnect', (client) => {
    const id = ids.get(client);
    if (id?.kind === 'device' && id.deviceId) void deviceEvent(id.deviceId, 'offline', 'disconnected');
  });
  aedes.on('clientError', (client, err) => {
    const id = ids.get(client);
    if (id?.kind === 'device' && id.deviceId) void deviceEvent(id.deviceId, 'offline', `connection lost: ${err.message}`);
  });

  const server: Server = createServer(aedes.handle);
  await new Promise<void>((resolve, reject) => {
    server.once('error', reject);
    server.listen(opts.port, opts.host, () => resolve());
  });
  const port = (server.address() as { port: number }).port;
  let wsHttp: http.Server | null = null;
  if (opts.wsPort !== undefined && opts.wsPort > 0) {
    wsHttp = http.createServer();
    const wss = new WebSocketServer({ server: wsHttp });
    wss.on('connection', (socket, req) => aedes.handle(createWebSocketStream(socket) as never, req as never));
    await new Promise<void>((resolve) => wsHttp!.listen(opts.wsPort, opts.host, resolve));
  }
  log(`MQTT broker on ${opts.host}:${port}`);
  return {
    aedes,
    port,
    async close() {
      await new Promise<void>((r) => aedes.close(() => r()));
      await new Promise<void>((r) => server.close(() => r()));
      if (wsHttp) await new Promise<void>((r) => wsHttp!.close(() => r()));
    },
  };
}
