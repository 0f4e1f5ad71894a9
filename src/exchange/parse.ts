/**
 * Reading a job file: bytes or text in, checked records or a list of problems out.
 *
 * Order of the checks, each stopping the read when it fails: size; UTF-8; JSON; that it is our
 * format; the schema version; every record field by field (schema.ts); references between
 * records; the SHA-256 digest. When records are refused, the digest is still computed over what
 * was parsed, so the report can say whether the file was damaged after export or exported wrong.
 */
import { canonicalJson, decodeUtf8Strict, sha256Hex, sha256HexOfBytes } from './canonical';
import {
  FORMAT_ID,
  LIMITS,
  SCHEMA_VERSION,
  type ExchangeProblem,
  type ExportedBy,
  type JobFile,
  type JobPayload,
} from './format';
import {
  Checker,
  checkAsset,
  checkConflict,
  checkExportedBy,
  checkJob,
  checkReading,
  checkRecordConflict,
  checkTechnician,
  describeType,
  INVALID,
  isoTime,
  reportUnknownKeys,
  type Check,
} from './schema';

export type ReadResult =
  | { ok: true; name: string; file: JobFile }
  | {
      ok: false;
      name: string;
      /** The first LIMITS.problemsListed problems. */
      problems: ExchangeProblem[];
      /** How many there were in all. */
      problemCount: number;
    };

const HEX64 = /^[0-9a-f]{64}$/;
const ENVELOPE_KEYS = new Set(['format', 'schemaVersion', 'exportedAt', 'exportedBy', 'payload', 'sha256']);
const PAYLOAD_KEYS = ['assets', 'conflicts', 'jobs', 'readings', 'recordConflicts', 'technicians'] as const;
const PAYLOAD_KEY_SET: ReadonlySet<string> = new Set(PAYLOAD_KEYS);

function refuse(name: string, message: string, field?: string): ReadResult {
  const problem: ExchangeProblem = { file: name, message };
  if (field !== undefined) problem.field = field;
  return { ok: false, name, problems: [problem], problemCount: 1 };
}

function describeJsonError(error: unknown, text: string): string {
  const message = error instanceof Error ? error.message : String(error);
  const at = /at position (\d+)/.exec(message);
  const position = at ? Number(at[1]) : undefined;
  if (/end of JSON/i.test(message) || position === text.trimEnd().length) {
    return 'the file ends before its JSON is complete: it is truncated (an interrupted copy or download?)';
  }
  if (error instanceof RangeError) return `the JSON is nested too deeply to read (${message})`;
  return `not valid JSON${position === undefined ? '' : ` at character ${position}`}: the file is damaged or is not a job file (${message})`;
}

/** Bytes of a file or its text, whichever the caller has. */
export type FileContent = string | Uint8Array;

function decode(content: FileContent, name: string): string | ReadResult {
  const size = typeof content === 'string' ? content.length : content.byteLength;
  if (size > LIMITS.fileBytes) {
    return refuse(name, `the file is too large (${size} bytes; a job file may have at most ${LIMITS.fileBytes})`);
  }
  let text: string;
  if (typeof content === 'string') text = content;
  else {
    try {
      text = decodeUtf8Strict(content);
    } catch {
      return refuse(name, 'not UTF-8 text: the file is damaged, or it is not a job file');
    }
  }
  if (text.charCodeAt(0) === 0xfeff) text = text.slice(1);
  if (text.trim() === '') return refuse(name, 'the file is empty');
  return text;
}

/**
 * Checks the envelope members that say whether this is a job file we can read at all.
 * Returns a refusal, or undefined to go on.
 */
function checkIdentity(parsed: unknown, name: string): ReadResult | undefined {
  if (typeof parsed !== 'object' || parsed === null || Array.isArray(parsed)) {
    return refuse(name, `not a Ripplewright job file: it holds ${describeType(parsed)}, not a job file object`);
  }
  const envelope = parsed as Record<string, unknown>;
  const format = Object.hasOwn(envelope, 'format') ? envelope.format : undefined;
  if (format !== FORMAT_ID) {
    const what = format === undefined ? 'it has no "format" member' : `its format is ${describeType(format)}`;
    return refuse(name, `not a Ripplewright job file: ${what}; expected "format": "${FORMAT_ID}"`, 'format');
  }
  const version = Object.hasOwn(envelope, 'schemaVersion') ? envelope.schemaVersion : undefined;
  if (typeof version !== 'number' || !Number.isInteger(version)) {
    return refuse(name, `the schema version should be a whole number, got ${describeType(version)}`, 'schemaVersion');
  }
  if (version > SCHEMA_VERSION) {
    return refuse(
      name,
      `made by a newer version of Ripplewright (schema version ${version}; this one reads version ${SCHEMA_VERSION}): update Ripplewright to import it`,
      'schemaVersion',
    );
  }
  if (version < SCHEMA_VERSION) {
    return refuse(name, `unknown schema version ${version} (this version of Ripplewright reads version ${SCHEMA_VERSION})`, 'schemaVersion');
  }
  return undefined;
}

