/**
 * Reflectance-spectrum uploads for the fringe-thickness calculator: at most 1 MB of UTF-8
 * text (binary content refused whatever its name or declared type), two numeric columns —
 * wavelength in nm and reflectance (fraction or %, any linear scale) — separated by a comma,
 * semicolon, tab or spaces. One optional header line; blank lines and lines starting with `#`
 * are skipped. Every bad row is reported with its line number. Pure (browser and server).
 * Linear time in the input: lines are capped at MAX_SPECTRUM_LINE characters and cells are
 * found by one scan (no backtracking regular expression).
 */
import { z } from 'zod';

/** One spectrum sample: wavelength in nm and reflectance (fraction or %, any linear scale). */
export interface SpectrumPoint {
  wavelengthNm: number;
  reflectance: number;
}

/** Largest accepted spectrum upload: 1 MB (1 048 576 bytes). */
export const MAX_SPECTRUM_BYTES = 1024 * 1024;
/** Most rows accepted. */
export const MAX_SPECTRUM_ROWS = 50_000;
/** Longest accepted line in characters (a data row is two numbers; anything longer is refused before tokenising). */
export const MAX_SPECTRUM_LINE = 256;
/** Fewest points the extrema search needs. */
export const MIN_SPECTRUM_POINTS = 5;

/** Options sent with the upload (form fields or query parameters). */
export const SpectrumOptionsSchema = z.object({
  refractiveIndex: z.coerce
    .number({ error: 'refractiveIndex must be a number.' })
    .min(1, 'refractiveIndex must be at least 1.')
    .max(5, 'refractiveIndex must be at most 5.'),
  smoothingWindow: z.coerce.number().int('smoothingWindow must be a whole number of samples.').min(1).max(101).optional(),
  minContrast: z.coerce.number().gt(0, 'minContrast must be above 0.').max(1, 'minContrast must be at most 1.').optional(),
});
export type SpectrumOptions = z.infer<typeof SpectrumOptionsSchema>;

/**
 * True when the bytes are UTF-8 text: valid sequences, no NUL and no C0 control other than
 * tab, LF, CR and FF (a spreadsheet binary, an image or a zip fails here).
 */
export function looksLikeText(b: Uint8Array): boolean {
  let i = b[0] === 0xef && b[1] === 0xbb && b[2] === 0xbf ? 3 : 0;
  while (i < b.length) {
    const c = b[i] as number;
    if (c < 0x80) {
      if ((c < 0x20 && c !== 0x09 && c !== 0x0a && c !== 0x0d && c !== 0x0c) || c === 0x7f) return false;
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

export interface RowError {
  line: number;
  message: string;
}

export type ParsedSpectrum = { ok: true; points: SpectrumPoint[]; skipped: number } | { ok: false; errors: RowError[] };

const NUMBER = /^[+-]?(\d+(\.\d*)?|\.\d+)([eE][+-]?\d+)?$/;

const isSpace = (c: string) => /\s/.test(c);
const isMark = (c: string) => c === ',' || c === ';';

/**
 * The cells of one trimmed line in one pass. With a comma, semicolon or tab in the line, a
 * delimiter is one comma or semicolon with the white space around it, or a run of white space
 * holding a tab; otherwise cells are separated by runs of white space.
 */
export function splitCells(raw: string): string[] {
  const delimited = raw.includes(',') || raw.includes(';') || raw.includes('\t');
  const cells: string[] = [];
  let cur = '';
  let i = 0;
  while (i < raw.length) {
    const c = raw[i] as string;
    if (!isSpace(c) && !isMark(c)) {
      cur += c;
      i++;
      continue;
    }
    let j = i;
    let marks = 0;
    let tab = false;
    while (j < raw.length && (isSpace(raw[j] as string) || isMark(raw[j] as string))) {
      if (isMark(raw[j] as string)) marks++;
      else if (raw[j] === '\t') tab = true;
      j++;
    }
    const delimiters = !delimited ? 1 : marks > 0 ? marks : tab ? 1 : 0;
    if (delimiters === 0) cur += raw.slice(i, j);
    else {
      cells.push(cur);
      for (let d = 1; d < delimiters; d++) cells.push('');
      cur = '';
    }
    i = j;
  }
  cells.push(cur);
  return cells;
}

/** Parse the text of a spectrum CSV; every bad row is listed with its 1-based line number (at most 50 listed). */
export function parseSpectrumCsv(text: string): ParsedSpectrum {
  const lines = text.replace(/^\uFEFF/, '').split(/\r\n|\n|\r/);
  const points: SpectrumPoint[] = [];
  const errors: RowError[] = [];
  let skipped = 0;
  let seenData = false;
  let headerAllowed = true;
  for (let i = 0; i < lines.length; i++) {
    const line = i + 1;
    if ((lines[i] as string).length > MAX_SPECTRUM_LINE) {
      errors.push({ line, message: `line longer than ${MAX_SPECTRUM_LINE} characters` });
      if (errors.length >= 50) break;
      continue;
    }
    const raw = (lines[i] as string).trim();
    if (raw === '' || raw.startsWith('#')) {
      skipped++;
      continue;
    }
    const cells = splitCells(raw).filter((c, k, all) => !(c === '' && k === all.length - 1));
    const numeric = cells.map((c) => NUMBER.test(c));
    if (headerAllowed && !seenData && numeric.every((n) => !n)) {
      // One header line (e.g. "wavelength_nm,reflectance") before the data.
      headerAllowed = false;
      skipped++;
      continue;
    }
    headerAllowed = false;
    if (cells.length !== 2) {
      errors.push({ line, message: `expected 2 columns (wavelength nm, reflectance), found ${cells.length}` });
    } else if (!numeric[0] || !numeric[1]) {
      errors.push({ line, message: `not a number: "${!numeric[0] ? cells[0] : cells[1]}"` });
    } else {
      const wavelengthNm = Number(cells[0]);
      const reflectance = Number(cells[1]);
      if (!(wavelengthNm > 0) || !Number.isFinite(wavelengthNm) || wavelengthNm > 100_000) {
        errors.push({ line, message: `wavelength ${cells[0]} nm is not between 0 and 100 000 nm` });
      } else if (!Number.isFinite(reflectance)) {
        errors.push({ line, message: `reflectance ${cells[1]} is not a finite number` });
      } else {
        seenData = true;
        points.push({ wavelengthNm, reflectance });
      }
    }
    if (errors.length >= 50) break;
    if (points.length > MAX_SPECTRUM_ROWS)
      return { ok: false, errors: [{ line, message: `more than ${MAX_SPECTRUM_ROWS} rows` }] };
  }
  if (errors.length) return { ok: false, errors };
  if (points.length < MIN_SPECTRUM_POINTS) {
    return {
      ok: false,
      errors: [
        { line: lines.length, message: `a spectrum needs at least ${MIN_SPECTRUM_POINTS} data rows, found ${points.length}` },
      ],
    };
  }
  return { ok: true, points, skipped };
}
