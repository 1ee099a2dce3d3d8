/**
 * Acknowledging after commit (ingest/ack-after-commit.ts) against a real aedes broker and a
 * real MQTT.js client on loopback: a QoS 1 delivery is acknowledged only when the worker says
 * so (never by the client's own packet pump), a PUBACK is the four bytes of MQTT 3.1.1 §3.4,
 * and an acknowledgement for a connection that has since closed is not written — the broker
 * redelivers that message to the persistent session instead (MQTT 3.1.1 §4.4).
 */
import net from 'node:net';
import { Aedes } from 'aedes';
import mqtt, { type MqttClient } from 'mqtt';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { AckAfterCommit } from '../../ingest/ack-after-commit.ts';
import { waitFor } from '../support/ingest-harness.ts';

let broker: Aedes;
let server: net.Server;
let port: number;
const acked: number[] = [];

beforeAll(async () => {
  broker = await Aedes.createBroker();
  broker.on('ack', (packet) => {
    if (packet && 'messageId' in packet && typeof packet.messageId === 'number') acked.push(packet.messageId);
  });
  server = net.createServer(broker.handle);
  await new Promise<void>((r) => server.listen(0, '127.0.0.1', r));
  port = (server.address() as net.AddressInfo).port;
});

afterAll(async () => {
  await new Promise<void>((r) => broker.close(() => r()));
  await new Promise<void>((r) => server.close(() => r()));
});

describe('AckAfterCommit', () => {
  it('acknowledges a delivery only when told, and not for an earlier connection', async () => {
    const worker: MqttClient = mqtt.connect(`mqtt://127.0.0.1:${port}`, {
      clientId: `ack-test-${process.pid}`,
      clean: false,
      protocolVersion: 4,
      reconnectPeriod: 100,
    });
    const acks = new AckAfterCommit(worker);
    const got: { mid: number; gen: number; dup: boolean; payload: string }[] = [];
    worker.on('message', (_t, buf, packet) =>
      got.push({ mid: AckAfterCommit.packetId(packet), gen: acks.generation, dup: !!packet.dup, payload: buf.toString() }),
    );
    const publisher = await mqtt.connectAsync(`mqtt://127.0.0.1:${port}`, { protocolVersion: 4 });
    try {
      await waitFor(async () => worker.connected, 5000, 'the worker to connect');
      await worker.subscribeAsync('ack/test', { qos: 1 });
      await publisher.publishAsync('ack/test', 'one', { qos: 1 });
      await waitFor(async () => got.length === 1, 5000, 'the first delivery');
      // A round trip after the delivery: a PUBACK from the pump would have reached the broker before this SUBACK.
      await worker.subscribeAsync('ack/other', { qos: 1 });
      expect(acked).toEqual([]);
      expect(acks.acknowledge(got)).toBe(1);
      await waitFor(async () => acked.includes(got[0]!.mid), 5000, 'the PUBACK written after commit');

      // A second message, then the connection drops before it is acknowledged.
      await publisher.publishAsync('ack/test', 'two', { qos: 1 });
      await waitFor(async () => got.length === 2, 5000, 'the second delivery');
      const stale = got[1]!;
      const gen = acks.generation;
      worker.stream.destroy();
      await waitFor(async () => acks.generation > gen && worker.connected, 5000, 'the worker to reconnect');
      expect(acks.acknowledge([stale])).toBe(0); // its packet id belonged to the old connection
      const redelivered = await waitFor(async () => got.find((g) => g.payload === 'two' && g.gen > gen), 5000, 'the redelivery');
      expect(acks.acknowledge([redelivered])).toBe(1);
      await waitFor(async () => acked.includes(redelivered.mid), 5000, 'the redelivery acknowledged');
      expect(acks.acknowledge([{ mid: -1, gen: acks.generation }])).toBe(0); // QoS 0: nothing to acknowledge
    } finally {
      await publisher.endAsync();
      await worker.endAsync();
    }
  });
});
