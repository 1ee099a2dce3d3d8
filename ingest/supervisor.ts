/**
 * The process supervisor of `npm start`: starts each child, restarts one that dies with an
 * exponential back-off (1 s, 2 s, 4 s … at most 30 s; back to 1 s after a minute of good
 * running), logs every exit and restart, and writes what it knows to a status file that the
 * web server's `/api/health` reads (`COATRAIL_SUPERVISOR_STATUS`). PostgreSQL is watched the
 * same way by `watch()` with a check and a restart function of its own.
 *
 * Why not exit when a child exits (as the first version did): ovens do not stop when software
 * does; one crashed worker must not take the plant record down with it.
 */
import { spawn, type ChildProcess } from 'node:child_process';
import fs from 'node:fs';
import path from 'node:path';

import type { ProcessState, ProcessStatus, SupervisorStatusFile } from '../src/lib/core/supervision-status.ts';

export type { ProcessState, ProcessStatus, SupervisorStatusFile };

export interface BackoffOptions {
  initialMs: number;
  maxMs: number;
  /** A child that ran this long without dying starts the back-off afresh. */
  resetAfterMs: number;
}

export const DEFAULT_BACKOFF: BackoffOptions = { initialMs: 1000, maxMs: 30_000, resetAfterMs: 60_000 };

/** The delay before restart number `failures` (1-based) in a row. */
export function backoffDelay(failures: number, b: BackoffOptions = DEFAULT_BACKOFF): number {
  return Math.min(b.maxMs, b.initialMs * 2 ** Math.max(0, failures - 1));
}

export interface ChildSpec {
  name: string;
  /** Arguments to `node` (this process's executable). */
  args: string[];
  env: NodeJS.ProcessEnv;
}

export interface WatchSpec {
  name: string;
  /** Whether the watched thing is up (called every `everyMs`). */
  isUp(): boolean | Promise<boolean>;
  /** Bring it back; throws when it could not. */
  restart(): Promise<void>;
  everyMs?: number;
}

interface Entry {
  status: ProcessStatus;
  failuresInRow: number;
  startedAt: number;
  proc: ChildProcess | null;
  timer: NodeJS.Timeout | null;
  spec: ChildSpec | null;
}

export interface SupervisorOptions {
  cwd: string;
  statusFile: string;
  log: (line: string) => void;
  backoff?: BackoffOptions;
}

export class Supervisor {
  private readonly entries = new Map<string, Entry>();
  private stopping = false;
  private readonly backoff: BackoffOptions;

  constructor(private readonly opts: SupervisorOptions) {
    this.backoff = opts.backoff ?? DEFAULT_BACKOFF;
    fs.mkdirSync(path.dirname(opts.statusFile), { recursive: true });
    this.write();
  }

  /** Start a child and keep it running until `stopAll()`. */
  start(spec: ChildSpec): ChildProcess {
    const entry = this.entry(spec.name);
    entry.spec = spec;
    return this.launch(entry);
  }

  /** Watch something that is not our child (PostgreSQL, started by pg_ctl) and restart it when it is down. */
  watch(spec: WatchSpec): void {
    const entry = this.entry(spec.name);
    this.set(entry, 'running');
    let busy = false;
    const tick = async () => {
      if (this.stopping || busy) return;
      busy = true;
      try {
        if (await spec.isUp()) {
          if (entry.status.state !== 'running') this.set(entry, 'running');
          if (entry.failuresInRow && Date.now() - entry.startedAt > this.backoff.resetAfterMs) entry.failuresInRow = 0;
          return;
        }
        if (entry.status.state === 'running') {
          entry.status.lastExit = { code: null, signal: null, at: new Date().toISOString() };
          this.opts.log(`${spec.name} is down; restarting it.`);
        }
        entry.failuresInRow++;
        const delay = backoffDelay(entry.failuresInRow, this.backoff);
        this.set(entry, 'restarting', new Date(Date.now() + delay).toISOString());
        await new Promise((r) => setTimeout(r, delay));
        if (this.stopping) return;
        try {
          await spec.restart();
          entry.status.restarts++;
          entry.startedAt = Date.now();
          this.opts.log(`${spec.name} restarted (restart ${entry.status.restarts}).`);
          this.set(entry, 'running');
        } catch (e) {
          this.opts.log(`${spec.name} could not be restarted: ${(e as Error).message}`);
        }
      } finally {
        busy = false;
      }
    };
    entry.timer = setInterval(() => void tick(), spec.everyMs ?? 2000);
  }

