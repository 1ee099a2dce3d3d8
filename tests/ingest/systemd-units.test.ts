/**
 * The systemd units shipped for a plant server (ingest/systemd/) pass `systemd-analyze verify`
 * (Debian's systemd package; .ci/run installs it where missing), restart the supervisor
 * always, and start the product through the same supervisor as `npm start`.
 */
import { execFile } from 'node:child_process';
import fs from 'node:fs';
import path from 'node:path';
import { promisify } from 'node:util';
import { describe, expect, it } from 'vitest';
import { root } from '../support/test-stack.ts';

const run = promisify(execFile);
const dir = path.join(root, 'ingest', 'systemd');
const units = fs.readdirSync(dir).filter((f) => /\.(service|timer)$/.test(f));

describe('systemd units', () => {
  it('ships the product unit and the nightly backup', () => {
    expect(units.sort()).toEqual(['coatrail-backup.service', 'coatrail-backup.timer', 'coatrail.service']);
  });

  it('pass systemd-analyze verify', async () => {
    const r = await run('systemd-analyze', ['verify', ...units.map((u) => path.join(dir, u))]).catch(
      (e: { code?: string; stderr?: string; message: string }) => {
        if (e.code === 'ENOENT') throw new Error('systemd-analyze is missing: apt-get install systemd (.ci/run does).');
        throw new Error(e.stderr || e.message);
      },
    );
    // Warnings (unknown keys, wrong sections) go to stderr even when the exit code is 0.
    expect(r.stderr.trim()).toBe('');
  });

  it('restart the supervisor always and run ingest/stack.ts', () => {
    const unit = fs.readFileSync(path.join(dir, 'coatrail.service'), 'utf8');
    expect(unit).toMatch(/^Restart=always$/m);
    expect(unit).toMatch(/^ExecStart=\/usr\/bin\/node --import tsx ingest\/stack\.ts$/m);
    const timer = fs.readFileSync(path.join(dir, 'coatrail-backup.timer'), 'utf8');
    expect(timer).toMatch(/^OnCalendar=/m);
    expect(timer).toMatch(/^Persistent=true$/m);
  });
});
