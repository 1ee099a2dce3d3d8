/**
 * Each long-running process (broker, ingest worker, web server, simulator) reports its own
 * health figures when COATRAIL_METRICS_DIR is set: every 5 s it writes `{dir}/{name}.json`
 * with resident memory, heap, active handles and event-loop delay over the last interval
 * (perf_hooks' histogram), plus whatever the process adds. `npm run bench:soak` reads them.
 * Without the variable it does nothing.
 */
import fs from 'node:fs';
import path from 'node:path';
import { monitorEventLoopDelay } from 'node:perf_hooks';

export interface ProcessMetrics {
  name: string;
  pid: number;
  at: string;
  uptimeS: number;
  rssBytes: number;
  heapUsedBytes: number;
  activeHandles: number;
  eventLoopDelayMs: { p50: number; p99: number; max: number };
  extra: Record<string, unknown>;
}

export function startProcessMetrics(name: string, extra: () => Record<string, unknown> = () => ({})): () => void {
  const dir = process.env['COATRAIL_METRICS_DIR'];
  if (!dir) return () => {};
  fs.mkdirSync(dir, { recursive: true });
  const h = monitorEventLoopDelay({ resolution: 10 });
  h.enable();
  const write = () => {
    const m = process.memoryUsage();
    const body: ProcessMetrics = {
      name,
      pid: process.pid,
      at: new Date().toISOString(),
      uptimeS: Math.round(process.uptime()),
      rssBytes: m.rss,
      heapUsedBytes: m.heapUsed,
      activeHandles: process.getActiveResourcesInfo().filter((r) => r !== 'Timeout' && r !== 'Immediate').length,
      eventLoopDelayMs: {
        p50: h.percentile(50) / 1e6,
        p99: h.percentile(99) / 1e6,
        max: h.max / 1e6,
      },
      extra: extra(),
    };
    h.reset();
    const file = path.join(dir, `${name}.json`);
    try {
      fs.writeFileSync(`${file}.tmp`, JSON.stringify(body));
      fs.renameSync(`${file}.tmp`, file);
    } catch {
      /* the folder went away: the soak is over */
    }
  };
  const timer = setInterval(write, 5000);
  timer.unref();
  return () => {
    clearInterval(timer);
    write();
    h.disable();
  };
}
