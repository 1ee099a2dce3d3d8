/**
 * The AR stack calculator in Chromium: a viewer opens it from the Calculators page, calculates
 * the example four-layer stack, sees the reflectance curve, the colour swatch and the colour
 * values; removing every layer gives the uncoated 1.60 lens's luminous reflectance 5.33 % (Fresnel: a constant R = ((n − 1)/(n + 1))² weights to itself); a bad
 * thickness shows the server's field message. Screenshots go to test-results/.
 */
import type { Browser } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { launchBrowser, newPage, screenshot, signIn, waitForIslands } from '../support/browser.ts';

let browser: Browser;

beforeAll(async () => {
  browser = await launchBrowser();
});

afterAll(async () => {
  await browser?.close();
});

describe('AR stack calculator page', () => {
  it('calculates a stack, draws its curve and colour, and reports bad input', async () => {
    const page = await newPage(browser);
    try {
      await signIn(page, 'viewer', undefined, '/calculators');
      await page.getByRole('link', { name: 'AR stack reflectance and colour' }).click();
      await page.waitForURL((u) => u.pathname === '/calculators/stack-reflectance');
      await waitForIslands(page);
      expect(await page.getByTestId('layer-row').count()).toBe(4);
      await page.getByRole('button', { name: 'Calculate' }).click();
      const result = page.getByTestId('stack-result');
      await result.getByTestId('reflectance-chart').waitFor({ timeout: 15_000 });
      await result.getByTestId('colour-swatch').waitFor();
      const text = await result.innerText();
      expect(text).toMatch(/Luminous reflectance/);
      expect(text).toMatch(/Hue angle/);
      expect(text).toMatch(/Model, not measurement/);
      await screenshot(page, 'optics-stack-calculator');

      // uncoated 1.60 lens at 550 nm only: R = ((1.6 − 1)/(1.6 + 1))² = 5.325 % (Fresnel)
      await page.getByRole('button', { name: 'Clear (uncoated lens)' }).click();
      await page.getByLabel('Lens index n (at 550 nm, constant)').fill('1.6');
      await page.getByRole('button', { name: 'Calculate' }).click();
      await expect
        .poll(async () => result.getByTestId('colour-panel').getAttribute('data-luminous-pct'), { timeout: 15_000 })
        .toBe('5.33');

      // a negative thickness: the server's message for the field
      await page.getByRole('button', { name: 'Example four-layer AR' }).click();
      await page.getByLabel('Layer 2 thickness (nm)').fill('-5');
      await page.getByRole('button', { name: 'Calculate' }).click();
      await result.getByRole('alert').waitFor({ timeout: 15_000 });
      expect(await result.getByRole('alert').innerText()).toMatch(/layers\.1\.thicknessNm/);
    } finally {
      await page.context().close();
    }
  });

  it('the colour-difference page gives Sharma et al. (2005) pair 1: ΔE00 2.0425', async () => {
    const page = await newPage(browser);
    try {
      await signIn(page, 'operator', undefined, '/calculators/colour-difference');
      await waitForIslands(page);
      await page.getByRole('button', { name: 'Calculate' }).click();
      await expect.poll(async () => page.getByLabel('Result').innerText(), { timeout: 15_000 }).toMatch(/2\.0425/);
    } finally {
      await page.context().close();
    }
  });
});
