/**
 * Writing a job file (schema version 2, docs/exchange-format.md): records in, the file's lines
 * out as bytes, with the digest computed as they are made.
 *
 * The records are checked first with the same checks an import makes, so a file this writes
 * always reads back. They are written in one order (order.ts) with their members in sorted
 * order, and cut into lines by size alone, so the same records always give the same bytes.
 */
import { jobDate, type IsoTime, type Job, type Reading } from '../model/job';
import { asciiLineBytes, concatBytes, decodeUtf8Strict, encodeUtf8 } from './canonical';
import { PieceHasher } from './digest';
import { FORMAT_ID, SCHEMA_VERSION, type ExchangeProblem, type ExportedBy, type JobFile, type JobPayload } from './format';
import { BLOCK_KINDS, buildReadingTable, isPlainReading, TARGET_LINE_CHARS, type RecordCounts } from './lines';
import { sortPayload } from './order';
import { formatProblem } from './parse';
import { checkRecordList, checkReferences, RECORD_LISTS, type PayloadKey } from './payload';
import { Checker, checkExportedBy, INVALID, isoTime } from './schema';

/** Records that cannot be written as they are (a bug upstream, or a store holding bad data). */
export class ExportError extends Error {
  override name = 'ExportError';
  constructor(readonly problems: ExchangeProblem[]) {
    super(`cannot export: ${problems.slice(0, 3).map(formatProblem).join('; ')}${problems.length > 3 ? ` (and ${problems.length - 3} more)` : ''}`);
  }
}

export interface WriteOptions {
  exportedAt: IsoTime;
  exportedBy?: ExportedBy;
}

/** A written file: its records as checked and ordered, and its bytes a line at a time. */
export interface BuiltFile {
  file: JobFile;
  /** The file's bytes: each part one line with its newline; the parts in order are the file. */
  parts: Uint8Array[];
  /** Bytes in all parts. */
  bytes: number;
}

/**
 * Checks the payload as an import would, in file order: returns it with copies of the records
 * whose members are written in sorted order (jobs, assets, technicians, conflicts; readings are
 * written as columns, by field), or throws ExportError naming every record that breaks the format.
 */
function checkForExport(payload: JobPayload, exportedAt: IsoTime, exportedBy: ExportedBy): { payload: JobPayload; exportedAt: IsoTime; exportedBy: ExportedBy } {
  const copying = new Checker('export', true);
  const reading = new Checker('export', false);
  copying.enter('exportedAt');
  const at = isoTime(exportedAt, copying);
  copying.leave();
  copying.enter('exportedBy');
  const by = checkExportedBy(exportedBy, copying);
  copying.leave();
  const sorted = sortPayload(payload);
  const checked: Partial<Record<PayloadKey, unknown[]>> = {};
  for (const kind of BLOCK_KINDS) {
    const list = sorted[kind] as unknown[];
    const { label, maxItems } = RECORD_LISTS[kind];
    if (list.length > maxItems) {
      copying.enter('payload');
      copying.enter(kind);
      copying.fail(`too many ${label}s (${list.length}; at most ${maxItems})`);
      copying.leave();
      copying.leave();
      continue;
    }
    // Readings are written as columns, field by field, so they need no sorted copy.
    checked[kind] = kind === 'readings' ? checkRecordList(list, kind, reading, 0, isPlainReading) : checkRecordList(list, kind, copying);
  }
  const problems = () => [...copying.problems, ...reading.problems];
  if (copying.problemCount + reading.problemCount > 0 || at === INVALID || by === INVALID) throw new ExportError(problems());
  const result = checked as unknown as JobPayload;
  checkReferences(result, copying);
  if (copying.problemCount > 0) throw new ExportError(problems());
  return { payload: result, exportedAt: at as IsoTime, exportedBy: by as ExportedBy };
}

const HEX_DIGITS = '0123456789abcdef';
const NON_ASCII = /[^\x00-\x7f]/;

/** Writes the escape `\uXXXX` of the UTF-16 unit `unit` at out[at]; returns the next place. */
function putEscape(out: Uint8Array, at: number, unit: number): number {
  out[at] = 0x5c; // backslash
  out[at + 1] = 0x75; // u
  out[at + 2] = HEX_DIGITS.charCodeAt((unit >> 12) & 15);
  out[at + 3] = HEX_DIGITS.charCodeAt((unit >> 8) & 15);
  out[at + 4] = HEX_DIGITS.charCodeAt((unit >> 4) & 15);
  out[at + 5] = HEX_DIGITS.charCodeAt(unit & 15);
  return at + 6;
}

/**
 * The place of the first byte above 0x7F at or after `from`, or the length: four bytes at a
 * time through `words`, a view of the same (4-aligned) buffer.
 */
function nextNonAscii(bytes: Uint8Array, words: Uint32Array, from: number): number {
  let i = from;
  while (i < bytes.length && (i & 3) !== 0) {
    if (bytes[i]! >= 0x80) return i;
    i++;
  }
  let w = i >> 2;
  while (w < words.length && (words[w]! & 0x80808080) === 0) w++;
  i = w << 2;
  while (i < bytes.length && bytes[i]! < 0x80) i++;
  return i;
}

