/** Server configuration from the environment (secrets only from env, never from files in git). */
import { DATABASE_URL, MQTT_URL, MQTT_SERVICE_PASSWORD, SMTP_URL, PUBLIC_ORIGIN } from 'astro:env/server';

export const config = {
  databaseUrl: DATABASE_URL ?? 'postgres://app@127.0.0.1:5432/coatrail',
  mqttUrl: MQTT_URL ?? `mqtt://127.0.0.1:${process.env['MQTT_PORT'] ?? 1883}`,
  mqttServicePassword: MQTT_SERVICE_PASSWORD ?? '',
  smtpUrl: SMTP_URL ?? null,
  publicOrigin: PUBLIC_ORIGIN ?? null,
};
