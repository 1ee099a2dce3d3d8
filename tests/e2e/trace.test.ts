/**
 * In Chromium: a quality user opens a failed cross-cut test, follows its trace to the oven load
 * (under-cured), and holds the load's other jobs in one action. The scenario is built here with
 * unique names (a throwaway line and oven, constructed oven readings). Screenshots go to
 * test-results/ for a person to look at.
 */
import fs from 'node:fs';
import path from 'node:path';
import type pg from 'pg';
import { chromium, type Browser, type Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { closeTestPool, testPool } from '../support/accounts.ts';
import { api, base, signIn } from '../support/http.ts';
import { root } from '../support/test-stack.ts';
import { createTestLine, createTestOven, insertReadings, minuteDaysAgo, tag } from '../support/trace-fixtures.ts';

const OUT = path.join(root, 'test-results');
const MIN = 60_000;
let browser: Browser;
let page: Page;
let pool: pg.Pool;
let loadId: number;
let ovenName: string;
const jobs: string[] = [];

beforeAll(async () => {
  fs.mkdirSync(OUT, { recursive: true });
  pool = testPool();
  const operator = await signIn('operator');
  const quality = await signIn('quality');
  const line = await createTestLine(pool);
  const oven = await createTestOven(pool);
  ovenName = oven.name;
  const t = tag();
  for (let i = 0; i < 8; i++) jobs.push(`E2E-${t}-${i}`);
  const start = minuteDaysAgo(2);
  // Oven readings of a short cure: 90 → 110 °C in 10 min, 60 min at 110 °C, back down in 10 min (under-cured against 150 equivalent min).
  const rows: { ch: number; t: number; v: number }[] = [];
  for (let m = 0; m <= 80; m++) {
    const cold = m <= 10 ? 90 + 2 * m : m <= 70 ? 110 : 110 - 2 * (m - 70);
    rows.push({ ch: oven.zoneIds[1], t: start + m * MIN, v: cold }, { ch: oven.zoneIds[0], t: start + m * MIN, v: cold + 1.5 });
  }
  rows.push(
    { ch: oven.setpointId, t: start, v: 110 },
    { ch: oven.setpointId, t: start + 70 * MIN, v: 25 },
    { ch: oven.doorId, t: start - MIN, v: 0 },
  );
  await insertReadings(pool, rows);
  for (const [i, rack] of [`EA-${t}`, `EB-${t}`].entries()) {
    const r = await api('/api/v1/dip-runs', {
      method: 'POST',
      session: operator,
      json: {
        lineAssetId: line.id,
        dippedAt: new Date(start - (60 - i * 5) * MIN).toISOString(),
        rackCode: rack,
        jobNumbers: jobs.slice(i * 4, i * 4 + 4),
      },
    });
    expect(r.status).toBe(201);
  }
  const open = await api('/api/v1/loads', {
    method: 'POST',
    session: operator,
    json: { ovenAssetId: oven.id, openedAt: new Date(start).toISOString() },
  });
  loadId = open.body.id;
  await api(`/api/v1/loads/${loadId}/jobs`, { method: 'POST', session: operator, json: { rackCodes: [`EA-${t}`, `EB-${t}`] } });
  const closed = await api(`/api/v1/loads/${loadId}/close`, {
    method: 'POST',
    session: operator,
    json: { closedAt: new Date(start + 80 * MIN).toISOString() },
  });
  expect(closed.body.verdict).toBe('under-cured');
  const fail = await api('/api/v1/quality/tests', {
    method: 'POST',
    session: quality,
    json: { kind: 'crosscut', jobNumber: jobs[0], percentRemoved: 18 },
  });
  expect(fail.body.result).toBe('fail');

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
  const [name, ...rest] = quality.cookie.split('=');
  await context.addCookies([{ name: name!, value: rest.join('='), url: base() }]);
  page = await context.newPage();
}, 90_000);

afterAll(async () => {
  await browser?.close();
  await closeTestPool();
});

describe('from a failed test to the load, and hold the siblings', () => {
  it('a quality user follows the trace and holds the load in one action', async () => {
    await page.goto(`${base()}/quality?result=fail&job=${jobs[0]}`);
    const row = page.locator('tr', { hasText: jobs[0]! }).filter({ hasText: 'Fail' }).first();
    await row.waitFor();
    await expect(row.textContent()).resolves.toContain('ISO 2409 class 3 / ASTM D3359 2B (18 % removed)');
    await page.screenshot({ path: path.join(OUT, 'trace-1-quality-failed-test.png'), fullPage: false });

    // Open the failed test, then its trace.
    await row.locator('a').first().click();
    await page.getByRole('heading', { name: new RegExp(`Cross-cut adhesion on job ${jobs[0]}`) }).waitFor();
    await page.getByRole('link', { name: 'Trace this job →' }).click();
    await page.getByRole('heading', { name: `Trace of job ${jobs[0]}` }).waitFor();
    const cure = page.locator('li', { has: page.getByRole('heading', { name: '3 · Cure' }) });
    await expect(cure.textContent()).resolves.toContain('Under-cured');
    await page.locator('.oven-trend canvas').first().waitFor();
    await page.screenshot({ path: path.join(OUT, 'trace-2-chain.png'), fullPage: false });

    // Follow to the load's cure record and back.
    await cure.getByRole('link', { name: `${ovenName} · load ${loadId}` }).click();
    await page.getByRole('heading', { name: `${ovenName} — load ${loadId}` }).waitFor();
    await expect(page.locator('header').last().textContent()).resolves.toContain('Under-cured');
    await expect(page.getByText('67.4 equivalent minutes').first().isVisible()).resolves.toBe(true);
    await page.locator('.oven-trend canvas').first().waitFor();
    await page.screenshot({ path: path.join(OUT, 'trace-3-load-record.png'), fullPage: true });
    await page.goBack();
    await page.getByRole('heading', { name: `Trace of job ${jobs[0]}` }).waitFor();

    // One action: select everything in the same load and hold it, with the reason prefilled.
    const form = page.getByRole('form', { name: 'Hold selected jobs' }).or(page.locator('form[aria-labelledby="hold-h"]'));
    await form.getByRole('button', { name: /Everything in the same load \(7\)/ }).click();
    await expect(form.getByLabel('Reason for the hold').inputValue()).resolves.toContain(`load ${loadId} under-cured`);
    const hold = form.getByRole('button', { name: 'Hold 8 selected jobs' });
    await page.screenshot({
      path: path.join(OUT, 'trace-4-siblings-selected.png'),
      fullPage: false,
      clip: { x: 0, y: 0, width: 1440, height: 900 },
    });
    await form.scrollIntoViewIfNeeded();
    await hold.click();
    await form.getByRole('status').filter({ hasText: '8 job(s) put on hold' }).waitFor();
    await page.screenshot({ path: path.join(OUT, 'trace-5-held.png'), fullPage: false });

    const { rows } = await pool.query<{ job_number: string; status: string }>(
      `select j.job_number, j.status from jobs j join holds h on h.job_id = j.id and h.status = 'active' where j.job_number = any($1::text[]) order by 1`,
      [jobs],
    );
    expect(rows.map((r) => r.job_number)).toEqual([...jobs].sort());
    expect(new Set(rows.map((r) => r.status))).toEqual(new Set(['held']));

    // After the reload the siblings show their hold.
    await page.waitForLoadState('load');
    await page
      .getByText(/on hold since/)
      .first()
      .waitFor({ timeout: 10_000 });
    await page.locator('section[aria-labelledby="sib-h"]').screenshot({ path: path.join(OUT, 'trace-6-siblings-held.png') });
  }, 90_000);
});
