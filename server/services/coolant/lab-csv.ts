/**
 * Lab results as CSV, our own simple layout (documented in the README and OpenAPI):
 *
 *   engine_id,tested_at,method,sca_units_per_gal,glycol_percent,freeze_point_c,ph,conductivity_us_cm,appearance,nitrite_ppm,molybdate_ppm
 *
 * The file is read as spreadsheets write it: UTF-8 (with or without a byte-order mark) or Windows-1252 (detected
 * and converted), `,` or `;` between fields (taken from the header row), LF or CRLF line ends, fields in double
 * quotes that may span lines, spaces before an opening quote. In `;`-separated files a decimal comma is accepted.
 * The header row is required and names columns of the table below (any order; `engine_id` may be left out when the
 * import is for one engine; the others but `tested_at` are optional).
 * engine_id: integer; tested_at: ISO 8601 date-time with offset or Z (or a date YYYY-MM-DD, taken as 00:00 UTC);
 * method: strip | refractometer | lab (blank = lab); blank number = not measured; SI units: % by volume, °C, µS/cm
 * at 25 °C; nitrite and molybdate as the lab reports them (mg/kg = ppm). At most MAX_ROWS data rows.
 */
import { CsvError, parse } from 'csv-parse/sync';
import type { TestMethod } from '../../models/coolant-models';

/**
 * The measured-value columns: CSV name -> field of the stored test, with the physical range a value must be in
 * (wider than any real coolant; anything outside is a typing error). Adding a measured column is one line here.
 */
const NUMBER_COLUMNS = {
  sca_units_per_gal: { key: 'scaUnitsPerGal', min: 0, max: 100, unit: 'units/US gal' },
  glycol_percent: { key: 'glycolPercent', min: 0, max: 100, unit: '%' },
  freeze_point_c: { key: 'freezePointC', min: -80, max: 10, unit: '°C' },
  ph: { key: 'ph', min: 0, max: 14, unit: '' },
  conductivity_us_cm: { key: 'conductivityUsCm', min: 0, max: 200000, unit: 'µS/cm' },
  nitrite_ppm: { key: 'nitritePpm', min: 0, max: 100000, unit: 'ppm' },
  molybdate_ppm: { key: 'molybdatePpm', min: 0, max: 100000, unit: 'ppm' },
} as const;
type NumberColumn = keyof typeof NUMBER_COLUMNS;
type Measurements = { -readonly [C in NumberColumn as (typeof NUMBER_COLUMNS)[C]['key']]: number | null };

export const LAB_CSV_COLUMNS = ['engine_id', 'tested_at', 'method', ...(Object.keys(NUMBER_COLUMNS) as NumberColumn[]), 'appearance'] as const;
export type LabCsvColumn = 'engine_id' | 'tested_at' | 'method' | NumberColumn | 'appearance';
export const MAX_ROWS = 5000;
const MAX_APPEARANCE = 200;

export class LabCsvError extends Error {
  constructor(message: string) {
    super(message);
    this.name = 'LabCsvError';
  }
}

/** One good row; its field names are those of the stored coolant test. */
export interface LabRow extends Measurements {
  engineId: number | null;
  testedAt: Date;
  method: TestMethod;
  appearance: string | null;
}

export interface RowError {
  /** Line number in the file (the header is line 1); for a row over several lines, the line it starts on. */
  line: number;
  field: LabCsvColumn | null;
  error: string;
}

export type LabCsvEncoding = 'utf-8' | 'windows-1252';

export interface ParsedLabCsv {
  rows: { line: number; row: LabRow }[];
  errors: RowError[];
  /** How the file was read, so the user sees a converted encoding or a decimal comma. */
  format: { encoding: LabCsvEncoding; separator: ',' | ';'; decimalComma: boolean };
}

/**
 * Bytes -> text. UTF-8 when the bytes are valid UTF-8, else Windows-1252 (what spreadsheets on Windows save as
 * "CSV"); throws LabCsvError when the bytes are not text at all (binary, NUL or control bytes, UTF-16).
 */
