/** Build the web app when its sources are newer than the last build (used by `npm start` and tests). */
import { spawnSync } from 'node:child_process';
import fs from 'node:fs';
import path from 'node:path';

function newestMtime(dir: string): number {
  if (!fs.existsSync(dir)) return 0;
  let newest = 0;
  for (const entry of fs.readdirSync(dir, { withFileTypes: true })) {
    const p = path.join(dir, entry.name);
    newest = Math.max(newest, entry.isDirectory() ? newestMtime(p) : fs.statSync(p).mtimeMs);
  }
  return newest;
}

/**
 * Returns true when it built. Throws with a plain message when the build fails.
 * `snapshotTo`: also copy the finished `dist/` there while still holding the lock, so a caller
 * (the test stack) can run a server from a build that a later parallel build cannot replace
 * under it (a replaced chunk makes the running server answer 500).
 */
export function buildIfNeeded(root: string, log: (s: string) => void = () => {}, opts: { snapshotTo?: string } = {}): boolean {
  // Several test runs may start at once (contributors' parallel runs): one builds at a time.
  const lock = path.join(root, 'var', 'build.lock');
  fs.mkdirSync(path.dirname(lock), { recursive: true });
  const until = Date.now() + 180_000;
  for (;;) {
    try {
      fs.mkdirSync(lock);
      break;
    } catch {
      const age = Date.now() - (fs.statSync(lock, { throwIfNoEntry: false })?.mtimeMs ?? Date.now());
      if (age > 180_000) fs.rmSync(lock, { recursive: true, force: true });
      if (Date.now() > until) throw new Error('Another build held var/build.lock for 3 minutes.');
      Atomics.wait(new Int32Array(new SharedArrayBuffer(4)), 0, 0, 250);
    }
  }
  try {
    const built = buildLocked(root, log);
    if (opts.snapshotTo) {
      fs.rmSync(opts.snapshotTo, { recursive: true, force: true });
      fs.cpSync(path.join(root, 'dist'), opts.snapshotTo, { recursive: true });
    }
    return built;
  } finally {
    fs.rmSync(lock, { recursive: true, force: true });
  }
}

function buildLocked(root: string, log: (s: string) => void): boolean {
  const entry = path.join(root, 'dist', 'server', 'entry.mjs');
  const newest = Math.max(
    ...['src', 'public', 'db', 'seeds'].map((d) => newestMtime(path.join(root, d))),
    fs.statSync(path.join(root, 'astro.config.mjs')).mtimeMs,
    fs.statSync(path.join(root, 'tailwind.config.mjs')).mtimeMs,
  );
  if (fs.existsSync(entry) && fs.statSync(entry).mtimeMs > newest) return false;
  log('Building the web app (astro build)…');
  const r = spawnSync(process.execPath, [path.join(root, 'node_modules', 'astro', 'astro.js'), 'build'], {
    cwd: root,
    stdio: ['ignore', 'ignore', 'inherit'],
    env: { ...process.env, ASTRO_TELEMETRY_DISABLED: '1' },
  });
  if (r.status !== 0) throw new Error('The web app did not build (see the errors above).');
  // Mark the build time even when Vite kept an unchanged entry file.
  const now = new Date();
  fs.utimesSync(entry, now, now);
  return true;
}
