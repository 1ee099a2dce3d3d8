/**
 * Upload rules for attachments (test photos, spectra, survey files): at most 5 MB, and the type
 * decided by the file's content ("magic bytes"), never by its name or the browser's claim.
 * Signatures: PNG (ISO/IEC 15948 §5.2: 89 50 4E 47 0D 0A 1A 0A), JPEG (ITU-T T.81 SOI marker
 * FF D8 FF), PDF (ISO 32000-1 §7.5.2 header "%PDF-"). CSV/plain text: valid UTF-8 without NUL
 * or other binary control bytes; a text file whose name ends in .csv, or whose first line has
 * commas/semicolons and more than one line has the same number of fields, is CSV. Pure.
 */

/** Largest accepted attachment, bytes (5 MB = 5 × 1024 × 1024). */
export const MAX_UPLOAD_BYTES = 5 * 1024 * 1024;

/** Types Coatrail stores. */
export const UPLOAD_MIME_TYPES = ['image/png', 'image/jpeg', 'application/pdf', 'text/csv', 'text/plain'] as const;
export type UploadMime = (typeof UPLOAD_MIME_TYPES)[number];

/** What the content says the file is, or why it is refused. */
export type SniffResult = { ok: true; mime: UploadMime } | { ok: false; reason: string };

const startsWith = (b: Uint8Array, sig: readonly number[]): boolean => sig.every((x, i) => b[i] === x);

/** True when the bytes are valid UTF-8 with no NUL and no C0 control other than tab, CR, LF, FF. */
export function isPlainText(b: Uint8Array): boolean {
  let i = b[0] === 0xef && b[1] === 0xbb && b[2] === 0xbf ? 3 : 0;
  while (i < b.length) {
    const c = b[i] as number;
    if (c < 0x80) {
      if (c < 0x20 && c !== 0x09 && c !== 0x0a && c !== 0x0d && c !== 0x0c) return false;
      if (c === 0x7f) return false;
      i++;
      continue;
    }
    const len = c >= 0xc2 && c <= 0xdf ? 2 : c >= 0xe0 && c <= 0xef ? 3 : c >= 0xf0 && c <= 0xf4 ? 4 : 0;
    if (len === 0 || i + len > b.length) return false;
    for (let k = 1; k < len; k++) if (((b[i + k] as number) & 0xc0) !== 0x80) return false;
    i += len;
  }
  return true;
}

/**
 * The type of an upload from its first bytes (and, for text, whether it is CSV).
 * @param name the file name, used only to tell CSV from plain text once the content is text.
 */
export function sniffUpload(bytes: Uint8Array, name = ''): SniffResult {
  if (bytes.length === 0) return { ok: false, reason: 'The file is empty.' };
  if (bytes.length > MAX_UPLOAD_BYTES) {
    return { ok: false, reason: `The file is ${(bytes.length / 1048576).toFixed(1)} MB; the limit is 5 MB.` };
  }
  if (startsWith(bytes, [0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a])) return { ok: true, mime: 'image/png' };
  if (startsWith(bytes, [0xff, 0xd8, 0xff])) return { ok: true, mime: 'image/jpeg' };
  if (startsWith(bytes, [0x25, 0x50, 0x44, 0x46, 0x2d])) return { ok: true, mime: 'application/pdf' };
  if (isPlainText(bytes)) {
    if (/\.csv$/i.test(name)) return { ok: true, mime: 'text/csv' };
    const head = new TextDecoder().decode(bytes.subarray(0, 4096));
    const lines = head
      .split(/\r?\n/)
      .filter((l) => l.trim() !== '')
      .slice(0, 5);
    const first = lines[0] ?? '';
    const delim = first.includes(',') ? ',' : first.includes(';') ? ';' : null;
    if (delim && lines.length > 1 && lines.every((l) => l.split(delim).length === first.split(delim).length)) {
      return { ok: true, mime: 'text/csv' };
    }
    return { ok: true, mime: 'text/plain' };
  }
  return {
    ok: false,
    reason:
      'The content is not a PNG or JPEG image, a PDF, or UTF-8 text/CSV (the type is read from the file itself, not its name).',
  };
}

/** A safe download name: letters, digits, dot, dash, underscore; at most 120 characters. */
export function safeFileName(name: string): string {
  const base = name.split(/[\\/]/).pop() ?? 'file';
  const cleaned = base
    .replace(/[^A-Za-z0-9._-]+/g, '_')
    .replace(/^\.+/, '')
    .slice(0, 120);
  return cleaned || 'file';
}
