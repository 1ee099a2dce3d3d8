/**
 * In Chromium against the built app: an operator signs in on the sign-in page, logs a bath
 * check in cup seconds on the tablet form, sees the viscosity against the window and the
 * solvent addition while typing, logs both; an engineer creates a draft window and approves it
 * through the signature dialog (a wrong password first). Screenshots go to test-results/.
 */
import { randomBytes } from 'node:crypto';
import fs from 'node:fs';
import path from 'node:path';
import pg from 'pg';
import { chromium, type Browser, type Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, inject, it } from 'vitest';
import { api, base, signIn } from '../support/http.ts';
import { root, TEST_PASSWORD } from '../support/test-stack.ts';

const OUT = path.join(root, 'test-results');
const tag = randomBytes(3).toString('hex');
let browser: Browser;
let pool: pg.Pool;
let tankName: string;
let tankId: number;
let lacquerName: string;

async function newPage(): Promise<Page> {
  const context = await browser.newContext({ viewport: { width: 1280, height: 1000 }, timezoneId: 'Europe/London' });
  return context.newPage();
}

async function signInOnPage(page: Page, username: string) {
  await page.goto(`${base()}/login`);
  await page.fill('#username', username);
  await page.fill('#password', TEST_PASSWORD);
  await Promise.all([page.waitForURL((u) => !u.pathname.startsWith('/login')), page.click('button[type=submit]')]);
}

beforeAll(async () => {
  fs.mkdirSync(OUT, { recursive: true });
  pool = new pg.Pool({ connectionString: inject('stack').databaseUrl, max: 2 });
  const engineer = await signIn('engineer');
  // A line and hard-coat tank of this test's own, on the seeded example CR-39 window, charged from a new lot.
  const { rows: site } = await pool.query(`select id from sites where code = 'fernhollow'`);
  const { rows: line } = await pool.query(
    `insert into assets (site_id, kind, code, name) values ($1, 'line', $2, $3) returning id`,
    [site[0].id, `e2e-${tag}`, `E2E line ${tag}`],
  );
  tankName = `E2E bath ${tag}`;
  const { rows: tank } = await pool.query(
    `insert into assets (site_id, parent_id, kind, code, name, details) values ($1, $2, 'tank', $3, $4, '{"role":"hard-coat"}') returning id`,
    [site[0].id, line[0].id, `e2e-${tag}-hc`, tankName],
  );
  tankId = tank[0].id;
  const windows = await api('/api/v1/windows?status=effective', { session: engineer });
  const example = windows.body.find((w: any) => w.lacquer === 'FH-Siloxane 30 (example)' && w.substrate === 'CR-39-type 1.50');
  expect(
    (
      await api('/api/v1/windows/assignments', {
        method: 'POST',
        session: engineer,
        json: { assetId: line[0].id, windowId: example.id },
      })
    ).status,
  ).toBe(201);
  const lacquer = (await api('/api/v1/lacquers', { session: engineer })).body.find(
    (l: any) => l.name === 'FH-Siloxane 30 (example)',
  );
  const day = (d: number) => new Date(Date.now() + d * 86_400_000).toISOString().slice(0, 10);
  const lot = await api('/api/v1/lots', {
    method: 'POST',
    session: engineer,
    json: { lacquerId: lacquer.id, lotCode: `E2E-${tag}`, receivedOn: day(-10), expiresOn: day(150), solidsPct: 30.4 },
  });
  expect(lot.status).toBe(201);
  const charge = await api('/api/v1/baths/charges', {
    method: 'POST',
    session: engineer,
    json: {
      tankAssetId: tankId,
      lotId: lot.body.id,
      massKg: 38,
      potLifeDays: 30,
      chargedAt: new Date(Date.now() - 5 * 86_400_000).toISOString(),
    },
  });
  expect(charge.status).toBe(201);
  lacquerName = `E2E lacquer ${tag}`;
  expect(
    (
      await api('/api/v1/lacquers', {
        method: 'POST',
        session: engineer,
        json: { name: lacquerName, maker: 'E2E maker', solidsPct: 30, densityGCm3: 0.95, activationEnergyKJMol: 75 },
      })
    ).status,
  ).toBe(201);
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
  await pool?.end();
});

