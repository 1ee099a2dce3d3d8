/**
 * In Chromium against the built app: a viewer opens Calculators → Cure verdict, judges the
 * example plan (complete), imports a CSV profile that only reaches 98 °C (under-cured with the
 * reason), sees the chart, and gets a field message for a window whose maximum is below its
 * minimum. Screenshots go to test-results/.
 */
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import type { Browser, Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { launchBrowser, newPage, screenshot, signIn, waitForIslands } from '../support/browser.ts';

let browser: Browser;
let page: Page;

beforeAll(async () => {
  browser = await launchBrowser();
  page = await newPage(browser);
  await signIn(page, 'viewer', undefined, '/calculators');
});

afterAll(async () => {
  await browser?.close();
});

describe('Calculators → Cure verdict', () => {
  it('is listed under Calculators and judges the example plan complete', async () => {
    await page.goto('/calculators');
    await page.getByRole('link', { name: /Cure verdict of a profile/ }).click();
    await page.getByRole('heading', { name: 'Cure verdict of a profile' }).waitFor();
    await waitForIslands(page);
    await page.getByRole('button', { name: 'Judge the cure' }).click();
    const result = page.getByTestId('cure-verdict-result');
    await result.waitFor();
    await expect(result.textContent()).resolves.toContain('Complete');
    await page.getByTestId('cure-verdict-chart').waitFor();
    await screenshot(page, 'cure-verdict-complete');
  });

  it('an imported CSV that never reaches the minimum is under-cured, with the reason', async () => {
    const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'cure-verdict-'));
    const file = path.join(dir, 'planned-98C.csv');
    const lines = ['minutes,tempC'];
    for (let m = 0; m <= 200; m += 1) lines.push(`${m},${m <= 30 ? 25 + (73 * m) / 30 : m <= 180 ? 98 : 98 - (m - 180) * 2}`);
    fs.writeFileSync(file, lines.join('\n'));
    await page.getByLabel('Import a CSV file').setInputFiles(file);
    await page.getByText('planned-98C.csv: 201 readings read.').waitFor();
    await page.getByRole('button', { name: 'Judge the cure' }).click();
    const result = page.getByTestId('cure-verdict-result');
    await page.waitForFunction(() =>
      document.querySelector('[data-testid="cure-verdict-result"]')?.textContent?.includes('Under-cured'),
    );
    await expect(result.textContent()).resolves.toContain('never reached the minimum 100 °C');
    await screenshot(page, 'cure-verdict-under-cured');
    fs.rmSync(dir, { recursive: true, force: true });
  });

  it('a window whose maximum part temperature is below its minimum gets the server’s field message', async () => {
    await page.getByLabel(/Maximum part temperature/).fill('90');
    await page.getByRole('button', { name: 'Judge the cure' }).click();
    await page.getByText('window.maxPartTempC must be above window.minTempC').first().waitFor();
    await expect(page.getByRole('alert').textContent()).resolves.toContain('No verdict');
  });
});
