/**
 * Reading a job file: bytes in, as they arrive, checked records or a list of problems out.
 *
 * `JobFileReader` takes the file in chunks (a stream from disk or from a browser's File) and
 * finds out from its first line which version it is: a version-2 file (JSON Lines) is checked a
 * line at a time as the chunks come (read-v2.ts), so memory holds the records and one line; a
 * version-1 file (one JSON object) is gathered and read whole at the end (read-v1.ts).
 * `readJobFile` is the same for bytes or text already in memory.
 */
import { concatBytes, decodeUtf8Strict, encodeUtf8 } from './canonical';
import { FORMAT_ID, LIMITS, type ExchangeProblem } from './format';
import { readVersion1 } from './read-v1';
import { LINE_LIMIT_MESSAGE, LinesReader } from './read-v2';
import { checkIdentity, refuse, type FileContent, type ReadResult } from './read-common';

export type { FileContent, ReadResult } from './read-common';
export { checkPayload, checkReferences } from './payload';
export { digestText } from './read-v1';

/** A version-2 head is a few hundred bytes; a first line longer than this is not one. */
const HEAD_PROBE_BYTES = 65_536;
const BOM = [0xef, 0xbb, 0xbf];

/** The first line's JSON value, or undefined when it is not UTF-8 JSON. */
function parseFirstLine(line: Uint8Array): { value: unknown } | undefined {
  try {
    return { value: JSON.parse(decodeUtf8Strict(line)) };
  } catch {
    return undefined;
  }
}

/**
 * Whether a value is a job file laid out as one object: our format, and schema version 1 or a
 * `payload` member (which no version-2 head has). The version-1 reader reads it, or says why not.
 */
function isOneObject(value: unknown): boolean {
  if (typeof value !== 'object' || value === null || Array.isArray(value)) return false;
  const object = value as Record<string, unknown>;
  if (!Object.hasOwn(object, 'format') || object.format !== FORMAT_ID) return false;
  return (Object.hasOwn(object, 'schemaVersion') && object.schemaVersion === 1) || Object.hasOwn(object, 'payload');
}

/**
 * Reads one job file given in chunks. `push` each chunk in order (the reader keeps references
 * to them until it is done with their lines: do not change a chunk after pushing it), then
 * `finish`. Never throws for anything in the file: every fault comes back as problems naming
 * the file, and the line, job, record and field when known. `finish` rejects only when the
 * runtime has no WebCrypto.
 */
export class JobFileReader {
  private mode: 'start' | 'v1' | 'v2' | 'refused' = 'start';
  /** start and v1: every chunk so far. v2: the pieces of the line not yet ended. */
  private chunks: Uint8Array[] = [];
  private pending = 0;
  private total = 0;
  private lineNumber = 0;
  private lines: LinesReader | undefined;
  private refusal: ReadResult | undefined;

  constructor(readonly name: string) {}

  /** Bytes taken so far. */
  get bytesRead(): number {
    return this.total;
  }

  push(chunk: Uint8Array): void {
    if (this.mode === 'refused' || chunk.byteLength === 0) return;
    this.total += chunk.byteLength;
    if (this.total > LIMITS.fileBytes) {
      this.stop(refuse(this.name, `the file is too large (more than ${LIMITS.fileBytes} bytes, the most a job file may have)`));
      return;
    }
    if (this.mode === 'v2') {
      this.feed(chunk);
      return;
    }
    this.chunks.push(chunk);
    this.pending += chunk.byteLength;
    // Only once the first line is complete, or too long to be a head (so tiny chunks cost no
    // repeated joining).
    if (this.mode === 'start' && (chunk.includes(0x0a) || this.pending > HEAD_PROBE_BYTES + BOM.length)) this.detect(false);
  }

  private stop(result: ReadResult): void {
    this.mode = 'refused';
    this.refusal = result;
    this.chunks = [];
    this.lines = undefined;
  }

