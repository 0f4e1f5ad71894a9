/**
 * CSV of readings: one row per reading, with its job, asset and technician, for spreadsheets.
 *
 * RFC 4180: records end in CRLF; a field containing a comma, a double quote, CR or LF is
 * enclosed in double quotes with inner quotes doubled. The first record is the header.
 *
 * Formula injection (OWASP, "CSV Injection"): a spreadsheet runs a cell that begins with
 * = + - @ tab or CR as a formula. Every text column gets a leading apostrophe when its value
 * begins with one of those, or with an apostrophe (so the rule can be undone: drop one leading
 * apostrophe from a text cell that has one). The numeric columns (value, expected_low,
 * expected_high) are left as the numbers they are, minus signs included (DOMAIN.md §9).
 */
import { READING_UNITS } from '../engine/diagnosis/types';
import type { Asset, Reading, Technician } from '../model/job';
import type { JobPayload } from './format';

/** The unit each reading kind is stored in (SI): the diagnosis contract's table. */
export { READING_UNITS };

/** A column: its header, whether it holds numbers, and how a row fills it. */
interface Column {
  header: string;
  numeric: boolean;
  cell(row: RowContext): string | number | undefined;
}

interface RowContext {
  reading: Reading;
  customer: string;
  site: string;
  asset: Asset | undefined;
  technician: Technician | undefined;
}

/** The columns, in order. docs/exchange-format.md lists the same. */
const COLUMNS: readonly Column[] = [
  { header: 'job_id', numeric: false, cell: (r) => r.reading.jobId },
  { header: 'customer', numeric: false, cell: (r) => r.customer },
  { header: 'site', numeric: false, cell: (r) => r.site },
  { header: 'technician', numeric: false, cell: (r) => r.technician?.name },
  { header: 'asset_id', numeric: false, cell: (r) => r.asset?.id },
  { header: 'asset_kind', numeric: false, cell: (r) => r.asset?.kind },
  { header: 'asset_make', numeric: false, cell: (r) => r.asset?.make },
  { header: 'asset_model', numeric: false, cell: (r) => r.asset?.model },
  { header: 'asset_serial', numeric: false, cell: (r) => r.asset?.serial },
  { header: 'asset_tag', numeric: false, cell: (r) => r.asset?.tag },
  { header: 'reading_id', numeric: false, cell: (r) => r.reading.id },
  { header: 'kind', numeric: false, cell: (r) => r.reading.kind },
  { header: 'target', numeric: false, cell: (r) => r.reading.target },
  // "OL" (the meter's overload) is the one text a value cell can hold; it needs no escaping.
  { header: 'value', numeric: true, cell: (r) => r.reading.value },
  { header: 'unit', numeric: false, cell: (r) => READING_UNITS[r.reading.kind] },
  { header: 'typed', numeric: false, cell: (r) => r.reading.text },
  { header: 'taken_at', numeric: false, cell: (r) => r.reading.takenAt },
  { header: 'phase', numeric: false, cell: (r) => r.reading.phase },
  { header: 'expected_low', numeric: true, cell: (r) => r.reading.expectedLow },
  { header: 'expected_high', numeric: true, cell: (r) => r.reading.expectedHigh },
  { header: 'verdict', numeric: false, cell: (r) => r.reading.verdict },
  { header: 'supersedes', numeric: false, cell: (r) => r.reading.supersedes },
  { header: 'note', numeric: false, cell: (r) => r.reading.note },
];

export const CSV_HEADERS: readonly string[] = COLUMNS.map((column) => column.header);
/** Headers of the columns left as numbers (never given an apostrophe). */
export const CSV_NUMERIC_HEADERS: readonly string[] = COLUMNS.filter((column) => column.numeric).map((column) => column.header);

const FORMULA_START = /^[=+\-@\t\r']/;
const NEEDS_QUOTES = /[",\r\n]/;

/**
 * Makes a text value safe to open in a spreadsheet: prefixes an apostrophe when it begins
 * with = + - @ tab CR or an apostrophe (OWASP CSV Injection). Returns it unchanged otherwise.
 */
export function neutraliseFormula(text: string): string {
  return FORMULA_START.test(text) ? `'${text}` : text;
}

/** Undoes neutraliseFormula on a text cell read back: drops one leading apostrophe. */
export function restoreFormula(cell: string): string {
  return cell.startsWith("'") ? cell.slice(1) : cell;
}

/** One RFC 4180 field: quoted when it holds a comma, a quote, CR or LF; inner quotes doubled. */
export function quoteField(text: string): string {
  return NEEDS_QUOTES.test(text) ? `"${text.replaceAll('"', '""')}"` : text;
}

/** A cell: numbers in shortest round-trip form (ECMAScript Number::toString), text neutralised. */
function formatCell(value: string | number | undefined, numeric: boolean): string {
  if (value === undefined) return '';
  if (typeof value === 'number') return String(value);
  return quoteField(numeric ? value : neutraliseFormula(value));
}

export interface CsvOptions {
  /** Start with a UTF-8 byte-order mark, so spreadsheets read non-ASCII text right. Default true. */
  bom?: boolean;
}

/**
 * The CSV as a sequence of records, each ending in CRLF: the header, then one per reading in
 * payload order. A generator, so half a million readings need not be one string; join or
 * stream the pieces. The payload should be consistent (as readJobFile returns it); a reading
 * whose job, asset or technician is missing gets empty cells for them.
 */
export function* csvRecords(payload: JobPayload, options: CsvOptions = {}): Generator<string> {
  const jobs = new Map(payload.jobs.map((job) => [job.id, job] as const));
  const assets = new Map(payload.assets.map((asset) => [asset.id, asset] as const));
  const technicians = new Map(payload.technicians.map((technician) => [technician.id, technician] as const));
  yield `${options.bom === false ? '' : '\uFEFF'}${CSV_HEADERS.join(',')}\r\n`;
  for (const reading of payload.readings) {
    const job = jobs.get(reading.jobId);
    const row: RowContext = {
      reading,
      customer: job?.customer ?? '',
      site: job?.site ?? '',
      asset: job?.assetId === undefined ? undefined : assets.get(job.assetId),
      technician: job === undefined ? undefined : technicians.get(job.technicianId),
    };
    let line = '';
    for (let i = 0; i < COLUMNS.length; i++) {
      const column = COLUMNS[i]!;
      if (i > 0) line += ',';
      line += formatCell(column.cell(row), column.numeric);
    }
    yield `${line}\r\n`;
  }
}

/** The whole CSV as one string (for small exports; use csvRecords for large ones). */
export function toCsv(payload: JobPayload, options: CsvOptions = {}): string {
  let text = '';
  for (const record of csvRecords(payload, options)) text += record;
  return text;
}
