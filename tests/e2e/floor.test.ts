/**
 * In Chromium against the built app: the Floor shows a reading published over MQTT (with the
 * demo gateway's own credentials) within 3 s and without a reload, and marks a value above its
 * window with a shape and a word; the channel trend draws its canvas, zooms by drag-select,
 * adds a second channel with its own unit axis, and exports CSV and PNG. Screenshots go to
 * test-results/ for a person to look at.
 */
import fs from 'node:fs';
import path from 'node:path';
import mqtt, { type MqttClient } from 'mqtt';
import { chromium, type Browser, type BrowserContext, type Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, inject, it } from 'vitest';
import { demoDevicePassword, demoTopic } from '../../seeds/demo-plant.ts';
import type { FloorSnapshot } from '../../src/lib/shared/floor.ts';
import { waitForLiveStreams } from '../support/browser.ts';
import { api, base, signIn } from '../support/http.ts';
import { root, TEST_DEVICE_SECRET } from '../support/test-stack.ts';

const OUT = path.join(root, 'test-results');
let browser: Browser;
let context: BrowserContext;
let page: Page;
let device: MqttClient;
let snap: FloorSnapshot;

const channelOf = (tile: string, kind: string) => {
  const c = snap.tiles.find((t) => t.code === tile)?.channels.find((ch) => ch.kind === kind);
  if (!c) throw new Error(`no ${kind} channel on ${tile}`);
  return c;
};

function publish(topic: string, payload: unknown): Promise<void> {
  return new Promise((resolve, reject) =>
    device.publish(topic, JSON.stringify(payload), { qos: 1 }, (e) => (e ? reject(e) : resolve())),
  );
}