  /** In 'start': once the first line is complete (or cannot be a head), choose the version. */
  private detect(ended: boolean): void {
    const bytes = concatBytes(this.chunks);
    // A byte-order mark is skipped: it is not part of the file's text (nor of its digest).
    const bomBytes = Math.min(bytes.length, BOM.length);
    let isBom = true;
    for (let i = 0; i < bomBytes; i++) if (bytes[i] !== BOM[i]) isBom = false;
    if (isBom && bytes.length < BOM.length && !ended) {
      this.chunks = [bytes];
      return;
    }
    const start = isBom && bytes.length >= BOM.length ? BOM.length : 0;
    const lf = bytes.indexOf(0x0a, start);
    // The first line ends at its line feed, or at the end of a file that has none.
    const lineEnd = lf !== -1 ? lf : ended ? bytes.length : -1;
    if (lineEnd === -1 && bytes.length - start <= HEAD_PROBE_BYTES) {
      this.chunks = [bytes];
      return;
    }
    // A first line too long for a head, or not JSON: version 1 (one object, perhaps re-indented),
    // or not a job file at all, which the version-1 reader names. Read whole at the end.
    const first = lineEnd !== -1 && lineEnd - start <= HEAD_PROBE_BYTES ? parseFirstLine(bytes.subarray(start, lineEnd)) : undefined;
    if (first === undefined || isOneObject(first.value)) {
      this.mode = 'v1';
      this.chunks = [bytes];
      return;
    }
    const identity = checkIdentity(first.value);
    if ('message' in identity) {
      const problem = refuse(this.name, identity.message, identity.field);
      // A head of ours from another version: its line. Anything else is simply not a job file.
      if (identity.field === 'schemaVersion') (problem.problems[0] as ExchangeProblem).line = 1;
      this.stop(problem);
      return;
    }
    this.mode = 'v2';
    this.chunks = [];
    this.pending = 0;
    this.lineNumber = 1;
    this.lines = new LinesReader(this.name, bytes.subarray(start, lineEnd), first.value as Record<string, unknown>);
    if (lf !== -1) this.feed(bytes.subarray(lf + 1));
  }

  /** v2: cuts lines out of a chunk and hands them over; keeps the unfinished tail. */
  private feed(chunk: Uint8Array): void {
    let at = 0;
    while (at < chunk.byteLength) {
      const lf = chunk.indexOf(0x0a, at);
      if (lf === -1) {
        this.chunks.push(chunk.subarray(at));
        this.pending += chunk.byteLength - at;
        if (this.pending > LIMITS.lineBytes) this.stop(refuse(this.name, LINE_LIMIT_MESSAGE(this.lineNumber + 1, this.pending)));
        return;
      }
      let line = chunk.subarray(at, lf);
      if (this.chunks.length > 0) {
        this.chunks.push(line);
        line = concatBytes(this.chunks);
        this.chunks = [];
        this.pending = 0;
      }
      this.lineNumber += 1;
      if (line.byteLength > LIMITS.lineBytes) {
        this.stop(refuse(this.name, LINE_LIMIT_MESSAGE(this.lineNumber, line.byteLength)));
        return;
      }
      this.lines!.line(line, this.lineNumber, false);
      at = lf + 1;
    }
  }

  /** The file has ended: resolves to the checked file or its problems. */
  async finish(): Promise<ReadResult> {
    if (this.mode === 'start') this.detect(true);
    if (this.mode === 'refused') return this.refusal!;
    if (this.mode === 'v1') {
      const bytes = concatBytes(this.chunks);
      this.chunks = [];
      return readVersion1(bytes, this.name);
    }
    const lines = this.lines!;
    if (this.pending > 0) {
      const last = concatBytes(this.chunks);
      this.chunks = [];
      this.pending = 0;
      lines.line(last, this.lineNumber + 1, true);
    }
    return lines.finish();
  }
}

/**
 * Reads one job file from its bytes (checked as strict UTF-8; a leading byte-order mark is
 * ignored) or its text. See JobFileReader. The bytes are not changed, but must not be changed
 * by anyone else until the promise settles.
 */
export async function readJobFile(content: FileContent, name: string): Promise<ReadResult> {
  if (typeof content === 'string' && content.length > LIMITS.fileBytes) {
    return refuse(name, `the file is too large (${content.length} characters; a job file may have at most ${LIMITS.fileBytes} bytes)`);
  }
  const reader = new JobFileReader(name);
  reader.push(typeof content === 'string' ? encodeUtf8(content) : content);
  return reader.finish();
}

/**
 * One problem as a line of plain text: "FILE: line N: job J: reading R: FIELD: message",
 * leaving out the parts that are not known.
 */
export function formatProblem(problem: ExchangeProblem): string {
  const parts = [problem.file];
  if (problem.line !== undefined) parts.push(`line ${problem.line}`);
  if (problem.jobId !== undefined && problem.record !== `job ${problem.jobId}`) parts.push(`job ${problem.jobId}`);
  if (problem.record !== undefined) parts.push(problem.record);
  if (problem.field !== undefined) parts.push(problem.field);
  parts.push(problem.message);
  return parts.join(': ');
}

/** All of a failed read's problems as lines, with "and N more" when some were not listed. */
export function formatProblems(result: Extract<ReadResult, { ok: false }>): string[] {
  const lines = result.problems.map(formatProblem);
  const unlisted = result.problemCount - result.problems.length;
  if (unlisted > 0) lines.push(`${result.name}: and ${unlisted} more problem${unlisted === 1 ? '' : 's'}`);
  return lines;
}