  status(): ProcessStatus[] {
    return [...this.entries.values()].map((e) => ({ ...e.status }));
  }

  /** Pid of a running child (for tests and logs). */
  pidOf(name: string): number | null {
    return this.entries.get(name)?.proc?.pid ?? null;
  }

  /**
   * Stop every child, newest first and one at a time (the simulator before the web server,
   * the worker before the broker), so each can hand on what it holds: SIGTERM, then SIGKILL
   * after `graceMs`.
   */
  async stopAll(graceMs = 8000): Promise<void> {
    this.stopping = true;
    const all = [...this.entries.values()].reverse();
    for (const e of all) {
      if (e.timer) {
        clearTimeout(e.timer);
        clearInterval(e.timer);
      }
    }
    for (const e of all) {
      const p = e.proc;
      if (!p) continue;
      if (p.exitCode === null && p.signalCode === null) p.kill('SIGTERM');
      const deadline = Date.now() + graceMs;
      while (p.exitCode === null && p.signalCode === null && Date.now() < deadline) await new Promise((r) => setTimeout(r, 50));
      if (p.exitCode === null && p.signalCode === null) p.kill('SIGKILL');
      this.set(e, 'stopped');
    }
  }

  private entry(name: string): Entry {
    let e = this.entries.get(name);
    if (!e) {
      e = {
        status: {
          name,
          state: 'starting',
          pid: null,
          restarts: 0,
          since: new Date().toISOString(),
          lastExit: null,
          nextStartAt: null,
        },
        failuresInRow: 0,
        startedAt: Date.now(),
        proc: null,
        timer: null,
        spec: null,
      };
      this.entries.set(name, e);
    }
    return e;
  }

  private launch(entry: Entry): ChildProcess {
    const spec = entry.spec!;
    const proc = spawn(process.execPath, spec.args, {
      cwd: this.opts.cwd,
      env: spec.env,
      stdio: ['ignore', 'inherit', 'inherit'],
    });
    entry.proc = proc;
    entry.startedAt = Date.now();
    entry.status.pid = proc.pid ?? null;
    this.set(entry, 'running');
    proc.on('exit', (code, signal) => {
      if (entry.proc !== proc) return;
      entry.status.lastExit = { code, signal, at: new Date().toISOString() };
      entry.status.pid = null;
      if (this.stopping) return this.set(entry, 'stopped');
      if (Date.now() - entry.startedAt > this.backoff.resetAfterMs) entry.failuresInRow = 0;
      entry.failuresInRow++;
      const delay = backoffDelay(entry.failuresInRow, this.backoff);
      this.opts.log(`${spec.name} stopped (${signal ?? `exit ${code}`}); restarting in ${Math.round(delay / 100) / 10} s.`);
      this.set(entry, 'restarting', new Date(Date.now() + delay).toISOString());
      entry.timer = setTimeout(() => {
        entry.timer = null;
        if (this.stopping) return;
        entry.status.restarts++;
        this.launch(entry);
        this.opts.log(`${spec.name} restarted (restart ${entry.status.restarts}, pid ${entry.proc?.pid}).`);
      }, delay);
    });
    return proc;
  }

  private set(entry: Entry, state: ProcessState, nextStartAt: string | null = null): void {
    entry.status.state = state;
    entry.status.since = new Date().toISOString();
    entry.status.nextStartAt = nextStartAt;
    this.write();
  }

  private write(): void {
    const body: SupervisorStatusFile = {
      updatedAt: new Date().toISOString(),
      supervisorPid: process.pid,
      processes: this.status(),
    };
    const tmp = `${this.opts.statusFile}.${process.pid}.tmp`;
    try {
      fs.writeFileSync(tmp, JSON.stringify(body, null, 1));
      fs.renameSync(tmp, this.opts.statusFile);
    } catch (e) {
      this.opts.log(`could not write the supervisor status (${(e as Error).message})`);
    }
  }
}
