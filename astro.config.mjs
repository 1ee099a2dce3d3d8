// @ts-check
import { defineConfig, envField } from 'astro/config';
import node from '@astrojs/node';
import react from '@astrojs/react';
import tailwind from '@astrojs/tailwind';

// https://docs.astro.build/en/reference/configuration-reference/
export default defineConfig({
  output: 'server',
  adapter: node({ mode: 'standalone' }),
  integrations: [react(), tailwind({ applyBaseStyles: false })],
  server: { host: '127.0.0.1', port: 4321 },
  security: { checkOrigin: true },
  devToolbar: { enabled: false },
  env: {
    schema: {
      DATABASE_URL: envField.string({ context: 'server', access: 'secret', optional: true }),
      MQTT_URL: envField.string({ context: 'server', access: 'secret', optional: true }),
      MQTT_SERVICE_PASSWORD: envField.string({ context: 'server', access: 'secret', optional: true }),
      SMTP_URL: envField.string({ context: 'server', access: 'secret', optional: true }),
      PUBLIC_ORIGIN: envField.string({ context: 'server', access: 'public', optional: true }),
      SITE_TIME_ZONE: envField.string({ context: 'server', access: 'public', default: 'Europe/London' }),
    },
  },
});
