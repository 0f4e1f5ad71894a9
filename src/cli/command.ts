import { once } from 'node:events';
import type { Readable, Writable } from 'node:stream';
import { parseArgs, type ParseArgsConfig } from 'node:util';

/** The streams a command talks through; injected so tests can run commands in-process. */
export interface CliIo {
  stdin: Readable;
  stdout: Writable;
  stderr: Writable;
}

/** One subcommand of `ripplewright`. Each lives in its own module and is listed in main.ts. */
export interface Command {
  name: string;
  /** One line for the command list in `ripplewright --help`. */
  summary: string;
  /** Full usage text for `ripplewright help NAME`, ending in a newline. */
  usage: string;
  /** Runs the command on the arguments after its name; resolves to the process exit code. */
  run(argv: string[], io: CliIo): Promise<number>;
}

/** Wrong arguments: main prints the message and the command's usage on stderr and exits 2. */
export class UsageError extends Error {
  override name = 'UsageError';
}

/** Exit codes shared by all commands. */
export const EXIT_OK = 0;
export const EXIT_FAILED = 1;
export const EXIT_USAGE = 2;

type OptionsConfig = NonNullable<ParseArgsConfig['options']>;

/**
 * node:util parseArgs in strict mode, with its errors turned into UsageError.
 * Returns the option values and positionals; throws UsageError on an unknown option, a missing
 * option value or a value given to a boolean flag.
 */
export function parseCommandArgs<T extends OptionsConfig>(argv: string[], options: T) {
  try {
    return parseArgs({ args: argv, options, allowPositionals: true, strict: true });
  } catch (error) {
    const code = (error as { code?: unknown }).code;
    if (typeof code === 'string' && code.startsWith('ERR_PARSE_ARGS')) {
      // Node's messages run on with advice about "--"; the first sentence is the useful part.
      const message = (error as Error).message.split('\n')[0] ?? 'bad arguments';
      throw new UsageError(message.replace(/\. To specify .*$/, '.'));
    }
    throw error;
  }
}

/** Writes text, waiting for 'drain' when the stream's buffer is full (keeps memory flat on big batches). */
export async function writeText(stream: Writable, text: string): Promise<void> {
  if (!stream.write(text)) await once(stream, 'drain');
}

/** Writes chunks of bytes in order, waiting for 'drain' as writeText does. */
export async function writeParts(stream: Writable, parts: readonly Uint8Array[]): Promise<void> {
  for (const part of parts) if (!stream.write(part)) await once(stream, 'drain');
}

/** Reads a whole stream as UTF-8 text. */
export async function readAllText(stream: Readable): Promise<string> {
  const chunks: Buffer[] = [];
  for await (const chunk of stream) chunks.push(typeof chunk === 'string' ? Buffer.from(chunk) : chunk);
  return Buffer.concat(chunks).toString('utf8');
}