/** Checks each list item with a record label and job id taken from the raw item, for messages. */
function checkRecords(
  list: unknown,
  check: Check,
  c: Checker,
  key: (typeof PAYLOAD_KEYS)[number],
  label: string,
  maxItems: number,
  jobIdKey: 'id' | 'jobId' | undefined,
): unknown[] | undefined {
  c.enter(key);
  try {
    if (!Array.isArray(list)) {
      c.fail(`expected a list of ${label}s, got ${describeType(list)}`);
      return undefined;
    }
    if (list.length > maxItems) {
      c.fail(`too many ${label}s (${list.length}; at most ${maxItems})`);
      return undefined;
    }
    const out: unknown[] | undefined = c.copy ? new Array(list.length) : undefined;
    let ok = true;
    c.recordKind = label;
    for (let i = 0; i < list.length; i++) {
      const item: unknown = list[i];
      // Read for messages only; the record's own check decides whether they are valid.
      const raw = typeof item === 'object' && item !== null ? (item as Record<string, unknown>) : undefined;
      const itemId = raw !== undefined && Object.hasOwn(raw, 'id') ? raw.id : undefined;
      const jobId = raw !== undefined && jobIdKey !== undefined && Object.hasOwn(raw, jobIdKey) ? raw[jobIdKey] : undefined;
      c.recordId = typeof itemId === 'string' ? itemId : undefined;
      c.jobId = typeof jobId === 'string' ? jobId.slice(0, 100) : undefined;
      c.enter(i);
      const checked = check(item, c);
      c.leave();
      if (checked === INVALID) ok = false;
      if (out) out[i] = checked;
    }
    c.recordKind = undefined;
    c.recordId = undefined;
    c.jobId = undefined;
    return ok ? (out ?? list) : undefined;
  } finally {
    c.leave();
  }
}

/**
 * Checks a payload object (parsed from a file, or records from the store before export) and
 * returns the rebuilt copy, or undefined after reporting its problems to `c`.
 */
export function checkPayload(value: unknown, c: Checker): JobPayload | undefined {
  c.enter('payload');
  try {
    if (typeof value !== 'object' || value === null || Array.isArray(value)) {
      c.fail(`expected the payload object, got ${describeType(value)}`);
      return undefined;
    }
    const raw = value as Record<string, unknown>;
    reportUnknownKeys(raw, PAYLOAD_KEY_SET, c);
    const list = (key: (typeof PAYLOAD_KEYS)[number], check: Check, label: string, maxItems: number, jobIdKey: 'id' | 'jobId' | undefined) => {
      if (Object.hasOwn(raw, key)) return checkRecords(raw[key], check, c, key, label, maxItems, jobIdKey);
      c.enter(key);
      c.fail('missing (write an empty list when there are none)');
      c.leave();
      return undefined;
    };
    const jobs = list('jobs', checkJob, 'job', LIMITS.jobs, 'id');
    const readings = list('readings', checkReading, 'reading', LIMITS.readings, 'jobId');
    const assets = list('assets', checkAsset, 'asset', LIMITS.assets, undefined);
    const technicians = list('technicians', checkTechnician, 'technician', LIMITS.technicians, undefined);
    const conflicts = list('conflicts', checkConflict, 'conflict', LIMITS.conflicts, 'jobId');
    const recordConflicts = list('recordConflicts', checkRecordConflict, 'record conflict', LIMITS.conflicts, undefined);
    if (!jobs || !readings || !assets || !technicians || !conflicts || !recordConflicts || c.problemCount > 0) return undefined;
    // Members in sorted order: JSON.stringify of this object is canonical (see canonical.ts).
    return { assets, conflicts, jobs, readings, recordConflicts, technicians } as unknown as JobPayload;
  } finally {
    c.leave();
  }
}