/**
 * The bytes of a line of JSON and its line feed, with every character beyond ASCII written as a
 * JSON escape (RFC 8259 §7: "\u00b5"; beyond the BMP, its two UTF-16 units: "\ud83d\ude15").
 * Only string values can hold such characters in JSON, so every value reads back the same. The
 * file is then plain ASCII: it survives a copy that mangles 8-bit text, and a reader turns it
 * into strings without the slow UTF-8 path (Node 20 decoded the benchmark's file 30 times faster
 * escaped than with its "Ω" as UTF-8: bench/exchange.ts).
 *
 * The line is encoded natively as UTF-8 and only its rare multi-byte sequences are rewritten,
 * the ASCII between them copied in runs (five times faster than a loop over the characters).
 */
export function encodeAsciiLine(line: string): Uint8Array {
  if (!NON_ASCII.test(line)) return asciiLineBytes(line);
  const encoded = encodeUtf8(line);
  const bytes = (encoded.byteOffset & 3) === 0 ? encoded : encoded.slice();
  const words = new Uint32Array(bytes.buffer, bytes.byteOffset, bytes.length >> 2);
  const first = nextNonAscii(bytes, words, 0);
  // First the size: each UTF-8 sequence of 2 or 3 bytes becomes one escape, of 4 bytes two.
  let size = first;
  for (let i = first; i < bytes.length; ) {
    const lead = bytes[i]!;
    const length = lead < 0xe0 ? 2 : lead < 0xf0 ? 3 : 4;
    size += length === 4 ? 12 : 6;
    const next = nextNonAscii(bytes, words, i + length);
    size += next - (i + length);
    i = next;
  }
  const out = new Uint8Array(size + 1);
  out[size] = 0x0a;
  out.set(bytes.subarray(0, first));
  let at = first;
  for (let i = first; i < bytes.length; ) {
    const lead = bytes[i]!;
    if (lead < 0xe0) {
      at = putEscape(out, at, ((lead & 0x1f) << 6) | (bytes[i + 1]! & 0x3f));
      i += 2;
    } else if (lead < 0xf0) {
      at = putEscape(out, at, ((lead & 0x0f) << 12) | ((bytes[i + 1]! & 0x3f) << 6) | (bytes[i + 2]! & 0x3f));
      i += 3;
    } else {
      const offset = (((lead & 0x07) << 18) | ((bytes[i + 1]! & 0x3f) << 12) | ((bytes[i + 2]! & 0x3f) << 6) | (bytes[i + 3]! & 0x3f)) - 0x10000;
      at = putEscape(out, at, 0xd800 + (offset >> 10));
      at = putEscape(out, at, 0xdc00 + (offset & 0x3ff));
      i += 4;
    }
    const next = nextNonAscii(bytes, words, i);
    out.set(bytes.subarray(i, next), at);
    at += next - i;
    i = next;
  }
  return out;
}

/** The bytes `text` takes once written by encodeAsciiLine: six for each character beyond ASCII. */
function asciiLength(text: string): number {
  if (!NON_ASCII.test(text)) return text.length;
  let length = text.length;
  for (let i = 0; i < text.length; i++) if (text.charCodeAt(i) >= 0x80) length += 5;
  return length;
}

/** Lines of one kind of record: whole records, a line ending once it reaches the target size. */
function recordLines(kind: PayloadKey, records: readonly unknown[], out: string[]): void {
  let parts: string[] = [];
  let size = 0;
  for (const record of records) {
    const text = JSON.stringify(record);
    parts.push(text);
    size += asciiLength(text) + 1;
    if (size >= TARGET_LINE_CHARS) {
      out.push(`{"${kind}":[${parts.join(',')}]}`);
      parts = [];
      size = 0;
    }
  }
  if (parts.length > 0) out.push(`{"${kind}":[${parts.join(',')}]}`);
}

/**
 * Bytes a reading takes in a table, near enough to cut lines by: its texts as written, and 96
 * for the rest (numbers, time, kind, separators: a reading without a note takes about 200).
 */
function readingChars(reading: Reading): number {
  return (
    96 +
    reading.id.length +
    asciiLength(reading.text) +
    (reading.note === undefined ? 0 : asciiLength(reading.note)) +
    (reading.supersedes?.length ?? 0) +
    (reading.target === undefined ? 0 : asciiLength(reading.target))
  );
}

