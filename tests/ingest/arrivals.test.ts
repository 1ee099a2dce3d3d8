/**
 * Arrival and the memory buffer (ingest/arrivals.ts): each message parsed once into an entry,
 * runs taken from the front and either committed or handed back whole, and the packet pump
 * held over the high-water mark. Properties that must hold: no entry lost or repeated, rows
 * conserved, arrival order kept (MQTT 3.1.1 §4.6: messages of one topic in order).
 */
import { describe, expect, it } from 'vitest';
import { ArrivalBuffer, BackPressure, EntryMaker, MAX_PAYLOAD_BYTES } from '../../ingest/arrivals.ts';

const topic = 'coatrail/v1/site/gw/tank/temp';
/** Sample times must lie in 2000–2099 (the shared schema). */
const T0 = Date.UTC(2026, 0, 1);

describe('EntryMaker', () => {
  it('parses the topic once per topic and the payload on arrival, counting samples', () => {
    const m = new EntryMaker();
    const one = m.make(topic, JSON.stringify({ t: T0, v: 1 }), 5, 7, 0);
    const batch = m.make(
      topic,
      JSON.stringify({
        samples: [
          { t: T0, v: 1 },
          { t: T0 + 1000, v: 2 },
          { t: T0 + 2000, v: 3 },
        ],
      }),
      6,
      8,
      0,
    );
    expect(one.route).toEqual({ kind: 'sample', site: 'site', device: 'gw', asset: 'tank', channel: 'temp' });
    expect(batch.route).toBe(one.route); // the same parsed object: parsed once
    expect(one.samples).toBe(1);
    expect(batch.samples).toBe(3);
    expect(one.parsed?.ok).toBe(true);
    expect(one).toMatchObject({ mid: 7, gen: 0, rxMs: 5 });
  });

  it('keeps bad payloads as refusals-to-be and status topics unparsed', () => {
    const m = new EntryMaker();
    expect(m.make(topic, '{not json', 1, -1, 0).parsed).toMatchObject({ ok: false, reason: 'malformed-json' });
    const big = m.make(topic, '', 1, -1, 0, MAX_PAYLOAD_BYTES + 1);
    expect(big.parsed).toMatchObject({ ok: false, reason: 'schema' });
    expect(big.parsed && !big.parsed.ok && big.parsed.detail).toContain(`${MAX_PAYLOAD_BYTES + 1} bytes`);
    const status = m.make('coatrail/v1/site/gw/status', 'online', 1, -1, 0);
    expect(status.route.kind).toBe('status');
    expect(status.parsed).toBeNull();
    expect(m.make('elsewhere/x', 'x', 1, -1, 0).route.kind).toBe('invalid');
  });
});

describe('ArrivalBuffer', () => {
  const maker = new EntryMaker();
  const entry = (i: number, samples = 1) =>
    maker.make(
      topic,
      JSON.stringify({ samples: Array.from({ length: samples }, (_, k) => ({ t: T0 + i * 1000 + k, v: k })) }),
      i,
      i,
      0,
    );

  it('takes runs of at most maxRows samples (at least one entry), in arrival order, and forgets them once committed', () => {
    const b = new ArrivalBuffer();
    for (let i = 0; i < 10; i++) b.push(entry(i, 3));
    expect(b.rows).toBe(30);
    const run = b.take(7); // 3 + 3 + 3 ≥ 7 after three entries
    expect(run.entries.map((e) => e.rxMs)).toEqual([0, 1, 2]);
    expect(run.rows).toBe(9);
    expect(b.pending).toBe(7);
    expect(b.size).toBe(10); // still held until committed
    expect(b.oldest()?.rxMs).toBe(0);
    expect(b.next()?.rxMs).toBe(3);
    b.done(run);
    expect(b.rows).toBe(21);
    expect(b.size).toBe(7);
    expect(b.oldest()?.rxMs).toBe(3);
    const huge = new ArrivalBuffer();
    huge.push(entry(0, 50));
    expect(huge.take(10).entries).toHaveLength(1);
  });

  it('hands a failed run back whole: the same entries come next, nothing lost or repeated', () => {
    const b = new ArrivalBuffer();
    for (let i = 0; i < 5; i++) b.push(entry(i));
    const first = b.take(2);
    b.push(entry(5)); // arrives while the flush runs
    b.putBack(first);
    expect(b.rows).toBe(6);
    const again = b.take(2);
    expect(again.entries).toEqual(first.entries);
    b.done(again);
    const rest = b.take(100);
    expect(rest.entries.map((e) => e.rxMs)).toEqual([2, 3, 4, 5]);
    b.done(rest);
    expect(b.rows).toBe(0);
    expect(b.size).toBe(0);
  });
});

describe('BackPressure', () => {
  it('lets the pump go on under the mark and holds it, in order, over it', () => {
    let full = false;
    const bp = new BackPressure(() => full);
    const released: number[] = [];
    bp.admit(() => released.push(1));
    expect(released).toEqual([1]);
    full = true;
    bp.admit(() => released.push(2));
    bp.admit(() => released.push(3));
    expect(bp.held).toBe(2);
    bp.release();
    expect(released).toEqual([1]);
    full = false;
    bp.release();
    expect(released).toEqual([1, 2, 3]);
    expect(bp.held).toBe(0);
  });
});
