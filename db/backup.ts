/**
 * Backups of the plant record: `npm run db:backup` and `npm run db:restore -- FILE`.
 *
 * - The database is the one in DATABASE_URL, else the local cluster of `npm start` (var/pg; it
 *   is started for the backup when it is not running, and stopped again afterwards).
 * - `db:backup` writes a pg_dump custom-format archive (compressed; every table, readings and
 *   their partitions included) to BACKUP_DIR (default var/backups) as
 *   `coatrail-YYYYMMDDTHHMMSSZ.dump`, then keeps the newest BACKUP_KEEP (default 14) archives
 *   and removes older ones. pg_dump reads one consistent snapshot, so it can run while the
 *   product records.
 * - `db:restore -- FILE` restores an archive into that database with pg_restore
 *   (`--clean --if-exists`: it replaces what is there). Stop the product first.
 *
 * The binaries come from Debian's PostgreSQL packages (the same version as the local server).
 */
import { execFile } from 'node:child_process';
import fs from 'node:fs';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import { promisify } from 'node:util';
import { findPgBin, isLocalPostgresRunning, PgControlError, startLocalPostgres, stopLocalPostgres } from './pg-control.ts';

const run = promisify(execFile);
const root = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '..');

function bin(name: 'pg_dump' | 'pg_restore'): string {
  const dir = findPgBin();
  if (!dir)
    throw new PgControlError(`${name} was not found: install Debian's postgresql-client (apt-get install postgresql-client).`);
  return path.join(dir, name);
}

/** pg_dump -Fc of `url` into `file`. */
export async function backupDatabase(url: string, file: string): Promise<{ file: string; bytes: number }> {
  fs.mkdirSync(path.dirname(file), { recursive: true });
  const tmp = `${file}.partial`;
  try {
    await run(bin('pg_dump'), ['--format=custom', '--no-owner', '--no-privileges', `--file=${tmp}`, `--dbname=${url}`], {
      maxBuffer: 64 << 20,
    });
  } catch (e) {
    fs.rmSync(tmp, { force: true });
    const err = e as { stderr?: string; message: string };
    throw new PgControlError(`pg_dump failed: ${(err.stderr || err.message).trim().split('\n').slice(-2).join(' ')}`);
  }
  fs.renameSync(tmp, file);
  return { file, bytes: fs.statSync(file).size };
}

/** pg_restore of `file` into `url`, replacing what is there. */
export async function restoreDatabase(url: string, file: string): Promise<void> {
  if (!fs.existsSync(file)) throw new PgControlError(`No backup file ${file}.`);
  try {
    await run(
      bin('pg_restore'),
      [
        '--clean',
        '--if-exists',
        '--no-owner',
        '--no-privileges',
        '--single-transaction',
        '--exit-on-error',
        `--dbname=${url}`,
        file,
      ],
      { maxBuffer: 64 << 20 },
    );
  } catch (e) {
    const err = e as { stderr?: string; message: string };
    throw new PgControlError(`pg_restore failed: ${(err.stderr || err.message).trim().split('\n').slice(-2).join(' ')}`);
  }
}

/** The archive name for a moment: coatrail-20261204T203000Z.dump. */
export function backupName(at: Date): string {
  return `coatrail-${at
    .toISOString()
    .replace(/[-:]/g, '')
    .replace(/\.\d+Z$/, 'Z')}.dump`;
}

/** Remove all but the newest `keep` coatrail-*.dump archives in `dir`; returns the removed names. */
export function pruneBackups(dir: string, keep: number): string[] {
  if (!fs.existsSync(dir)) return [];
  const all = fs
    .readdirSync(dir)
    .filter((f) => /^coatrail-\d{8}T\d{6}Z\.dump$/.test(f))
    .sort();
  const removed = all.slice(0, Math.max(0, all.length - keep));
  for (const f of removed) fs.rmSync(path.join(dir, f));
  return removed;
}

/** The database to back up or restore, and how to let go of it afterwards. */
async function target(): Promise<{ url: string; release(): Promise<void> }> {
  const external = process.env['DATABASE_URL'];
  if (external) return { url: external, release: async () => {} };
  const varDir = path.resolve(process.env['COATRAIL_VAR_DIR'] ?? path.join(root, 'var'));
  const base = path.join(varDir, 'pg');
  const wasRunning = isLocalPostgresRunning(base);
  const h = await startLocalPostgres({ baseDir: base, database: 'coatrail' });
  return { url: h.url, release: async () => (wasRunning ? undefined : stopLocalPostgres(base)) };
}

const invokedDirectly = process.argv[1] && path.resolve(process.argv[1]) === fileURLToPath(import.meta.url);
if (invokedDirectly) {
  const [cmd, fileArg] = process.argv.slice(2);
  const main = async () => {
    const t = await target();
    try {
      if (cmd === 'backup') {
        const dir = path.resolve(process.env['BACKUP_DIR'] ?? path.join(root, 'var', 'backups'));
        const keep = Number(process.env['BACKUP_KEEP'] ?? 14);
        const r = await backupDatabase(t.url, path.join(dir, backupName(new Date())));
        console.log(`Backup written: ${r.file} (${(r.bytes / 1048576).toFixed(1)} MiB)`);
        const removed = pruneBackups(dir, Number.isInteger(keep) && keep > 0 ? keep : 14);
        if (removed.length) console.log(`Removed ${removed.length} older backup(s), keeping the newest ${keep}.`);
      } else if (cmd === 'restore') {
        if (!fileArg) throw new PgControlError('Usage: npm run db:restore -- FILE (a .dump written by db:backup).');
        await restoreDatabase(t.url, path.resolve(fileArg));
        console.log(`Restored ${fileArg}.`);
      } else {
        throw new PgControlError('Usage: tsx db/backup.ts backup | restore FILE');
      }
    } finally {
      await t.release();
    }
  };
  main().catch((e: Error) => {
    console.error(e instanceof PgControlError ? e.message : e);
    process.exit(1);
  });
}
