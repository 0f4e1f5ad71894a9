/**
 * Reading a version-2 job file, a line at a time (docs/exchange-format.md): the head, blocks of
 * records, the seal. The lines come from parse.ts's JobFileReader, which cuts them out of the
 * bytes as they arrive, so a file of any size is read with one line in hand at a time besides
 * the records themselves.
 *
 * Each line is checked as it comes: UTF-8, JSON, its kind of block, every record (schema.ts, or
 * lines.ts for the reading table). A line that is not JSON stops the checking of the lines after
 * it (their records could not be placed), but not the digest, so the report can still say
 * whether the file was damaged after export. At the end: the counts the head promised, the
 * references between records, and the digest.
 */
import { decodeUtf8Strict } from './canonical';
import { PieceHasher } from './digest';
import { FORMAT_ID, LIMITS, SCHEMA_VERSION, type ExportedBy, type JobFile, type JobPayload } from './format';
import { BLOCK_KIND_SET, BLOCK_KINDS, HEAD_KEYS, readReadingTable, type RecordCounts } from './lines';
import { checkRecordList, checkReferences, RECORD_LISTS, type PayloadKey } from './payload';
import { ALTERED, describeJsonError, HEX64, type ReadResult } from './read-common';
import { Checker, checkExportedBy, describeType, INVALID, isoTime, reportUnknownKeys, unknownFieldMessage } from './schema';

const NEWLINE = new Uint8Array([0x0a]);

const ALTERED_CRLF = `${ALTERED} (its lines end in CR LF: was it copied as text, or opened and saved in an editor?)`;

/** Whether every byte is a space, tab, CR or LF. */
function isBlank(bytes: Uint8Array): boolean {
  for (const byte of bytes) if (byte !== 0x20 && byte !== 0x09 && byte !== 0x0d && byte !== 0x0a) return false;
  return true;
}

function isPlainObject(value: unknown): value is Record<string, unknown> {
  return typeof value === 'object' && value !== null && !Array.isArray(value);
}

/** Checks the head's `counts`: one whole number per kind of record, within the limits. */
function checkCounts(value: unknown, c: Checker): RecordCounts | undefined {
  c.enter('counts');
  try {
    if (!isPlainObject(value)) {
      c.fail(`expected the number of records of each kind, got ${describeType(value)}`);
      return undefined;
    }
    reportUnknownKeys(value, BLOCK_KIND_SET, c);
    const counts = {} as RecordCounts;
    let ok = true;
    for (const kind of BLOCK_KINDS) {
      c.enter(kind);
      const count = Object.hasOwn(value, kind) ? value[kind] : undefined;
      const max = RECORD_LISTS[kind].maxItems;
      if (count === undefined) ok = c.fail('missing (write 0 when there are none)') !== INVALID;
      else if (typeof count !== 'number' || !Number.isInteger(count) || count < 0) ok = c.fail(`expected a whole number, got ${describeType(count)}`) !== INVALID;
      else if (count > max) ok = c.fail(`too many ${RECORD_LISTS[kind].label}s (${count}; at most ${max})`) !== INVALID;
      else counts[kind] = count;
      c.leave();
    }
    return ok && c.problemCount === 0 ? counts : undefined;
  } finally {
    c.leave();
  }
}

/** The version-2 reader: fed the head, then each further line in order, then finished once. */
export class LinesReader {
  private readonly c: Checker;
  private readonly hasher = new PieceHasher();
  private readonly exportedAt: string | undefined;
  private readonly exportedBy: ExportedBy | undefined;
  private readonly counts: RecordCounts | undefined;
  /** Records of each kind seen so far (read or refused), which numbers them in messages. */
  private readonly seen: RecordCounts = { technicians: 0, assets: 0, jobs: 0, readings: 0, conflicts: 0, recordConflicts: 0 };
  private readonly payload: JobPayload = { jobs: [], readings: [], assets: [], technicians: [], conflicts: [], recordConflicts: [] };
  /** Per kind, where each of its lines starts: [index of the line's first record, line number]. */
  private readonly lineStarts: Record<PayloadKey, [number, number][]> = { technicians: [], assets: [], jobs: [], readings: [], conflicts: [], recordConflicts: [] };
  private sha256: string | undefined;
  private sealLine: number | undefined;
  /** A line could not be read: the lines after it are hashed, not checked. */
  private broken = false;
  private crlf = false;
  private lastLine = 1;

