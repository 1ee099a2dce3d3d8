/**
 * The device status message kind: `coatrail/v1/{site}/{device}/status` carries `online` or
 * `offline` (a gateway publishes `online` retained when it connects and sets `offline` as its
 * last will). Plain text or JSON (`"offline"` or `{"status": "offline"}`).
 */
import { DeviceStatusSchema } from '../../src/lib/shared/telemetry.ts';
import type { ChannelMap } from '../channel-map.ts';
import { deviceTopicPrefix, type ParsedTopic } from '../../src/lib/shared/topics.ts';
import { storedPayload, type Batch } from '../batch.ts';

function statusOf(text: string): 'online' | 'offline' | null {
  let v: unknown = text.trim();
  try {
    v = JSON.parse(text);
  } catch {
    /* plain text */
  }
  if (v && typeof v === 'object' && 'status' in v) v = (v as { status: unknown }).status;
  const r = DeviceStatusSchema.safeParse(typeof v === 'string' ? v.trim().toLowerCase() : v);
  return r.success ? r.data : null;
}

export function processStatus(
  map: ChannelMap,
  batch: Batch,
  msg: { topic: string; payload: string; rxMs: number },
  topic: Extract<ParsedTopic, { kind: 'status' }>,
): void {
  const prefix = deviceTopicPrefix(topic.site, topic.device);
  const device = map.device(prefix);
  const reject = (reason: 'unknown-device' | 'schema', detail: string): void => {
    batch.rejections.push({
      rxMs: msg.rxMs,
      topic: msg.topic,
      deviceUsername: device?.username ?? topic.device,
      channelId: null,
      reason,
      detail,
      payload: storedPayload(msg.payload),
    });
  };
  if (msg.payload.trim() === '') return; // clearing a retained status: nothing to record
  if (!device) return reject('unknown-device', `no device publishes under ${prefix}`);
  const status = statusOf(msg.payload);
  if (!status) return reject('schema', 'a status message is "online" or "offline"');
  batch.status.push({ deviceId: device.id, online: status === 'online', rxMs: msg.rxMs, topic: msg.topic });
}