/** References between records: unique ids, and every id a record names is in the file. Reports to `c`. */
export function checkReferences(payload: JobPayload, c: Checker): void {
  const fail = (path: string, index: number, message: string, jobId?: string, record?: string) => {
    c.enter('payload');
    c.enter(path);
    c.enter(index);
    c.jobId = jobId;
    c.record = record;
    c.fail(message);
    c.jobId = undefined;
    c.record = undefined;
    c.leave();
    c.leave();
    c.leave();
  };
  const indexIds = <T extends { id: string }>(list: T[], path: string, label: string, jobIdOf: (item: T) => string | undefined) => {
    const ids = new Map<string, T>();
    for (let i = 0; i < list.length; i++) {
      const item = list[i]!;
      if (ids.has(item.id)) fail(path, i, `the id ${item.id} appears twice in this file`, jobIdOf(item), `${label} ${item.id}`);
      else ids.set(item.id, item);
    }
    return ids;
  };
  const jobs = indexIds(payload.jobs, 'jobs', 'job', (job) => job.id);
  const readings = indexIds(payload.readings, 'readings', 'reading', (reading) => reading.jobId);
  const assets = indexIds(payload.assets, 'assets', 'asset', () => undefined);
  const technicians = indexIds(payload.technicians, 'technicians', 'technician', () => undefined);
  payload.jobs.forEach((job, i) => {
    if (!technicians.has(job.technicianId)) {
      fail('jobs', i, `names technician ${job.technicianId}, who is not in the file's technicians`, job.id, `job ${job.id}`);
    }
    if (job.assetId !== undefined && !assets.has(job.assetId)) {
      fail('jobs', i, `names asset ${job.assetId}, which is not in the file's assets`, job.id, `job ${job.id}`);
    }
  });
  for (let i = 0; i < payload.readings.length; i++) {
    const reading = payload.readings[i]!;
    if (!jobs.has(reading.jobId)) fail('readings', i, `belongs to job ${reading.jobId}, which is not in the file`, reading.jobId, `reading ${reading.id}`);
    if (reading.supersedes !== undefined) {
      const old = readings.get(reading.supersedes);
      if (old === undefined) fail('readings', i, `corrects reading ${reading.supersedes}, which is not in the file`, reading.jobId, `reading ${reading.id}`);
      else if (old.jobId !== reading.jobId) fail('readings', i, `corrects reading ${reading.supersedes} of another job`, reading.jobId, `reading ${reading.id}`);
    }
  }
  payload.conflicts.forEach((conflict, i) => {
    if (!jobs.has(conflict.jobId)) fail('conflicts', i, `is about job ${conflict.jobId}, which is not in the file`, conflict.jobId);
  });
  payload.recordConflicts.forEach((conflict, i) => {
    const known = conflict.record === 'asset' ? assets : technicians;
    if (!known.has(conflict.id)) fail('recordConflicts', i, `is about ${conflict.record} ${conflict.id}, which is not in the file`);
  });
}

/**
 * The exact text the digest is computed over, for a file whose records were copied in sorted
 * order by schema.ts (a Checker with copies, as write.ts uses): canonical JSON of the file
 * object without `sha256`. The envelope's members are put in sorted order here (exportedAt,
 * exportedBy, format, payload, schemaVersion), so JSON.stringify gives the canonical text.
 */
export function digestText(file: Omit<JobFile, 'sha256'>): string {
  const ordered = {
    exportedAt: file.exportedAt,
    exportedBy: file.exportedBy,
    format: file.format,
    payload: file.payload,
    schemaVersion: file.schemaVersion,
  };
  return JSON.stringify(ordered);
}

const ALTERED =
  'altered or damaged: the SHA-256 digest does not match the content, so the file changed after it was exported';

async function digestOfRaw(envelope: Record<string, unknown>): Promise<string | undefined> {
  try {
    const { sha256: _ignored, ...rest } = envelope;
    return await sha256Hex(canonicalJson(rest));
  } catch {
    return undefined;
  }
}

const DIGEST_SUFFIX_BYTES = ',"sha256":"'.length + 64 + '"}'.length;

/**
 * The fast way to the same digest for a file as write.ts lays it out: canonical JSON with
 * `,"sha256":"<hex>"}` last (and maybe a newline). Those bytes minus that member are the
 * canonical text, so they are hashed as they stand, with no re-serialising. True when they
 * match `sha256`; false means "use the definition" (a re-indented or damaged file).
 */
