/**
 * Password reset end to end through the local fake SMTP relay: the admin triggers a
 * link, the mail arrives in outbox_mail (and on the admin's caught-mail API), the link sets a
 * new password once, the new password signs in, the old one does not; reuse and expiry give a
 * clear 4xx; the public "forgot password" form answers the same way for every input.
 */
import { afterAll, describe, expect, inject, it } from 'vitest';
import {
  closeTestPool,
  createThrowawayUser,
  freshSignIn,
  lastMailId,
  resetTokenIn,
  testPool,
  waitForMail,
} from '../support/accounts.ts';
import { api, signIn } from '../support/http.ts';

afterAll(async () => {
  await closeTestPool();
});

const reset = (token: string, password: string) => api('/api/auth/reset-password', { method: 'POST', json: { token, password } });
const login = (username: string, password: string) => api('/api/auth/login', { method: 'POST', json: { username, password } });

describe('password reset by e-mailed link', () => {
  it('works once: admin sends, mail caught, new password set, sessions ended, reuse refused', async () => {
    const u = await createThrowawayUser('quality', 'reset');
    const oldSession = await freshSignIn(u.username, u.password);
    const admin = await signIn('admin');
    const since = await lastMailId();
    const sent = await api(`/api/v1/admin/users/${u.id}/password-reset`, { method: 'POST', session: admin, json: {} });
    expect(sent.status).toBe(202);
    expect(sent.body).toMatchObject({ to: u.email, expiresInMinutes: 30 });

    const mail = await waitForMail(u.email, since);
    expect(mail.subject).toBe('Set a new Coatrail password');
    expect(mail.body).toContain(`${inject('stack').baseUrl}/reset-password?token=`);
    const token = resetTokenIn(mail.body);
    // Only the hash is stored.
    const stored = await testPool().query<{ token_hash: string }>('select token_hash from password_resets where user_id = $1', [
      u.id,
    ]);
    expect(stored.rows.every((r) => r.token_hash !== token && /^[0-9a-f]{64}$/.test(r.token_hash))).toBe(true);
    // The admin sees it on the caught-mail API too.
    const caught = await api('/api/v1/admin/mail', { session: admin });
    expect(caught.body.some((m: { to: string; body: string }) => m.to === u.email && m.body.includes(token))).toBe(true);

    // The page offers the form for a good link.
    const page = await fetch(`${inject('stack').baseUrl}/reset-password?token=${encodeURIComponent(token)}`);
    expect(page.status).toBe(200);
    expect(await page.text()).toContain('New password');

    // Too short a password: 400 with the field, the link stays usable.
    const short = await reset(token, 'short');
    expect(short.status).toBe(400);
    expect(short.body.errors[0].path).toBe('password');

    const newPassword = 'a-new-password-for-the-test';
    const ok = await reset(token, newPassword);
    expect(ok.status).toBe(200);
    expect(ok.body).toMatchObject({ passwordSet: true, username: u.username });

    // Old session ended, old password refused, new one works.
    expect((await api('/api/v1/channels', { session: oldSession })).status).toBe(401);
    expect((await login(u.username, u.password)).status).toBe(401);
    expect((await login(u.username, newPassword)).status).toBe(200);

    // Reuse: a clear 4xx, and the password stays.
    const again = await reset(token, 'yet-another-password-1');
    expect(again.status).toBe(410);
    expect(again.body.detail).toMatch(/already been used/);
    expect((await login(u.username, newPassword)).status).toBe(200);
    const reusedPage = await fetch(`${inject('stack').baseUrl}/reset-password?token=${encodeURIComponent(token)}`);
    expect(reusedPage.status).toBe(410);
    expect(await reusedPage.text()).toContain('already been used');

    // Audited: sent by admin, set by the user; no token in the trail.
    const trail = await testPool().query<{ action: string; actor_label: string; after: unknown }>(
      `select action, actor_label, after from audit_log where entity = 'user' and entity_id = $1 and action like 'user.password%' order by id`,
      [String(u.id)],
    );
    expect(trail.rows.map((r) => [r.action, r.actor_label])).toEqual([
      // the throwaway user replaced the admin-chosen password at its first sign-in
      ['user.password-changed', u.username],
      ['user.password-reset-sent', 'admin'],
      ['user.password-set', u.username],
    ]);
    expect(JSON.stringify(trail.rows)).not.toContain(token);
  });

  it('refuses an expired link with 410 and an unknown one with 400, changing nothing', async () => {
    const u = await createThrowawayUser('viewer', 'expire');
    const since = await lastMailId();
    expect(
      (await api(`/api/v1/admin/users/${u.id}/password-reset`, { method: 'POST', session: await signIn('admin'), json: {} }))
        .status,
    ).toBe(202);
    const token = resetTokenIn((await waitForMail(u.email, since)).body);
    // 31 minutes later (the link lives 30): move its expiry into the past.
    await testPool().query(
      `update password_resets set expires_at = now() - interval '1 minute' where user_id = $1 and used_at is null`,
      [u.id],
    );
    const expired = await reset(token, 'a-password-too-late');
    expect(expired.status).toBe(410);
    expect(expired.body.detail).toMatch(/expired/);
    expect((await login(u.username, u.password)).status).toBe(200);
    const unknown = await reset('x'.repeat(43), 'a-password-for-nothing');
    expect(unknown.status).toBe(400);
    expect(unknown.body.errors[0].path).toBe('token');
    const page = await fetch(`${inject('stack').baseUrl}/reset-password?token=${encodeURIComponent(token)}`);
    expect(page.status).toBe(410);
  });

  it('cancels an older link when a newer one is sent', async () => {
    const u = await createThrowawayUser('viewer', 'twice');
    const admin = await signIn('admin');
    let since = await lastMailId();
    await api(`/api/v1/admin/users/${u.id}/password-reset`, { method: 'POST', session: admin, json: {} });
    const first = resetTokenIn((await waitForMail(u.email, since)).body);
    since = await lastMailId();
    await api(`/api/v1/admin/users/${u.id}/password-reset`, { method: 'POST', session: admin, json: {} });
    const second = resetTokenIn((await waitForMail(u.email, since)).body);
    expect((await reset(first, 'first-link-password')).status).toBe(410);
    expect((await reset(second, 'second-link-password')).status).toBe(200);
  });
});

