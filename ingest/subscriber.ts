/**
 * Subscribe to the plant's topics and hand each message to its handler. This first version
 * keeps the worker's heartbeat in `ingest_status`; the storage path lives in handlers/.
 */
import mqtt from 'mqtt';
import type pg from 'pg';
import type { IngestConfig } from './config.ts';
import { TOPIC_ROOT } from './topics.ts';

export interface WorkerOptions {
  config: IngestConfig;
  pool: pg.Pool;
  log?: (line: string) => void;
}

export interface RunningWorker {
  close(): Promise<void>;
}

export async function startWorker({ config, pool, log = () => {} }: WorkerOptions): Promise<RunningWorker> {
  const client = mqtt.connect(config.mqttUrl, {
    username: 'svc-ingest',
    password: config.MQTT_SERVICE_PASSWORD,
    clientId: `coatrail-ingest-${config.INGEST_WORKER_ID}`,
    protocolVersion: 4,
    clean: false,
    reconnectPeriod: 1000,
  });
  const topic = config.INGEST_SHARED_GROUP ? `$share/${config.INGEST_SHARED_GROUP}/${TOPIC_ROOT}/#` : `${TOPIC_ROOT}/#`;
  client.on('connect', () => {
    log(`connected to ${config.mqttUrl}`);
    client.subscribe(topic, { qos: 1 });
  });
  client.on('error', (e) => log(`mqtt: ${e.message}`));
  const beat = async () => {
    try {
      await pool.query(
        `insert into ingest_status(worker_id, heartbeat_at, lag_ms) values ($1, now(), 0)
         on conflict (worker_id) do update set heartbeat_at = now()`,
        [config.INGEST_WORKER_ID],
      );
    } catch (e) {
      log(`heartbeat: ${(e as Error).message}`);
    }
  };
  await beat();
  const timer = setInterval(beat, 2000);
  return {
    async close() {
      clearInterval(timer);
      await client.endAsync();
    },
  };
}
