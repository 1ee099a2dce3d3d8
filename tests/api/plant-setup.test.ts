/**
 * Plant set-up endpoints against the real broker and worker:
 * devices with credentials shown once (and working on the broker), rotation, disabling;
 * assets; channels with their topic and validation; approving an unknown channel.
 */
import { afterAll, describe, expect, inject, it } from 'vitest';
import { closeTestPool, testPool } from '../support/accounts.ts';
import { api, signIn } from '../support/http.ts';
import { connectDevice, waitFor } from '../support/ingest-harness.ts';

const port = () => inject('stack').mqttPort;

afterAll(async () => {
  await closeTestPool();
});

async function canConnect(username: string, password: string): Promise<boolean> {
  try {
    const c = await connectDevice(port(), username, password);
    await c.endAsync();
    return true;
  } catch {
    return false;
  }
}

describe('devices', () => {
  it('creates a device whose password is shown once, hashed with argon2id, and works on the broker', async () => {
    const admin = await signIn('admin');
    const name = `Dip line ${Date.now()} PLC gateway`;
    const r = await api('/api/v1/devices', { method: 'POST', session: admin, json: { name } });
    expect(r.status).toBe(201);
    expect(Object.keys(r.body).sort()).toEqual(['id', 'password', 'topicPrefix', 'username']);
    expect(r.body.username).toMatch(/^dip-line-\d+-plc-gateway$/);
    expect(r.body.topicPrefix).toBe(`coatrail/v1/fernhollow/${r.body.username}`);
    expect(r.body.password.length).toBeGreaterThanOrEqual(20);
    const { rows } = await testPool().query<{ password_hash: string }>('select password_hash from devices where id = $1', [
      r.body.id,
    ]);
    expect(rows[0]!.password_hash).toMatch(/^\$argon2id\$/);
    expect(rows[0]!.password_hash).not.toContain(r.body.password);
    // The list never carries a password.
    const list = await api('/api/v1/devices', { session: admin });
    const listed = list.body.find((d: { id: number }) => d.id === r.body.id);
    expect(listed).toMatchObject({ name, username: r.body.username, enabled: true, channels: 0 });
    expect(JSON.stringify(list.body)).not.toContain(r.body.password);
    // The credentials work; a wrong password does not.
    expect(await canConnect(r.body.username, r.body.password)).toBe(true);
    expect(await canConnect(r.body.username, r.body.password + 'x')).toBe(false);
    // Online/offline from the broker's connection events is recorded.
    const c = await connectDevice(port(), r.body.username, r.body.password);
    const online = await waitFor(
      async () =>
        (await api('/api/v1/devices', { session: admin })).body.find(
          (d: { id: number; online: boolean }) => d.id === r.body.id && d.online,
        ),
      5000,
      'device online',
    );
    expect(online.lastSeenAt).not.toBeNull();
    await c.endAsync();
    // The same name again gets a distinct username.
    const again = await api('/api/v1/devices', { method: 'POST', session: admin, json: { name } });
    expect(again.status).toBe(201);
    expect(again.body.username).toBe(`${r.body.username}-2`);
    // Audited without the secret.
    const audit = await testPool().query<{ after: Record<string, unknown> }>(
      `select after from audit_log where action = 'device.created' and entity_id = $1`,
      [String(r.body.id)],
    );
    expect(audit.rows[0]!.after).toMatchObject({ username: r.body.username, topicPrefix: r.body.topicPrefix });
    expect(JSON.stringify(audit.rows[0]!.after)).not.toContain(r.body.password);
  });

  it('rotates a password (old refused, new accepted) and disables a device (refused at connect)', async () => {
    const admin = await signIn('admin');
    const d = (await api('/api/v1/devices', { method: 'POST', session: admin, json: { name: `Rotator ${Date.now()}` } })).body;
    const rot = await api(`/api/v1/devices/${d.id}/rotate-password`, { method: 'POST', session: admin, json: {} });
    expect(rot.status).toBe(200);
    expect(rot.body.password).not.toBe(d.password);
    expect(await canConnect(d.username, d.password)).toBe(false);
    expect(await canConnect(d.username, rot.body.password)).toBe(true);
    const off = await api(`/api/v1/devices/${d.id}`, { method: 'PATCH', session: admin, json: { enabled: false } });
    expect(off.status).toBe(200);
    expect(off.body).toMatchObject({ enabled: false, online: false });
    expect(await canConnect(d.username, rot.body.password)).toBe(false);
    const trail = await testPool().query<{ action: string; before: unknown; after: unknown }>(
      `select action, before, after from audit_log where entity = 'device' and entity_id = $1 order by id`,
      [String(d.id)],
    );
    expect(trail.rows.map((r) => r.action)).toEqual(['device.created', 'device.password-rotated', 'device.disabled']);
    expect(trail.rows[2]).toMatchObject({ before: { enabled: true }, after: { enabled: false } });
  });

  it('refuses a device without a name (400 with path) and for a non-admin (403)', async () => {
    const bad = await api('/api/v1/devices', { method: 'POST', session: await signIn('admin'), json: { name: '' } });
    expect(bad.status).toBe(400);
    expect(bad.body.errors[0].path).toBe('name');
    expect(
      (await api('/api/v1/devices', { method: 'POST', session: await signIn('engineer'), json: { name: 'x-y' } })).status,
    ).toBe(403);
  });
});

