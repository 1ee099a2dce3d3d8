/**
 * What the supervisor of `npm start` (ingest/supervisor.ts) writes about its processes, and
 * the reader that `/api/health` uses. The file's path travels in COATRAIL_SUPERVISOR_STATUS.
 */
import fs from 'node:fs';

export type ProcessState = 'starting' | 'running' | 'restarting' | 'stopped';

export interface ProcessStatus {
  name: string;
  state: ProcessState;
  pid: number | null;
  restarts: number;
  /** When the current state began (ISO 8601). */
  since: string;
  lastExit: { code: number | null; signal: string | null; at: string } | null;
  /** When the next restart is due, while restarting. */
  nextStartAt: string | null;
}

export interface SupervisorStatusFile {
  updatedAt: string;
  supervisorPid: number;
  processes: ProcessStatus[];
}

/** Read a status file (the web server's side); null when absent or unreadable. */
export function readSupervisorStatus(file: string): SupervisorStatusFile | null {
  try {
    return JSON.parse(fs.readFileSync(file, 'utf8')) as SupervisorStatusFile;
  } catch {
    return null;
  }
}
