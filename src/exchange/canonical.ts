/**
 * Canonical JSON and the digests over it.
 *
 * The digest of a job file is SHA-256 over the UTF-8 bytes of the canonical JSON of the file's
 * object without its `sha256` member. Canonical JSON follows RFC 8785 (JSON Canonicalization
 * Scheme): no whitespace, object members sorted by the UTF-16 code units of their names, numbers
 * and strings written as ECMAScript's JSON.stringify writes them (RFC 8785 §3.2.2 adopts exactly
 * those rules). A file rewritten by any tool that keeps the values keeps its digest; a changed
 * value, name or order of array items changes it.
 *
 * Runs in the browser and in Node 20 alike: WebCrypto's `crypto.subtle.digest` and TextEncoder
 * are reached through `globalThis`, typed here by hand so this folder compiles without the DOM
 * library.
 */

interface SubtleDigest {
  digest(algorithm: 'SHA-256', data: Uint8Array): Promise<ArrayBuffer>;
}
interface Utf8Encoder {
  encode(text: string): Uint8Array;
  encodeInto(text: string, into: Uint8Array): { read: number; written: number };
}
interface Utf8Decoder {
  decode(bytes: Uint8Array): string;
}
interface WebGlobals {
  crypto?: { subtle?: SubtleDigest };
  TextEncoder: new () => Utf8Encoder;
  TextDecoder: new (label: 'utf-8', options: { fatal: boolean; ignoreBOM: boolean }) => Utf8Decoder;
}

const web = globalThis as unknown as WebGlobals;

let encoder: Utf8Encoder | undefined;
let lenientDecoder: Utf8Decoder | undefined;
let strictDecoder: Utf8Decoder | undefined;

/** UTF-8 bytes of a string (lone surrogates become U+FFFD, as the Encoding Standard says). */
export function encodeUtf8(text: string): Uint8Array {
  encoder ??= new web.TextEncoder();
  return encoder.encode(text);
}

/** Byte arrays one after another in one array (the one array itself when there is just one). */
export function concatBytes(chunks: readonly Uint8Array[]): Uint8Array {
  if (chunks.length === 1) return chunks[0]!;
  const out = new Uint8Array(chunks.reduce((sum, chunk) => sum + chunk.byteLength, 0));
  let at = 0;
  for (const chunk of chunks) {
    out.set(chunk, at);
    at += chunk.byteLength;
  }
  return out;
}

/** The bytes of ASCII text followed by one line feed (the caller knows the text is ASCII). */
export function asciiLineBytes(text: string): Uint8Array {
  encoder ??= new web.TextEncoder();
  const out = new Uint8Array(text.length + 1);
  encoder.encodeInto(text, out);
  out[text.length] = 0x0a;
  return out;
}

/**
 * Strict UTF-8 decoding: returns the text, or throws a TypeError when the bytes are not UTF-8
 * (a damaged file). A leading byte-order mark is kept for the caller to strip.
 *
 * Decodes leniently first (the fast path in V8 and Node) and repeats strictly only when the text
 * holds U+FFFD, which is either in the file or stands for bytes that were not UTF-8.
 */
export function decodeUtf8Strict(bytes: Uint8Array): string {
  // One decoder of each kind for every call: a file of thousands of lines decodes each.
  lenientDecoder ??= new web.TextDecoder('utf-8', { fatal: false, ignoreBOM: true });
  const text = lenientDecoder.decode(bytes);
  if (!text.includes('\uFFFD')) return text;
  strictDecoder ??= new web.TextDecoder('utf-8', { fatal: true, ignoreBOM: true });
  return strictDecoder.decode(bytes);
}

/**
 * Lowercase hex SHA-256 (FIPS 180-4) of the UTF-8 bytes of `text`, by WebCrypto.
 * Throws when the runtime has no WebCrypto (Node before 19 without the flag; an insecure page).
 */
export async function sha256Hex(text: string): Promise<string> {
  return sha256HexOfBytes(encodeUtf8(text));
}

/**
 * SHA-256 of bytes, by WebCrypto: the 32 bytes. The bytes are copied before this returns, so the
 * caller may change them at once. Rejects when the runtime has no WebCrypto.
 */
