/**
 * A gauge study in Chromium: an engineer registers a gauge, opens a new study, imports the
 * AIAG MSA 4th ed. example as CSV into the entry grid, saves it by average and range, and reads
 * the printable report (%GRR 26.7 % of total variation, ndc 5 → conditional, as the manual's
 * example gives); a CSV with a bad line shows its line number; a characteristic linked to the
 * gauge shows the warning on its capability report.
 */
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import type { Browser } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { launchBrowser, newPage, screenshot, signIn, waitForIslands } from '../support/browser.ts';

const AIAG: Record<string, number[][]> = {
  A: [
    [0.29, -0.56, 1.34, 0.47, -0.8, 0.02, 0.59, -0.31, 2.26, -1.36],
    [0.41, -0.68, 1.17, 0.5, -0.92, -0.11, 0.75, -0.2, 1.99, -1.25],
    [0.64, -0.58, 1.27, 0.64, -0.84, -0.21, 0.66, -0.17, 2.01, -1.31],
  ],
  B: [
    [0.08, -0.47, 1.19, 0.01, -0.56, -0.2, 0.47, -0.63, 1.8, -1.68],
    [0.25, -1.22, 0.94, 1.03, -1.2, 0.22, 0.55, 0.08, 2.12, -1.62],
    [0.07, -0.68, 1.34, 0.2, -1.28, 0.06, 0.83, -0.34, 2.19, -1.5],
  ],
  C: [
    [0.04, -1.38, 0.88, 0.14, -1.46, -0.29, 0.02, -0.46, 1.77, -1.49],
    [-0.11, -1.13, 1.09, 0.2, -1.07, -0.67, 0.01, -0.56, 1.45, -1.77],
    [-0.15, -0.96, 0.67, 0.11, -1.45, -0.49, 0.21, -0.49, 1.87, -2.16],
  ],
};
const CSV = [
  'appraiser,part,trial,value',
  ...Object.entries(AIAG).flatMap(([a, trials]) => trials.flatMap((row, t) => row.map((v, p) => `${a},${p + 1},${t + 1},${v}`))),
].join('\n');

let browser: Browser;
let dir: string;
const tag = `${Date.now().toString(36)}${Math.floor(Math.random() * 1e4)}`;

beforeAll(async () => {
  browser = await launchBrowser();
  dir = fs.mkdtempSync(path.join(os.tmpdir(), 'gauge-e2e-'));
});

afterAll(async () => {
  await browser?.close();
  fs.rmSync(dir, { recursive: true, force: true });
});

describe('gauge study page', () => {
  it('imports a CSV into the grid, saves, and shows the printable report', async () => {
    const page = await newPage(browser, { width: 1400 });
    page.setDefaultTimeout(12_000);
    try {
      await signIn(page, 'engineer', undefined, '/gauges');
      await waitForIslands(page);
      const gaugeName = `Haze meter ${tag}`;
      const add = page.getByRole('form', { name: 'New gauge' });
      await add.getByLabel('Name').fill(gaugeName);
      await add.getByLabel('Kind').selectOption('haze');
      await add.getByLabel('Unit').fill('%');
      await add.getByRole('button', { name: 'Add gauge' }).click();
      await page.getByRole('table', { name: 'Gauges' }).getByText(gaugeName).waitFor({ timeout: 15_000 });

      await page.getByRole('link', { name: 'New study' }).click();
      await page.waitForURL((u) => u.pathname === '/gauges/studies/new');
      await waitForIslands(page);
      const form = page.getByRole('form', { name: 'New gauge study' });
      await form.locator('select[name=gaugeId]').selectOption({ label: `${gaugeName} (%)` });
      await form.getByLabel('Title').fill(`AIAG example ${tag}`);
      await form.locator('select[name=method]').selectOption('average-range');

      const bad = path.join(dir, 'bad.csv');
      fs.writeFileSync(bad, 'appraiser,part,trial,value\nA,1,1,0.29\nA,x,2,0.41\n');
      await form.getByLabel(/Import CSV/).setInputFiles(bad);
      await expect.poll(async () => form.getByRole('status').innerText(), { timeout: 10_000 }).toMatch(/line 3/);

      const good = path.join(dir, 'aiag.csv');
      fs.writeFileSync(good, CSV);
      await form.getByLabel(/Import CSV/).setInputFiles(good);
      await expect.poll(async () => form.getByLabel('C trial 3 part 10').inputValue(), { timeout: 10_000 }).toBe('-2.16');
      await form.getByRole('button', { name: 'Compute and save' }).click();
      await page.waitForURL((u) => /^\/gauges\/studies\/\d+$/.test(u.pathname), { timeout: 15_000 });

      const report = page.getByRole('article', { name: 'Study report' });
      expect(await report.locator('[data-verdict]').getAttribute('data-verdict')).toBe('conditional');
      const components = await report.getByRole('table', { name: 'Variance components' }).innerText();
      expect(components).toMatch(/Gauge R&R \(GRR\)\s+\S+\s+0\.3058\s+\S+\s+26\.7/);
      expect(await report.innerText()).toMatch(/ndc = 5/);
      await screenshot(page, 'gauge-study-report');

      // Link a characteristic to the gauge: its capability report warns (conditional study), then unlink.
      await page.goto('/gauges');
      await waitForIslands(page);
      const link = page.getByRole('form', { name: 'Gauge of a characteristic' });
      const characteristicId = await link.locator('select[name=characteristicId]').inputValue();
      await link.locator('select[name=linkGaugeId]').selectOption({ label: gaugeName });
      await link.getByRole('button', { name: 'Save link' }).click();
      await link.getByRole('status').filter({ hasText: 'Saved.' }).waitFor();
      await page.goto(`/charts/control/${characteristicId}/capability`);
      expect(await page.locator('[data-gauge-warning]').innerText()).toMatch(/only conditionally acceptable/);
      await page.goto('/gauges');
      await waitForIslands(page);
      await link.locator('select[name=linkGaugeId]').selectOption({ label: '— no gauge —' });
      await link.getByRole('button', { name: 'Save link' }).click();
      await link.getByRole('status').filter({ hasText: 'Saved.' }).waitFor();
    } finally {
      await page.context().close();
    }
  }, 90_000);
});
