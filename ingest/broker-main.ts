/** The broker process: `tsx ingest/broker-main.ts` (started by `npm start`). */
import { createSequelize } from '../db/connection.ts';
import { initModels } from '../db/models/index.ts';
import { startBroker } from './broker.ts';
import { loadConfig } from './config.ts';
import { startProcessMetrics } from '../src/lib/core/process-metrics.ts';

const config = loadConfig();
const sequelize = createSequelize({ url: config.DATABASE_URL, max: 3 });
initModels(sequelize);
const log = (s: string) => console.log(`[broker] ${s}`);
const broker = await startBroker({
  sequelize,
  host: config.MQTT_HOST,
  port: config.MQTT_PORT,
  wsPort: config.MQTT_WS_PORT,
  servicePassword: config.MQTT_SERVICE_PASSWORD,
  log,
  ...(process.env['BROKER_STATE_DIR'] ? { stateDir: process.env['BROKER_STATE_DIR'] } : {}),
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
