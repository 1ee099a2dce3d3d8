/**
 * The shared telemetry schema (one sample, a batch, a bare array; ISO 8601 with zone or epoch
 * ms; quality flag; unit spellings) and the worker's journal (append → fsync → acknowledge,
 * ordered replay in chunks with a resumable position, a torn last line skipped).
 */
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { afterEach, describe, expect, it } from 'vitest';
import { Journal } from '../../ingest/journal.ts';
import { parseTelemetry } from '../../ingest/handlers/readings.ts';
import { parseTelemetryPayload, ReadingsQuerySchema, sameUnit, TelemetryPayloadSchema } from '../../src/lib/shared/telemetry.ts';

const parse = (x: unknown) => {
  const r = parseTelemetryPayload(x);
  if (!r.success) throw r.error;
  return r.data;
};

describe('TelemetryPayloadSchema', () => {
  // 2026-12-02T10:00:00.250Z = 1 796 205 600 250 ms since the epoch (hand-computed: 20 789 days × 86 400 000 + 10 h + 250 ms).
  const T = 1_796_205_600_250;

  it('normalises one sample, a batch and a bare array to {u, samples}', () => {
    expect(parse({ t: T, v: 1.5 })).toEqual({ u: undefined, samples: [{ t: T, v: 1.5 }] });
    expect(parse({ t: '2026-12-02T10:00:00.250Z', v: 1 }).samples[0]!.t).toBe(T);
    expect(parse({ t: '2026-12-02T11:00:00.250+01:00', v: 1 }).samples[0]!.t).toBe(T);
    expect(parse({ u: '°C', samples: [{ t: T, v: 1, q: 2 }] })).toEqual({ u: '°C', samples: [{ t: T, v: 1, q: 2 }] });
    expect(
      parse([
        { t: T, v: 1 },
        { t: T + 1, v: 2 },
      ]).samples,
    ).toHaveLength(2);
    expect(parse({ t: T + 0.4, v: 1 }).samples[0]!.t).toBe(T); // sub-millisecond digits rounded
  });

  it('refuses times without a zone, epoch seconds, non-numbers, bad quality flags and empty batches', () => {
    for (const bad of [
      { t: '2026-12-02T10:00:00', v: 1 },
      { t: 1_796_205_600, v: 1 },
      { t: T, v: '1.5' },
      { t: T, v: null },
      { t: T, v: 1, q: 3 },
      { t: T, v: 1, q: 0.5 },
      { samples: [] },
      [],
      { v: 1 },
      'online',
      null,
    ]) {
      expect(TelemetryPayloadSchema.safeParse(bad).success, JSON.stringify(bad)).toBe(false);
    }
  });

  it('tells malformed JSON from a schema failure', () => {
    expect(parseTelemetry('{"t": 1,')).toMatchObject({ ok: false, reason: 'malformed-json' });
    expect(parseTelemetry('{"t": 1796205600250}')).toMatchObject({ ok: false, reason: 'schema' });
    expect(parseTelemetry('NaN')).toMatchObject({ ok: false, reason: 'malformed-json' });
    expect(parseTelemetry('{"t": 1796205600250, "v": 1}')).toMatchObject({ ok: true });
  });

  it('says what is wrong in words an engineer can act on', () => {
    const detail = (p: string) => {
      const r = parseTelemetry(p);
      return r.ok ? null : r.detail;
    };
    expect(detail('{"t": 1796205600, "v": 1}')).toContain('epoch milliseconds, not seconds');
    expect(detail('{"t": "2026-12-02 10:00:00", "v": 1}')).toContain('needs a zone designator');
    expect(detail('{"t": 1796205600250, "value": 1}')).toBe('v: Invalid input: expected number, received undefined');
    expect(detail('{"t": 1796205600250, "v": 1, "q": 7}')).toBe('q: must be 0 (good), 1 (uncertain) or 2 (bad)');
    expect(detail('[{"t": 1796205600250, "v": "x"}]')).toBe('[0].v: Invalid input: expected number, received string');
  });

  it('compares units by their canonical spelling, keeping case', () => {
    expect(sameUnit('mm2/s', 'mm²/s')).toBe(true);
    expect(sameUnit('cSt', 'mm²/s')).toBe(true);
    expect(sameUnit(' °C ', '°C')).toBe(true);
    expect(sameUnit('degC', '°C')).toBe(true);
    expect(sameUnit('°F', '°C')).toBe(false);
    expect(sameUnit('MW/cm²', 'mW/cm²')).toBe(false);
  });

  it('reads the readings query: defaults, ISO or epoch ms, from before to', () => {
    const d = ReadingsQuerySchema.parse({});
    expect(d.to - d.from).toBe(3_600_000);
    expect(d.maxPoints).toBe(1000);
    expect(ReadingsQuerySchema.parse({ from: '2026-12-02T10:00:00.250Z', to: String(T + 1000), maxPoints: '5000' })).toEqual({
      from: T,
      to: T + 1000,
      maxPoints: 5000,
    });
    expect(ReadingsQuerySchema.safeParse({ from: String(T), to: String(T) }).success).toBe(false);
    expect(ReadingsQuerySchema.safeParse({ maxPoints: '5001' }).success).toBe(false);
  });
});

