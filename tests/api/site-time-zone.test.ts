/**
 * One source for the site's time zone: the `sites` row, read at request time. Changing the
 * zone in the database (no rebuild, no restart) changes what the running web server does at
 * once: the audit filter reads zone-less times in the new zone, and pages hand the new zone to
 * their islands. The demo site's zone (Europe/London) is restored afterwards.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { closeTestPool, testPool } from '../support/accounts.ts';
import { api, signIn, type Session } from '../support/http.ts';

let admin: Session;
let original: string;

/** The wall-clock time of `ms` in `timeZone`, without a zone ("2026-12-04T21:05:09"). */
const wall = (ms: number, timeZone: string) =>
  new Intl.DateTimeFormat('sv-SE', {
    timeZone,
    year: 'numeric',
    month: '2-digit',
    day: '2-digit',
    hour: '2-digit',
    minute: '2-digit',
    second: '2-digit',
    hourCycle: 'h23',
  })
    .format(new Date(ms))
    .replace(' ', 'T');

const setZone = (tz: string) => testPool().query(`update sites set time_zone = $1 where id = (select min(id) from sites)`, [tz]);

async function page(path: string): Promise<string> {
  const r = await api(path, { session: admin });
  expect(r.status).toBe(200);
  return r.body as string;
}

beforeAll(async () => {
  admin = await signIn('admin');
  const { rows } = await testPool().query<{ tz: string }>(`select time_zone as tz from sites order by id limit 1`);
  original = rows[0]!.tz;
});

afterAll(async () => {
  await setZone(original);
  await closeTestPool();
});

describe('the site time zone is read from the site row at request time', () => {
  it('the audit filter reads zone-less bounds in the zone the row holds now', async () => {
    // Tokyo is 8–9 hours from London all year, so the same wall-clock window misses in London.
    expect(original).toBe('Europe/London');
    const latest = await api('/api/v1/audit?action=auth.signed-in&pageSize=1', { session: admin });
    expect(latest.status).toBe(200);
    const row = latest.body.rows[0] as { id: number; at: string };
    const atMs = Date.parse(row.at);
    const window = (tz: string) =>
      `/api/v1/audit?action=auth.signed-in&pageSize=500&from=${wall(atMs - 1000, tz)}&to=${wall(atMs + 1000, tz)}`;
    const ids = async (path: string) =>
      ((await api(path, { session: admin })).body.rows as Array<{ id: number }>).map((r) => r.id);

    expect(await ids(window('Europe/London'))).toContain(row.id);
    expect(await ids(window('Asia/Tokyo'))).not.toContain(row.id);
    await setZone('Asia/Tokyo');
    try {
      expect(await ids(window('Asia/Tokyo'))).toContain(row.id);
      expect(await ids(window('Europe/London'))).not.toContain(row.id);
    } finally {
      await setZone(original);
    }
    expect(await ids(window('Europe/London'))).toContain(row.id);
  });

  it('pages pass the zone from the row to their islands', async () => {
    for (const path of ['/audit', '/admin', '/plant']) {
      expect(await page(path)).not.toContain('Asia/Tokyo');
    }
    await setZone('Asia/Tokyo');
    try {
      for (const path of ['/audit', '/admin', '/plant']) {
        const html = await page(path);
        // Astro serialises island props as escaped JSON: [0, "<zone>"] is a plain string prop.
        expect(html).toMatch(/timeZone&quot;:\[0,&quot;Asia\/Tokyo&quot;\]/);
        expect(html).not.toMatch(/timeZone&quot;:\[0,&quot;Europe\/London&quot;\]/);
      }
    } finally {
      await setZone(original);
    }
    expect(await page('/audit')).toMatch(/timeZone&quot;:\[0,&quot;Europe\/London&quot;\]/);
  });
});
