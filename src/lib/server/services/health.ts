/** What `/api/health` reports: database, broker and ingest lag. */
import { readSupervisorStatus, type ProcessStatus } from '../../core/supervision-status.ts';
import { brokerLink } from '../broker-link.ts';
import { QueryTypes } from 'sequelize';
import { db as database } from '../db.ts';

export interface HealthReport {
  status: 'ok' | 'degraded';
  time: string;
  db: { ok: boolean; latencyMs?: number; error?: string };
  broker: { ok: boolean; error?: string };
  ingest: {
    ok: boolean;
    workers: number;
    lagMs: number | null;
    heartbeatAgeMs: number | null;
    buffered: number;
    journalBytes: number;
    error?: string;
  };
  /** Present under `npm start`: each supervised process, its state and restarts. */
  supervisor?: { processes: ProcessStatus[] };
  failing: string[];
}

/** A worker that has not written a heartbeat for this long counts as down. */
const HEARTBEAT_STALE_MS = 15_000;

export async function healthReport(): Promise<HealthReport> {
  const failing: string[] = [];
  const t0 = performance.now();
  const db: HealthReport['db'] = { ok: false };
  const ingest: HealthReport['ingest'] = {
    ok: false,
    workers: 0,
    lagMs: null,
    heartbeatAgeMs: null,
    buffered: 0,
    journalBytes: 0,
  };
  try {
    // ingest_status is the worker's heartbeat record: one aggregate over it.
    const rows = await database().query<{
      n: number;
      lag: number | null;
      age: number | null;
      buffered: number;
      journal: number;
    }>(
      `
      select count(*)::int as n,
             max(lag_ms) as lag,
             min(extract(epoch from now() - heartbeat_at) * 1000)::float8 as age,
             coalesce(sum(buffered), 0)::int as buffered,
             coalesce(sum(journal_bytes), 0)::float8 as journal
        from ingest_status
       where heartbeat_at > now() - interval '1 hour'`,
      { type: QueryTypes.SELECT },
    );
    db.ok = true;
    db.latencyMs = Math.round((performance.now() - t0) * 10) / 10;
    const r = rows[0]!;
    ingest.workers = r.n;
    ingest.lagMs = r.lag;
    ingest.heartbeatAgeMs = r.age === null ? null : Math.round(r.age);
    ingest.buffered = r.buffered;
    ingest.journalBytes = r.journal;
    ingest.ok = r.n > 0 && r.age !== null && r.age < HEARTBEAT_STALE_MS;
    if (!ingest.ok) ingest.error = r.n === 0 ? 'no ingest worker has reported' : 'the ingest worker heartbeat is stale';
  } catch (e) {
    db.error = (e as Error).message;
    ingest.error = 'unknown while the database is down';
  }
  const link = brokerLink();
  // The link is made on first use: give a fresh process a moment to connect.
  for (let i = 0; i < 20 && !link.connected; i++) await new Promise((r) => setTimeout(r, 100));
  const broker: HealthReport['broker'] = { ok: link.connected };
  if (!link.connected) broker.error = link.lastError ?? 'not connected to the MQTT broker';
  if (!db.ok) failing.push('db');
  if (!broker.ok) failing.push('broker');
  if (!ingest.ok) failing.push('ingest');
  const statusFile = process.env['COATRAIL_SUPERVISOR_STATUS'];
  const sup = statusFile ? readSupervisorStatus(statusFile) : null;
  if (sup) for (const p of sup.processes) if (p.state !== 'running') failing.push(`process:${p.name}`);
  return {
    status: failing.length ? 'degraded' : 'ok',
    time: new Date().toISOString(),
    db,
    broker,
    ingest,
    ...(sup ? { supervisor: { processes: sup.processes } } : {}),
    failing,
  };
}

/** What anonymous callers see: the verdict and which parts fail, never internal messages. */
export function publicHealth(r: HealthReport) {
  return {
    status: r.status,
    time: r.time,
    db: { ok: r.db.ok },
    broker: { ok: r.broker.ok },
    ingest: { ok: r.ingest.ok },
    failing: r.failing,
  };
}
