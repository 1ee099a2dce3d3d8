/**
 * The ingest worker: subscribes to the plant's topics with QoS 1 on a persistent session,
 * validates every message, stores readings in batches and acknowledges each message to the
 * broker only after the transaction holding it has committed (or, while PostgreSQL is away,
 * after it is fsynced in the local journal). A crash therefore loses nothing the broker
 * handed over: unacknowledged messages are redelivered to the persistent session.
 *
 * Flow per message: arrival (parse JSON + shared schema) → memory buffer (or journal) →
 * flush every INGEST_FLUSH_MS or at INGEST_BATCH_ROWS rows: resolve topics through the cached
 * channel map, check each sample, one transaction (readings + rollups + rejections + unknown
 * channels + device status) → PUBACK → live readings (≤ 4/s) → post-commit handlers.
 *
 * Acknowledging after commit. MQTT.js sends the PUBACK of an incoming QoS 1 message from
 * inside its packet pump, and holds the pump (no further packet is read) until its
 * `handleMessage` callback returns; its `customHandleAcks` option has the same shape and is
 * honoured only for MQTT 5 connections, which aedes does not speak. Holding either would
 * allow one message per commit. So the worker takes the PUBACK out of the pump (the client's
 * `_sendPacket` drops pubacks) and writes it itself after the commit, on the same connection;
 * an acknowledgement whose connection has since closed is dropped, and the broker redelivers
 * that message (stored once, refused as a duplicate the second time). `handleMessage` is used
 * for what it is meant for: back-pressure while the buffer is full.
 */
import mqtt, { type IClientOptions, type MqttClient } from 'mqtt';
import type pg from 'pg';
import type { Sequelize } from 'sequelize';
import {
  postCommitHandlers as defaultHandlers,
  type PostCommitHandler,
  type StoredReading,
  type WorkerContext,
} from './handlers/index.ts';
import { Batch, parseTelemetry, processReadings, storedPayload, type ParsedPayload } from './handlers/readings.ts';
import { processStatus } from './handlers/status.ts';
import { ChannelMap } from './channel-map.ts';
import type { IngestConfig } from './config.ts';
import { Journal, segmentTime } from './journal.ts';
import { commitBatch } from './store.ts';
import { LIVE_ROOT, TOPIC_ROOT, parseTopic, type ParsedTopic } from '../src/lib/shared/topics.ts';

export interface WorkerOptions {
  config: IngestConfig;
  /** The process's one Sequelize instance (models initialised). */
  sequelize: Sequelize;
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
}

export interface RunningWorker {
  stats(): WorkerStats;
  close(): Promise<void>;
}

interface Entry {
  topic: string;
  payload: string;
  rxMs: number;
  /** The MQTT packet id to acknowledge after commit (-1: none, QoS 0 or replayed from the journal) … */
  mid: number;
  /** … on this connection (an acknowledgement for an older connection is dropped). */
  gen: number;
  route: ParsedTopic;
  parsed: ParsedPayload | null;
  samples: number;
}

/** The largest payload taken (a full batch of 10 000 samples is well under 1 MiB). */
const MAX_PAYLOAD_BYTES = 2 << 20;
const MAX_BATCH_ROWS = 20_000;
const REPLAY_RECORDS = 5_000;
const LIVE_EVERY_MS = 250;

interface MqttInternals {
  _sendPacket(packet: { cmd: string; messageId?: number }, cb?: (err?: Error) => void, ...rest: unknown[]): void;
  _writePacket(packet: { cmd: string; messageId?: number }, cb?: () => void): void;
}

export function subscriptionTopics(sharedGroup?: string): string[] {
  const topics = [`${TOPIC_ROOT}/+/+/+/+`, `${TOPIC_ROOT}/+/+/status`];
  return sharedGroup ? topics.map((t) => `$share/${sharedGroup}/${t}`) : topics;
}

