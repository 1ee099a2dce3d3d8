/** What the ingest worker refused, and topics of known devices that no channel matched (engineer review). */
import { Op, col, fn, literal } from 'sequelize';
import { Device, IngestRejection, IngestStatus, UnknownChannel } from '../../../../db/models/index.ts';
import { db } from '../db.ts';
import type { RejectionReason, RejectionRow, RejectionsQuery, UnknownChannelRow } from '../../shared/telemetry.ts';

const ms = (d: Date | null): number | null => (d ? d.getTime() : null);

export async function listRejections(q: RejectionsQuery): Promise<{ items: RejectionRow[]; nextBefore: number | null }> {
  db();
  const rows = await IngestRejection.findAll({
    where: {
      ...(q.reason ? { reason: q.reason } : {}),
      ...(q.before !== undefined && q.before !== null ? { id: { [Op.lt]: q.before } } : {}),
    },
    order: [['id', 'DESC']],
    limit: q.limit,
  });
  const items: RejectionRow[] = rows.map((r) => ({
    id: Number(r.id),
    receivedAtMs: r.receivedAt.getTime(),
    topic: r.topic,
    deviceUsername: r.deviceUsername,
    channelId: r.channelId,
    reason: r.reason as RejectionReason,
    detail: r.detail,
    payload: r.payload,
  }));
  const last = items[items.length - 1];
  return { items, nextBefore: items.length === q.limit && last ? last.id : null };
}

/** Counts of refused messages per reason over the last `hours`. */
export async function rejectionCounts(hours = 24): Promise<Record<string, number>> {
  db();
  const rows = (await IngestRejection.findAll({
    attributes: ['reason', [fn('count', col('id')), 'n']],
    where: { receivedAt: { [Op.gt]: new Date(Date.now() - hours * 3_600_000) } },
    group: ['reason'],
    raw: true,
  })) as unknown as { reason: string; n: number | string }[];
  return Object.fromEntries(rows.map((r) => [r.reason, Number(r.n)]));
}

export async function listUnknownChannels(includeResolved: boolean): Promise<UnknownChannelRow[]> {
  db();
  const rows = await UnknownChannel.findAll({
    ...(includeResolved ? {} : { where: { resolvedAt: null } }),
    include: [{ model: Device, attributes: ['username'], required: true }],
    order: [
      ['resolvedAt', 'ASC NULLS FIRST'],
      ['lastSeenAt', 'DESC'],
    ],
    limit: 1000,
  });
  return rows.map((u) => ({
    id: u.id,
    deviceId: u.deviceId,
    deviceUsername: (u as UnknownChannel & { Device: Device }).Device.username,
    topic: u.topic,
    assetCode: u.assetCode,
    channelKey: u.channelKey,
    firstSeenMs: u.firstSeenAt.getTime(),
    lastSeenMs: u.lastSeenAt.getTime(),
    messages: u.messages,
    samplePayload: u.samplePayload,
    resolvedAtMs: ms(u.resolvedAt),
    resolution: u.resolution,
  }));
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

/** Each ingest worker's last heartbeat (workers silent for a day are left out); ages by the database's clock. */
export async function workerStatus(): Promise<WorkerStatusRow[]> {
  db();
  const rows = (await IngestStatus.findAll({
    attributes: {
      include: [[literal('(extract(epoch from now() - heartbeat_at) * 1000)::float8'), 'heartbeatAgeMs']],
    },
    where: { heartbeatAt: { [Op.gt]: literal("now() - interval '1 day'") } },
    order: [['workerId', 'ASC']],
  })) as (IngestStatus & { get(key: 'heartbeatAgeMs'): number })[];
  return rows.map((r) => ({
    workerId: r.workerId,
    heartbeatAgeMs: Number(r.get('heartbeatAgeMs')),
    lastCommitMs: ms(r.lastCommitAt),
    lagMs: r.lagMs,
    buffered: r.buffered,
    journalBytes: Number(r.journalBytes),
    committed: Number(r.committed),
    rejected: Number(r.rejected),
  }));
}
