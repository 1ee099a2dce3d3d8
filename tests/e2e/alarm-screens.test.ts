/**
 * In Chromium: the engineer's alarm settings (the seeded example limits are listed, a channel's
 * settings are edited through the form, a bad entry shows its field error) and the
 * alarm-system health page (benchmark chart drawn, summary figures, CSV link); an operator
 * cannot open the settings. Screenshots go to test-results/.
 */
import fs from 'node:fs';
import path from 'node:path';
import { chromium, type Browser, type BrowserContext } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { base, signIn } from '../support/http.ts';
import { root } from '../support/test-stack.ts';
import { channelIdOf, closeAlarmHelpers, testDb } from '../support/alarm-helpers.ts';

const OUT = path.join(root, 'test-results');
let browser: Browser;

async function contextAs(username: string): Promise<BrowserContext> {
  const ctx = await browser.newContext({ viewport: { width: 1440, height: 1000 }, timezoneId: 'Europe/London' });
  const s = await signIn(username);
  const [name, ...rest] = s.cookie.split('=');
  await ctx.addCookies([{ name: name!, value: rest.join('='), url: base() }]);
  return ctx;
}

beforeAll(async () => {
  fs.mkdirSync(OUT, { recursive: true });
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
}, 60_000);

afterAll(async () => {
  await browser?.close();
  await closeAlarmHelpers();
});

describe('alarm settings and health screens', () => {
  it('the engineer sees the seeded example limits and edits a channel through the form', async () => {
    const ctx = await contextAs('engineer');
    const page = await ctx.newPage();
    await page.goto(`${base()}/alarms/settings`);
    const visc = page.locator('tr', { hasText: 'Line 1 bath viscosity' }).first();
    await visc.waitFor();
    // Seeded example (seeds/alarm-defaults.ts): low 6, high 12.5 mm²/s.
    await expect(visc.textContent()).resolves.toContain('6 – 12.5 mm²/s');

    const uvRow = page.locator('tr', { hasText: 'UV lamp irradiance' }).first();
    await uvRow.getByRole('button', { name: 'Edit' }).click();
    const form = page.getByRole('form', { name: 'Alarm settings of UV lamp irradiance' });
    await form.getByLabel('Low (mW/cm²)').fill('200');
    await form.getByLabel('High (mW/cm²)').fill('150');
    await form.getByRole('button', { name: 'Save' }).click();
    await form.getByText('the low limit must be below the high limit').waitFor();
    await form.getByLabel('High (mW/cm²)').fill('260');
    await form.getByLabel('Where these values come from').fill('lamp maker data, e2e');
    await form.getByRole('button', { name: 'Save' }).click();
    await page.getByText('Saved the alarm settings of UV lamp irradiance').waitFor();
    await expect(uvRow.textContent()).resolves.toContain('200 – 260 mW/cm²');
    const ch = await channelIdOf('uv-1', 'irradiance');
    const db = await testDb().query<{ low: number; high: number }>('select low, high from alarm_configs where channel_id = $1', [
      ch,
    ]);
    expect(db.rows[0]).toEqual({ low: 200, high: 260 });
    await page.screenshot({ path: path.join(OUT, 'alarm-settings.png'), fullPage: true });
    await ctx.close();
  }, 60_000);

  it('the health page draws the benchmark chart and the summary for a viewer; operators cannot open settings', async () => {
    const ctx = await contextAs('viewer');
    const page = await ctx.newPage();
    await page.goto(`${base()}/alarms/health`);
    await page.getByText('Alarms per 10 minutes against the benchmark').waitFor();
    await page.getByText('Average per 10 min per position').waitFor();
    await page.getByRole('button', { name: 'Last 7 days' }).click();
    const csv = page.getByRole('link', { name: 'Export CSV' });
    const href = (await csv.getAttribute('href')) ?? '';
    expect(href).toMatch(/^\/api\/v1\/alarms\/kpi\?from=\d+&to=\d+&positions=1&format=csv$/);
    const [from, to] = [...href.matchAll(/(?:from|to)=(\d+)/g)].map((m) => Number(m[1]));
    expect(to! - from!).toBe(7 * 86_400_000); // the link follows the chosen period
    // The figures for that period are on screen (not the first 24 h any more).
    const query = href.replace(/^.*\?/, '').replace(/&format=csv$/, '');
    await page.locator(`[data-alarm-health][data-loaded="${query}"]`).waitFor({ timeout: 10_000 });
    await page.screenshot({ path: path.join(OUT, 'alarm-health.png'), fullPage: true });
    await ctx.close();

    const op = await contextAs('operator');
    const p2 = await op.newPage();
    const r = await p2.goto(`${base()}/alarms/settings`);
    expect(r?.status()).toBe(403);
    await op.close();
  }, 60_000);
});
