/**
 * Alarm flood benchmark: `npm run bench:alarms`.
 *
 * Starts a throwaway stack (PostgreSQL in var/, broker, ingest worker, web server — the test
 * stack), gives every demo channel (but oven setpoints and doors) a plain high limit (no delays, no deadband), then publishes
 * over MQTT with the demo devices' credentials, for 10 s, readings that alternately cross the
 * limit and return: 1 000 alarm-raising readings (each re-annunciates its channel's alarm) and
 * 1 000 returns to normal. It measures:
 * - raise-to-visible latency: from publishing a raising reading to receiving its `alarms`
 *   event on the server-sent event stream (p50 / p99 / max, and how many never arrived);
 * - queue responsiveness during the flood: GET /api/v1/alarms?state=open timed every 250 ms;
 * - optionally (when /usr/bin/chromium exists) the time for the /alarms page to render its
 *   queue in Chromium mid-flood.
 * Prints the figures; exits non-zero only when the stack cannot start.
 */
import fs from 'node:fs';
import mqtt, { type MqttClient } from 'mqtt';
import pg from 'pg';
import { demoDevicePassword, demoTopic } from '../../seeds/demo-plant.ts';
import { startTestStack, TEST_DEVICE_SECRET, TEST_PASSWORD, type TestStack } from '../support/test-stack.ts';

const RAISES = Number(process.env['BENCH_RAISES'] ?? 1000);
const DURATION_MS = Number(process.env['BENCH_SECONDS'] ?? 10) * 1000;

interface Channel {
  id: number;
  key: string;
  assetCode: string;
  device: string;
  min: number;
  max: number;
}

function pct(sorted: number[], p: number): number {
  if (sorted.length === 0) return Number.NaN;
  const i = Math.min(sorted.length - 1, Math.max(0, Math.ceil((p / 100) * sorted.length) - 1));
  return sorted[i]!;
}
const ms = (v: number) => (Number.isFinite(v) ? `${v.toFixed(0)} ms` : '—');

async function signIn(baseUrl: string, username: string): Promise<string> {
  const r = await fetch(`${baseUrl}/api/auth/login`, {
    method: 'POST',
    headers: { 'content-type': 'application/json' },
    body: JSON.stringify({ username, password: TEST_PASSWORD }),
  });
  if (r.status !== 200) throw new Error(`sign-in as ${username}: ${r.status}`);
  return (r.headers.get('set-cookie') ?? '').split(';')[0]!;
}

