import { createReadStream } from 'node:fs';
import { readFile } from 'node:fs/promises';
import type { Readable, Writable } from 'node:stream';
import { createInterface } from 'node:readline';
import { SpecError } from '../engine';
import { readAllText, writeText, type CliIo } from './command';

/** What a failed batch line prints in place of a result. */
export interface BatchErrorLine {
  error: string;
  /** 1-based input line number. */
  line: number;
  /** SpecError field path, when the spec was at fault. */
  field?: string;
}

export interface BatchSummary {
  lines: number;
  failed: number;
}

/** Why one input failed, in words; SpecError messages pass through unchanged. */
export function describeFailure(error: unknown): { message: string; field?: string } {
  if (error instanceof SpecError) return { message: error.message, field: error.field };
  if (error instanceof SyntaxError) return { message: `not valid JSON (${error.message})` };
  return { message: `solver failed: ${error instanceof Error ? error.message : String(error)}` };
}

/** A file-read error in words. */
export function describeReadError(error: unknown): string {
  const code = (error as { code?: unknown }).code;
  if (code === 'ENOENT') return 'no such file';
  if (code === 'EACCES' || code === 'EPERM') return 'permission denied';
  if (code === 'EISDIR') return 'is a directory';
  return error instanceof Error ? error.message : String(error);
}

/**
 * Reads one JSON value per line from `input` and writes one JSON line per input line to
 * `output`, in order: `answer(value)`, or a BatchErrorLine for a blank line, bad JSON or a value
 * `answer` refuses (it throws). Blank lines get an error line rather than being skipped, so
 * output line N always answers input line N. Streams line by line (readline, honouring
 * 'drain'), so input size is not limited by memory. `warn` may return a warning for an answer,
 * written to `warnings` with the line number. Never throws for a bad line.
 * @param what  what one line holds, for the blank-line message ("spec", "diagnosis input")
 */
export async function jsonLinesBatch<T>(
  input: Readable,
  output: Writable,
  answer: (value: unknown) => T,
  what: string,
  warn?: (answer: T) => string | null,
  warnings?: Writable,
  command = 'ripplewright',
): Promise<BatchSummary> {
  const lines = createInterface({ input, crlfDelay: Infinity });
  let lineNumber = 0;
  let failed = 0;
  for await (const line of lines) {
    lineNumber += 1;
    let out: T | BatchErrorLine;
    let isError = false;
    if (line.trim() === '') {
      out = { error: `line ${lineNumber}: blank line; expected one ${what} JSON object`, line: lineNumber };
      isError = true;
    } else {
      try {
        out = answer(JSON.parse(line) as unknown);
        const warning = warn?.(out);
        if (warning && warnings) await writeText(warnings, `${command}: line ${lineNumber}: ${warning}\n`);
      } catch (error) {
        const { message, field } = describeFailure(error);
        out = { error: `line ${lineNumber}: ${message}`, line: lineNumber, ...(field === undefined ? {} : { field }) };
        isError = true;
      }
    }
    if (isError) failed += 1;
    await writeText(output, `${JSON.stringify(out)}\n`);
  }
  return { lines: lineNumber, failed };
}

/**
 * The input of a line mode: stdin for "-", else the file, opened before the loop starts so a
 * missing file is reported as the single mode reports it.
 * @throws the open error (ENOENT, EACCES, …)
 */
export async function openLineInput(source: string, io: CliIo): Promise<Readable> {
  if (source === '-') return io.stdin;
  const stream = createReadStream(source);
  await new Promise<void>((resolve, reject) => {
    stream.once('open', () => resolve());
    stream.once('error', reject);
  });
  return stream;
}

/**
 * The whole text of FILE, or of stdin for "-"; null after a "cannot read" message on stderr.
 * @param command  the prefix of the message, e.g. "ripplewright expect"
 */
export async function readSourceText(source: string, io: CliIo, command: string): Promise<string | null> {
  try {
    return source === '-' ? await readAllText(io.stdin) : await readFile(source, 'utf8');
  } catch (error) {
    await writeText(io.stderr, `${command}: cannot read ${source === '-' ? 'stdin' : source}: ${describeReadError(error)}\n`);
    return null;
  }
}