describe('assets and channels', () => {
  it('lists assets as a tree by parentId', async () => {
    const r = await api('/api/v1/assets', { session: await signIn('viewer') });
    expect(r.status).toBe(200);
    const byCode = new Map(r.body.map((a: { code: string }) => [a.code, a]));
    const line = byCode.get('dip-1') as { id: number; parentId: number | null; kind: string };
    const bath = byCode.get('dip-1-hc') as { parentId: number };
    expect(line.kind).toBe('line');
    expect(line.parentId).toBeNull();
    expect(bath.parentId).toBe(line.id);
  });

  it('lists channels with unit, valid range and topic', async () => {
    const r = await api('/api/v1/channels', { session: await signIn('operator') });
    expect(r.status).toBe(200);
    const visc = r.body.find((c: { topic: string }) => c.topic === 'coatrail/v1/fernhollow/gw-dip-1/dip-1-hc/viscosity');
    expect(visc).toMatchObject({ kind: 'viscosity', unit: 'mm²/s', min: 0, max: 60 });
    for (const k of ['id', 'name', 'kind', 'unit', 'min', 'max', 'topic', 'deviceId', 'assetId']) expect(visc).toHaveProperty(k);
  });

  it('creates a channel (engineer), validates range, asset, device and duplicates with field paths', async () => {
    const eng = await signIn('engineer');
    const assets = (await api('/api/v1/assets', { session: eng })).body as { id: number; code: string }[];
    const coatRoom = assets.find((a) => a.code === 'coat-room')!;
    const admin = await signIn('admin');
    const dev = (await api('/api/v1/devices', { method: 'POST', session: admin, json: { name: `Room sensor ${Date.now()}` } }))
      .body;
    const body = {
      assetId: coatRoom.id,
      deviceId: dev.id,
      name: 'Coating room humidity',
      kind: 'room-humidity',
      unit: '%',
      min: 0,
      max: 100,
    };
    const ok = await api('/api/v1/channels', { method: 'POST', session: eng, json: body });
    expect(ok.status).toBe(201);
    expect(ok.body).toMatchObject({
      key: 'coating-room-humidity',
      topic: `${dev.topicPrefix}/coat-room/coating-room-humidity`,
      assetId: coatRoom.id,
      deviceId: dev.id,
    });
    const dup = await api('/api/v1/channels', { method: 'POST', session: eng, json: body });
    expect(dup.status).toBe(409);
    expect(dup.body.errors[0].path).toBe('key');
    const range = await api('/api/v1/channels', {
      method: 'POST',
      session: eng,
      json: { ...body, key: 'rh-2', min: 50, max: 50 },
    });
    expect(range.status).toBe(400);
    expect(range.body.errors.map((e: { path: string }) => e.path)).toContain('max');
    const noAsset = await api('/api/v1/channels', {
      method: 'POST',
      session: eng,
      json: { ...body, key: 'rh-3', assetId: 2147483000 },
    });
    expect(noAsset.status).toBe(400);
    expect(noAsset.body.errors[0].path).toBe('assetId');
    const noDevice = await api('/api/v1/channels', {
      method: 'POST',
      session: eng,
      json: { ...body, key: 'rh-4', deviceId: 2147483000 },
    });
    expect(noDevice.status).toBe(400);
    expect(noDevice.body.errors[0].path).toBe('deviceId');
    const badKind = await api('/api/v1/channels', { method: 'POST', session: eng, json: { ...body, key: 'rh-5', kind: 'mood' } });
    expect(badKind.status).toBe(400);
    expect(badKind.body.errors[0].path).toBe('kind');
    const audit = await testPool().query(`select 1 from audit_log where action = 'channel.created' and entity_id = $1`, [
      String(ok.body.id),
    ]);
    expect(audit.rows).toHaveLength(1);
  });
});

