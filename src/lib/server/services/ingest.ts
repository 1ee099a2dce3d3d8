/** What the ingest worker refused, and topics of known devices that no channel matched (engineer review). */
import { pgPool } from '../db.ts';
import type { RejectionRow, RejectionsQuery, UnknownChannelRow } from '../../shared/telemetry.ts';

export async function listRejections(q: RejectionsQuery): Promise<{ items: RejectionRow[]; nextBefore: number | null }> {
  const { rows } = await pgPool().query<RejectionRow>(
    `select id::float8 as id, (extract(epoch from received_at) * 1000)::float8 as "receivedAtMs", topic,
            device_username as "deviceUsername", channel_id as "channelId", reason, detail, payload
       from ingest_rejections
      where ($1::text is null or reason = $1) and ($2::bigint is null or id < $2)
      order by id desc limit $3`,
    [q.reason ?? null, q.before ?? null, q.limit],
  );
  const last = rows[rows.length - 1];
  return { items: rows, nextBefore: rows.length === q.limit && last ? last.id : null };
}

/** Counts of refused messages per reason over the last `hours`. */
export async function rejectionCounts(hours = 24): Promise<Record<string, number>> {
  const { rows } = await pgPool().query<{ reason: string; n: number }>(
    `select reason, count(*)::int as n from ingest_rejections where received_at > now() - make_interval(hours => $1) group by reason`,
    [hours],
  );
  return Object.fromEntries(rows.map((r) => [r.reason, r.n]));
}

export async function listUnknownChannels(includeResolved: boolean): Promise<UnknownChannelRow[]> {
  const { rows } = await pgPool().query<UnknownChannelRow>(
    `select u.id, u.device_id as "deviceId", d.username as "deviceUsername", u.topic, u.asset_code as "assetCode",
            u.channel_key as "channelKey", (extract(epoch from u.first_seen_at) * 1000)::float8 as "firstSeenMs",
            (extract(epoch from u.last_seen_at) * 1000)::float8 as "lastSeenMs", u.messages, u.sample_payload as "samplePayload",
            (extract(epoch from u.resolved_at) * 1000)::float8 as "resolvedAtMs", u.resolution
       from unknown_channels u join devices d on d.id = u.device_id
      where $1 or u.resolved_at is null
      order by u.resolved_at nulls first, u.last_seen_at desc
      limit 1000`,
    [includeResolved],
  );
  return rows;
}

export interface WorkerStatusRow {
  workerId: string;
  heartbeatAgeMs: number;
  lastCommitMs: number | null;
  lagMs: number | null;
  buffered: number;
  journalBytes: number;
  committed: number;
  rejected: number;
}

/** Each ingest worker's last heartbeat (workers silent for a day are left out). */
export async function workerStatus(): Promise<WorkerStatusRow[]> {
  const { rows } = await pgPool().query<WorkerStatusRow>(
    `select worker_id as "workerId", (extract(epoch from now() - heartbeat_at) * 1000)::float8 as "heartbeatAgeMs",
            (extract(epoch from last_commit_at) * 1000)::float8 as "lastCommitMs", lag_ms as "lagMs", buffered,
            journal_bytes::float8 as "journalBytes", committed::float8 as committed, rejected::float8 as rejected
       from ingest_status where heartbeat_at > now() - interval '1 day' order by worker_id`,
  );
  return rows;
}
