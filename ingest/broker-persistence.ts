/**
 * The embedded broker's in-memory persistence: aedes-persistence's memory store, with the
 * outgoing queue of each persistent session kept in an insertion-ordered Map instead of an
 * array.
 *
 * Why: the ingest worker keeps a persistent session and acknowledges each message only after
 * its batch has committed, so hundreds to thousands of deliveries are unacknowledged at any
 * time. The stock memory store finds the queued copy of every delivery (`outgoingUpdate`) and
 * of every acknowledgement (`outgoingClearMessageId`) by scanning that array from the start,
 * which costs the broker O(unacknowledged) per message. Here both are map look-ups, and the
 * behaviour is otherwise the same (order of redelivery, packet ids, the QoS 2 pubrel swap).
 * Sessions still live in memory only: README "What a failure can lose" says what a broker
 * restart loses.
 */
import { Readable } from 'node:stream';
import memory from 'aedes-persistence';

interface QueuedPacket {
  brokerId?: string;
  brokerCounter?: number;
  messageId?: number;
  [k: string]: unknown;
}

interface SessionQueue {
  /** Queued packets by `brokerId|brokerCounter`, in the order they were queued. */
  byKey: Map<string, QueuedPacket>;
  /** Packet id of a delivery → its key. */
  byMid: Map<number, string>;
}

const keyOf = (p: QueuedPacket) => `${p.brokerId}|${p.brokerCounter}`;

export function memoryPersistence(): unknown {
  const p = memory() as unknown as Record<string, unknown>;
  const Packet = (memory as unknown as { Packet: new (p: unknown) => QueuedPacket }).Packet;
  const sessions = new Map<string, SessionQueue>();
  const queueOf = (clientId: string): SessionQueue => {
    let q = sessions.get(clientId);
    if (!q) sessions.set(clientId, (q = { byKey: new Map(), byMid: new Map() }));
    return q;
  };
  const enqueue = (sub: { clientId: string }, packet: QueuedPacket) => {
    const copy = new Packet(packet);
    queueOf(sub.clientId).byKey.set(keyOf(copy), copy);
  };

  p['outgoingEnqueue'] = async (sub: { clientId: string }, packet: QueuedPacket) => enqueue(sub, packet);
  p['outgoingEnqueueCombi'] = async (subs: { clientId: string }[], packet: QueuedPacket) => {
    for (const sub of subs) enqueue(sub, packet);
  };
  p['outgoingUpdate'] = async (client: { id: string }, packet: QueuedPacket) => {
    const q = queueOf(client.id);
    const key = keyOf(packet);
    const queued = q.byKey.get(key);
    if (queued) {
      // The delivery got its packet id.
      if (queued.messageId !== undefined && q.byMid.get(queued.messageId) === key) q.byMid.delete(queued.messageId);
      queued.messageId = packet.messageId;
      if (packet.messageId !== undefined) q.byMid.set(packet.messageId, key);
      return;
    }
    // A packet from another broker instance, or a QoS 2 pubrel, takes the place of the queued one with its id.
    const other = packet.messageId !== undefined ? q.byMid.get(packet.messageId) : undefined;
    const current = other !== undefined ? q.byKey.get(other) : undefined;
    if (other !== undefined && current && current.brokerId !== packet.brokerId) {
      q.byKey.set(other, packet);
      return;
    }
    throw new Error('no such packet');
  };
  p['outgoingClearMessageId'] = async (client: { id: string }, packet: QueuedPacket) => {
    const q = sessions.get(client.id);
    if (!q || packet.messageId === undefined) return undefined;
    const key = q.byMid.get(packet.messageId);
    if (key === undefined) return undefined;
    q.byMid.delete(packet.messageId);
    const queued = q.byKey.get(key);
    q.byKey.delete(key);
    if (q.byKey.size === 0) sessions.delete(client.id);
    return queued;
  };
  p['outgoingStream'] = (client: { id: string }) => Readable.from([...(sessions.get(client.id)?.byKey.values() ?? [])]);
  return p;
}
