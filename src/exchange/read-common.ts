/**
 * What the readers of both file versions share: the result type, refusals, the identity check
 * (is this a job file, of a version this code reads) and the words for damaged JSON.
 */
import { FORMAT_ID, READABLE_VERSIONS, SCHEMA_VERSION, type ExchangeProblem, type JobFile } from './format';
import { describeType } from './schema';

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

/** Bytes of a file or its text, whichever the caller has. */
export type FileContent = string | Uint8Array;

export const HEX64 = /^[0-9a-f]{64}$/;

export const ALTERED =
  'altered or damaged: the SHA-256 digest does not match the content, so the file changed after it was exported';

export function refuse(name: string, message: string, field?: string): Extract<ReadResult, { ok: false }> {
  const problem: ExchangeProblem = { file: name, message };
  if (field !== undefined) problem.field = field;
  return { ok: false, name, problems: [problem], problemCount: 1 };
}

const versionsText = READABLE_VERSIONS.length === 1 ? `version ${READABLE_VERSIONS[0]}` : `versions ${READABLE_VERSIONS.join(' and ')}`;

/**
 * Whether a parsed value is a job file's object (version 1) or head (version 2) of a version
 * this code reads. Returns the refusal's message and field, or the version to go on with.
 */
export function checkIdentity(parsed: unknown): { version: number } | { message: string; field?: string } {
  if (typeof parsed !== 'object' || parsed === null || Array.isArray(parsed)) {
    return { message: `not a Ripplewright job file: it holds ${describeType(parsed)}, not a job file object` };
  }
  const envelope = parsed as Record<string, unknown>;
  const format = Object.hasOwn(envelope, 'format') ? envelope.format : undefined;
  if (format !== FORMAT_ID) {
    const what = format === undefined ? 'it has no "format" member' : `its format is ${describeType(format)}`;
    return { message: `not a Ripplewright job file: ${what}; expected "format": "${FORMAT_ID}"`, field: 'format' };
  }
  const version = Object.hasOwn(envelope, 'schemaVersion') ? envelope.schemaVersion : undefined;
  if (typeof version !== 'number' || !Number.isInteger(version)) {
    return { message: `the schema version should be a whole number, got ${describeType(version)}`, field: 'schemaVersion' };
  }
  if (version > SCHEMA_VERSION) {
    return {
      message: `made by a newer version of Ripplewright (schema version ${version}; this one reads ${versionsText}): update Ripplewright to import it`,
      field: 'schemaVersion',
    };
  }
  if (!READABLE_VERSIONS.includes(version)) {
    return { message: `unknown schema version ${version} (this version of Ripplewright reads ${versionsText})`, field: 'schemaVersion' };
  }
  return { version };
}

/** Plain words for JSON.parse's error on `text`; `atEnd` says the text is the end of the file. */
export function describeJsonError(error: unknown, text: string, atEnd = true): string {
  const message = error instanceof Error ? error.message : String(error);
  const at = /at position (\d+)/.exec(message);
  const position = at ? Number(at[1]) : undefined;
  if (atEnd && (/end of JSON/i.test(message) || position === text.trimEnd().length)) {
    return 'the file ends before its JSON is complete: it is truncated (an interrupted copy or download?)';
  }
  if (error instanceof RangeError) return `the JSON is nested too deeply to read (${message})`;
  return `not valid JSON${position === undefined ? '' : ` at character ${position}`}: the file is damaged or is not a job file (${message})`;
}
