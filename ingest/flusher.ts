/**
 * Flush and commit: turn a run of entries into one batch and store it in one transaction.
 * Topics resolve through the cached channel map; topics the cache misses are looked up first
 * (the batch is held for that one look-up), so a reading of a device or channel created a
 * moment ago is stored, not refused. Then each message is checked (handlers/readings.ts,
 * handlers/status.ts) and the batch committed (store.ts).
 */
import type { Sequelize } from 'sequelize';
import { Batch, storedPayload } from './batch.ts';
import type { ChannelMap } from './channel-map.ts';
import type { Entry } from './arrivals.ts';
import { parseTelemetry, processReadings } from './handlers/readings.ts';
import { processStatus } from './handlers/status.ts';
import { commitBatch, type CommitResult } from './store.ts';
import { deviceTopicPrefix } from '../src/lib/shared/topics.ts';

export interface FlusherOptions {
  sequelize: Sequelize;
  map: ChannelMap;
  futureToleranceMs: number;
  /** After each successful reload of the map (e.g. resolve the unknown-channel list). */
  afterReload?: () => Promise<void>;
  log?: (line: string) => void;
}

/** Topics of `entries` the cache cannot answer for yet (unknown, and not looked up since the message arrived). */
export function unsettledTopics(map: ChannelMap, entries: readonly Entry[]): string[] {
  const out = new Set<string>();
  for (const e of entries) {
    const r = e.route;
    if (r.kind === 'invalid' || out.has(e.topic)) continue;
    if (r.kind === 'sample' && map.channel(e.topic)) continue; // the hot path: a known channel
    const known = map.device(deviceTopicPrefix(r.site, r.device)) && (r.kind === 'status' || map.channel(e.topic));
    if (!known && !map.settled(e.topic, e.rxMs)) out.add(e.topic);
  }
  return [...out];
}

export class Flusher {
  private readonly log: (line: string) => void;

  constructor(private readonly opts: FlusherOptions) {
    this.log = opts.log ?? (() => {});
  }

  /** Load the channel map when it is not loaded or the safety-net reload is due (a failed reload keeps the old map). */
  async ensureMap(): Promise<void> {
    const { map } = this.opts;
    if (map.loaded && !map.shouldRefresh(Date.now())) return;
    try {
      await map.refresh();
      await this.opts.afterReload?.();
    } catch (e) {
      if (!map.loaded) throw e;
      this.log(`channel map reload failed, keeping the cached one: ${(e as Error).message}`);
    }
  }

  /** Resolve, check and commit one run of entries. Throws when the database fails (nothing is committed then). */
  async store(entries: readonly Entry[]): Promise<CommitResult> {
    const { map } = this.opts;
    await this.ensureMap();
    const unsettled = unsettledTopics(map, entries);
    if (unsettled.length) await map.lookUp(unsettled);
    return commitBatch(this.opts.sequelize, this.build(entries));
  }

  /** The batch for `entries` against the map as it is now (pure but for the map). */
  build(entries: readonly Entry[]): Batch {
    const { map, futureToleranceMs } = this.opts;
    const batch = new Batch();
    for (const e of entries) {
      try {
        if (e.route.kind === 'sample') {
          processReadings(map, batch, e, e.route, e.parsed ?? parseTelemetry(e.payload), { futureToleranceMs });
        } else if (e.route.kind === 'status') {
          processStatus(map, batch, e, e.route);
        } else {
          batch.rejections.push({
            rxMs: e.rxMs,
            topic: e.topic,
            deviceUsername: null,
            channelId: null,
            reason: 'topic',
            detail: e.route.reason,
            payload: storedPayload(e.payload),
          });
        }
      } catch (err) {
        batch.rejections.push({
          rxMs: e.rxMs,
          topic: e.topic,
          deviceUsername: null,
          channelId: null,
          reason: 'schema',
          detail: `could not be processed: ${(err as Error).message}`,
          payload: storedPayload(e.payload),
        });
      }
    }
    return batch;
  }
}