async function digestOfWrittenLayout(content: FileContent, sha256: string): Promise<boolean> {
  // Text, or bytes behind a byte-order mark: not the written layout.
  if (typeof content === 'string' || content[0] !== 0x7b) return false;
  let end = content.byteLength;
  if (content[end - 1] === 0x0a) end -= 1;
  const start = end - DIGEST_SUFFIX_BYTES;
  if (start <= 0) return false;
  const suffix = `,"sha256":"${sha256}"}`;
  for (let i = 0; i < DIGEST_SUFFIX_BYTES; i++) if (content[start + i] !== suffix.charCodeAt(i)) return false;
  // The canonical text is the bytes up to the "," before "sha256", then "}". Rather than copy
  // 200 MB, that "," becomes "}" while digest() takes its copy of the bytes (WebCrypto copies
  // them before it returns, Web Cryptography API §14.3.x "digest" step 2) and is put back at
  // once. So the caller's bytes must not be shared with another thread during the call.
  const digestDone = sha256HexOfSlice(content, start);
  return (await digestDone) === sha256;
}

function sha256HexOfSlice(bytes: Uint8Array, comma: number): Promise<string> {
  bytes[comma] = 0x7d; // "}"
  try {
    return sha256HexOfBytes(bytes.subarray(0, comma + 1));
  } finally {
    bytes[comma] = 0x2c; // ","
  }
}

/**
 * Reads one job file. `content` is the file's bytes (checked as strict UTF-8; a leading BOM is
 * ignored) or its text; `name` labels every problem. Never throws for anything in the file:
 * every fault comes back as problems naming the file, and the job, record and field when known.
 * Resolves to the checked file (records rebuilt from known fields only, members sorted) or the
 * problems. Rejects only when the runtime has no WebCrypto.
 */
export async function readJobFile(content: FileContent, name: string): Promise<ReadResult> {
  const text = decode(content, name);
  if (typeof text !== 'string') return text;
  let parsed: unknown;
  try {
    parsed = JSON.parse(text);
  } catch (error) {
    return refuse(name, describeJsonError(error, text));
  }
  const refusal = checkIdentity(parsed, name);
  if (refusal) return refusal;
  const envelope = parsed as Record<string, unknown>;

  const c = new Checker(name, false);
  reportUnknownKeys(envelope, ENVELOPE_KEYS, c);
  c.enter('exportedAt');
  const exportedAt = isoTime(envelope.exportedAt, c);
  c.leave();
  c.enter('exportedBy');
  const exportedBy = Object.hasOwn(envelope, 'exportedBy') ? checkExportedBy(envelope.exportedBy, c) : c.fail('missing');
  c.leave();
  const sha256 = envelope.sha256;
  if (typeof sha256 !== 'string' || !HEX64.test(sha256)) {
    c.enter('sha256');
    c.fail(`expected 64 lowercase hex digits (the SHA-256 digest), got ${describeType(sha256)}`);
    c.leave();
  }
  const payload = checkPayload(Object.hasOwn(envelope, 'payload') ? envelope.payload : undefined, c);
  if (payload && c.problemCount === 0) checkReferences(payload, c);

  if (c.problemCount > 0 || payload === undefined || exportedAt === INVALID || exportedBy === INVALID) {
    const problems = [...c.problems];
    let problemCount = c.problemCount;
    if (typeof sha256 === 'string' && (await digestOfRaw(envelope)) !== sha256) {
      problems.unshift({ file: name, field: 'sha256', message: ALTERED });
      problemCount += 1;
    }
    return { ok: false, name, problems, problemCount };
  }

  const checked: Omit<JobFile, 'sha256'> = {
    format: FORMAT_ID,
    schemaVersion: SCHEMA_VERSION,
    exportedAt: exportedAt as string,
    exportedBy: exportedBy as ExportedBy,
    payload,
  };
  // The checked records are the parsed ones (no copies), so the definition needs the general
  // canonicaliser; files as write.ts lays them out take the fast way.
  const sound = (await digestOfWrittenLayout(content, sha256 as string)) || (await sha256Hex(canonicalJson(checked))) === sha256;
  if (!sound) return refuse(name, ALTERED, 'sha256');
  return { ok: true, name, file: { ...checked, sha256: sha256 as string } };
}

/**
 * One problem as a line of plain text: "FILE: job J: reading R: FIELD: message", leaving out
 * the parts that are not known.
 */
export function formatProblem(problem: ExchangeProblem): string {
  const parts = [problem.file];
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