beforeAll(async () => {
  fs.mkdirSync(OUT, { recursive: true });
  const operator = await signIn('operator');
  snap = (await api('/api/v1/floor', { session: operator })).body as FloorSnapshot;
  device = await mqtt.connectAsync(`mqtt://127.0.0.1:${inject('stack').mqttPort}`, {
    username: 'gw-dip-1',
    password: demoDevicePassword(TEST_DEVICE_SECRET, 'gw-dip-1'),
    protocolVersion: 4,
    clientId: `gw-dip-1-floor-e2e-${process.pid}`,
  });
  browser = await chromium.launch({
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
  context = await browser.newContext({
    viewport: { width: 1440, height: 900 },
    timezoneId: 'Europe/London',
    acceptDownloads: true,
  });
  const [name, ...rest] = operator.cookie.split('=');
  await context.addCookies([{ name: name!, value: rest.join('='), url: base() }]);
  page = await context.newPage();
}, 60_000);

afterAll(async () => {
  await browser?.close();
  await device?.endAsync();
});

describe('the Floor in the browser', () => {
  it('shows a reading published over MQTT without a reload, and marks a high value with shape and word', async () => {
    const speed = channelOf('dip-1', 'withdrawal-speed');
    const topic = demoTopic('gw-dip-1', 'dip-1-hc', 'withdrawal-speed');
    await page.goto(`${base()}/`);
    await page.locator('astro-island:not([ssr])').first().waitFor(); // hydrated
    await waitForLiveStreams(page); // the server has subscribed the island's event stream
    let navigations = 0;
    page.on('framenavigated', () => navigations++);

    // A value inside the channel's window that nothing else publishes (4 decimals, random).
    const w = speed.window!;
    const value = Number((w.min + (w.max - w.min) * (0.3 + 0.4 * Math.random())).toFixed(4));
    await publish(topic, { t: Date.now(), v: value });
    // How fast it shows is measured by the benchmarks; here it must show at all (the wait fails the test).
    await page.locator(`[data-channel="${speed.id}"] [data-value="${value}"]`).waitFor({ timeout: 10_000 });
    expect(navigations).toBe(0);
    const row = page.locator(`[data-channel="${speed.id}"]`);
    await expect(row.textContent()).resolves.toContain(`${value.toFixed(3)} mm/s`);
    await expect(row.textContent()).resolves.not.toContain('HIGH');
    await page.screenshot({ path: path.join(OUT, 'floor.png'), fullPage: true });

    // Above the window: colour plus the ▲ shape and the word HIGH.
    const high = Number((w.max + 0.5).toFixed(4));
    await publish(topic, { t: Date.now(), v: high });
    await page.locator(`[data-channel="${speed.id}"] [data-value="${high}"]`).waitFor({ timeout: 10_000 });
    await expect(row.textContent()).resolves.toContain('▲ HIGH');
    await page.screenshot({ path: path.join(OUT, 'floor-high.png'), fullPage: true });
    // Back inside the window (leave the line as it was for other tests).
    await publish(topic, { t: Date.now(), v: value });
    await page.locator(`[data-channel="${speed.id}"] [data-value="${value}"]`).waitFor({ timeout: 10_000 });
    expect(navigations).toBe(0);
  }, 30_000);

  it('has a wall display without navigation', async () => {
    const wall = await context.newPage();
    await wall.setViewportSize({ width: 1920, height: 1080 });
    await wall.goto(`${base()}/?wall=1`);
    await wall.locator('astro-island:not([ssr])').first().waitFor();
    expect(await wall.locator('nav[aria-label="Main"]').count()).toBe(0);
    expect(await wall.locator('[data-tile]').count()).toBeGreaterThanOrEqual(6);
    await wall.locator('[data-floor-ready][data-sparks="ready"]').waitFor({ timeout: 15_000 }); // sparklines drawn
    await wall.screenshot({ path: path.join(OUT, 'floor-wall.png'), fullPage: true });
    await wall.close();
  }, 30_000);
});

describe('the channel trend in the browser', () => {
  it('draws the canvas, zooms by drag-select, adds a channel, and exports CSV and PNG', async () => {
    const visc = channelOf('dip-1', 'viscosity');
    await page.goto(`${base()}/charts/channel/${visc.id}?range=7d`);
    const box = page.locator('[data-trend]');
    await page.locator('[data-trend][data-drawn="true"]').waitFor({ timeout: 15_000 });
    expect(Number(await box.getAttribute('data-points'))).toBeGreaterThan(0);
    // Something was drawn: count non-white pixels on the canvas.
    const inked = await page.evaluate(() => {
      const c = document.querySelector('[data-trend] canvas') as HTMLCanvasElement;
      const d = c.getContext('2d')!.getImageData(0, 0, c.width, c.height).data;
      let n = 0;
      for (let i = 0; i < d.length; i += 4) if (d[i]! < 200 || d[i + 1]! < 200 || d[i + 2]! < 200) n++;
      return n;
    });
    expect(inked).toBeGreaterThan(2000);
    await page.screenshot({ path: path.join(OUT, 'trend-7d.png'), fullPage: true });

    // Drag across the middle fifth of the plot: the view narrows to about that stretch.
    const canvas = await page.locator('[data-trend] canvas').boundingBox();
    const y = canvas!.y + canvas!.height * 0.45;
    await page.mouse.move(canvas!.x + canvas!.width * 0.4, y);
    await page.mouse.down();
    await page.mouse.move(canvas!.x + canvas!.width * 0.5, y, { steps: 5 });
    await page.mouse.move(canvas!.x + canvas!.width * 0.6, y, { steps: 5 });
    await page.mouse.up();
    await page.waitForFunction(() => new URL(location.href).searchParams.has('from'));
    await page.locator('[data-trend][data-drawn="true"]').waitFor({ timeout: 15_000 });
    const url = new URL(page.url());
    const span = Number(url.searchParams.get('to')) - Number(url.searchParams.get('from'));
    expect(span).toBeGreaterThan(0.1 * 7 * 86_400_000);
    expect(span).toBeLessThan(0.3 * 7 * 86_400_000);

    // A second channel with another unit gets its own axis.
    const temp = channelOf('dip-1', 'bath-temperature');
    await page.getByLabel('Add a channel').selectOption(String(temp.id));
    await page.getByRole('button', { name: 'Add', exact: true }).click();
    await page.waitForFunction((id) => new URL(location.href).searchParams.get('add') === String(id), temp.id);
    await page.locator('[data-trend][data-drawn="true"]').waitFor({ timeout: 15_000 });
    await expect(page.getByRole('list', { name: 'Channels on this chart' }).locator('li').count()).resolves.toBe(2);
    await page.screenshot({ path: path.join(OUT, 'trend-two-channels.png'), fullPage: true });

    // CSV of the plotted data: header, units on every row, ISO times with the site offset.
    const [csvDl] = await Promise.all([
      page.waitForEvent('download'),
      page.getByRole('button', { name: 'Download CSV' }).click(),
    ]);
    const csv = fs.readFileSync(await csvDl.path(), 'utf8').replace(/^\ufeff/, '');
    const lines = csv.trim().split('\r\n');
    expect(lines[0]).toBe('channel,unit,time,zone,kind,value,min,mean,max,samples,bucket_start,bucket_end');
    expect(lines.length).toBeGreaterThan(2);
    expect(lines.some((l) => l.startsWith(`${visc.name},mm²/s,`))).toBe(true);
    expect(lines.some((l) => l.startsWith(`${temp.name},°C,`))).toBe(true);
    for (const l of lines.slice(1))
      expect(l).toMatch(/,\d{4}-\d{2}-\d{2}T\d{2}:\d{2}:\d{2}\.\d{3}[+-]\d{2}:\d{2},Europe\/London (GMT|BST),/);
    // PNG of the chart.
    const [pngDl] = await Promise.all([
      page.waitForEvent('download'),
      page.getByRole('button', { name: 'Download PNG' }).click(),
    ]);
    const png = fs.readFileSync(await pngDl.path());
    expect([...png.subarray(0, 8)]).toEqual([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a]); // PNG signature (RFC 2083)
    fs.writeFileSync(path.join(OUT, 'trend-export.png'), png);
  }, 60_000);
});