describe('bath check on the tablet form (operator)', () => {
  it('shows viscosity against the window and the addition while typing, and logs check and addition', async () => {
    const page = await newPage();
    await signInOnPage(page, 'operator');
    await page.goto(`${base()}/baths?tank=${tankId}`);
    const form = page.locator('form', { has: page.getByRole('button', { name: 'Log check' }) });
    await form.getByRole('button', { name: tankName }).waitFor();
    await page.locator('astro-island:not([ssr])').first().waitFor();
    await page.screenshot({ path: path.join(OUT, 'baths-top.png') });
    await form.getByRole('button', { name: tankName }).click();
    await form.getByLabel('Cup', { exact: true }).selectOption('zahn-1');
    // ASTM D4212 Zahn 1: ν = 1.1·(41.5 − 29) = 13.75 mm²/s, above the example window's 12.5
    await form.getByLabel('Efflux time (s)').fill('41.5');
    await form.getByLabel('Bath temperature (°C)').fill('12.2');
    await form.getByLabel('Solids (wt %)').fill('31.2');
    await form.getByLabel('Bath mass (kg, if weighed)').fill('36');
    await expect.poll(() => form.textContent()).toContain('13.75 mm²/s');
    const text = (await form.textContent()) ?? '';
    expect(text).toContain('above the window high 12.50 mm²/s');
    // hand-computed mass balance: 36·(31.2/30 − 1) = 1.44 kg of solvent
    expect(text).toContain('Add 1.44 kg of solvent');
    expect(text).toContain('Solvents and lacquer are flammable and harmful');
    await form.scrollIntoViewIfNeeded();
    await form.screenshot({ path: path.join(OUT, 'bath-check-typing.png') });

    // A cup time outside the cup's window is refused before it is sent.
    await form.getByLabel('Efflux time (s)').fill('30');
    await expect.poll(() => form.textContent()).toContain('out of range — use another cup');
    expect(await form.getByRole('button', { name: 'Log check' }).isDisabled()).toBe(true);
    await form.getByLabel('Efflux time (s)').fill('41.5');

    await form.getByRole('button', { name: 'Log check' }).click();
    await page.getByText('✓ Check logged').waitFor();
    expect(await page.getByRole('status').filter({ hasText: 'Check logged' }).textContent()).toContain('13.75 mm²/s');
    await page.getByRole('button', { name: 'Log this addition' }).click();
    await page.getByText('Addition logged: 1.44 kg of solvent').waitFor();
    await form.screenshot({ path: path.join(OUT, 'bath-check-logged.png') });

    const { rows } = await pool.query(
      `select k.kinematic_mm2s, k.cup, k.efflux_seconds, a.mass_kg from bath_checks k join bath_additions a on a.check_id = k.id where k.tank_asset_id = $1`,
      [tankId],
    );
    expect(rows).toHaveLength(1);
    expect(rows[0]).toMatchObject({ cup: 'zahn-1', efflux_seconds: 41.5, mass_kg: 1.44 });
    expect(rows[0].kinematic_mm2s).toBeCloseTo(13.75, 10);

    // The overview shows the tank's last check against the window.
    await page.reload();
    const panel = page.locator('section', { has: page.getByRole('heading', { name: tankName }) });
    expect(await panel.textContent()).toContain('above the window high 12.50 mm²/s');
    await panel.screenshot({ path: path.join(OUT, 'bath-overview.png') });
    await page.screenshot({ path: path.join(OUT, 'baths-page.png') });
    await page.context().close();
  }, 90_000);
});