describe('approving an unknown channel', () => {
  it('turns a topic the worker did not know into a channel whose readings are then stored', async () => {
    const admin = await signIn('admin');
    const eng = await signIn('engineer');
    const dev = (await api('/api/v1/devices', { method: 'POST', session: admin, json: { name: `Probe box ${Date.now()}` } }))
      .body;
    const topic = `${dev.topicPrefix}/dip-1-hc/solids-probe`;
    const client = await connectDevice(port(), dev.username, dev.password);
    try {
      await client.publishAsync(topic, JSON.stringify({ t: Date.now(), v: 24.5 }), { qos: 1 });
      const unknown = await waitFor(
        async () =>
          (
            await testPool().query<{ id: number }>('select id from unknown_channels where topic = $1 and resolved_at is null', [
              topic,
            ])
          ).rows[0],
        10_000,
        'the unknown channel to be listed',
      );
      // Validation first, then the role.
      const bad = await api(`/api/v1/ingest/unknown-channels/${unknown.id}/approve`, {
        method: 'POST',
        session: eng,
        json: { name: 'Solids', kind: 'solids', unit: '%', min: 40, max: 10 },
      });
      expect(bad.status).toBe(400);
      expect(bad.body.errors[0].path).toBe('max');
      expect(
        (
          await api(`/api/v1/ingest/unknown-channels/${unknown.id}/approve`, {
            method: 'POST',
            session: await signIn('operator'),
            json: {},
          })
        ).status,
      ).toBe(403);
      const ok = await api(`/api/v1/ingest/unknown-channels/${unknown.id}/approve`, {
        method: 'POST',
        session: eng,
        json: { name: 'Line 1 bath solids probe', kind: 'solids', unit: '%', min: 0, max: 60 },
      });
      expect(ok.status).toBe(201);
      expect(ok.body).toMatchObject({ topic, key: 'solids-probe', deviceId: dev.id, unit: '%' });
      const again = await api(`/api/v1/ingest/unknown-channels/${unknown.id}/approve`, {
        method: 'POST',
        session: eng,
        json: { name: 'Solids', kind: 'solids', unit: '%', min: 0, max: 60 },
      });
      expect(again.status).toBe(409);
      const { rows } = await testPool().query<{ resolved_at: Date | null }>(
        'select resolved_at from unknown_channels where id = $1',
        [unknown.id],
      );
      expect(rows[0]!.resolved_at).not.toBeNull();
      // Samples on the topic are now stored as readings of the channel. (The worker re-reads its
      // channel map at most once a second on a miss, so a sample sent in that second may still be
      // refused as unknown; the device keeps publishing, as a real one does.)
      const stored = await waitFor(
        async () => {
          await client.publishAsync(topic, JSON.stringify({ t: Date.now(), v: 25.25 }), { qos: 1 });
          const { rows: got } = await testPool().query<{ value: number }>('select value from readings where channel_id = $1', [
            ok.body.id,
          ]);
          return got[0];
        },
        15_000,
        'a reading of the approved channel to be stored',
        400,
      );
      expect(stored.value).toBe(25.25);
      const audit = await testPool().query<{ before: { unknownChannelId: number } }>(
        `select before from audit_log where action = 'channel.approved' and entity_id = $1`,
        [String(ok.body.id)],
      );
      expect(audit.rows[0]!.before.unknownChannelId).toBe(unknown.id);
    } finally {
      await client.endAsync();
    }
  }, 40_000);

  it('answers 404 for an unknown id', async () => {
    const r = await api('/api/v1/ingest/unknown-channels/2147483000/approve', {
      method: 'POST',
      session: await signIn('engineer'),
      json: { name: 'Solids', kind: 'solids', unit: '%', min: 0, max: 60 },
    });
    expect(r.status).toBe(404);
  });
});