export function decodeText(buf: Buffer): { text: string; encoding: LabCsvEncoding } {
  if ((buf[0] === 0xff && buf[1] === 0xfe) || (buf[0] === 0xfe && buf[1] === 0xff)) {
    throw new LabCsvError('file is UTF-16 text; save it as CSV (UTF-8 or the plain "CSV" of the spreadsheet)');
  }
  if (buf.includes(0)) throw new LabCsvError('file is not text (contains NUL bytes)');
  let text: string;
  let encoding: LabCsvEncoding = 'utf-8';
  try {
    text = new TextDecoder('utf-8', { fatal: true }).decode(buf);
  } catch {
    text = fixWindows1252(new TextDecoder('windows-1252').decode(buf));
    encoding = 'windows-1252';
  }
  // C0 controls but tab and line ends, and C1 controls (what undefined Windows-1252 bytes decode to): binary.
  // eslint-disable-next-line no-control-regex
  if (/[\x01-\x08\x0b\x0c\x0e-\x1f\x7f-\x9f]/.test(text)) throw new LabCsvError('file is not text (contains control characters)');
  return { text: text.replace(/^\uFEFF/, ''), encoding };
}

/**
 * Windows-1252 bytes 0x80-0x9F (the WHATWG Encoding Standard's index-windows-1252); undefined bytes stay C1 controls.
 * Node 20's TextDecoder('windows-1252') decodes these bytes as Latin-1 (U+0080-U+009F), so they are mapped here.
 */
const WINDOWS_1252_80_9F =
  '\u20ac\u0081\u201a\u0192\u201e\u2026\u2020\u2021\u02c6\u2030\u0160\u2039\u0152\u008d\u017d\u008f' +
  '\u0090\u2018\u2019\u201c\u201d\u2022\u2013\u2014\u02dc\u2122\u0161\u203a\u0153\u009d\u017e\u0178';
function fixWindows1252(text: string): string {
  return text.replace(/[\x80-\x9f]/g, (c) => WINDOWS_1252_80_9F[c.charCodeAt(0) - 0x80]);
}

/** The separator is whichever of `,` and `;` the header row uses more (column names contain neither). */
function separatorOf(headerLine: string): ',' | ';' {
  const count = (c: string) => headerLine.split(c).length - 1;
  return count(';') > count(',') ? ';' : ',';
}

interface CsvRecord {
  /** Line the record starts on. */
  line: number;
  fields: string[];
}

/** Text -> records with the file line each starts on; a record the parser cannot read becomes an error instead. */
function readRecords(text: string, separator: ',' | ';'): { records: CsvRecord[]; broken: RowError[] } {
  const lines = text.split('\n');
  const records: CsvRecord[] = [];
  const broken: RowError[] = [];
  let lastEnd = 0;
  // The first non-blank line after the last record: where a record that failed to parse started.
  const nextStart = () => {
    let n = lastEnd + 1;
    while (n <= lines.length && lines[n - 1].trim() === '') n++;
    return n;
  };
  try {
    parse(text, {
      delimiter: separator,
      ltrim: true,
      relax_quotes: true,
      relax_column_count: true,
      skip_empty_lines: true,
      skip_records_with_error: true,
      on_record: (fields: string[], { lines: end }) => {
        // `lines` is the line the record ends on; quoted line breaks are the lines before it.
        const span = fields.reduce((n, f) => n + f.split('\n').length - 1, 0);
        records.push({ line: end - span, fields });
        lastEnd = end;
        return null; // the records are kept here, with their line
      },
      on_skip: (err) => {
        const line = nextStart();
        broken.push({ line, field: null, error: `broken quoting (${err?.message.replace(/ at line \d+$/, '') ?? 'unreadable'})` });
        lastEnd = Math.max(lastEnd, typeof err?.lines === 'number' ? err.lines : line);
      },
    });
  } catch (err) {
    if (!(err instanceof CsvError)) throw err;
    broken.push({ line: nextStart(), field: null, error: `broken quoting (${err.message.replace(/ at line \d+$/, '')}); the rest of the file is not read` });
  }
  return { records, broken };
}

const METHODS: readonly TestMethod[] = ['strip', 'refractometer', 'lab'];
const NUMBER = /^[+-]?(\d+(\.\d*)?|\.\d+)([eE][+-]?\d+)?$/;
const DECIMAL_COMMA = /^[+-]?\d+,\d+$/;
const DATE_ONLY = /^\d{4}-\d{2}-\d{2}$/;
const DATE_TIME = /^\d{4}-\d{2}-\d{2}T\d{2}:\d{2}(:\d{2}(\.\d+)?)?(Z|[+-]\d{2}:\d{2})$/;

/**
 * Parse the whole file. Throws LabCsvError when it is not a CSV of this layout at all (not text, no header,
 * unknown columns); otherwise returns the good rows and an error per bad row.
 */
