/**
 * CSV in and out for uploads and exports (RFC 4180: comma-separated, fields optionally in
 * double quotes, a quote inside a quoted field doubled, CRLF or LF line ends). Shared by the
 * browser (preview before upload) and the server (the authoritative parse). Pure.
 *
 * Every parsed row keeps the 1-based line number where it starts in the file, so that a bad
 * row can be reported as "line 7: …".
 */

/** One parsed record: its cells and the 1-based line of the file where it starts. */
export interface CsvRecord {
  line: number;
  cells: string[];
}

/** A parse that failed on the file's structure (not on a cell's value). */
export class CsvSyntaxError extends Error {
  constructor(
    public line: number,
    message: string,
  ) {
    super(`line ${line}: ${message}`);
  }
}

/**
 * Parses CSV text into records. Blank lines are skipped. A leading UTF-8 byte-order mark is
 * dropped. The delimiter is a comma, or a semicolon when the first line holds semicolons and
 * no commas (a common spreadsheet export in Europe).
 * @throws CsvSyntaxError on an unterminated quoted field or text after a closing quote.
 */
export function parseCsv(text: string): CsvRecord[] {
  const src = text.charCodeAt(0) === 0xfeff ? text.slice(1) : text;
  const firstLine = src.slice(0, Math.max(0, src.search(/\r?\n/)) || src.length);
  const delim = !firstLine.includes(',') && firstLine.includes(';') ? ';' : ',';
  const out: CsvRecord[] = [];
  let line = 1;
  let i = 0;
  const n = src.length;
  while (i < n) {
    const start = line;
    const cells: string[] = [];
    let cell = '';
    let quoted = false;
    let wasQuoted = false;
    for (;;) {
      if (i >= n) {
        if (quoted) throw new CsvSyntaxError(start, 'a quoted field is not closed');
        cells.push(cell);
        break;
      }
      const ch = src[i] as string;
      if (quoted) {
        if (ch === '"') {
          if (src[i + 1] === '"') {
            cell += '"';
            i += 2;
          } else {
            quoted = false;
            i++;
            const next = src[i];
            if (next !== undefined && next !== delim && next !== '\n' && next !== '\r') {
              throw new CsvSyntaxError(line, 'text follows a closing quote');
            }
          }
        } else {
          if (ch === '\n') line++;
          cell += ch;
          i++;
        }
        continue;
      }
      if (ch === '"' && cell === '' && !wasQuoted) {
        quoted = true;
        wasQuoted = true;
        i++;
      } else if (ch === delim) {
        cells.push(cell);
        cell = '';
        wasQuoted = false;
        i++;
      } else if (ch === '\r' || ch === '\n') {
        cells.push(cell);
        i += ch === '\r' && src[i + 1] === '\n' ? 2 : 1;
        line++;
        break;
      } else {
        if (ch === '"') throw new CsvSyntaxError(line, 'a quote inside an unquoted field');
        cell += ch;
        i++;
      }
    }
    if (!(cells.length === 1 && (cells[0] as string).trim() === '')) out.push({ line: start, cells: cells.map((c) => c.trim()) });
  }
  return out;
}

/** Header name normalised for matching: lower case, spaces and dashes as underscores. */
export function normaliseHeader(h: string): string {
  return h
    .trim()
    .toLowerCase()
    .replace(/[\s-]+/g, '_');
}

/**
 * One CSV field, quoted when it needs to be (RFC 4180); formula-leading text is prefixed with '.
 * A Date is written as ISO 8601 UTC and any other object as JSON (never "[object Object]").
 */
export function csvField(value: unknown): string {
  if (value === null || value === undefined) return '';
  let s =
    typeof value === 'number'
      ? Number.isFinite(value)
        ? String(value)
        : ''
      : value instanceof Date
        ? value.toISOString()
        : typeof value === 'object'
          ? JSON.stringify(value)
          : String(value as string | boolean | bigint | symbol);
  // Spreadsheet formula injection (OWASP "CSV Injection"): neutralise a leading = + - @.
  if (typeof value === 'string' && /^[=+\-@\t\r]/.test(s)) s = `'${s}`;
  return /[",\r\n;]/.test(s) ? `"${s.replace(/"/g, '""')}"` : s;
}

/** A CSV document from a header and rows (CRLF line ends, as RFC 4180 specifies). */
export function toCsv(header: readonly string[], rows: readonly (readonly unknown[])[]): string {
  return [header, ...rows].map((r) => r.map(csvField).join(',')).join('\r\n') + '\r\n';
}
