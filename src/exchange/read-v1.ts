/**
 * Reading a version-1 job file: one JSON object, its `sha256` over the RFC 8785 canonical JSON of
 * the rest (docs/exchange-format.md, "Version 1"). Files of this version are no longer written,
 * but every one ever exported still reads.
 *
 * Order of the checks, each stopping the read when it fails: size; UTF-8; JSON; that it is our
 * format; the schema version; every record field by field; references between records; the
 * SHA-256 digest. When records are refused, the digest is still computed over what was parsed,
 * so the report can say whether the file was damaged after export or exported wrong.
 */
import { canonicalJson, decodeUtf8Strict, sha256Hex, sha256HexOfBytes } from './canonical';
import { FORMAT_ID, LIMITS, type ExportedBy, type JobFile } from './format';
import { checkPayload, checkReferences } from './payload';
import { ALTERED, checkIdentity, describeJsonError, HEX64, refuse, type FileContent, type ReadResult } from './read-common';
import { Checker, checkExportedBy, describeType, INVALID, isoTime, reportUnknownKeys } from './schema';

const ENVELOPE_KEYS = new Set(['format', 'schemaVersion', 'exportedAt', 'exportedBy', 'payload', 'sha256']);

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
 * The exact text a version-1 digest is computed over, for a file whose records were copied in
 * sorted order by schema.ts (a Checker with copies): canonical JSON of the file object without
 * `sha256`. The envelope's members are put in sorted order here (exportedAt, exportedBy, format,
 * payload, schemaVersion), so JSON.stringify gives the canonical text.
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
 * The fast way to the same digest for a file as the version-1 writer laid it out: canonical JSON
 * with `,"sha256":"<hex>"}` last (and maybe a newline). Those bytes minus that member are the
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
  // them before it returns, Web Cryptography API, SubtleCrypto.digest) and is put back at once.
  // So the caller's bytes must not be shared with another thread during the call.
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
 * Reads one version-1 job file (bytes checked as strict UTF-8, a leading BOM ignored, or text).
 * Never throws for anything in the file: every fault comes back as problems naming the file, and
 * the job, record and field when known. Rejects only when the runtime has no WebCrypto.
 */
export async function readVersion1(content: FileContent, name: string): Promise<ReadResult> {
  const text = decode(content, name);
  if (typeof text !== 'string') return text;
  let parsed: unknown;
  try {
    parsed = JSON.parse(text);
  } catch (error) {
    return refuse(name, describeJsonError(error, text));
  }
  const identity = checkIdentity(parsed);
  if ('message' in identity) return refuse(name, identity.message, identity.field);
  if (identity.version !== 1) return refuse(name, `a file laid out as one JSON object is of schema version 1, this one says ${identity.version}`, 'schemaVersion');
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
    schemaVersion: 1,
    exportedAt: exportedAt as string,
    exportedBy: exportedBy as ExportedBy,
    payload,
  };
  // The checked records are the parsed ones (no copies), so the definition needs the general
  // canonicaliser; files as the version-1 writer laid them out take the fast way.
  const sound = (await digestOfWrittenLayout(content, sha256 as string)) || (await sha256Hex(canonicalJson(checked))) === sha256;
  if (!sound) return refuse(name, ALTERED, 'sha256');
  return { ok: true, name, file: { ...checked, sha256: sha256 as string } };
}