  /**
   * @param name   the file's name, for messages
   * @param head   the first line's bytes (its newline not included) and its parsed value,
   *               already known to be a version-2 job file's head (parse.ts)
   */
  constructor(
    private readonly name: string,
    head: Uint8Array,
    parsed: Record<string, unknown>,
  ) {
    this.c = new Checker(name, false);
    const c = this.c;
    this.hash(head);
    c.line = 1;
    reportUnknownKeys(parsed, HEAD_KEYS, c);
    c.enter('exportedAt');
    const exportedAt = Object.hasOwn(parsed, 'exportedAt') ? isoTime(parsed.exportedAt, c) : c.fail('missing');
    c.leave();
    c.enter('exportedBy');
    const exportedBy = Object.hasOwn(parsed, 'exportedBy') ? checkExportedBy(parsed.exportedBy, c) : c.fail('missing');
    c.leave();
    if (exportedAt !== INVALID) this.exportedAt = exportedAt as string;
    if (exportedBy !== INVALID) this.exportedBy = exportedBy as ExportedBy;
    if (Object.hasOwn(parsed, 'counts')) this.counts = checkCounts(parsed.counts, c);
    else {
      c.enter('counts');
      c.fail('missing');
      c.leave();
    }
    if (head[head.length - 1] === 0x0d) this.crlf = true;
    c.line = undefined;
    // Without counts the blocks cannot be held to them: the head's problems are the report.
    if (this.counts === undefined) this.broken = true;
  }

  private hash(line: Uint8Array): void {
    this.hasher.add(line);
    this.hasher.add(NEWLINE);
  }

  private failOnLine(line: number, message: string): void {
    this.c.line = line;
    this.c.fail(message);
    this.c.line = undefined;
  }

  /**
   * One line after the head: its bytes without the newline, its number (the head is 1), and
   * whether the file ended on it without a newline.
   */
  line(bytes: Uint8Array, number: number, unterminated: boolean): void {
    this.lastLine = number;
    if (this.sealLine !== undefined) {
      if (isBlank(bytes)) return;
      if (!this.broken) this.failOnLine(number, `something follows the seal on line ${this.sealLine}, which ends a job file`);
      this.broken = true;
      return;
    }
    if (bytes.length > 0 && bytes[bytes.length - 1] === 0x0d) this.crlf = true;
    if (bytes.length === 0 || isBlank(bytes)) {
      this.hash(bytes);
      if (!this.broken) this.failOnLine(number, 'a blank line: every line of a job file holds one JSON object');
      return;
    }
    let parsed: unknown;
    try {
      const text = decodeUtf8Strict(bytes);
      try {
        parsed = JSON.parse(text);
      } catch (error) {
        this.hash(bytes);
        if (!this.broken) {
          this.failOnLine(
            number,
            unterminated
              ? `the file ends in the middle of line ${number}: it is truncated (an interrupted copy or download?)`
              : describeJsonError(error, text, false),
          );
        }
        this.broken = true;
        return;
      }
    } catch {
      this.hash(bytes);
      if (!this.broken) this.failOnLine(number, 'not UTF-8 text: the file is damaged');
      this.broken = true;
      return;
    }
    if (isPlainObject(parsed) && Object.hasOwn(parsed, 'sha256') && Object.keys(parsed).length === 1) {
      this.seal(parsed.sha256, number);
      return;
    }
    this.hash(bytes);
    if (!this.broken) this.block(parsed, number);
  }

  private seal(sha256: unknown, number: number): void {
    this.sealLine = number;
    if (typeof sha256 === 'string' && HEX64.test(sha256)) this.sha256 = sha256;
    else {
      this.c.line = number;
      this.c.enter('sha256');
      this.c.fail(`expected 64 lowercase hex digits (the SHA-256 digest), got ${describeType(sha256)}`);
      this.c.leave();
      this.c.line = undefined;
    }
  }

