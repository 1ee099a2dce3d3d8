/**
 * Configuration changes, as they commit: a dedicated PostgreSQL connection LISTENs on
 * `coatrail_config` (the triggers of migration 20261204-1100 notify it for devices, channels,
 * assets, sites, characteristics, limit sets, alarm settings, windows and site settings) and
 * hands each change to `onChange`. The connection is re-made when it breaks (250 ms doubling
 * to 5 s); after a re-connection, notifications sent meanwhile are lost, so it reports one
 * `{table: '*', op: 'reconnect'}` change (reload everything). `onListening` says whether
 * changes are being heard, so the caller can rely on its periodic reload meanwhile.
 */
import pg from 'pg';
import type { ConfigChange, ConfigTable } from './handlers/types.ts';

export const CONFIG_CHANNEL = 'coatrail_config';

const TABLES: ReadonlySet<string> = new Set<ConfigTable>([
  'sites',
  'assets',
  'devices',
  'channels',
  'characteristics',
  'limit_sets',
  'alarm_configs',
  'process_windows',
  'window_assignments',
  'site_settings',
]);
const OPS: ReadonlySet<string> = new Set(['insert', 'update', 'delete']);

/** A notification's payload as a change, or null when it is not one of ours. */
export function parseConfigChange(payload: string | undefined): ConfigChange | null {
  let v: unknown;
  try {
    v = JSON.parse(payload ?? '');
  } catch {
    return null;
  }
  if (!v || typeof v !== 'object') return null;
  const o = v as Record<string, unknown>;
  if (typeof o['table'] !== 'string' || !TABLES.has(o['table']) || typeof o['op'] !== 'string' || !OPS.has(o['op'])) return null;
  return {
    table: o['table'] as ConfigTable,
    op: o['op'] as ConfigChange['op'],
    id: typeof o['id'] === 'number' ? o['id'] : null,
    key: typeof o['key'] === 'string' ? o['key'] : null,
  };
}

export interface ConfigListenerOptions {
  url: string;
  onChange(change: ConfigChange): void;
  onListening?(listening: boolean): void;
  log?: (line: string) => void;
}

export class ConfigListener {
  private client: pg.Client | null = null;
  private closed = false;
  private listening = false;
  private delay = 250;
  private timer: NodeJS.Timeout | null = null;
  private connectedOnce = false;
  private readonly log: (line: string) => void;

  constructor(private readonly opts: ConfigListenerOptions) {
    this.log = opts.log ?? (() => {});
  }

  get isListening(): boolean {
    return this.listening;
  }

  /** Connect and LISTEN; resolves after the first attempt (a failed one is retried in the background). */
  async start(): Promise<void> {
    await this.connect();
  }

  async close(): Promise<void> {
    this.closed = true;
    if (this.timer) clearTimeout(this.timer);
    const c = this.client;
    this.client = null;
    this.setListening(false);
    await c?.end().catch(() => {});
  }

  private setListening(on: boolean): void {
    if (this.listening === on) return;
    this.listening = on;
    this.opts.onListening?.(on);
  }

  private async connect(): Promise<void> {
    if (this.closed) return;
    const client = new pg.Client({ connectionString: this.opts.url, connectionTimeoutMillis: 5000, keepAlive: true });
    let dropped = false;
    const drop = (why: string) => {
      if (dropped) return;
      dropped = true;
      if (this.client === client) this.client = null;
      client.removeAllListeners('notification');
      client.end().catch(() => {});
      if (this.closed) return;
      if (this.listening) this.log(`config listener: connection lost (${why}); reconnecting`);
      this.setListening(false);
      this.timer = setTimeout(() => void this.connect(), this.delay);
      this.delay = Math.min(this.delay * 2, 5000);
    };
    client.on('error', (e) => drop(e.message));
    client.on('end', () => drop('closed'));
    client.on('notification', (n) => {
      if (n.channel !== CONFIG_CHANNEL) return;
      const change = parseConfigChange(n.payload);
      if (change) this.opts.onChange(change);
    });
    try {
      await client.connect();
      await client.query(`listen ${CONFIG_CHANNEL}`);
    } catch (e) {
      drop((e as Error).message);
      return;
    }
    if (this.closed) {
      await client.end().catch(() => {});
      return;
    }
    this.client = client;
    this.delay = 250;
    this.setListening(true);
    if (this.connectedOnce) {
      this.log('config listener: listening again; reloading the configuration');
      this.opts.onChange({ table: '*', op: 'reconnect', id: null, key: null });
    }
    this.connectedOnce = true;
  }
}