async function main() {
  const t0 = Date.now();
  console.log('Starting a throwaway stack (build if needed, PostgreSQL, broker, worker, web)…');
  let stack: TestStack | null = null;
  const clients: MqttClient[] = [];
  const db = { pool: null as pg.Pool | null };
  try {
    stack = await startTestStack();
    console.log(`Stack up in ${((Date.now() - t0) / 1000).toFixed(1)} s at ${stack.baseUrl}`);
    db.pool = new pg.Pool({ connectionString: stack.databaseUrl, max: 2 });
    const { rows: channels } = await db.pool.query<Channel>(
      `select c.id, c.key, a.code as "assetCode", d.username as device, c.min, c.max
         from channels c join assets a on a.id = c.asset_id join devices d on d.id = c.device_id
        -- not setpoints or doors: flipping those would start and end oven loads (another handler's work)
        where c.kind not in ('setpoint', 'door') order by c.id`,
    );
    const engineer = await signIn(stack.baseUrl, 'engineer');
    const operator = await signIn(stack.baseUrl, 'operator');
    // A plain high limit at mid-span for every channel: each crossing raises at once.
    for (const c of channels) {
      const r = await fetch(`${stack.baseUrl}/api/v1/alarm-configs/${c.id}`, {
        method: 'PUT',
        headers: { 'content-type': 'application/json', cookie: engineer },
        body: JSON.stringify({
          enabled: true,
          high: (c.min + c.max) / 2,
          deadband: 0,
          onDelayMs: 0,
          offDelayMs: 0,
          priority: 'low',
          staleSeconds: null,
        }),
      });
      if (r.status !== 200) throw new Error(`configure channel ${c.id}: ${r.status} ${await r.text()}`);
    }
    await new Promise((r) => setTimeout(r, 3_000)); // the worker re-reads settings every 2 s

    // The live stream, read as a browser would (session cookie, text/event-stream).
    const sent = new Map<string, number>();
    const latencies: number[] = [];
    let events = 0;
    const ac = new AbortController();
    const sse = await fetch(`${stack.baseUrl}/api/v1/stream?kinds=alarms`, { headers: { cookie: operator }, signal: ac.signal });
    if (!sse.body) throw new Error('no stream body');
    const reader = sse.body.getReader();
    const dec = new TextDecoder();
    void (async () => {
      let buf = '';
      try {
        for (;;) {
          const { value, done } = await reader.read();
          if (done) break;
          buf += dec.decode(value, { stream: true });
          let i: number;
          while ((i = buf.indexOf('\n\n')) >= 0) {
            const block = buf.slice(0, i);
            buf = buf.slice(i + 2);
            const data = block.split('\n').find((l) => l.startsWith('data: '));
            if (!data) continue;
            events++;
            const a = JSON.parse(data.slice(6)) as { channelId: number | null; value: number | null; state: string };
            if (a.state !== 'unacked' || a.channelId === null || a.value === null) continue;
            const at = sent.get(`${a.channelId}:${a.value}`);
            if (at !== undefined) {
              latencies.push(performance.now() - at);
              sent.delete(`${a.channelId}:${a.value}`);
            }
          }
        }
      } catch {
        /* aborted */
      }
    })();
    await new Promise((r) => setTimeout(r, 500));

    // One MQTT connection per demo device.
    const byDevice = new Map<string, MqttClient>();
    for (const d of new Set(channels.map((c) => c.device))) {
      const client = mqtt.connect(`mqtt://127.0.0.1:${stack.mqttPort}`, {
        username: d,
        password: demoDevicePassword(TEST_DEVICE_SECRET, d),
        clientId: `${d}-bench-${process.pid}`,
        protocolVersion: 4,
        reconnectPeriod: 0,
      });
      await new Promise<void>((resolve, reject) => {
        client.once('connect', () => resolve());
        client.once('error', reject);
      });
      byDevice.set(d, client);
      clients.push(client);
    }

    // Queue responsiveness probe.
    const listTimes: number[] = [];
    let probing = true;
    const probe = (async () => {
      while (probing) {
        const s = performance.now();
        const r = await fetch(`${stack.baseUrl}/api/v1/alarms?state=open`, { headers: { cookie: operator } });
        await r.arrayBuffer();
        if (r.status === 200) listTimes.push(performance.now() - s);
        await new Promise((res) => setTimeout(res, 250));
      }
    })();

    // Optional: render /alarms in Chromium mid-flood.
    let renderMs: number | null = null;
    let renderNote = 'skipped (no /usr/bin/chromium)';
    const chromiumRun = fs.existsSync('/usr/bin/chromium')
      ? (async () => {
          await new Promise((r) => setTimeout(r, DURATION_MS / 2));
          const { chromium } = await import('playwright-core');
          const browser = await chromium.launch({
            executablePath: '/usr/bin/chromium',
            args: [
              '--headless',
              '--no-sandbox',
              '--disable-gpu',
              '--disable-quic',
              '--no-first-run',
              '--disable-background-networking',
              '--disable-component-update',
              '--disable-sync',
            ],
          });
          try {
            const ctx = await browser.newContext({ viewport: { width: 1440, height: 900 } });
            const [name, ...rest] = operator.split('=');
            await ctx.addCookies([{ name: name!, value: rest.join('='), url: stack.baseUrl }]);
            const page = await ctx.newPage();
            const s = performance.now();
            await page.goto(`${stack.baseUrl}/alarms`);
            await page.locator('tr[data-state]').first().waitFor({ timeout: 30_000 });
            await page.getByText(/^Live —/).waitFor({ timeout: 30_000 });
            renderMs = performance.now() - s;
            renderNote = `${await page.locator('tr[data-state]').count()} rows on screen`;
          } finally {
            await browser.close();
          }
        })().catch((e: Error) => {
          renderNote = `failed: ${e.message}`;
        })
      : Promise.resolve();

    // The flood: RAISES raising readings interleaved with as many returns, evenly over DURATION_MS.
    const total = RAISES * 2;
    const phase = new Map<number, boolean>(); // true = next reading raises
    const lastT = new Map<number, number>();
    console.log(
      `Publishing ${RAISES} alarm-raising readings (and ${RAISES} returns) over ${DURATION_MS / 1000} s across ${channels.length} channels…`,
    );
    const start = performance.now();
    let published = 0;
    let raisesSent = 0;
    const pubacks: number[] = [];
    for (let i = 0; i < total; i++) {
      const due = start + (i * DURATION_MS) / total;
      const wait = due - performance.now();
      if (wait > 1) await new Promise((r) => setTimeout(r, wait));
      const c = channels[i % channels.length]!;
      const raise = phase.get(c.id) ?? true;
      phase.set(c.id, !raise);
      const mid = (c.min + c.max) / 2;
      const span = c.max - c.min;
      // Unique raising values per channel so each SSE event matches its reading.
      const v = raise ? Number((mid + span * (0.1 + (i / total) * 0.3)).toFixed(9)) : c.min + span * 0.1;
      const t = Math.max(Date.now(), (lastT.get(c.id) ?? 0) + 1);
      lastT.set(c.id, t);
      if (raise) {
        sent.set(`${c.id}:${v}`, performance.now());
        raisesSent++;
      }
      const sentAt = performance.now();
      byDevice.get(c.device)!.publish(demoTopic(c.device, c.assetCode, c.key), JSON.stringify({ t, v }), { qos: 1 }, (err) => {
        if (!err) pubacks.push(performance.now() - sentAt);
      });
      published++;
    }
    const floodMs = performance.now() - start;
    // Let stragglers arrive.
    const until = Date.now() + 30_000;
    while (sent.size > 0 && Date.now() < until) await new Promise((r) => setTimeout(r, 200));
    probing = false;
    await probe;
    await chromiumRun;
    ac.abort();

    const lat = [...latencies].sort((a, b) => a - b);
    const acks = [...pubacks].sort((a, b) => a - b);
    const list = [...listTimes].sort((a, b) => a - b);
    const { rows: counts } = await db.pool.query<{ n: number; ev: number }>(
      `select (select count(*)::int from alarms) as n, (select count(*)::int from alarm_events where event = 'activate') as ev`,
    );
    console.log('');
    console.log('Alarm flood benchmark (2-core machine shared with other work; figures are indicative)');
    console.log(`  published:                 ${published} readings in ${(floodMs / 1000).toFixed(2)} s (${raisesSent} raising)`);
    console.log(`  alarm rows / activations:  ${counts[0]!.n} alarms, ${counts[0]!.ev} activate events stored`);
    console.log(`  live 'alarms' events read: ${events}`);
    console.log(
      `  publish → PUBACK (stored):  ${acks.length} acks; p50 ${ms(pct(acks, 50))}, p99 ${ms(pct(acks, 99))}, max ${ms(acks[acks.length - 1] ?? NaN)}`,
    );
    console.log(
      `  raise → visible on SSE:    received ${lat.length} of ${raisesSent}; p50 ${ms(pct(lat, 50))}, p99 ${ms(pct(lat, 99))}, max ${ms(lat[lat.length - 1] ?? NaN)}`,
    );
    console.log(`  not received within 30 s:  ${sent.size}`);
    console.log(
      `  GET /api/v1/alarms?state=open during the flood: ${list.length} calls; p50 ${ms(pct(list, 50))}, p99 ${ms(pct(list, 99))}, max ${ms(list[list.length - 1] ?? NaN)}`,
    );
    console.log(`  /alarms in Chromium mid-flood: ${renderMs === null ? '—' : ms(renderMs)} to render the queue (${renderNote})`);
  } finally {
    for (const c of clients) c.end(true);
    await db.pool?.end();
    await stack?.stop();
  }
}

main().then(
  () => process.exit(0),
  (e: Error) => {
    console.error(`bench:alarms failed: ${e.stack ?? e.message}`);
    process.exit(1);
  },
);
