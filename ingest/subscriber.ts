/**
 * The ingest worker: subscribes to the plant's topics with QoS 1 on a persistent session,
 * validates every message, stores readings in batches and acknowledges each message to the
 * broker only after the transaction holding it has committed (or, while PostgreSQL is away,
 * after it is fsynced in the local journal). A crash therefore loses nothing the broker
 * handed over: unacknowledged messages are redelivered to the persistent session.
 *
 * `startWorker` composes the parts, each in its own module:
 *   arrivals.ts         arrival (parse once) → memory buffer; back-pressure on the packet pump
 *   flush-loop.ts       flush every INGEST_FLUSH_MS / INGEST_BATCH_ROWS; journal mode while the database is away
 *   flusher.ts          resolve topics (holding misses for one look-up) → check → one transaction (store.ts)
 *   ack-after-commit.ts PUBACKs written after the commit
 *   live-publisher.ts   live readings (≤ 4/s)
 *   handler-queue.ts    post-commit handlers (readings, ticks, configuration changes)
 *   health-reporter.ts  the heartbeat in ingest_status
 *   config-listener.ts  configuration changes by LISTEN/NOTIFY → channel map reload → handlers
 */
import mqtt, { type IClientOptions, type MqttClient } from 'mqtt';
import type pg from 'pg';
import { Op, type Sequelize } from 'sequelize';
import { UnknownChannel } from '../db/models/index.ts';
import { postCommitHandlers as defaultHandlers } from './handlers/index.ts';
import type { ConfigChange, PostCommitHandler, WorkerContext } from './handlers/types.ts';
import { AckAfterCommit } from './ack-after-commit.ts';
import { ArrivalBuffer, EntryMaker, MAX_PAYLOAD_BYTES, type Entry } from './arrivals.ts';
import { ChannelMap } from './channel-map.ts';
import type { IngestConfig } from './config.ts';
import { ConfigListener } from './config-listener.ts';
import { FlushLoop } from './flush-loop.ts';
import { Flusher } from './flusher.ts';
import { HandlerQueue } from './handler-queue.ts';
import { HealthReporter } from './health-reporter.ts';
import { Journal } from './journal.ts';
import { LivePublisher } from './live-publisher.ts';
import { LIVE_ROOT, ingestClientId, ingestSubscriptionTopics } from '../src/lib/shared/topics.ts';

export interface WorkerOptions {
  config: IngestConfig;
  /** The process's one Sequelize instance (models initialised): its pool carries every query. */
  sequelize: Sequelize;
  /** Transitional, for the handlers that have not moved to `ctx.sequelize` yet. */
  pool: pg.Pool;
  log?: (line: string) => void;
  /** Post-commit handlers (default: ingest/handlers/index.ts). */
  handlers?: PostCommitHandler[];
}

export interface WorkerStats {
  received: number;
  committed: number;
  rejected: number;
  buffered: number;
  journalBytes: number;
  lagMs: number;
  dbHealthy: boolean;
  mode: 'memory' | 'journal';
  /** Connected to the broker with the subscriptions granted. */
  subscribed: boolean;
  /** Hearing configuration changes as they commit. */
  listening: boolean;
}

export interface RunningWorker {
  stats(): WorkerStats;
  close(): Promise<void>;
}

export { ingestSubscriptionTopics as subscriptionTopics } from '../src/lib/shared/topics.ts';

/** Tables the channel map is built from (a change to another table concerns only the handlers). */
const MAP_TABLES = new Set<ConfigChange['table']>(['*', 'sites', 'assets', 'devices', 'channels']);

