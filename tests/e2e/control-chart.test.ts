/**
 * In Chromium, on the seeded demo plant: the control chart of a seeded characteristic draws a
 * canvas with its control limits and at least one marked signal, the signals table names the
 * rule, a point's details open; the capability report and the limit study render. Screenshots go
 * to test-results/ for a person to look at.
 */
import fs from 'node:fs';
import path from 'node:path';
import pg from 'pg';
import { chromium, type Browser, type Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, inject, it } from 'vitest';
import { base, signIn } from '../support/http.ts';
import { root, TEST_PASSWORD } from '../support/test-stack.ts';

const OUT = path.join(root, 'test-results');
let browser: Browser;
let page: Page;
let pool: pg.Pool;
/** A seeded characteristic with a signal among its latest points, and how many points to show. */
let target: { id: number; name: string; last: number };

beforeAll(async () => {
  fs.mkdirSync(OUT, { recursive: true });
  pool = new pg.Pool({ connectionString: inject('stack').databaseUrl, max: 1 });
  // The seed judges the history against its approved limits; pick the seeded characteristic whose
  // newest signal of the plotted statistic (not of its MR chart) is closest to the end, and a "latest N" choice of the page that includes it.
  const { rows } = await pool.query<{ id: number; name: string; behind: number }>(
    `select c.id, c.name, (select max(idx) from spc_points where characteristic_id = c.id) - max(p.idx) as behind
       from characteristics c join spc_points p on p.characteristic_id = c.id
      where c.name in ('Line 1 withdrawal speed', 'Line 1 bath viscosity', 'Oven A soak temperature') and exists (select 1 from unnest(p.violations) v where v not like 'dispersion-%')
      group by c.id, c.name order by behind limit 1`,
  );
  const r = rows[0];
  if (!r) throw new Error('the demo seed left no signal on any seeded characteristic');
  target = { id: r.id, name: r.name, last: [50, 200, 1000, 5000].find((n) => n > r.behind) ?? 5000 };
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
  const context = await browser.newContext({ viewport: { width: 1440, height: 1000 }, timezoneId: 'Europe/London' });
  const engineer = await signIn('engineer');
  const [name, ...rest] = engineer.cookie.split('=');
  await context.addCookies([{ name: name!, value: rest.join('='), url: base() }]);
  page = await context.newPage();
}, 60_000);

afterAll(async () => {
  await browser?.close();
  await pool?.end();
});

