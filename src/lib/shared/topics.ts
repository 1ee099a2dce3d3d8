/**
 * The topic scheme (pure parsing). Version 1:
 *
 *   coatrail/v1/{site}/{device}/{asset}/{channel}   one sample or a batch (JSON)
 *   coatrail/v1/{site}/{device}/status              "online" / "offline" (retained; last will)
 *   coatrail/v1/_live/...                           events the worker publishes for live views
 *
 * Every segment is a lower-case code ([a-z0-9-]). A device may publish only under its own
 * prefix `coatrail/v1/{site}/{device}`.
 */
export const TOPIC_ROOT = 'coatrail/v1';
export const LIVE_ROOT = `${TOPIC_ROOT}/_live`;

/** The ingest worker's QoS 1 subscriptions (a `$share/<group>/` prefix behind an external broker with several workers). */
export function ingestSubscriptionTopics(sharedGroup?: string): string[] {
  const topics = [`${TOPIC_ROOT}/+/+/+/+`, `${TOPIC_ROOT}/+/+/status`];
  return sharedGroup ? topics.map((t) => `$share/${sharedGroup}/${t}`) : topics;
}

/** The ingest worker's MQTT client id: stable per worker id, so a restarted worker resumes its session. */
export const ingestClientId = (workerId: string) => `coatrail-ingest-${workerId}`;
const SEG = /^[a-z0-9][a-z0-9-]{0,63}$/;

export type ParsedTopic =
  | { kind: 'sample'; site: string; device: string; asset: string; channel: string }
  | { kind: 'status'; site: string; device: string }
  | { kind: 'invalid'; reason: string };

export function deviceTopicPrefix(siteCode: string, deviceUsername: string): string {
  return `${TOPIC_ROOT}/${siteCode}/${deviceUsername}`;
}

export function channelTopic(prefix: string, assetCode: string, channelKey: string): string {
  return `${prefix}/${assetCode}/${channelKey}`;
}

export function parseTopic(topic: string): ParsedTopic {
  const parts = topic.split('/');
  if (parts[0] !== 'coatrail' || parts[1] !== 'v1') return { kind: 'invalid', reason: 'topic is not under coatrail/v1/' };
  const rest = parts.slice(2);
  if (rest.length === 3 && rest[2] === 'status' && rest.slice(0, 2).every((s) => SEG.test(s))) {
    return { kind: 'status', site: rest[0]!, device: rest[1]! };
  }
  if (rest.length !== 4) return { kind: 'invalid', reason: 'expected coatrail/v1/{site}/{device}/{asset}/{channel}' };
  if (!rest.every((s) => SEG.test(s))) return { kind: 'invalid', reason: 'topic segments must be lower-case codes [a-z0-9-]' };
  return { kind: 'sample', site: rest[0]!, device: rest[1]!, asset: rest[2]!, channel: rest[3]! };
}

/** Whether `topic` lies under `prefix/` (MQTT level-wise, no wildcards in topic). */
export function isUnder(topic: string, prefix: string): boolean {
  return topic.startsWith(prefix + '/') && !/[+#]/.test(topic);
}