describe('calculator pages (viewer)', () => {
  it('answer through the API with units, validity and caution; the spectrum upload finds the fringes', async () => {
    const page = await newPage();
    await signInOnPage(page, 'viewer');
    await page.goto(`${base()}/calculators`);
    expect(await page.locator('main').textContent()).toContain('the lab’s own validation govern');
    await page.goto(`${base()}/calculators/viscosity-cup`);
    await page.locator('astro-island:not([ssr])').first().waitFor();
    await page.getByLabel('Cup', { exact: true }).selectOption('zahn-1');
    await page.getByLabel('Efflux time').fill('40');
    await page.getByRole('button', { name: 'Calculate' }).click();
    // ASTM D4212 Zahn 1: 1.1·(40 − 29) = 12.1 mm²/s
    await page.getByText('12.1 mm²/s').waitFor();
    await page.screenshot({ path: path.join(OUT, 'calc-viscosity-cup.png'), fullPage: true });

    await page.goto(`${base()}/calculators/fringe-thickness`);
    await page.locator('astro-island:not([ssr])').first().waitFor();
    // R(λ) = 0.04 + 0.02·cos(4π·1.5·2000/λ): fringes of a 2000 nm coat with n = 1.5 (thin-film interference)
    const csv = [
      'wavelength_nm,reflectance',
      ...Array.from(
        { length: 451 },
        (_, i) => `${450 + i},${(0.04 + 0.02 * Math.cos((4 * Math.PI * 1.5 * 2000) / (450 + i))).toFixed(6)}`,
      ),
    ].join('\n');
    await page
      .getByLabel(/Reflectance spectrum/)
      .setInputFiles({ name: 'spectrum.csv', mimeType: 'text/csv', buffer: Buffer.from(csv) });
    await page.getByRole('button', { name: 'Find the fringes' }).click();
    const result = page.getByRole('region', { name: 'Spectrum result' });
    await result.getByText('Pairs used').waitFor();
    const thickness = Number(((await result.locator('dd').first().textContent()) ?? '').replace(/[^0-9.]/g, ''));
    expect(Math.abs(thickness - 2000) / 2000).toBeLessThan(0.005);
    await page.screenshot({ path: path.join(OUT, 'calc-fringe-spectrum.png'), fullPage: true });
    await page.context().close();
  }, 90_000);
});

describe('process window draft and signed approval (engineer)', () => {
  it('creates a draft on the form and approves it through the signature dialog', async () => {
    const page = await newPage();
    await signInOnPage(page, 'engineer');
    await page.goto(`${base()}/windows/new`);
    await page.locator('astro-island:not([ssr])').first().waitFor();
    await page.getByLabel('Lacquer', { exact: true }).selectOption({ label: lacquerName });
    await page.getByLabel('Substrate', { exact: true }).selectOption({ label: 'Polycarbonate 1.59' });
    await page.getByLabel('Window name').fill(`E2E window ${tag}`);
    const row = (label: string) => page.locator('tr', { has: page.getByRole('rowheader', { name: label, exact: false }) });
    await row('Bath viscosity').getByLabel('low').fill('7');
    await row('Bath viscosity').getByLabel('target').fill('9.5');
    await row('Bath viscosity').getByLabel('high').fill('12.5');
    await row('Minimum cure temperature').getByLabel('value').fill('100');
    await row('Minimum equivalent cure').getByLabel('value').fill('150');
    await row('Reference temperature').getByLabel('value').fill('110');
    await row('Lacquer activation energy').getByLabel('value').fill('75');
    await row('Maximum part temperature').getByLabel('value').fill('130');
    await Promise.all([page.waitForURL(/\/windows\/\d+$/), page.getByRole('button', { name: 'Create draft' }).click()]);
    await page.getByText('draft — not in force').waitFor();

    await page.getByRole('button', { name: 'Approve with signature…' }).click();
    const dialog = page.getByRole('dialog');
    await dialog.waitFor();
    await dialog.getByLabel('Your password').fill('wrong-password');
    await dialog.getByRole('button', { name: 'Sign and approve' }).click();
    await dialog.getByText('Not signed.').waitFor();
    await dialog.getByLabel('Your password').fill(TEST_PASSWORD);
    await page.screenshot({ path: path.join(OUT, 'window-sign-dialog.png') });
    await dialog.getByRole('button', { name: 'Sign and approve' }).click();
    await page.getByText('● effective').waitFor({ timeout: 10_000 });
    const body = (await page.locator('main').textContent()) ?? '';
    expect(body).toContain('Signed: Emil Engineer (engineer)');
    expect(body).toContain('meaning “approved”');
    await page.screenshot({ path: path.join(OUT, 'window-approved.png'), fullPage: true });
    const id = Number(new URL(page.url()).pathname.split('/').pop());
    await page.goto(`${base()}/windows`);
    expect(await page.locator('main').textContent()).toContain(`E2E window ${tag}`);
    await page.screenshot({ path: path.join(OUT, 'windows-index.png'), fullPage: true });
    const { rows } = await pool.query(
      `select action from audit_log where entity = 'process_window' and entity_id = $1 order by id`,
      [String(id)],
    );
    expect(rows.map((r) => r.action)).toEqual(['window.draft', 'window.approve']);
    await page.context().close();
  }, 90_000);
});