describe('control chart in the browser', () => {
  it('draws the statistic with its limits and a marked signal; the signals table names the rule; a point opens', async () => {
    const errors: string[] = [];
    page.on('pageerror', (e) => errors.push(e.message));
    await page.goto(`${base()}/charts/control/${target.id}?last=${target.last}`);
    await page.getByRole('heading', { level: 1, name: target.name }).waitFor();
    const plot = page.locator('[data-spc-plot="statistic"]');
    await plot.locator('canvas').waitFor({ timeout: 10_000 });
    const points = Number(await plot.getAttribute('data-points'));
    const limitPoints = Number(await plot.getAttribute('data-limit-points'));
    const signals = Number(await plot.getAttribute('data-signals'));
    expect(points).toBeGreaterThan(0);
    expect(limitPoints).toBeGreaterThan(0); // UCL/LCL drawn for the points judged under approved limits
    expect(signals).toBeGreaterThan(0);
    // The canvas really has ink on it (not a blank element).
    const inked = await plot.locator('canvas').evaluate((c: HTMLCanvasElement) => {
      const ctx = c.getContext('2d');
      if (!ctx) return 0;
      const d = ctx.getImageData(0, 0, c.width, c.height).data;
      let n = 0;
      for (let i = 3; i < d.length; i += 4) if (d[i]! > 0) n++;
      return n;
    });
    expect(inked).toBeGreaterThan(1000);
    const signalRows = page.getByRole('region', { name: /Signals in view/ }).locator('tbody tr');
    expect(await signalRows.count()).toBeGreaterThan(0);
    await expect(signalRows.first().textContent()).resolves.toMatch(/WE \d|spread above/);
    await page.locator('[data-spc-plot="statistic"][data-drawn="true"]').waitFor({ timeout: 10_000 });
    await page.screenshot({ path: path.join(OUT, 'control-chart.png'), fullPage: true });

    await signalRows.first().getByRole('button', { name: 'Details' }).click();
    const panel = page.getByRole('region', { name: /^Point #\d+/ });
    await panel.getByText('Subgroup (').waitFor({ timeout: 5_000 });
    await page.getByLabel('1σ / 2σ zone lines').check();
    await page.locator('[data-spc-plot="statistic"][data-drawn-zones="true"]').waitFor({ timeout: 10_000 });
    await page.screenshot({ path: path.join(OUT, 'control-chart-point.png'), fullPage: true });
    expect(errors).toEqual([]);
  }, 60_000);

  it('each seeded chart draws its limits (screenshots for a person to look at)', async () => {
    const { rows } = await pool.query<{ id: number; name: string }>(
      `select id, name from characteristics where name in ('Line 1 withdrawal speed', 'Line 1 bath viscosity', 'Oven A soak temperature') order by id`,
    );
    expect(rows).toHaveLength(3);
    for (const c of rows) {
      await page.goto(`${base()}/charts/control/${c.id}?last=200`);
      const plot = page.locator('[data-spc-plot="statistic"]');
      await plot.locator('canvas').waitFor({ timeout: 10_000 });
      expect(Number(await plot.getAttribute('data-limit-points'))).toBeGreaterThan(0);
      await page.locator('[data-spc-plot="statistic"][data-drawn="true"]').waitFor({ timeout: 10_000 });
      await page.screenshot({
        path: path.join(OUT, `control-chart-${c.name.toLowerCase().replace(/[^a-z0-9]+/g, '-')}.png`),
        fullPage: false,
      });
    }
  }, 60_000);

  it('the charts list, the capability report and the limit study render', async () => {
    await page.goto(`${base()}/charts`);
    await page.getByRole('link', { name: target.name }).first().waitFor();
    await page.screenshot({ path: path.join(OUT, 'charts-list.png'), fullPage: true });
    await page.goto(`${base()}/charts/control/${target.id}/capability`);
    await page.getByRole('heading', { level: 1, name: /Capability report/ }).waitFor();
    expect(await page.locator('svg[role="img"] rect').count()).toBeGreaterThan(3);
    await page.screenshot({ path: path.join(OUT, 'capability-report.png'), fullPage: true });
    await page.goto(`${base()}/charts/characteristics/${target.id}/study`);
    await page.getByRole('button', { name: 'Run study' }).click();
    await page.locator('[data-spc-plot="statistic"] canvas').waitFor({ timeout: 10_000 });
    await page.getByText(/Trial limits: centre/).waitFor();
    await page.locator('[data-spc-plot="statistic"][data-drawn="true"]').waitFor({ timeout: 10_000 });
    await page.screenshot({ path: path.join(OUT, 'limit-study.png'), fullPage: true });
  }, 60_000);

  it('an engineer studies a baseline and approves new limits with a signature; the chart shows them in force', async () => {
    const { rows } = await pool.query<{ id: number }>(`select id from characteristics where name = 'Line 1 withdrawal speed'`);
    const id = rows[0]!.id;
    await page.goto(`${base()}/charts/characteristics/${id}/study`);
    await page.getByRole('button', { name: 'Run study' }).click();
    await page.getByText(/Trial limits: centre/).waitFor({ timeout: 10_000 });
    await page.getByRole('button', { name: 'Save and approve…' }).click();
    const dialog = page.getByRole('dialog', { name: /Approve control limits v\d+ for Line 1 withdrawal speed/ });
    await dialog.waitFor();
    await dialog.getByLabel('Your password').fill('not-my-password');
    await dialog.getByRole('button', { name: 'Approve limits' }).click();
    await dialog.getByRole('alert').filter({ hasText: 'Not signed.' }).waitFor();
    await page.screenshot({ path: path.join(OUT, 'limit-approve-refused.png') });
    await dialog.getByLabel('Your password').fill(TEST_PASSWORD);
    await dialog.getByRole('button', { name: 'Approve limits' }).click();
    await page.waitForURL(`${base()}/charts/control/${id}`, { timeout: 10_000 });
    const sets = page.getByRole('region', { name: 'Limit sets' });
    await sets.getByText('✓ in force').waitFor();
    const text = (await sets.textContent()) ?? '';
    expect(text).toContain('superseded');
    expect(text).toMatch(/Emil Engineer \(approved\)/);
    await page.screenshot({ path: path.join(OUT, 'limit-approved.png'), fullPage: true });
  }, 60_000);
});
