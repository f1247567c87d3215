/**
 * Lab results as CSV, our own simple layout (documented in the README and OpenAPI):
 *
 *   engine_id,tested_at,method,sca_units_per_gal,glycol_percent,freeze_point_c,ph,conductivity_us_cm,appearance
 *
 * plus the optional columns nitrite_ppm and molybdate_ppm (as the lab reports them, mg/kg = ppm).
 *
 * - UTF-8 text, optional byte-order mark, LF or CRLF line ends, comma-separated; the header row is required and
 *   names exactly these columns (any order; `engine_id` may be left out when the import is for one engine).
 * - Fields may be in double quotes (a quote inside is doubled), as RFC 4180 describes; no line breaks inside fields.
 * - engine_id: integer; tested_at: ISO 8601 date-time with offset or Z (or a date YYYY-MM-DD, taken as 00:00 UTC);
 *   method: strip | refractometer | lab (blank = lab); numbers use a point as decimal mark, blank = not measured;
 *   SI units: % by volume, °C, µS/cm at 25 °C. At most MAX_ROWS data rows.
 * No CSV package is installed in the project, so this is a small strict parser for that layout only.
 */
import type { TestMethod } from '../../models/coolant-models';

export const LAB_CSV_COLUMNS = ['engine_id', 'tested_at', 'method', 'sca_units_per_gal', 'glycol_percent', 'freeze_point_c', 'ph', 'conductivity_us_cm', 'appearance', 'nitrite_ppm', 'molybdate_ppm'] as const;
export type LabCsvColumn = (typeof LAB_CSV_COLUMNS)[number];
export const MAX_ROWS = 5000;

export class LabCsvError extends Error {
  constructor(message: string) {
    super(message);
    this.name = 'LabCsvError';
  }
}

export interface LabRow {
  engineId: number | null;
  testedAt: Date;
  method: TestMethod;
  scaUnitsPerGal: number | null;
  glycolPercent: number | null;
  freezePointC: number | null;
  ph: number | null;
  conductivityUsCm: number | null;
  nitritePpm: number | null;
  molybdatePpm: number | null;
  appearance: string | null;
}

export interface RowError {
  /** Line number in the file (the header is line 1). */
  line: number;
  field: LabCsvColumn | null;
  error: string;
}

export interface ParsedLabCsv {
  rows: { line: number; row: LabRow }[];
  errors: RowError[];
}

/** Bytes -> text; throws LabCsvError when the bytes are not UTF-8 text (binary, NUL bytes). */
export function decodeText(buf: Buffer): string {
  if (buf.includes(0)) throw new LabCsvError('file is not text (contains NUL bytes)');
  let text: string;
  try {
    text = new TextDecoder('utf-8', { fatal: true }).decode(buf);
  } catch {
    throw new LabCsvError('file is not UTF-8 text');
  }
  // eslint-disable-next-line no-control-regex
  if (/[\x01-\x08\x0b\x0c\x0e-\x1f\x7f]/.test(text)) throw new LabCsvError('file is not text (contains control characters)');
  return text.replace(/^\uFEFF/, '');
}

/** One line -> fields; null when the quoting is broken. */
export function splitCsvLine(line: string): string[] | null {
  const out: string[] = [];
  let i = 0;
  for (;;) {
    if (line[i] === '"') {
      let v = '';
      i++;
      for (;;) {
        if (i >= line.length) return null; // unterminated quote
        if (line[i] === '"') {
          if (line[i + 1] === '"') {
            v += '"';
            i += 2;
            continue;
          }
          i++;
          break;
        }
        v += line[i++];
      }
      if (i < line.length && line[i] !== ',') return null; // text after the closing quote
      out.push(v);
    } else {
      const end = line.indexOf(',', i);
      const v = end === -1 ? line.slice(i) : line.slice(i, end);
      if (v.includes('"')) return null;
      out.push(v);
      i = end === -1 ? line.length : end;
    }
    if (i >= line.length) return out;
    i++; // the comma
    if (i === line.length) {
      out.push('');
      return out;
    }
  }
}

const METHODS: readonly TestMethod[] = ['strip', 'refractometer', 'lab'];
const NUMBER = /^[+-]?(\d+(\.\d*)?|\.\d+)([eE][+-]?\d+)?$/;
const DATE_ONLY = /^\d{4}-\d{2}-\d{2}$/;
const DATE_TIME = /^\d{4}-\d{2}-\d{2}T\d{2}:\d{2}(:\d{2}(\.\d+)?)?(Z|[+-]\d{2}:\d{2})$/;

/** Physical ranges a lab value must be in (wider than any real coolant; anything outside is a typing error). */
const RANGES: Partial<Record<LabCsvColumn, [number, number, string]>> = {
  sca_units_per_gal: [0, 100, 'units/US gal'],
  glycol_percent: [0, 100, '%'],
  freeze_point_c: [-80, 10, '°C'],
  ph: [0, 14, ''],
  conductivity_us_cm: [0, 200000, 'µS/cm'],
  nitrite_ppm: [0, 100000, 'ppm'],
  molybdate_ppm: [0, 100000, 'ppm'],
};

/**
 * Parse the whole file. Throws LabCsvError when it is not a CSV of this layout at all (not text, no header,
 * unknown columns); otherwise returns the good rows and an error per bad row.
 */
