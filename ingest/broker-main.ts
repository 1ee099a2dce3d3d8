/**
 * The broker process: `tsx ingest/broker-main.ts` (started by `npm start`).
 *
 * Environment beyond ingest/config.ts: MQTT_INGEST_PASSWORD / MQTT_WEB_PASSWORD give each
 * service account its own secret (either falls back to MQTT_SERVICE_PASSWORD); MQTT_TLS_PORT
 * with MQTT_TLS_CERT and MQTT_TLS_KEY (PEM file paths) add an MQTT-over-TLS listener;
 * MQTT_MAX_PACKET_BYTES caps a device's packets (default 1 MiB).
 */
import fs from 'node:fs';
import { createSequelize } from '../db/connection.ts';
import { initModels } from '../db/models/index.ts';
import { poolView } from '../src/lib/core/record-db.ts';
import { startProcessMetrics } from '../src/lib/core/process-metrics.ts';
import { startBroker } from './broker.ts';
import { loadConfig } from './config.ts';
import { ingestClientId, ingestSubscriptionTopics } from '../src/lib/shared/topics.ts';

const config = loadConfig();
// The process's one Sequelize pool; the broker's few queries go through a pg-shaped view of it.
const sequelize = createSequelize({ url: config.DATABASE_URL, max: 3 });
initModels(sequelize);
const pool = poolView(sequelize);
const log = (s: string) => console.log(`[broker] ${s}`);
const env = process.env;
const tlsPort = Number(env['MQTT_TLS_PORT'] ?? 0);
if (tlsPort && (!env['MQTT_TLS_CERT'] || !env['MQTT_TLS_KEY'])) {
  console.error('[broker] MQTT_TLS_PORT needs MQTT_TLS_CERT and MQTT_TLS_KEY (PEM files).');
  process.exit(1);
}
const maxPacket = Number(env['MQTT_MAX_PACKET_BYTES'] ?? 0);
const broker = await startBroker({
  pool,
  host: config.MQTT_HOST,
  port: config.MQTT_PORT,
  wsPort: config.MQTT_WS_PORT,
  servicePassword: config.MQTT_SERVICE_PASSWORD,
  servicePasswords: {
    ...(env['MQTT_INGEST_PASSWORD'] ? { 'svc-ingest': env['MQTT_INGEST_PASSWORD'] } : {}),
    ...(env['MQTT_WEB_PASSWORD'] ? { 'svc-web': env['MQTT_WEB_PASSWORD'] } : {}),
  },
  ...(tlsPort
    ? { tls: { port: tlsPort, cert: fs.readFileSync(env['MQTT_TLS_CERT']!), key: fs.readFileSync(env['MQTT_TLS_KEY']!) } }
    : {}),
  ...(maxPacket > 0 ? { maxPacketBytes: maxPacket } : {}),
  log,
  ...(process.env['BROKER_STATE_DIR'] ? { stateDir: process.env['BROKER_STATE_DIR'] } : {}),
  // npm start names its one worker (INGEST_WORKER_ID=main): its session exists from the broker's
  // first moment, so readings published before the worker has (re)connected wait for it.
  ...(env['INGEST_WORKER_ID'] && !config.INGEST_SHARED_GROUP
    ? { presetSessions: [{ clientId: ingestClientId(env['INGEST_WORKER_ID']), topics: ingestSubscriptionTopics() }] }
    : {}),
}).catch((e: NodeJS.ErrnoException) => {
  console.error(
    e.code === 'EADDRINUSE'
      ? `[broker] port ${config.MQTT_PORT} is taken; set MQTT_PORT to a free port.`
      : `[broker] ${e.message}`,
  );
  process.exit(1);
});

startProcessMetrics('broker', () => ({ clients: broker.aedes.connectedClients }));

const stop = async () => {
  await broker.close();
  await sequelize.close();
  process.exit(0);
};
process.once('SIGTERM', stop);
process.once('SIGINT', stop);
