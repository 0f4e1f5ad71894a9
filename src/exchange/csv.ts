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

/**
 * A column: its header, what kind of value it holds, and how a row fills it. "number" cells are
 * left as numbers; "plain" cells hold values that can never need quotes or an apostrophe (enums,
 * times, units), written as they are; "text" cells are neutralised and quoted as needed.
 */
interface Column<Row> {
  header: string;
  kind: 'text' | 'number' | 'plain';
  cell(row: Row): string | number | undefined;
}

/** What the job-level columns read: the same for every reading of a job. */
interface JobContext {
  jobId: string;
  customer: string;
  site: string;
  asset: Asset | undefined;
  technician: Technician | undefined;
}

/** The columns about the job, first in each row (written once per job and reused). */
const JOB_COLUMNS: readonly Column<JobContext>[] = [
  { header: 'job_id', kind: 'text', cell: (r) => r.jobId },
  { header: 'customer', kind: 'text', cell: (r) => r.customer },
  { header: 'site', kind: 'text', cell: (r) => r.site },
  { header: 'technician', kind: 'text', cell: (r) => r.technician?.name },
  { header: 'asset_id', kind: 'text', cell: (r) => r.asset?.id },
  { header: 'asset_kind', kind: 'text', cell: (r) => r.asset?.kind },
  { header: 'asset_make', kind: 'text', cell: (r) => r.asset?.make },
  { header: 'asset_model', kind: 'text', cell: (r) => r.asset?.model },
  { header: 'asset_serial', kind: 'text', cell: (r) => r.asset?.serial },
  { header: 'asset_tag', kind: 'text', cell: (r) => r.asset?.tag },
];

/** The columns about the reading, after the job's. */
const READING_COLUMNS: readonly Column<Reading>[] = [
  { header: 'reading_id', kind: 'text', cell: (r) => r.id },
  { header: 'kind', kind: 'plain', cell: (r) => r.kind },
  { header: 'target', kind: 'text', cell: (r) => r.target },
  // "OL" (the meter's overload) is the one text a value cell can hold; it needs no escaping.
  { header: 'value', kind: 'number', cell: (r) => r.value },
  { header: 'unit', kind: 'plain', cell: (r) => READING_UNITS[r.kind] },
  { header: 'typed', kind: 'text', cell: (r) => r.text },
  { header: 'taken_at', kind: 'plain', cell: (r) => r.takenAt },
  { header: 'phase', kind: 'plain', cell: (r) => r.phase },
  { header: 'expected_low', kind: 'number', cell: (r) => r.expectedLow },
  { header: 'expected_high', kind: 'number', cell: (r) => r.expectedHigh },
  { header: 'verdict', kind: 'plain', cell: (r) => r.verdict },
  { header: 'supersedes', kind: 'text', cell: (r) => r.supersedes },
  { header: 'note', kind: 'text', cell: (r) => r.note },
];

/** The columns, in order. docs/exchange-format.md lists the same. */
const COLUMNS: readonly Column<never>[] = [...JOB_COLUMNS, ...READING_COLUMNS];

export const CSV_HEADERS: readonly string[] = COLUMNS.map((column) => column.header);
/** Headers of the columns left as numbers (never given an apostrophe). */
export const CSV_NUMERIC_HEADERS: readonly string[] = COLUMNS.filter((column) => column.kind === 'number').map((column) => column.header);

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
function formatCell(value: string | number | undefined, kind: Column<never>['kind']): string {
  if (value === undefined) return '';
  if (typeof value === 'number') return String(value);
  if (kind === 'plain') return value;
  return quoteField(kind === 'number' ? value : neutraliseFormula(value));
}

function formatCells<Row>(columns: readonly Column<Row>[], row: Row): string {
  let line = '';
  for (let i = 0; i < columns.length; i++) {
    const column = columns[i]!;
    if (i > 0) line += ',';
    line += formatCell(column.cell(row), column.kind);
  }
  return line;
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
  // A job's cells are the same in each of its rows: written once per run of its readings.
  let jobId: string | undefined;
  let jobCells = '';
  for (const reading of payload.readings) {
    if (reading.jobId !== jobId) {
      jobId = reading.jobId;
      const job = jobs.get(jobId);
      jobCells = formatCells(JOB_COLUMNS, {
        jobId,
        customer: job?.customer ?? '',
        site: job?.site ?? '',
        asset: job?.assetId === undefined ? undefined : assets.get(job.assetId),
        technician: job === undefined ? undefined : technicians.get(job.technicianId),
      });
    }
    yield `${jobCells},${formatCells(READING_COLUMNS, reading)}\r\n`;
  }
}

/**
 * The same records gathered into pieces of about `chars` characters: for a Blob or a stream,
 * which take a few large pieces better than a great many small ones.
 */
export function* csvChunks(payload: JobPayload, options: CsvOptions = {}, chars = 65_536): Generator<string> {
  let chunk = '';
  for (const record of csvRecords(payload, options)) {
    chunk += record;
    if (chunk.length >= chars) {
      yield chunk;
      chunk = '';
    }
  }
  if (chunk !== '') yield chunk;
}

/** The whole CSV as one string (for small exports; use csvRecords for large ones). */
export function toCsv(payload: JobPayload, options: CsvOptions = {}): string {
  let text = '';
  for (const record of csvRecords(payload, options)) text += record;
  return text;
}