describe('forgot password (public)', () => {
  it('answers the same for a known user, an e-mail, an unknown name and a deactivated user; mails only the known, active one', async () => {
    const u = await createThrowawayUser('operator', 'forgot');
    const off = await createThrowawayUser('operator', 'forgot-off');
    expect(
      (await api(`/api/v1/admin/users/${off.id}`, { method: 'PATCH', session: await signIn('admin'), json: { active: false } }))
        .status,
    ).toBe(200);
    const since = await lastMailId();
    const answers = [];
    for (const login of [u.username, `nobody-${Date.now()}`, `nobody-${Date.now()}@example.test`, off.email]) {
      const r = await api('/api/auth/forgot-password', { method: 'POST', json: { login } });
      answers.push({ status: r.status, body: r.body });
    }
    expect(answers[0]!.status).toBe(202);
    expect(answers[1]).toEqual(answers[0]);
    expect(answers[2]).toEqual(answers[0]);
    expect(answers[3]).toEqual(answers[0]);
    const mail = await waitForMail(u.email, since);
    expect(mail.subject).toBe('Set a new Coatrail password');
    // Asking again at once sends no second mail (at most one link every two minutes).
    const after = await lastMailId();
    expect((await api('/api/auth/forgot-password', { method: 'POST', json: { login: u.email } })).body).toEqual(answers[0]!.body);
    await new Promise((r) => setTimeout(r, 1500));
    const { rows } = await testPool().query('select 1 from outbox_mail where mail_to = $1 and id > $2', [u.email, after]);
    expect(rows).toHaveLength(0);
    const { rows: toOff } = await testPool().query('select 1 from outbox_mail where mail_to = $1', [off.email]);
    expect(toOff).toHaveLength(0);
    // The link from the mail works.
    expect((await reset(resetTokenIn(mail.body), 'forgot-then-set-1')).status).toBe(200);
    expect((await login(u.username, 'forgot-then-set-1')).status).toBe(200);
  });

  it('answers a blank form with 400 and the field', async () => {
    const r = await api('/api/auth/forgot-password', { method: 'POST', json: { login: ' ' } });
    expect(r.status).toBe(400);
    expect(r.body.errors[0].path).toBe('login');
  });
});