export async function startWorker({
  config,
  sequelize,
  pool,
  log = () => {},
  handlers = defaultHandlers,
}: WorkerOptions): Promise<RunningWorker> {
  const map = new ChannelMap(sequelize);
  const journal = new Journal(config.INGEST_JOURNAL_DIR, config.INGEST_WORKER_ID, log);
  if (journal.closedSegments().length)
    log(`journal: ${journal.closedSegments().length} segment(s) from an earlier run to replay`);
  const counters = { received: 0, committed: 0, rejected: 0 };
  let lastCommitAt: number | null = null;
  let closing = false;

  // ---- MQTT (every listener is in place before the first await: a resumed session delivers at once) ----
  const options: IClientOptions = {
    username: 'svc-ingest',
    password: config.MQTT_SERVICE_PASSWORD,
    clientId: ingestClientId(config.INGEST_WORKER_ID),
    protocolVersion: 4,
    clean: false,
    reconnectPeriod: 1000,
    connectTimeout: 10_000,
    keepalive: 30,
  };
  const client: MqttClient = mqtt.connect(config.mqttUrl, options);
  const acks = new AckAfterCommit(client);
  const topics = ingestSubscriptionTopics(config.INGEST_SHARED_GROUP);
  let subscribed = false;
  client.on('connect', (connack) => {
    log(`connected to ${config.mqttUrl}${connack.sessionPresent ? ' (session resumed)' : ''}`);
    client.subscribe(topics, { qos: 1 }, (err, granted) => {
      if (err) log(`subscribe failed: ${err.message}`);
      const refused = (granted ?? []).filter((g) => g.qos > 1);
      for (const g of refused) log(`subscription to ${g.topic} refused by the broker`);
      subscribed = !err && refused.length === 0;
    });
  });
  client.on('close', () => (subscribed = false));
  client.on('error', (e) => log(`mqtt: ${e.message}`));

  // ---- after commit: live readings and handlers ----
  const publishLive = (kind: string, payload: unknown) => {
    if (client.connected) client.publish(`${LIVE_ROOT}/${kind}`, JSON.stringify(payload), { qos: 0 });
  };
  const live = new LivePublisher(publishLive);
  const ctx: WorkerContext = { sequelize, pool, publishLive, log };
  const queue = new HandlerQueue(handlers, ctx);

  // ---- arrival → flush → commit ----
  const buffer = new ArrivalBuffer();
  // The heartbeat (its snapshot reads the flush loop, created below).
  const health = new HealthReporter(sequelize, config.INGEST_WORKER_ID, () => ({
    lastCommitAt,
    lagMs: loop.lagMs(),
    buffered: buffer.rows,
    journalBytes: journal.bytes + journal.pendingSize,
  }));

  const maker = new EntryMaker();
  const flusher = new Flusher({
    sequelize,
    map,
    futureToleranceMs: config.FUTURE_TOLERANCE_MS,
    afterReload: () => resolveUnknown(map),
    log,
  });
  const store = async (entries: Entry[]) => {
    const result = await flusher.store(entries);
    acks.acknowledge(entries);
    counters.committed += result.inserted.length;
    counters.rejected += result.rejections;
    health.counted(result.inserted.length, result.rejections);
    lastCommitAt = Date.now();
    for (const d of result.devices) publishLive('devices', d);
    live.committed(result.inserted);
    queue.push(result.inserted);
  };
  const loop = new FlushLoop({
    config,
    buffer,
    journal,
    store,
    replayEntry: (r) => maker.make(r.topic, r.payload, r.rx, -1, acks.generation),
    log,
  });
  // Back-pressure: hold MQTT.js's packet pump while the buffer is full.
  client.handleMessage = (_packet, callback) => loop.backPressure.admit(() => callback());
  client.on('message', (topic, buf, packet) => {
    if (closing) return; // not acknowledged: the broker redelivers it to the next run
    const rxMs = Date.now();
    counters.received++;
    const payload = buf.length > MAX_PAYLOAD_BYTES ? '' : buf.toString('utf8');
    if (loop.mode === 'journal' && buf.length <= MAX_PAYLOAD_BYTES) {
      journal.append({ topic, payload, rx: rxMs }, acks.later(packet));
      return;
    }
    buffer.push(maker.make(topic, payload, rxMs, AckAfterCommit.packetId(packet), acks.generation, buf.length));
    loop.arrived();
  });

  // ---- configuration changes ----
  const pending: ConfigChange[] = [];
  let applying: Promise<void> | null = null;
  const applyChanges = async () => {
    while (pending.length) {
      const changes = pending.splice(0, pending.length);
      if (changes.some((c) => MAP_TABLES.has(c.table) || (c.table === 'site_settings' && c.key === 'retention'))) {
        try {
          await map.refresh();
          await resolveUnknown(map);
        } catch (e) {
          map.markStale(); // the next flush reloads it
          log(`configuration change not loaded yet (${(e as Error).message}); reloading before the next batch`);
        }
      }
      for (const c of changes) queue.configChanged(c);
    }
  };
  const listener = new ConfigListener({
    url: config.DATABASE_URL,
    onChange: (change) => {
      pending.push(change);
      applying ??= applyChanges().finally(() => (applying = null));
    },
    onListening: (on) => (map.listening = on),
    log,
  });

  // Messages that arrive meanwhile (a resumed session delivers at once) wait in the buffer.
  await queue.init();
  await listener.start();

  loop.start();
  live.start();
  queue.startTicking();
  await health.beat();
  health.start();

  return {
    stats: () => ({
      received: counters.received,
      committed: counters.committed,
      rejected: counters.rejected,
      buffered: buffer.rows,
      journalBytes: journal.bytes + journal.pendingSize,
      lagMs: loop.lagMs(),
      dbHealthy: loop.dbHealthy,
      mode: loop.mode,
      subscribed,
      listening: listener.isListening,
    }),
    async close() {
      closing = true;
      queue.stopTicking();
      await loop.close();
      live.stop();
      health.stop();
      await listener.close();
      await applying;
      await queue.drain(3000);
      await health.beat();
      await client.endAsync().catch(() => {});
    },
  };
}

/** Unknown channels an engineer has since created: mark them resolved. */
async function resolveUnknown(map: ChannelMap): Promise<void> {
  const open = await UnknownChannel.findAll({ attributes: ['id', 'topic'], where: { resolvedAt: null }, raw: true });
  const ids = open.filter((u) => map.channel(u.topic)).map((u) => u.id);
  if (!ids.length) return;
  await UnknownChannel.update(
    { resolvedAt: new Date(), resolution: 'channel created' },
    { where: { id: { [Op.in]: ids }, resolvedAt: null } },
  );
}