export async function startWorker({
  config,
  sequelize,
  pool,
  log = () => {},
  handlers = defaultHandlers,
}: WorkerOptions): Promise<RunningWorker> {
  const map = new ChannelMap(pool);
  const journal = new Journal(config.INGEST_JOURNAL_DIR, config.INGEST_WORKER_ID, log);
  if (journal.closedSegments().length)
    log(`journal: ${journal.closedSegments().length} segment(s) from an earlier run to replay`);

  // ---- state ----
  const memory: Entry[] = [];
  let memHead = 0; // entries before memHead are taken by the flush in progress
  let memRows = 0;
  let mode: 'memory' | 'journal' = 'memory';
  let journalSince: number | null = null;
  let dbHealthy = true;
  let closing = false;
  let stopped = false;
  const counters = { received: 0, committed: 0, rejected: 0, committedSinceBeat: 0, rejectedSinceBeat: 0 };
  let lastBatchLatencyMs = 0;
  let lastCommitAt: number | null = null;
  let retryDelay = 250;

  // ---- MQTT ----
  let generation = 0;
  const options: IClientOptions = {
    username: 'svc-ingest',
    password: config.MQTT_SERVICE_PASSWORD,
    clientId: `coatrail-ingest-${config.INGEST_WORKER_ID}`,
    protocolVersion: 4,
    clean: false,
    reconnectPeriod: 1000,
    connectTimeout: 10_000,
    keepalive: 30,
  };
  const client: MqttClient = mqtt.connect(config.mqttUrl, options);
  const internals = client as unknown as MqttInternals;
  if (typeof internals._sendPacket !== 'function' || typeof internals._writePacket !== 'function') {
    throw new Error('This MQTT.js version lacks _sendPacket/_writePacket; the worker cannot acknowledge after commit.');
  }
  const sendPacket = internals._sendPacket.bind(client);
  internals._sendPacket = (packet, cb, ...rest) => {
    if (packet.cmd === 'puback') {
      cb?.(); // acknowledged by the worker itself after commit (see the file comment)
      return;
    }
    sendPacket(packet, cb, ...rest);
  };
  /**
   * Write the PUBACKs of committed messages in one socket write. A PUBACK is four bytes (MQTT
   * 3.1.1 §3.4: fixed header 0x40, remaining length 2, the packet id, big-endian); whole
   * packets written in one call cannot interleave with the client's own writes.
   */
  const sendAcks = (entries: readonly Entry[]) => {
    if (!client.connected || !client.stream) return;
    let n = 0;
    for (const e of entries) if (e.mid >= 0 && e.gen === generation) n++;
    if (n === 0) return;
    const buf = Buffer.allocUnsafe(4 * n);
    let o = 0;
    for (const e of entries) {
      if (e.mid < 0 || e.gen !== generation) continue;
      buf[o] = 0x40;
      buf[o + 1] = 2;
      buf.writeUInt16BE(e.mid, o + 2);
      o += 4;
    }
    client.stream.write(buf);
  };
  /** An acknowledgement written once the journal has the message on disk. */
  const ackLater = (id: number | undefined, qos: number): (() => void) | null => {
    if (qos === 0 || id === undefined) return null;
    const gen = generation;
    return () => {
      if (gen === generation && client.connected) internals._writePacket({ cmd: 'puback', messageId: id });
    };
  };

  const topics = subscriptionTopics(config.INGEST_SHARED_GROUP);
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
  client.on('close', () => {
    generation++;
    subscribed = false;
  });
  client.on('error', (e) => log(`mqtt: ${e.message}`));

  // Back-pressure: hold MQTT.js's packet pump while the buffer is full.
  const waiting: (() => void)[] = [];
  const overHighWater = () =>
    (mode === 'memory' && memRows >= config.INGEST_BUFFER_ROWS) ||
    journal.pendingSize >= 64 << 20 ||
    (mode === 'journal' && journal.bytes >= config.INGEST_JOURNAL_MAX_BYTES);
  client.handleMessage = (_packet, callback) => {
    if (overHighWater()) waiting.push(() => callback());
    else callback();
  };
  const releaseWaiting = () => {
    while (waiting.length && !overHighWater()) waiting.shift()!();
  };

  client.on('message', (topic, buf, packet) => {
    if (closing) return; // not acknowledged: the broker redelivers it to the next run
    const rxMs = Date.now();
    counters.received++;
    const payload = buf.length > MAX_PAYLOAD_BYTES ? '' : buf.toString('utf8');
    if (mode === 'journal' && buf.length <= MAX_PAYLOAD_BYTES) {
      journal.append({ topic, payload, rx: rxMs }, ackLater(packet.messageId, packet.qos));
      return;
    }
    const mid = packet.qos > 0 && packet.messageId !== undefined ? packet.messageId : -1;
    const entry = makeEntry(topic, payload, rxMs, mid, buf.length);
    memory.push(entry);
    memRows += entry.samples;
    if (!dbHealthy && memRows >= config.INGEST_BUFFER_ROWS && mode === 'memory') toJournal();
    if (memRows >= config.INGEST_BATCH_ROWS) wake();
  });

  function toJournal() {
    mode = 'journal';
    journalSince = Date.now();
    log(`database unavailable and ${memRows} rows buffered: spilling to the journal in ${journal.dir}`);
  }

  /** Topics repeat (one per channel): parse each once. */
  const routes = new Map<string, ParsedTopic>();
  function route(topic: string): ParsedTopic {
    let r = routes.get(topic);
    if (!r) {
      if (routes.size >= 100_000) routes.clear();
      routes.set(topic, (r = parseTopic(topic)));
    }
    return r;
  }

  function makeEntry(topic: string, payload: string, rxMs: number, mid: number, size = payload.length): Entry {
    const route_ = route(topic);
    let parsed: ParsedPayload | null = null;
    let samples = 1;
    if (route_.kind === 'sample') {
      parsed =
        size > MAX_PAYLOAD_BYTES
          ? { ok: false, reason: 'schema', detail: `payload of ${size} bytes is larger than 2 MiB` }
          : parseTelemetry(payload);
      if (parsed.ok) samples = parsed.payload.samples.length;
    }
    return { topic, payload, rxMs, mid, gen: generation, route: route_, parsed, samples };
  }

  // ---- post-commit: live readings and handlers ----
  const liveLatest = new Map<number, { tMs: number; value: number }>();
  const livePublished = new Map<number, number>();
  const publishLive = (kind: string, payload: unknown) => {
    if (client.connected) client.publish(`${LIVE_ROOT}/${kind}`, JSON.stringify(payload), { qos: 0 });
  };
  const liveTimer = setInterval(() => {
    if (!liveLatest.size) return;
    const out: { channelId: number; tMs: number; value: number }[] = [];
    for (const [channelId, r] of liveLatest) out.push({ channelId, tMs: r.tMs, value: r.value });
    liveLatest.clear();
    publishLive('readings', out);
  }, LIVE_EVERY_MS);
  const ctx: WorkerContext = { sequelize, pool, publishLive, log };
  const handlerQueue: StoredReading[][] = [];
  let handlersRunning: Promise<void> | null = null;
  const runHandlers = () => {
    if (handlersRunning || !handlerQueue.length) return;
    handlersRunning = (async () => {
      while (handlerQueue.length) {
        const rows = handlerQueue.splice(0, handlerQueue.length).flat();
        for (const h of handlers) {
          try {
            await h.onReadings(ctx, rows);
          } catch (e) {
            log(`handler ${h.name} failed on ${rows.length} readings: ${(e as Error).stack ?? e}`);
          }
        }
      }
    })().finally(() => {
      handlersRunning = null;
      if (handlerQueue.length) runHandlers();
    });
  };
  for (const h of handlers) {
    try {
      await h.init?.(ctx);
    } catch (e) {
      log(`handler ${h.name} failed to start: ${(e as Error).message}`);
    }
  }
  let ticking = false;
  const tickTimer = setInterval(() => {
    if (ticking || closing) return;
    ticking = true;
    void (async () => {
      const now = Date.now();
      for (const h of handlers) {
        if (!h.onTick) continue;
        try {
          await h.onTick(ctx, now);
        } catch (e) {
          log(`handler ${h.name} tick failed: ${(e as Error).message}`);
        }
      }
    })().finally(() => (ticking = false));
  }, 1000);

  // ---- the flush loop ----
  async function storeEntries(entries: Entry[], live: boolean): Promise<void> {
    const missed = entries.some((e) => e.route.kind !== 'invalid' && e.route.kind === 'sample' && !map.channel(e.topic));
    if (!map.loaded || map.shouldRefresh(Date.now(), missed)) {
      try {
        await map.refresh();
        await resolveUnknown();
      } catch (e) {
        if (!map.loaded) throw e;
      }
    }
    const batch = new Batch();
    for (const e of entries) {
      try {
        if (e.route.kind === 'sample') {
          processReadings(map, batch, e, e.route, e.parsed ?? parseTelemetry(e.payload), {
            futureToleranceMs: config.FUTURE_TOLERANCE_MS,
          });
        } else if (e.route.kind === 'status') {
          processStatus(map, batch, e, e.route);
        } else {
          batch.rejections.push({
            rxMs: e.rxMs,
            topic: e.topic,
            deviceUsername: null,
            channelId: null,
            reason: 'topic',
            detail: e.route.reason,
            payload: storedPayload(e.payload),
          });
        }
      } catch (err) {
        batch.rejections.push({
          rxMs: e.rxMs,
          topic: e.topic,
          deviceUsername: null,
          channelId: null,
          reason: 'schema',
          detail: `could not be processed: ${(err as Error).message}`,
          payload: storedPayload(e.payload),
        });
      }
    }
    const result = await commitBatch(pool, batch);
    const now = Date.now();
    sendAcks(entries);
    counters.committed += result.inserted.length;
    counters.committedSinceBeat += result.inserted.length;
    counters.rejected += result.rejections;
    counters.rejectedSinceBeat += result.rejections;
    lastCommitAt = now;
    if (live && entries.length) lastBatchLatencyMs = now - entries[0]!.rxMs;
    for (const d of result.devices) publishLive('devices', d);
    if (result.inserted.length) {
      for (const r of result.inserted) {
        if ((livePublished.get(r.channelId) ?? -Infinity) < r.tMs) {
          livePublished.set(r.channelId, r.tMs);
          liveLatest.set(r.channelId, { tMs: r.tMs, value: r.value });
        }
      }
      if (handlers.length) {
        handlerQueue.push(result.inserted);
        runHandlers();
      }
    }
  }

  /** Unknown channels an engineer has since created: mark them resolved. */
  async function resolveUnknown(): Promise<void> {
    await pool.query(`
      update unknown_channels u set resolved_at = now(), resolution = 'channel created'
        from channels c join assets a on a.id = c.asset_id join devices d on d.id = c.device_id
       where u.resolved_at is null and u.topic = d.topic_prefix || '/' || a.code || '/' || c.key`);
  }

  async function flushMemory(): Promise<void> {
    let rows = 0;
    let end = memHead;
    while (end < memory.length && (rows < MAX_BATCH_ROWS || end === memHead)) rows += memory[end++]!.samples;
    const entries = memory.slice(memHead, end);
    memHead = end;
    try {
      await storeEntries(entries, true);
      memory.splice(0, entries.length);
      memHead -= entries.length;
      memRows -= rows;
    } catch (e) {
      memHead -= entries.length;
      throw e;
    }
  }

  async function replayOne(file: string): Promise<void> {
    const { records, start, end, eof } = await journal.read(file, REPLAY_RECORDS);
    if (records.length)
      await storeEntries(
        records.map((r) => makeEntry(r.topic, r.payload, r.rx, -1)),
        false,
      );
    await journal.advance(file, start, end, eof);
  }

  let wakeUp: (() => void) | null = null;
  function wake() {
    const w = wakeUp;
    wakeUp = null;
    w?.();
  }
  const sleep = (ms: number) =>
    new Promise<void>((resolve) => {
      const t = setTimeout(() => {
        wakeUp = null;
        resolve();
      }, ms);
      wakeUp = () => {
        clearTimeout(t);
        resolve();
      };
    });

  async function step(): Promise<boolean> {
    const closed = journal.closedSegments();
    const first = closed[0];
    const pending = memory.length - memHead;
    if (first && (pending === 0 || segmentTime(first) <= memory[memHead]!.rxMs)) {
      await replayOne(first);
      return true;
    }
    if (pending > 0) {
      const age = Date.now() - memory[memHead]!.rxMs;
      if (memRows >= config.INGEST_BATCH_ROWS || age >= config.INGEST_FLUSH_MS || closing || mode === 'journal') {
        await flushMemory();
        return true;
      }
      await sleep(config.INGEST_FLUSH_MS - age);
      return true;
    }
    if (mode === 'journal' && dbHealthy) {
      mode = 'memory'; // first, so nothing more is appended while the active segment closes
      journalSince = null;
      await journal.rotate();
      log('journal: database back; switching to the memory buffer and replaying the journal');
      return true;
    }
    return false;
  }

  const loop = (async () => {
    while (!stopped) {
      try {
        const worked = await step();
        if (!dbHealthy) log(`database reachable again after an outage; ${memRows} rows buffered, journal ${journal.bytes} bytes`);
        dbHealthy = true;
        retryDelay = 250;
        releaseWaiting();
        if (!worked) {
          if (closing) break;
          await sleep(config.INGEST_FLUSH_MS);
        }
      } catch (e) {
        if (dbHealthy) log(`storing failed, will retry: ${(e as Error).message}`);
        dbHealthy = false;
        if (memRows >= config.INGEST_BUFFER_ROWS && mode === 'memory') toJournal();
        releaseWaiting();
        if (closing) break;
        await sleep(retryDelay);
        retryDelay = Math.min(retryDelay * 2, 2000);
      }
    }
  })();

  // Journal writes run on their own timer so that they continue while the loop waits for the database.
  let syncing = false;
  const journalTimer = setInterval(() => {
    if (syncing || journal.pendingCount === 0) return;
    syncing = true;
    journal
      .sync()
      .catch((e: Error) => log(`journal write failed: ${e.message}`))
      .finally(() => {
        syncing = false;
        releaseWaiting();
      });
  }, config.INGEST_FLUSH_MS);

  // ---- heartbeat ----
  /** The age of the oldest message not yet committed, and at least the last batch's arrival→commit time. */
  const lagMs = () => {
    const now = Date.now();
    let lag = lastBatchLatencyMs;
    if (memory.length) lag = Math.max(lag, now - memory[0]!.rxMs);
    const seg = journal.closedSegments()[0];
    if (seg) lag = Math.max(lag, now - segmentTime(seg));
    if (mode === 'journal' && journalSince !== null) lag = Math.max(lag, now - journalSince);
    return lag;
  };
  let beating = false;
  const beat = async () => {
    if (beating) return;
    beating = true;
    const c = counters.committedSinceBeat;
    const r = counters.rejectedSinceBeat;
    try {
      await pool.query(
        `insert into ingest_status(worker_id, heartbeat_at, last_commit_at, lag_ms, buffered, journal_bytes, committed, rejected)
         values ($1, now(), to_timestamp($2::float8 / 1000), $3, $4, $5, $6, $7)
         on conflict (worker_id) do update set heartbeat_at = now(),
           last_commit_at = coalesce(excluded.last_commit_at, ingest_status.last_commit_at),
           lag_ms = excluded.lag_ms, buffered = excluded.buffered, journal_bytes = excluded.journal_bytes,
           committed = ingest_status.committed + excluded.committed, rejected = ingest_status.rejected + excluded.rejected`,
        [config.INGEST_WORKER_ID, lastCommitAt, lagMs(), memRows, journal.bytes + journal.pendingSize, c, r],
      );
      counters.committedSinceBeat -= c;
      counters.rejectedSinceBeat -= r;
    } catch {
      /* the database is away; the next beat reports */
    } finally {
      beating = false;
    }
  };
  await beat();
  const beatTimer = setInterval(() => void beat(), 1000);

  return {
    stats: () => ({
      received: counters.received,
      committed: counters.committed,
      rejected: counters.rejected,
      buffered: memRows,
      journalBytes: journal.bytes + journal.pendingSize,
      lagMs: lagMs(),
      dbHealthy,
      mode,
      subscribed,
    }),
    async close() {
      closing = true;
      clearInterval(tickTimer);
      wake();
      // Flush what is buffered (give an unreachable database a few seconds), then stop.
      const until = Date.now() + 8000;
      while (memory.length && dbHealthy && Date.now() < until) await new Promise((r) => setTimeout(r, 20));
      stopped = true;
      wake();
      await loop;
      clearInterval(journalTimer);
      await journal.close().catch((e: Error) => log(`journal close: ${e.message}`));
      clearInterval(liveTimer);
      clearInterval(beatTimer);
      if (handlersRunning) await Promise.race([handlersRunning, new Promise((r) => setTimeout(r, 3000))]);
      await beat();
      await client.endAsync().catch(() => {});
    },
  };
}
