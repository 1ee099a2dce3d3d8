/**
 * Acknowledging after commit. MQTT.js sends the PUBACK of an incoming QoS 1 message from
 * inside its packet pump, and holds the pump (no further packet is read) until its
 * `handleMessage` callback returns; its `customHandleAcks` option has the same shape and is
 * honoured only for MQTT 5 connections, which aedes does not speak. Holding either would
 * allow one message per commit. So the worker takes the PUBACK out of the pump (the client's
 * `_sendPacket` drops pubacks) and writes it itself after the commit, on the same connection;
 * an acknowledgement whose connection has since closed is dropped, and the broker redelivers
 * that message (stored once, refused as a duplicate the second time). Re-check this when
 * moving the pinned `mqtt` version: the constructor throws when the internals are missing.
 */
import type { MqttClient } from 'mqtt';

interface MqttInternals {
  _sendPacket(packet: { cmd: string; messageId?: number }, cb?: (err?: Error) => void, ...rest: unknown[]): void;
  _writePacket(packet: { cmd: string; messageId?: number }, cb?: () => void): void;
}

/** A message to acknowledge: its packet id (-1: nothing to acknowledge) on connection `gen`. */
export interface Acknowledgeable {
  mid: number;
  gen: number;
}

export class AckAfterCommit {
  private gen = 0;
  private readonly internals: MqttInternals;

  constructor(private readonly client: MqttClient) {
    const internals = client as unknown as MqttInternals;
    if (typeof internals._sendPacket !== 'function' || typeof internals._writePacket !== 'function') {
      throw new Error('This MQTT.js version lacks _sendPacket/_writePacket; the worker cannot acknowledge after commit.');
    }
    this.internals = internals;
    const sendPacket = internals._sendPacket.bind(client);
    internals._sendPacket = (packet, cb, ...rest) => {
      if (packet.cmd === 'puback') {
        cb?.(); // written by acknowledge() after commit
        return;
      }
      sendPacket(packet, cb, ...rest);
    };
    // Packet ids belong to one connection: a new connection makes every older acknowledgement void.
    client.on('close', () => this.gen++);
  }

  /** The current connection's number, to record with each arriving message. */
  get generation(): number {
    return this.gen;
  }

  /** The packet id to acknowledge for a message (-1 for QoS 0). */
  static packetId(packet: { qos: number; messageId?: number | undefined }): number {
    return packet.qos > 0 && packet.messageId !== undefined ? packet.messageId : -1;
  }

  /**
   * Write the PUBACKs of committed messages in one socket write. A PUBACK is four bytes (MQTT
   * 3.1.1 §3.4: fixed header 0x40, remaining length 2, the packet id, big-endian); whole
   * packets written in one call cannot interleave with the client's own writes. Returns how
   * many were written (messages of an earlier connection are left to the broker's redelivery).
   */
  acknowledge(entries: readonly Acknowledgeable[]): number {
    if (!this.client.connected || !this.client.stream) return 0;
    let n = 0;
    for (const e of entries) if (e.mid >= 0 && e.gen === this.gen) n++;
    if (n === 0) return 0;
    const buf = Buffer.allocUnsafe(4 * n);
    let o = 0;
    for (const e of entries) {
      if (e.mid < 0 || e.gen !== this.gen) continue;
      buf[o] = 0x40;
      buf[o + 1] = 2;
      buf.writeUInt16BE(e.mid, o + 2);
      o += 4;
    }
    this.client.stream.write(buf);
    return n;
  }

  /** An acknowledgement to write later (once the journal has the message on disk), or null for QoS 0. */
  later(packet: { qos: number; messageId?: number | undefined }): (() => void) | null {
    const id = packet.messageId;
    if (packet.qos === 0 || id === undefined) return null;
    const gen = this.gen;
    return () => {
      if (gen === this.gen && this.client.connected) this.internals._writePacket({ cmd: 'puback', messageId: id });
    };
  }
}
