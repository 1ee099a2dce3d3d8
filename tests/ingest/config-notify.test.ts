/**
 * Configuration reaches the worker at once: a device and a channel created through the API
 * (admin, engineer), then 200 readings published at once by that device over MQTT, through the
 * global stack's broker and worker. Every reading is stored and none is refused: a reading
 * whose topic the worker's cache does not know yet waits for the look-up instead of being
 * refused as from an unknown device.
 */
import { afterAll, describe, expect, inject, it } from 'vitest';
import { closeTestPool, testPool } from '../support/accounts.ts';
import { api, signIn } from '../support/http.ts';
import { connectDevice, countReadings, waitFor } from '../support/ingest-harness.ts';

afterAll(async () => {
  await closeTestPool();
});

describe('configuration changes reach the worker at once', () => {
  it('stores all 200 readings of a device and channel created just before, refusing none', async () => {
    const admin = await signIn('admin');
    const eng = await signIn('engineer');
    const stamp = Date.now();
    const dev = await api('/api/v1/devices', { method: 'POST', session: admin, json: { name: `Notify gateway ${stamp}` } });
    expect(dev.status).toBe(201);
    const assets = (await api('/api/v1/assets', { session: eng })).body as { id: number; code: string }[];
    const room = assets.find((a) => a.code === 'coat-room')!;
    const ch = await api('/api/v1/channels', {
      method: 'POST',
      session: eng,
      json: {
        assetId: room.id,
        deviceId: dev.body.id,
        name: `Notify humidity ${stamp}`,
        kind: 'room-humidity',
        unit: '%',
        min: 0,
        max: 100,
      },
    });
    expect(ch.status).toBe(201);
    const topic = ch.body.topic as string;

    const client = await connectDevice(inject('stack').mqttPort, dev.body.username, dev.body.password);
    try {
      const t0 = Date.now() - 200_000;
      await Promise.all(
        Array.from({ length: 200 }, (_, i) =>
          client.publishAsync(topic, JSON.stringify({ t: t0 + i * 1000, v: 40 + (i % 10) }), { qos: 1 }),
        ),
      );
    } finally {
      await client.endAsync();
    }
    // The broker acknowledged them; wait until the worker has committed each one, stored or refused.
    const pool = testPool();
    const refusals = async () =>
      (
        await pool.query<{ reason: string; n: number }>(
          'select reason, count(*)::int as n from ingest_rejections where topic = $1 or device_username = $2 group by reason',
          [topic, dev.body.username],
        )
      ).rows;
    await waitFor(
      async () => (await countReadings(pool, ch.body.id)) + (await refusals()).reduce((s, r) => s + r.n, 0) >= 200,
      20_000,
      'the worker to commit all 200 messages',
    );
    expect(await refusals()).toEqual([]);
    expect(await countReadings(pool, ch.body.id)).toBe(200);
    // The rollups count them too (minute buckets of the same rows).
    const { rows } = await pool.query<{ n: number }>(
      'select coalesce(sum(n), 0)::int as n from readings_1m where channel_id = $1',
      [ch.body.id],
    );
    expect(rows[0]!.n).toBe(200);
    // No stray entry for an engineer to approve.
    const unknown = await pool.query('select 1 from unknown_channels where topic = $1 and resolved_at is null', [topic]);
    expect(unknown.rowCount).toBe(0);
  });
});