describe('Journal', () => {
  const dirs: string[] = [];
  const tmp = () => {
    const d = fs.mkdtempSync(path.join(os.tmpdir(), 'coatrail-journal-'));
    dirs.push(d);
    return d;
  };
  afterEach(() => {
    for (const d of dirs.splice(0)) fs.rmSync(d, { recursive: true, force: true });
  });

  it('acknowledges only after the write is synced, and replays in order in chunks, resuming from its position', async () => {
    const base = tmp();
    const j = new Journal(base, 'w1');
    const acked: number[] = [];
    for (let i = 0; i < 10; i++) j.append({ topic: 't', payload: String(i), rx: 1000 + i }, () => acked.push(i));
    expect(acked).toEqual([]);
    await j.sync();
    expect(acked).toEqual([0, 1, 2, 3, 4, 5, 6, 7, 8, 9]);
    await j.rotate();
    const [seg] = j.closedSegments();
    expect(seg).toBeDefined();

    const first = await j.read(seg!, 4);
    expect(first.records.map((r) => r.payload)).toEqual(['0', '1', '2', '3']);
    expect(first.eof).toBe(false);
    await j.advance(seg!, first.start, first.end, first.eof);

    // A new process (crash after the first chunk) resumes after it.
    const again = new Journal(base, 'w1');
    expect(again.closedSegments()).toEqual([seg]);
    const rest = await again.read(seg!, 100);
    expect(rest.records.map((r) => r.payload)).toEqual(['4', '5', '6', '7', '8', '9']);
    expect(rest.eof).toBe(true);
    await again.advance(seg!, rest.start, rest.end, rest.eof);
    expect(again.closedSegments()).toEqual([]);
    expect(fs.existsSync(seg!)).toBe(false);
    expect(again.bytes).toBe(0);
  });

  it('skips a torn last line (never acknowledged, so the broker redelivers it)', async () => {
    const base = tmp();
    const j = new Journal(base, 'w2');
    j.append({ topic: 't', payload: 'a', rx: 1 }, null);
    j.append({ topic: 't', payload: 'b', rx: 2 }, null);
    await j.rotate();
    const [seg] = j.closedSegments();
    fs.appendFileSync(seg!, '{"topic":"t","payl');
    const r = await new Journal(base, 'w2').read(seg!, 100);
    expect(r.records.map((x) => x.payload)).toEqual(['a', 'b']);
    expect(r.eof).toBe(true);
  });

  it('orders segments from several runs by the arrival time of their first record', async () => {
    const base = tmp();
    const j = new Journal(base, 'w3');
    j.append({ topic: 't', payload: 'late', rx: 5000 }, null);
    await j.rotate();
    j.append({ topic: 't', payload: 'early', rx: 100 }, null);
    await j.rotate();
    const order = await Promise.all(
      new Journal(base, 'w3').closedSegments().map(async (s) => (await j.read(s, 10)).records[0]!.payload),
    );
    expect(order).toEqual(['early', 'late']);
  });
});
