/**
 * The web server's one MQTT connection (service account `svc-web`): tells /api/health
 * whether the broker is reachable and fans live plant messages out to server-sent events.
 */
import { EventEmitter } from 'node:events';
import mqtt, { type MqttClient } from 'mqtt';
import { config } from './config.ts';

export interface LiveMessage {
  topic: string;
  payload: unknown;
}

class BrokerLink extends EventEmitter {
  client: MqttClient | null = null;
  connected = false;
  lastError: string | null = null;

  start(): void {
    if (this.client) return;
    this.setMaxListeners(500);
    this.client = mqtt.connect(config.mqttUrl, {
      username: 'svc-web',
      password: config.mqttServicePassword,
      clientId: `coatrail-web-${process.pid}`,
      protocolVersion: 4,
      reconnectPeriod: 1000,
      connectTimeout: 5000,
      clean: true,
    });
    this.client.on('connect', () => {
      this.connected = true;
      this.lastError = null;
      // Live events the ingest worker publishes after it commits (readings, alarms, points).
      this.client?.subscribe('coatrail/v1/_live/#', { qos: 0 });
    });
    this.client.on('close', () => (this.connected = false));
    this.client.on('error', (e) => (this.lastError = e.message));
    this.client.on('message', (topic, buf) => {
      let payload: unknown;
      try {
        payload = JSON.parse(buf.toString('utf8'));
      } catch {
        return;
      }
      this.emit('live', { topic, payload } satisfies LiveMessage);
    });
  }
}

let link: BrokerLink | null = null;

export function brokerLink(): BrokerLink {
  if (!link) {
    link = new BrokerLink();
    link.start();
  }
  return link;
}

/** Publish a live event from the web server (e.g. an acknowledgement) to every open stream, via the broker. */
export function publishLive(kind: string, payload: unknown): void {
  brokerLink().client?.publish(`coatrail/v1/_live/${kind}`, JSON.stringify(payload), { qos: 0 });
}
