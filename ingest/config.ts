/** Worker/broker configuration: zod over process.env, with the web app's variable names. */
import { z } from 'zod';

const EnvSchema = z.object({
  DATABASE_URL: z.string().min(1, 'DATABASE_URL is required'),
  MQTT_URL: z.string().optional(),
  MQTT_HOST: z.string().default('127.0.0.1'),
  MQTT_PORT: z.coerce.number().int().min(1).max(65535).default(1883),
  MQTT_WS_PORT: z.coerce.number().int().min(0).max(65535).default(0),
  MQTT_SERVICE_PASSWORD: z.string().min(8, 'MQTT_SERVICE_PASSWORD must be set (8+ characters)'),
  INGEST_WORKER_ID: z.string().default(`worker-${process.pid}`),
  INGEST_SHARED_GROUP: z.string().optional(),
  INGEST_FLUSH_MS: z.coerce.number().int().min(1).max(5000).default(20),
  INGEST_JOURNAL_DIR: z.string().default('var/ingest-journal'),
  /** Rows held in memory while PostgreSQL is away, before spilling to the journal. */
  INGEST_BUFFER_ROWS: z.coerce.number().int().min(100).default(50_000),
  /** Flush at once when this many rows are waiting (else every INGEST_FLUSH_MS). */
  INGEST_BATCH_ROWS: z.coerce.number().int().min(1).default(10_000),
  /** Stop taking messages from the broker when the journal holds this many bytes. */
  INGEST_JOURNAL_MAX_BYTES: z.coerce
    .number()
    .int()
    .min(1 << 20)
    .default(2 ** 30),
  FUTURE_TOLERANCE_MS: z.coerce.number().int().min(0).default(120_000),
});
export type IngestConfig = z.infer<typeof EnvSchema> & { mqttUrl: string };

export function loadConfig(env: NodeJS.ProcessEnv = process.env): IngestConfig {
  const parsed = EnvSchema.safeParse(env);
  if (!parsed.success) {
    throw new Error('Ingest configuration: ' + parsed.error.issues.map((i) => `${i.path.join('.')}: ${i.message}`).join('; '));
  }
  const c = parsed.data;
  return { ...c, mqttUrl: c.MQTT_URL ?? `mqtt://${c.MQTT_HOST}:${c.MQTT_PORT}` };
}
