/**
 * The embedded broker's session store (ingest/broker-persistence.ts): the same behaviour as
 * aedes-persistence's memory store for a persistent session's outgoing queue — queue order
 * kept for redelivery, packet ids assigned on delivery, cleared by PUBACK — with map look-ups.
 */
import { describe, expect, it } from 'vitest';
import { memoryPersistence } from '../../ingest/broker-persistence.ts';

type P = {
  outgoingEnqueueCombi(subs: { clientId: string }[], packet: object): Promise<void>;
  outgoingUpdate(client: { id: string }, packet: object): Promise<void>;
  outgoingClearMessageId(client: { id: string }, packet: object): Promise<{ payload?: unknown } | undefined>;
  outgoingStream(client: { id: string }): AsyncIterable<{ payload: unknown; messageId?: number }>;
};

const pkt = (n: number, extra: object = {}) => ({
  cmd: 'publish',
  topic: 't',
  payload: `m${n}`,
  qos: 1,
  brokerId: 'b1',
  brokerCounter: n,
  ...extra,
});

async function drain(p: P, id: string) {
  const out: { payload: unknown; messageId?: number }[] = [];
  for await (const x of p.outgoingStream({ id })) out.push(x);
  return out;
}

describe('memoryPersistence (outgoing queue)', () => {
  it('keeps queue order, assigns ids on delivery, clears by PUBACK, and isolates sessions', async () => {
    const p = memoryPersistence() as P;
    for (let n = 1; n <= 5; n++) await p.outgoingEnqueueCombi([{ clientId: 'w' }, { clientId: 'x' }], pkt(n));
    for (let n = 1; n <= 5; n++) await p.outgoingUpdate({ id: 'w' }, pkt(n, { messageId: 100 + n }));
    expect((await p.outgoingClearMessageId({ id: 'w' }, { messageId: 102 }))?.payload).toBe('m2');
    expect((await p.outgoingClearMessageId({ id: 'w' }, { messageId: 104 }))?.payload).toBe('m4');
    expect(await p.outgoingClearMessageId({ id: 'w' }, { messageId: 104 })).toBeUndefined();
    // What a reconnecting session gets redelivered: the rest, in the order they were queued.
    expect((await drain(p, 'w')).map((x) => [x.payload, x.messageId])).toEqual([
      ['m1', 101],
      ['m3', 103],
      ['m5', 105],
    ]);
    expect((await drain(p, 'x')).map((x) => x.payload)).toEqual(['m1', 'm2', 'm3', 'm4', 'm5']);
    await expect(p.outgoingUpdate({ id: 'w' }, pkt(99, { messageId: 7 }))).rejects.toThrow('no such packet');
  });

  it('lets a packet id be reused once its delivery was acknowledged', async () => {
    const p = memoryPersistence() as P;
    await p.outgoingEnqueueCombi([{ clientId: 'w' }], pkt(1));
    await p.outgoingUpdate({ id: 'w' }, pkt(1, { messageId: 1 }));
    await p.outgoingClearMessageId({ id: 'w' }, { messageId: 1 });
    await p.outgoingEnqueueCombi([{ clientId: 'w' }], pkt(2));
    await p.outgoingUpdate({ id: 'w' }, pkt(2, { messageId: 1 }));
    expect((await p.outgoingClearMessageId({ id: 'w' }, { messageId: 1 }))?.payload).toBe('m2');
    expect(await drain(p, 'w')).toEqual([]);
  });

  it('swaps in a QoS 2 pubrel for its publish, as the stock store does', async () => {
    const p = memoryPersistence() as P;
    await p.outgoingEnqueueCombi([{ clientId: 'w' }], pkt(1, { qos: 2 }));
    await p.outgoingUpdate({ id: 'w' }, pkt(1, { qos: 2, messageId: 9 }));
    await p.outgoingUpdate({ id: 'w' }, { cmd: 'pubrel', messageId: 9 });
    const [only] = await drain(p, 'w');
    expect(only).toMatchObject({ cmd: 'pubrel', messageId: 9 });
  });
});
