/**
 * Roles in the browser: each demo user signs in through the sign-in page and sees in
 * the navigation only what the permission table lets that role do; a page the role may not
 * open answers 403. The admin screens, plant set-up and audit trail render and work with
 * their islands. Screenshots go to test-results/.
 */
import type { Browser } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { can, ROLES, type Action, type Role } from '../../src/lib/shared/roles.ts';
import { launchBrowser, newPage, screenshot, signIn, waitForIslands } from '../support/browser.ts';

let browser: Browser;

beforeAll(async () => {
  browser = await launchBrowser();
});

afterAll(async () => {
  await browser?.close();
});

/** Navigation entries that depend on the role, with the action that guards each (src/layouts/AppLayout.astro). */
const GUARDED: { label: string; href: string; action: Action }[] = [
  { label: 'Audit trail', href: '/audit', action: 'audit.view' },
  { label: 'Plant set-up', href: '/plant', action: 'plant.view' },
  { label: 'Admin', href: '/admin', action: 'admin.users' },
];

/** Spelled out as well, so a change to the permission table that breaks these expectations is noticed. */
const EXPECTED: Record<Role, string[]> = {
  viewer: ['Audit trail'],
  operator: [],
  engineer: ['Audit trail', 'Plant set-up'],
  quality: ['Audit trail'],
  admin: ['Audit trail', 'Plant set-up', 'Admin'],
};

describe('navigation per role', () => {
  it.each(ROLES.map((r) => [r] as const))(
    '%s sees only what the role may open, and a forbidden page answers 403',
    async (role) => {
      const page = await newPage(browser);
      try {
        await signIn(page, role);
        const nav = page.getByRole('navigation', { name: 'Main' });
        const labels = (await nav.getByRole('link').allInnerTexts()).map((s) => s.trim());
        expect(labels).toContain('Floor');
        const guardedShown = GUARDED.filter((g) => labels.includes(g.label)).map((g) => g.label);
        expect(guardedShown).toEqual(EXPECTED[role]);
        expect(guardedShown).toEqual(GUARDED.filter((g) => can(role, g.action)).map((g) => g.label));
        for (const g of GUARDED) {
          const r = await page.goto(g.href);
          expect(r?.status(), `${role} opening ${g.href}`).toBe(can(role, g.action) ? 200 : 403);
        }
        await page.goto('/');
        await screenshot(page, `roles-nav-${role}`);
      } finally {
        await page.context().close();
      }
    },
    60_000,
  );

  it('sends an anonymous visitor to the sign-in page, and back after signing in', async () => {
    const page = await newPage(browser);
    try {
      await page.goto('/audit');
      expect(new URL(page.url()).pathname).toBe('/login');
      await page.getByLabel('Username').fill(`nobody-${Date.now()}`);
      await page.getByLabel('Password').fill('not-a-password');
      await page.getByRole('button', { name: 'Sign in' }).click();
      await expect(page.getByRole('alert').innerText()).resolves.toMatch(/username or password is not right/);
      await screenshot(page, 'roles-signin-refused');
      await signIn(page, 'viewer', undefined, '/audit');
      expect(new URL(page.url()).pathname).toBe('/audit');
    } finally {
      await page.context().close();
    }
  }, 60_000);
});

describe('admin, plant set-up and audit screens', () => {
  it('admin: users, tokens (secret shown once), locks, caught mail', async () => {
    const page = await newPage(browser);
    try {
      await signIn(page, 'admin');
      await page.goto('/admin');
      await waitForIslands(page);
      await expect(page.getByRole('cell', { name: 'operator', exact: true }).first().isVisible()).resolves.toBe(true);
      await page.getByRole('button', { name: '+ New user' }).click();
      await page.getByRole('heading', { name: 'New user' }).waitFor();
      await expect(page.getByRole('button', { name: 'Deactivate' }).first().isVisible()).resolves.toBe(true);
      await screenshot(page, 'admin-users');

      await page.goto('/admin/tokens');
      await waitForIslands(page);
      const name = `browser-token-${Date.now()}`;
      await page.getByLabel('Name (which client uses it)').fill(name);
      await page.getByLabel('Role', { exact: true }).selectOption('viewer');
      await page.getByRole('button', { name: 'Create token' }).click();
      const secret = page.locator('code', { hasText: /^ct_/ });
      await secret.waitFor();
      expect(await secret.innerText()).toMatch(/^ct_[A-Za-z0-9_-]{32}$/);
      await expect(page.getByRole('cell', { name, exact: true }).isVisible()).resolves.toBe(true);
      await screenshot(page, 'admin-tokens');

      await page.goto('/admin/security');
      await page.getByRole('heading', { name: /Failed sign-ins/ }).waitFor();
      await screenshot(page, 'admin-security');
      await page.goto('/admin/mail');
      await page.getByRole('heading', { name: /Caught e-mail/ }).waitFor();
    } finally {
      await page.context().close();
    }
  }, 60_000);

  it('engineer: plant set-up lists devices and channels with topics and gives the mqtt line for a device', async () => {
    const page = await newPage(browser);
    try {
      await signIn(page, 'engineer');
      await page.goto('/plant');
      await waitForIslands(page);
      await page.getByRole('cell', { name: 'coatrail/v1/fernhollow/gw-dip-1/dip-1-hc/viscosity' }).waitFor();
      await page.getByRole('radio', { name: 'Show the mqtt example for gw-oven-a' }).check();
      const line = page.locator('pre', { hasText: 'mqtt pub' });
      expect(await line.innerText()).toMatch(
        /^mqtt pub -h 127\.0\.0\.1 -p \d+ -u gw-oven-a -P '<device password>' -q 1 -t 'coatrail\/v1\/fernhollow\/gw-oven-a\/oven-a[^']*' -m '\{"t":/,
      );
      // Engineers add channels but do not create devices.
      await expect(page.getByRole('heading', { name: 'New channel' }).isVisible()).resolves.toBe(true);
      await expect(page.getByRole('button', { name: 'Create device' }).count()).resolves.toBe(0);
      // Filtering by an asset narrows the channels.
      await page.getByRole('button', { name: /Cure oven B/ }).click();
      await page.getByText(/shown under Cure oven B/).waitFor();
      await screenshot(page, 'plant-setup-engineer');
    } finally {
      await page.context().close();
    }
  }, 60_000);

  it('viewer: the audit trail filters, pages and offers a CSV export', async () => {
    const page = await newPage(browser);
    try {
      await signIn(page, 'viewer');
      await page.goto('/audit');
      await waitForIslands(page);
      await page.getByRole('columnheader', { name: /When/ }).waitFor();
      await page.getByLabel('Action contains').fill('auth.signed-in');
      await page.getByRole('button', { name: 'Apply' }).click();
      await page.waitForURL(/action=auth.signed-in/);
      const actions = await page.locator('tbody tr td:nth-child(3)').allInnerTexts();
      expect(actions.length).toBeGreaterThan(0);
      expect(new Set(actions)).toEqual(new Set(['auth.signed-in']));
      const csv = page.getByRole('link', { name: /Export all \d+ as CSV/ });
      expect(await csv.getAttribute('href')).toContain('format=csv');
      // Sorting by "Who" orders the page by actor.
      await page.getByRole('button', { name: /^Who/ }).click();
      const who = await page.locator('tbody tr td:nth-child(2)').allInnerTexts();
      expect(who).toEqual([...who].sort((a, b) => a.localeCompare(b, 'en', { numeric: true, sensitivity: 'base' })));
      await screenshot(page, 'audit-viewer');
    } finally {
      await page.context().close();
    }
  }, 60_000);
});
