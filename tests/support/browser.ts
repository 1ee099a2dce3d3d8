/**
 * Browser helpers for tests/e2e: Debian's Chromium driven by playwright-core, sign-in through
 * our own sign-in page, and screenshots under test-results/ (git-ignored).
 *
 *   const browser = await launchBrowser();
 *   const page = await newPage(browser);
 *   await signIn(page, 'operator');
 *   await screenshot(page, 'floor-operator');
 *   await browser.close();
 */
import fs from 'node:fs';
import path from 'node:path';
import { chromium, type Browser, type BrowserContext, type Page } from 'playwright-core';
import { inject } from 'vitest';
import { root, TEST_PASSWORD } from './test-stack.ts';

export const CHROMIUM_ARGS = [
  '--headless',
  '--no-sandbox',
  '--disable-gpu',
  '--disable-quic',
  '--no-first-run',
  '--disable-background-networking',
  '--disable-component-update',
  '--disable-sync',
];

export function launchBrowser(): Promise<Browser> {
  return chromium.launch({ executablePath: '/usr/bin/chromium', args: CHROMIUM_ARGS });
}

/** A page in a fresh context (its own cookies), 1440×900 by default, with the stack's base URL. */
export async function newPage(browser: Browser, opts: { width?: number; height?: number } = {}): Promise<Page> {
  const context: BrowserContext = await browser.newContext({
    baseURL: inject('stack').baseUrl,
    viewport: { width: opts.width ?? 1440, height: opts.height ?? 900 },
    timezoneId: 'Europe/London',
    locale: 'en-GB',
  });
  return context.newPage();
}

/** Sign in through /login as `username`; waits until the app shell shows the user. */
export async function signIn(page: Page, username: string, password = TEST_PASSWORD, next = '/'): Promise<void> {
  await page.goto(`/login?next=${encodeURIComponent(next)}`);
  await page.getByLabel('Username').fill(username);
  await page.getByLabel('Password').fill(password);
  await Promise.all([
    page.waitForURL((u) => !u.pathname.startsWith('/login')),
    page.getByRole('button', { name: 'Sign in' }).click(),
  ]);
}

/** Save a full-page PNG as test-results/<name>.png and return its path. */
export async function screenshot(page: Page, name: string): Promise<string> {
  const dir = path.join(root, 'test-results');
  fs.mkdirSync(dir, { recursive: true });
  const file = path.join(dir, `${name.replace(/[^a-z0-9._-]+/gi, '-')}.png`);
  await page.screenshot({ path: file, fullPage: true });
  return file;
}

/**
 * Wait until every island on the page has hydrated (Astro removes the `ssr` attribute from an
 * `<astro-island>` when it does). Click into an island only after this: before it, a form is
 * still the server-rendered HTML and a click submits it the plain way.
 */
export async function waitForIslands(page: Page, timeoutMs = 15_000): Promise<void> {
  await page.waitForFunction(() => document.querySelectorAll('astro-island[ssr]').length === 0, null, { timeout: timeoutMs });
}

/**
 * Wait until the page has `n` live streams open (`subscribeLive` in src/lib/client/api.ts counts
 * them on `<html data-live-open>`): the server has subscribed them, so a reading or an alarm
 * published from here on reaches the page.
 */
export async function waitForLiveStreams(page: Page, n = 1, timeoutMs = 15_000): Promise<void> {
  await page.waitForFunction((want) => Number(document.documentElement.dataset['liveOpen'] ?? 0) >= want, n, {
    timeout: timeoutMs,
  });
}
