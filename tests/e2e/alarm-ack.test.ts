/**
 * In Chromium: the operator has the alarm queue open; a reading published over MQTT raises an
 * alarm that appears without a reload; acknowledging without a comment shows the server's
 * field error; with a comment the row turns to "Acknowledged, still active" (shape and words,
 * not only colour). Screenshots go to test-results/ for a person to look at.
 */
import fs from 'node:fs';
import path from 'node:path';
import { chromium, type Browser, type Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { waitForLiveStreams } from '../support/browser.ts';
import { base, signIn } from '../support/http.ts';
import { root } from '../support/test-stack.ts';
import { channelIdOf, closeAlarmHelpers, configureChannel, connectDevice, type DeviceLink } from '../support/alarm-helpers.ts';

const OUT = path.join(root, 'test-results');
let browser: Browser;
let page: Page;
let dev: DeviceLink;

beforeAll(async () => {
  fs.mkdirSync(OUT, { recursive: true });
  const ch = await channelIdOf('dip-1', 'room-temp');
  // Hand-chosen: room temperature above 35 °C alarms at once, high priority.
  await configureChannel(ch, { high: 35, deadband: 0.5, onDelayMs: 0, priority: 'high' });
  dev = await connectDevice('gw-dip-1');
  await dev.publish('dip-1', 'room-temp', 21.5, Date.now() - 5 * 60_000);
  await dev.publish('dip-1', 'room-temp', 21.8, Date.now() - 2 * 60_000);
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
  const context = await browser.newContext({ viewport: { width: 1440, height: 900 }, timezoneId: 'Europe/London' });
  const operator = await signIn('operator');
  const [name, ...rest] = operator.cookie.split('=');
  await context.addCookies([{ name: name!, value: rest.join('='), url: base() }]);
  page = await context.newPage();
}, 60_000);

afterAll(async () => {
  await browser?.close();
  await dev?.close();
  await closeAlarmHelpers();
});

describe('alarm queue in the browser', () => {
  it('a live alarm appears without a reload and the operator acknowledges it with a comment', async () => {
    await page.goto(`${base()}/alarms`);
    await page.getByText('These alarms are advisory.').waitFor();
    await page.getByText(/^Live —/).waitFor(); // the island is hydrated
    await waitForLiveStreams(page); // the server has subscribed the island's event stream
    let navigations = 0;
    page.on('framenavigated', () => navigations++);

    await dev.publish('dip-1', 'room-temp', 36.4);
    const row = page.locator('tr[data-state]', { hasText: 'Line 1 room temperature' }).first();
    await row.waitFor({ timeout: 10_000 });
    await expect(row.textContent()).resolves.toContain('Needs acknowledgement');
    await expect(row.textContent()).resolves.toContain('Room temperature 36.4 °C above the alarm high 35.0 °C');
    await expect(row.getAttribute('data-state')).resolves.toBe('unacked');
    await row.locator('svg[role="img"]').waitFor({ timeout: 10_000 }); // the alarm's sparkline
    await page.screenshot({ path: path.join(OUT, 'alarm-queue-new.png'), fullPage: true });

    await row.getByRole('button', { name: 'Acknowledge' }).click();
    await page.screenshot({ path: path.join(OUT, 'alarm-queue-ack-form.png'), fullPage: true });
    const form = page.getByRole('form', { name: /^Acknowledge: Line 1 room temperature/ });
    await form.getByRole('button', { name: 'Acknowledge' }).click();
    await form.getByRole('alert').filter({ hasText: 'an acknowledgement needs a comment' }).waitFor();
    await form.getByLabel(/Comment \(required\)/).fill('Door to the yard left open; closed it');
    await form.getByRole('button', { name: 'Acknowledge' }).click();
    await page.locator('tr[data-state="acked"]', { hasText: 'Line 1 room temperature' }).first().waitFor({ timeout: 5_000 });
    const acked = page.locator('tr[data-state="acked"]', { hasText: 'Line 1 room temperature' }).first();
    await expect(acked.textContent()).resolves.toContain('Acknowledged, still active');
    await expect(acked.textContent()).resolves.toContain('by Olu Operator');
    await page.screenshot({ path: path.join(OUT, 'alarm-queue-acked.png'), fullPage: true });
    expect(navigations).toBe(0);
  }, 60_000);
});