export async function sha256Bytes(bytes: Uint8Array): Promise<Uint8Array> {
  const subtle = web.crypto?.subtle;
  if (subtle === undefined) throw new Error('this runtime has no WebCrypto (crypto.subtle) to compute SHA-256');
  return new Uint8Array(await subtle.digest('SHA-256', bytes));
}

/** Lowercase hex SHA-256 of bytes, by WebCrypto (see sha256Hex). */
export async function sha256HexOfBytes(bytes: Uint8Array): Promise<string> {
  const digest = await sha256Bytes(bytes);
  let hex = '';
  for (const byte of digest) hex += byte.toString(16).padStart(2, '0');
  return hex;
}

/** Deepest nesting canonicalJson follows; a job file is at most 6 levels deep. */
const MAX_DEPTH = 64;

/**
 * RFC 8785 canonical JSON of any JSON value (objects from JSON.parse, or records built in code).
 * `undefined` members are left out, as JSON.stringify does. Throws a RangeError on nesting deeper
 * than 64 levels and a TypeError on values JSON cannot hold (functions, non-finite numbers).
 *
 * This is the reference implementation; parse.ts gets the same text faster by rebuilding each
 * record with its members in sorted order and calling JSON.stringify once (test/exchange checks
 * that the two agree).
 */
export function canonicalJson(value: unknown): string {
  return canonicalPart(value, 0);
}

function canonicalPart(value: unknown, depth: number): string {
  if (depth > MAX_DEPTH) throw new RangeError(`nested deeper than ${MAX_DEPTH} levels`);
  if (value === null || typeof value === 'boolean' || typeof value === 'string') return JSON.stringify(value);
  if (typeof value === 'number') {
    if (!Number.isFinite(value)) throw new TypeError(`JSON has no ${value}`);
    return JSON.stringify(value);
  }
  if (Array.isArray(value)) {
    return `[${value.map((item) => (item === undefined ? 'null' : canonicalPart(item, depth + 1))).join(',')}]`;
  }
  if (typeof value === 'object') {
    const record = value as Record<string, unknown>;
    // Default sort compares UTF-16 code units, which is RFC 8785 §3.2.3's order.
    const names = Object.keys(record).sort();
    const parts: string[] = [];
    for (const name of names) {
      const member = record[name];
      if (member !== undefined) parts.push(`${JSON.stringify(name)}:${canonicalPart(member, depth + 1)}`);
    }
    return `{${parts.join(',')}}`;
  }
  throw new TypeError(`JSON has no ${typeof value}`);
}

const FNV64_OFFSET = 0xcbf29ce484222325n;
const FNV64_PRIME = 0x100000001b3n;
const MASK64 = 0xffffffffffffffffn;

/**
 * 64-bit FNV-1a (Fowler–Noll–Vo; IETF draft-eastlake-fnv) of the UTF-8 bytes of `text`, as 16
 * lowercase hex digits. Not a security digest: it names reading variants in a merge, where the
 * same content must always get the same name, synchronously.
 */
export function fnv1a64Hex(text: string): string {
  let hash = FNV64_OFFSET;
  for (const byte of encodeUtf8(text)) {
    hash ^= BigInt(byte);
    hash = (hash * FNV64_PRIME) & MASK64;
  }
  return hash.toString(16).padStart(16, '0');
}

/**
 * Whether two JSON values are equal as JSON: the same members whatever their order, `undefined`
 * members counting as absent (as canonicalJson leaves them out). Equivalent to comparing their
 * canonical JSON, without building the text.
 */
export function sameJson(a: unknown, b: unknown): boolean {
  if (a === b) return true;
  if (typeof a !== 'object' || typeof b !== 'object' || a === null || b === null) return false;
  if (Array.isArray(a)) {
    if (!Array.isArray(b) || a.length !== b.length) return false;
    for (let i = 0; i < a.length; i++) if (!sameJson(a[i], b[i])) return false;
    return true;
  }
  if (Array.isArray(b)) return false;
  const x = a as Record<string, unknown>;
  const y = b as Record<string, unknown>;
  let count = 0;
  for (const key in x) {
    if (!Object.hasOwn(x, key) || x[key] === undefined) continue;
    count += 1;
    if (!Object.hasOwn(y, key) || !sameJson(x[key], y[key])) return false;
  }
  for (const key in y) if (Object.hasOwn(y, key) && y[key] !== undefined) count -= 1;
  return count === 0;
}