/** Lines of jobs, each followed by the lines of those jobs' readings (readings in file order). */
function jobAndReadingLines(jobs: readonly Job[], readings: readonly Reading[], out: string[]): void {
  const place = new Map<string, number>();
  jobs.forEach((job, i) => place.set(job.id, i));
  // Each reading's job as its place among the jobs, looked up once.
  const jobOf = new Int32Array(readings.length);
  readings.forEach((reading, k) => (jobOf[k] = place.get(reading.jobId)!));
  let r = 0;
  let j = 0;
  while (j < jobs.length) {
    // Jobs up to the target size...
    const texts: string[] = [];
    let size = 0;
    while (j < jobs.length && size < TARGET_LINE_CHARS) {
      const text = JSON.stringify(jobs[j++]);
      texts.push(text);
      size += asciiLength(text) + 1;
    }
    out.push(`{"jobs":[${texts.join(',')}]}`);
    // ...then their readings (sorted by job, so the next ones until a later job's).
    const lastJob = j - 1;
    const start = r;
    while (r < readings.length && jobOf[r]! <= lastJob) r++;
    let from = start;
    let chars = 0;
    for (let k = start; k < r; k++) {
      chars += readingChars(readings[k]!);
      if (chars >= TARGET_LINE_CHARS || k === r - 1) {
        out.push(JSON.stringify({ readings: buildReadingTable(readings, from, k + 1, jobOf) }));
        from = k + 1;
        chars = 0;
      }
    }
  }
}

/**
 * Checks and orders the records and writes the file. Throws ExportError when a record breaks
 * the format (the same checks an import makes), so a file this writes always reads back.
 * Rejects when the runtime has no WebCrypto.
 */
export async function buildJobFile(payload: JobPayload, options: WriteOptions): Promise<BuiltFile> {
  const checked = checkForExport(payload, options.exportedAt, options.exportedBy ?? {});
  const records = checked.payload;
  const counts = {} as RecordCounts;
  for (const kind of BLOCK_KINDS) counts[kind] = records[kind].length;
  const lines = [JSON.stringify({ format: FORMAT_ID, schemaVersion: SCHEMA_VERSION, exportedAt: checked.exportedAt, exportedBy: checked.exportedBy, counts })];
  recordLines('technicians', records.technicians, lines);
  recordLines('assets', records.assets, lines);
  jobAndReadingLines(records.jobs, records.readings, lines);
  recordLines('conflicts', records.conflicts, lines);
  recordLines('recordConflicts', records.recordConflicts, lines);

  const hasher = new PieceHasher();
  const parts: Uint8Array[] = new Array(lines.length + 1);
  let bytes = 0;
  for (let i = 0; i < lines.length; i++) {
    const part = encodeAsciiLine(lines[i]!);
    hasher.add(part);
    parts[i] = part;
    bytes += part.byteLength;
  }
  const sha256 = await hasher.finish();
  const seal = encodeUtf8(`{"sha256":"${sha256}"}\n`);
  parts[lines.length] = seal;
  bytes += seal.byteLength;
  const file: JobFile = {
    format: FORMAT_ID,
    schemaVersion: SCHEMA_VERSION,
    exportedAt: checked.exportedAt,
    exportedBy: checked.exportedBy,
    payload: records,
    sha256,
  };
  return { file, parts, bytes };
}

/** The parts of a built file as one array of bytes. */
export const joinParts: (parts: readonly Uint8Array[]) => Uint8Array = concatBytes;

/** The file's text for these records (see buildJobFile): for tests and small files. */
export async function writeJobFile(payload: JobPayload, options: WriteOptions): Promise<string> {
  return decodeUtf8Strict(joinParts((await buildJobFile(payload, options)).parts));
}

/** What to export from a store's records. */
export type ExportSelection =
  | { kind: 'all' }
  | { kind: 'jobs'; jobIds: readonly string[] }
  /**
   * Jobs dated from `from` (inclusive) to `to` (exclusive), either end open. A job's date is
   * when work on it started, else when it was made: the same date the shop review filters by.
   */
  | { kind: 'dates'; from?: IsoTime; to?: IsoTime };

/**
 * The records an export of `selection` carries: the chosen jobs, all their readings and
 * conflicts, and the assets and technicians they name (and those records' conflicts).
 */
export function selectForExport(store: JobPayload, selection: ExportSelection): JobPayload {
  if (selection.kind === 'all') return store;
  let keep: (job: Job) => boolean;
  if (selection.kind === 'jobs') {
    const ids = new Set(selection.jobIds);
    keep = (job) => ids.has(job.id);
  } else {
    const { from, to } = selection;
    keep = (job) => {
      const date = jobDate(job);
      return (from === undefined || date >= from) && (to === undefined || date < to);
    };
  }
  const jobs = store.jobs.filter(keep);
  const jobIds = new Set(jobs.map((job) => job.id));
  const assetIds = new Set(jobs.flatMap((job) => (job.assetId === undefined ? [] : [job.assetId])));
  const technicianIds = new Set(jobs.map((job) => job.technicianId));
  return {
    jobs,
    readings: store.readings.filter((reading) => jobIds.has(reading.jobId)),
    assets: store.assets.filter((asset) => assetIds.has(asset.id)),
    technicians: store.technicians.filter((technician) => technicianIds.has(technician.id)),
    conflicts: store.conflicts.filter((conflict) => jobIds.has(conflict.jobId)),
    recordConflicts: store.recordConflicts.filter((conflict) =>
      conflict.record === 'asset' ? assetIds.has(conflict.id) : technicianIds.has(conflict.id),
    ),
  };
}