  private block(parsed: unknown, number: number): void {
    const c = this.c;
    c.line = number;
    try {
      const keys = isPlainObject(parsed) ? Object.keys(parsed) : [];
      const kind = keys.length === 1 && BLOCK_KIND_SET.has(keys[0]!) ? (keys[0] as PayloadKey) : undefined;
      if (kind === undefined) {
        const what = !isPlainObject(parsed)
          ? describeType(parsed)
          : keys.length === 0
            ? 'an empty object'
            : keys.map((key) => (BLOCK_KIND_SET.has(key) ? `"${key}"` : unknownFieldMessage(key))).join(', ');
        c.fail(`a line holds one kind of record: an object with one member, ${BLOCK_KINDS.map((k) => `"${k}"`).join(', ')}; this one has ${what}`);
        return;
      }
      const content = (parsed as Record<string, unknown>)[kind];
      const label = RECORD_LISTS[kind].label;
      const count = kind === 'readings' ? readingCount(content) : Array.isArray(content) ? content.length : undefined;
      if (count !== undefined && this.seen[kind] + count > this.counts![kind]) {
        c.fail(`more ${label}s than the head line says (${this.counts![kind]}): the file is damaged`);
        this.broken = true;
        return;
      }
      if (kind === 'readings') {
        const readings = readReadingTable(content, c, this.seen.readings, this.payload.jobs);
        if (readings !== undefined) for (const reading of readings) this.payload.readings.push(reading);
      } else if (!Array.isArray(content)) {
        c.enter(kind);
        c.fail(`expected a list of ${label}s, got ${describeType(content)}`);
        c.leave();
      } else {
        const checked = checkRecordList(content, kind, c, this.seen[kind]);
        // Jobs are kept even when refused, so readings after them still find their job by place.
        const list = this.payload[kind] as unknown[];
        for (const item of checked ?? content) list.push(item);
      }
      if (count !== undefined && count > 0) this.lineStarts[kind].push([this.seen[kind], number]);
      this.seen[kind] += count ?? 0;
    } finally {
      c.line = undefined;
    }
  }

  /** The line the file's record `index` of this kind is on. */
  private lineOf(kind: PayloadKey, index: number): number {
    const starts = this.lineStarts[kind];
    let low = 0;
    let high = starts.length - 1;
    while (low < high) {
      const middle = (low + high + 1) >> 1;
      if (starts[middle]![0] <= index) low = middle;
      else high = middle - 1;
    }
    return starts[low]![1];
  }

  /** The file ended: counts, references, digest. */
  async finish(): Promise<ReadResult> {
    const c = this.c;
    if (!this.broken && this.sealLine === undefined) {
      this.failOnLine(this.lastLine + 1, 'the file ends before its seal line (the last, with the digest): it is truncated (an interrupted copy or download?)');
    }
    if (!this.broken && this.counts !== undefined && this.sealLine !== undefined) {
      for (const kind of BLOCK_KINDS) {
        if (this.seen[kind] !== this.counts[kind]) {
          this.failOnLine(1, `the head line says ${this.counts[kind]} ${RECORD_LISTS[kind].label}s, the file holds ${this.seen[kind]}: the file is damaged`);
        }
      }
    }
    if (c.problemCount === 0) checkReferences(this.payload, c, (kind, index) => this.lineOf(kind, index));
    const digest = await this.hasher.finish();
    const altered = this.sha256 !== undefined && digest !== this.sha256;
    const alteredProblem = { file: this.name, line: this.sealLine!, field: 'sha256', message: this.crlf ? ALTERED_CRLF : ALTERED };
    if (c.problemCount > 0 || this.exportedAt === undefined || this.exportedBy === undefined || this.sha256 === undefined) {
      const problems = [...c.problems];
      let problemCount = c.problemCount;
      if (altered) {
        problems.unshift(alteredProblem);
        problemCount += 1;
      }
      return { ok: false, name: this.name, problems, problemCount };
    }
    if (altered) return { ok: false, name: this.name, problems: [alteredProblem], problemCount: 1 };
    const file: JobFile = {
      format: FORMAT_ID,
      schemaVersion: SCHEMA_VERSION,
      exportedAt: this.exportedAt,
      exportedBy: this.exportedBy,
      payload: this.payload,
      sha256: this.sha256,
    };
    return { ok: true, name: this.name, file };
  }
}

/** How many readings a table holds, as its `id` column says (undefined when it has none). */
function readingCount(table: unknown): number | undefined {
  if (!isPlainObject(table) || !Object.hasOwn(table, 'id') || !Array.isArray(table.id)) return undefined;
  return table.id.length;
}

/** Why a line too long to be a job file's is refused (parse.ts stops reading there). */
export const LINE_LIMIT_MESSAGE = (number: number, bytes: number) =>
  `line ${number} is too long (${bytes} bytes or more; a line of a job file has at most ${LIMITS.lineBytes}): the file is damaged or is not a job file`;