export function parseLabCsv(buf: Buffer, opts: { now?: number; engineIdOptional?: boolean } = {}): ParsedLabCsv {
  const now = opts.now ?? Date.now();
  const text = decodeText(buf);
  const lines = text.split(/\r?\n/);
  while (lines.length && lines[lines.length - 1].trim() === '') lines.pop();
  if (!lines.length) throw new LabCsvError('file is empty');
  const header = splitCsvLine(lines[0])?.map((h) => h.trim().toLowerCase());
  if (!header || header.length < 2) throw new LabCsvError(`first line is not a CSV header; expected: ${LAB_CSV_COLUMNS.join(',')}`);
  const unknown = header.filter((h) => !(LAB_CSV_COLUMNS as readonly string[]).includes(h));
  if (unknown.length) throw new LabCsvError(`unknown column(s) ${unknown.join(', ')}; the columns are: ${LAB_CSV_COLUMNS.join(',')}`);
  if (new Set(header).size !== header.length) throw new LabCsvError('a column is named twice in the header');
  const required: LabCsvColumn[] = opts.engineIdOptional ? ['tested_at'] : ['engine_id', 'tested_at'];
  const missing = required.filter((c) => !header.includes(c));
  if (missing.length) throw new LabCsvError(`header lacks column(s) ${missing.join(', ')}`);
  if (lines.length - 1 > MAX_ROWS) throw new LabCsvError(`more than ${MAX_ROWS} data rows`);

  const rows: ParsedLabCsv['rows'] = [];
  const errors: RowError[] = [];
  for (let n = 1; n < lines.length; n++) {
    const line = n + 1;
    if (lines[n].trim() === '') continue;
    const fields = splitCsvLine(lines[n]);
    if (!fields) {
      errors.push({ line, field: null, error: 'broken quoting' });
      continue;
    }
    if (fields.length !== header.length) {
      errors.push({ line, field: null, error: `${fields.length} fields where the header has ${header.length}` });
      continue;
    }
    const get = (c: LabCsvColumn): string => {
      const i = header.indexOf(c);
      return i === -1 ? '' : fields[i].trim();
    };
    const fail = (field: LabCsvColumn, error: string) => errors.push({ line, field, error: `${field}: ${error}` });
    const numberOf = (c: LabCsvColumn): number | null | undefined => {
      const s = get(c);
      if (s === '') return null;
      if (!NUMBER.test(s)) return void fail(c, `not a number (${JSON.stringify(s.slice(0, 40))})`);
      const v = Number(s);
      const range = RANGES[c];
      if (range && (v < range[0] || v > range[1])) return void fail(c, `must be between ${range[0]} and ${range[1]}${range[2] ? ' ' + range[2] : ''} (got ${v})`);
      return v;
    };

    const before = errors.length;
    let engineId: number | null = null;
    const idText = get('engine_id');
    if (idText === '') {
      if (!opts.engineIdOptional) fail('engine_id', 'missing');
    } else if (!/^\d+$/.test(idText) || Number(idText) < 1) fail('engine_id', `not a positive integer (${JSON.stringify(idText.slice(0, 40))})`);
    else engineId = Number(idText);

    const at = get('tested_at');
    let testedAt: Date | null = null;
    if (at === '') fail('tested_at', 'missing');
    else if (!DATE_TIME.test(at) && !DATE_ONLY.test(at)) fail('tested_at', `not an ISO 8601 date-time with offset, nor a YYYY-MM-DD date (${JSON.stringify(at.slice(0, 40))})`);
    else {
      const ms = Date.parse(DATE_ONLY.test(at) ? `${at}T00:00:00Z` : at);
      if (!Number.isFinite(ms)) fail('tested_at', `not a real date (${at})`);
      else if (ms > now + 24 * 3600 * 1000) fail('tested_at', `in the future (${at})`);
      else if (ms < Date.UTC(1990, 0, 1)) fail('tested_at', `before 1990 (${at})`);
      else testedAt = new Date(ms);
    }

    const m = get('method').toLowerCase() || 'lab';
    if (!(METHODS as readonly string[]).includes(m)) fail('method', `must be one of ${METHODS.join(', ')} (got ${JSON.stringify(m.slice(0, 40))})`);

    const sca = numberOf('sca_units_per_gal');
    const glycol = numberOf('glycol_percent');
    const fp = numberOf('freeze_point_c');
    const ph = numberOf('ph');
    const ec = numberOf('conductivity_us_cm');
    const no2 = numberOf('nitrite_ppm');
    const mo = numberOf('molybdate_ppm');
    const appearance = get('appearance');
    if (appearance.length > 200) fail('appearance', 'longer than 200 characters');
    if (errors.length > before) continue;
    if ([sca, glycol, fp, ph, ec, no2, mo].every((v) => v === null)) {
      errors.push({ line, field: null, error: 'no measured value in the row' });
      continue;
    }
    rows.push({
      line,
      row: {
        engineId, testedAt: testedAt!, method: m as TestMethod,
        scaUnitsPerGal: sca ?? null, glycolPercent: glycol ?? null, freezePointC: fp ?? null, ph: ph ?? null, conductivityUsCm: ec ?? null,
        nitritePpm: no2 ?? null, molybdatePpm: mo ?? null, appearance: appearance || null,
      },
    });
  }
  return { rows, errors };
}
