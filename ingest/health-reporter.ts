/**
 * The worker's heartbeat: once a second one `ingest_status` row per worker gets the time (the
 * database's clock), the last commit, the lag, the buffer and journal sizes, and the messages
 * committed and refused since the last beat added to its running counts. A beat that fails
 * (the database is away) is skipped; its counts go with the next one.
 */
import type { Sequelize } from 'sequelize';
import { IngestStatus } from '../db/models/index.ts';

export interface HealthSnapshot {
  lastCommitAt: number | null;
  lagMs: number;
  buffered: number;
  journalBytes: number;
}

export class HealthReporter {
  private committed = 0;
  private rejected = 0;
  private beating: Promise<boolean> | null = null;
  private timer: NodeJS.Timeout | null = null;

  constructor(
    private readonly sequelize: Sequelize,
    private readonly workerId: string,
    private readonly snapshot: () => HealthSnapshot,
  ) {}

  /** Count a committed batch. */
  counted(committed: number, rejected: number): void {
    this.committed += committed;
    this.rejected += rejected;
  }

  /** Write one heartbeat now (a beat in progress is shared); resolves to whether it was written. */
  beat(): Promise<boolean> {
    if (!this.beating) this.beating = this.write().finally(() => (this.beating = null));
    return this.beating;
  }

  private async write(): Promise<boolean> {
    const c = this.committed;
    const r = this.rejected;
    const s = this.snapshot();
    try {
      await this.sequelize.transaction(async (transaction) => {
        await IngestStatus.upsert(
          {
            workerId: this.workerId,
            heartbeatAt: this.sequelize.fn('now') as unknown as Date,
            // Absent before this run's first commit: an existing row keeps its last commit.
            ...(s.lastCommitAt !== null ? { lastCommitAt: new Date(s.lastCommitAt) } : {}),
            lagMs: s.lagMs,
            buffered: s.buffered,
            journalBytes: s.journalBytes,
          },
          { transaction, returning: false },
        );
        if (c || r)
          await IngestStatus.increment({ committed: c, rejected: r }, { where: { workerId: this.workerId }, transaction });
      });
      this.committed -= c;
      this.rejected -= r;
      return true;
    } catch {
      return false; // the database is away; the next beat reports
    }
  }

  start(everyMs = 1000): void {
    if (!this.timer) this.timer = setInterval(() => void this.beat(), everyMs);
  }

  stop(): void {
    if (this.timer) clearInterval(this.timer);
    this.timer = null;
  }
}
