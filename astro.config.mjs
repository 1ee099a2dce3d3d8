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
  // Without allowedDomains Astro trusts no Host header and takes the request's origin to be
  // "http://localhost" (no port), so its origin check refused every same-origin browser form,
  // multipart upload and sign-out from http://127.0.0.1:PORT. Loopback names on any port are ours;
  // behind a proxy, PUBLIC_ORIGIN (at build time) adds the public host.
  security: {
    checkOrigin: true,
    allowedDomains: [
      { hostname: '127.0.0.1' },
      { hostname: 'localhost' },
      ...(process.env.PUBLIC_ORIGIN ? [{ hostname: new URL(process.env.PUBLIC_ORIGIN).hostname }] : []),
    ],
  },
  devToolbar: { enabled: false },
  env: {
    schema: {
      DATABASE_URL: envField.string({ context: 'server', access: 'secret', optional: true }),
      MQTT_URL: envField.string({ context: 'server', access: 'secret', optional: true }),
      MQTT_SERVICE_PASSWORD: envField.string({ context: 'server', access: 'secret', optional: true }),
      SMTP_URL: envField.string({ context: 'server', access: 'secret', optional: true }),
      PUBLIC_ORIGIN: envField.string({ context: 'server', access: 'public', optional: true }),
    },
  },
});
