/**
 * Live readings (ingest/live-publisher.ts): one message per interval with the newest
 * committed value of each channel; a value older than one already published is never sent
 * (a redelivered or replayed reading must not move a live view backwards).
 */
import { describe, expect, it } from 'vitest';
import { LivePublisher } from '../../ingest/live-publisher.ts';

describe('LivePublisher', () => {
  it('publishes the newest value per channel, once, and never an older one afterwards', () => {
    const sent: { kind: string; payload: unknown }[] = [];
    const live = new LivePublisher((kind, payload) => sent.push({ kind, payload }));
    expect(live.flush()).toEqual([]);
    expect(sent).toHaveLength(0); // nothing to say: nothing published
    live.committed([
      { channelId: 1, tMs: 1000, value: 1, quality: 0 },
      { channelId: 1, tMs: 3000, value: 3, quality: 0 },
      { channelId: 1, tMs: 2000, value: 2, quality: 0 },
      { channelId: 2, tMs: 1500, value: 15, quality: 0 },
    ]);
    expect(live.flush()).toEqual([
      { channelId: 1, tMs: 3000, value: 3 },
      { channelId: 2, tMs: 1500, value: 15 },
    ]);
    expect(sent).toEqual([{ kind: 'readings', payload: sent[0]!.payload }]);
    expect(live.flush()).toEqual([]); // sent once
    live.committed([
      { channelId: 1, tMs: 2500, value: 9, quality: 0 }, // older than what was published
      { channelId: 2, tMs: 1600, value: 16, quality: 0 },
    ]);
    expect(live.flush()).toEqual([{ channelId: 2, tMs: 1600, value: 16 }]);
    expect(sent).toHaveLength(2);
  });
});