export function parseLabCsv(buf: Buffer, opts: { now?: number; engineIdOptional?: boolean } = {}): ParsedLabCsv {
  const now = opts.now ?? Date.now();
  const decoded = decodeText(buf);
  // One line end for the parser and the line numbers; a line break inside a quoted field becomes "\n".
  const text = decoded.text.replace(/\r\n?/g, '\n');
  if (text.trim() === '') throw new LabCsvError('file is empty');
  const separator = separatorOf(text.slice(0, text.indexOf('\n') === -1 ? undefined : text.indexOf('\n')));
  const { records, broken } = readRecords(text, separator);
  const [first, ...data] = records;
  const header = first?.line === 1 ? first.fields.map((h) => h.trim().toLowerCase()) : null;
  if (!header || header.length < 2) throw new LabCsvError(`first line is not a CSV header; expected: ${LAB_CSV_COLUMNS.join(',')}`);
  const unknown = header.filter((h) => !(LAB_CSV_COLUMNS as readonly string[]).includes(h));
  if (unknown.length) throw new LabCsvError(`unknown column(s) ${unknown.join(', ')}; the columns are: ${LAB_CSV_COLUMNS.join(',')}`);
  if (new Set(header).size !== header.length) throw new LabCsvError('a column is named twice in the header');
  const required: LabCsvColumn[] = opts.engineIdOptional ? ['tested_at'] : ['engine_id', 'tested_at'];
  const missing = required.filter((c) => !header.includes(c));
  if (missing.length) throw new LabCsvError(`header lacks column(s) ${missing.join(', ')}`);
  if (data.length > MAX_ROWS) throw new LabCsvError(`more than ${MAX_ROWS} data rows`);

  const rows: ParsedLabCsv['rows'] = [];
  const errors: RowError[] = [...broken];
  let decimalComma = false;
  for (const { line, fields } of data) {
    if (fields.every((f) => f.trim() === '')) continue; // a row of separators only, as spreadsheets leave
    if (fields.length !== header.length) {
      errors.push({ line, field: null, error: `${fields.length} fields where the header has ${header.length}` });
      continue;
    }
    const get = (c: LabCsvColumn): string => {
      const i = header.indexOf(c);
      return i === -1 ? '' : fields[i].trim();
    };
    const fail = (field: LabCsvColumn, error: string) => errors.push({ line, field, error: `${field}: ${error}` });
    const numberOf = (c: NumberColumn): number | null | undefined => {
      let s = get(c);
      if (s === '') return null;
      if (separator === ';' && DECIMAL_COMMA.test(s)) {
        s = s.replace(',', '.');
        decimalComma = true;
      }
      if (!NUMBER.test(s)) return void fail(c, `not a number (${JSON.stringify(s.slice(0, 40))})`);
      const v = Number(s);
      const { min, max, unit } = NUMBER_COLUMNS[c];
      if (v < min || v > max) return void fail(c, `must be between ${min} and ${max}${unit ? ' ' + unit : ''} (got ${v})`);
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
    else if (!DATE_TIME.test(at) && !DATE_ONLY.test(at))
      fail('tested_at', `not an ISO 8601 date-time with offset, nor a YYYY-MM-DD date (${JSON.stringify(at.slice(0, 40))})`);
    else {
      const ms = Date.parse(DATE_ONLY.test(at) ? `${at}T00:00:00Z` : at);
      if (!Number.isFinite(ms)) fail('tested_at', `not a real date (${at})`);
      else if (ms > now + 24 * 3600 * 1000) fail('tested_at', `in the future (${at})`);
      else if (ms < Date.UTC(1990, 0, 1)) fail('tested_at', `before 1990 (${at})`);
      else testedAt = new Date(ms);
    }

    const m = get('method').toLowerCase() || 'lab';
    if (!(METHODS as readonly string[]).includes(m)) fail('method', `must be one of ${METHODS.join(', ')} (got ${JSON.stringify(m.slice(0, 40))})`);

    const measured = {} as Measurements;
    for (const c of Object.keys(NUMBER_COLUMNS) as NumberColumn[]) measured[NUMBER_COLUMNS[c].key] = numberOf(c) ?? null;
    // A line break inside the quoted appearance is kept as a space: it is one short description.
    const appearance = get('appearance').replace(/\s*\n\s*/g, ' ');
    if (appearance.length > MAX_APPEARANCE) fail('appearance', `longer than ${MAX_APPEARANCE} characters`);
    if (errors.length > before) continue;
    if (Object.values(measured).every((v) => v === null)) {
      errors.push({ line, field: null, error: 'no measured value in the row' });
      continue;
    }
    rows.push({ line, row: { engineId, testedAt: testedAt!, method: m as TestMethod, ...measured, appearance: appearance || null } });
  }
  errors.sort((a, b) => a.line - b.line);
  return { rows, errors, format: { encoding: decoded.encoding, separator, decimalComma } };
}
