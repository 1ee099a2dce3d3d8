/**
 * Static check: `auditIn(t, …)` (db/transaction.ts) is the only way to write `audit_log`, so
 * every audit row is written inside the change's transaction. Scans the source of src/,
 * ingest/, seeds/ and db/ (comments removed) and fails for a raw `insert into audit_log`, a
 * `bulkInsert` into it, `AuditEntry.create` / `bulkCreate` outside db/transaction.ts, and any
 * call of the retired helpers `audit(…)` (src/lib/server/audit.ts) and `appendAudit(…)`
 * (src/lib/core/audit-store.ts).
 */
import fs from 'node:fs';
import path from 'node:path';
import { describe, expect, it } from 'vitest';

const root = path.resolve(path.dirname(new URL(import.meta.url).pathname), '../..');
const SCANNED = ['src', 'ingest', 'seeds', 'db'];
const EXTENSIONS = /\.(ts|tsx|mts|js|mjs|astro)$/;
/** The one writer. */
const THE_WRITER = 'db/transaction.ts';

/**
 * Files that still write the trail another way, while their areas are converted in parallel
 * to `withTransaction` + `auditIn`. The integrator removes each entry as the conversion of
 * that file is merged (the test fails for an entry that no longer offends, as a reminder),
 * and deletes the two retired helpers (the last two entries) when the list is otherwise empty.
 */
const TEMPORARY_OFFENDERS: Record<string, string> = {};

const RULES: Array<{ what: string; re: RegExp; except?: string }> = [
  { what: 'raw insert into audit_log', re: /insert\s+into\s+"?audit_log"?/i },
  { what: 'bulkInsert into audit_log', re: /bulkInsert\(\s*['"`]audit_log/ },
  { what: 'AuditEntry.create/bulkCreate', re: /\bAuditEntry\s*\.\s*(create|bulkCreate|upsert)\s*\(/, except: THE_WRITER },
  { what: 'appendAudit(…) call', re: /\bappendAudit\s*\(/ },
  { what: 'audit(…) call', re: /(?<![\w.$])audit\s*\(/ },
];

/** Source without comments (block comments, and lines that are comments). */
function code(text: string): string {
  return text
    .replace(/\/\*[\s\S]*?\*\//g, (m) => m.replace(/[^\n]/g, ' '))
    .split('\n')
    .map((l) => (/^\s*\/\//.test(l) ? '' : l))
    .join('\n');
}

/** Each rule `text` breaks, with its line number. */
function offences(rel: string, text: string): string[] {
  const out: string[] = [];
  const lines = code(text).split('\n');
  for (const rule of RULES) {
    if (rule.except === rel) continue;
    lines.forEach((l, i) => {
      if (rule.re.test(l)) out.push(`${rel}:${i + 1}: ${rule.what}`);
    });
  }
  return out;
}

function walk(dir: string, out: string[] = []): string[] {
  for (const e of fs.readdirSync(dir, { withFileTypes: true })) {
    if (e.name === 'node_modules' || e.name.startsWith('.')) continue;
    const p = path.join(dir, e.name);
    if (e.isDirectory()) walk(p, out);
    else if (EXTENSIONS.test(e.name)) out.push(p);
  }
  return out;
}

describe('audit_log is written only by auditIn', () => {
  const files = SCANNED.flatMap((d) => walk(path.join(root, d))).map((p) => path.relative(root, p).split(path.sep).join('/'));
  const found = new Map<string, string[]>();
  for (const rel of files) {
    const o = offences(rel, fs.readFileSync(path.join(root, rel), 'utf8'));
    if (o.length) found.set(rel, o);
  }

  it('the scanner sees the ways around auditIn (and not auditIn itself)', () => {
    expect(files).toContain(THE_WRITER);
    expect(offences('x.ts', "await q.query(`insert into audit_log (action) values ('x')`);")).toHaveLength(1);
    expect(offences('x.ts', 'await AuditEntry.create({ action });')).toHaveLength(1);
    expect(offences(THE_WRITER, 'await AuditEntry.create({ action });')).toHaveLength(0);
    expect(offences('x.ts', 'await appendAudit(client, actor, rec);')).toHaveLength(1);
    expect(offences('x.ts', 'await audit(actor, { action });')).toHaveLength(1);
    expect(offences('x.ts', 'await auditIn(t, actor, { action });')).toHaveLength(0);
    expect(offences('x.ts', '// await audit(actor, { action });\n/* insert into audit_log */')).toHaveLength(0);
  });

  it('no file outside the temporary list writes the trail another way', () => {
    const unexpected = [...found].filter(([rel]) => !(rel in TEMPORARY_OFFENDERS)).flatMap(([, o]) => o);
    expect(unexpected).toEqual([]);
  });

  it('every entry of the temporary list still offends (remove it once converted)', () => {
    const stale = Object.keys(TEMPORARY_OFFENDERS).filter((rel) => !found.has(rel));
    expect(stale).toEqual([]);
  });
});
