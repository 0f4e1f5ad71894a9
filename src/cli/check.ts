import { createReadStream } from 'node:fs';
import { formatProblems, JobFileReader, type ReadResult } from '../exchange/parse';
import type { Readable } from 'node:stream';
import { EXIT_FAILED, EXIT_OK, parseCommandArgs, UsageError, writeText, type CliIo, type Command } from './command';

const USAGE = `Usage:
  ripplewright check FILE      check a job file: its format, every record, the SHA-256 digest
  ripplewright check -         the same, the file read from stdin

Options:
  -h, --help     show this help

Output: a line saying who exported the file and when and what it holds, then, as the last
line, the one-line summary {"jobs": n, "readings": m}.

A damaged, truncated or altered file, one made by a newer version, or a file that is not a
job file prints what is wrong on stderr (naming the job, record and field where it can) and
nothing on stdout.

Exit codes: 0 the file is sound; 1 it is not, or cannot be read; 2 bad arguments.
`;

function describeReadError(error: unknown): string {
  const code = (error as { code?: unknown }).code;
  if (code === 'ENOENT') return 'no such file';
  if (code === 'EACCES' || code === 'EPERM') return 'permission denied';
  if (code === 'EISDIR') return 'is a directory';
  return error instanceof Error ? error.message : String(error);
}

/**
 * Reads and checks one job file named on the command line ("-" for stdin), a chunk at a time as
 * it streams in (a version-2 file is checked line by line, never held whole). Returns the read
 * result, or undefined after printing "cannot read" on stderr when the file cannot be opened.
 */
export async function readJobFileArgument(path: string, io: CliIo, command: string): Promise<ReadResult | undefined> {
  const name = path === '-' ? 'stdin' : path;
  const reader = new JobFileReader(name);
  try {
    const stream: Readable = path === '-' ? io.stdin : createReadStream(path);
    for await (const chunk of stream) reader.push(typeof chunk === 'string' ? Buffer.from(chunk) : (chunk as Buffer));
  } catch (error) {
    await writeText(io.stderr, `ripplewright ${command}: cannot read ${name}: ${describeReadError(error)}\n`);
    return undefined;
  }
  return reader.finish();
}

/** Prints a refused file's problems on stderr, one per line. */
export async function printProblems(result: Extract<ReadResult, { ok: false }>, io: CliIo, command: string): Promise<void> {
  for (const line of formatProblems(result)) await writeText(io.stderr, `ripplewright ${command}: ${line}\n`);
}

/** The summary line: exactly {"jobs": n, "readings": m}. */
export function summaryLine(jobs: number, readings: number): string {
  return `{"jobs": ${jobs}, "readings": ${readings}}`;
}

function plural(count: number, word: string): string {
  return `${count} ${word}${count === 1 ? '' : 's'}`;
}

export const checkCommand: Command = {
  name: 'check',
  summary: 'check a job file (format, records, SHA-256 digest) and count its jobs and readings',
  usage: USAGE,
  async run(argv, io) {
    const { values, positionals } = parseCommandArgs(argv, { help: { type: 'boolean', short: 'h' } });
    if (values.help === true) {
      await writeText(io.stdout, USAGE);
      return EXIT_OK;
    }
    if (positionals.length !== 1) {
      throw new UsageError(positionals.length === 0 ? 'a job FILE is needed, or - for stdin.' : `check takes one FILE, got ${positionals.length}: ${positionals.join(' ')}`);
    }
    const result = await readJobFileArgument(positionals[0]!, io, 'check');
    if (result === undefined) return EXIT_FAILED;
    if (!result.ok) {
      await printProblems(result, io, 'check');
      return EXIT_FAILED;
    }
    const { file } = result;
    const { payload } = file;
    const by = [file.exportedBy.name, file.exportedBy.device].filter((part) => part !== undefined).join(', ');
    const conflicts = payload.conflicts.length + payload.recordConflicts.length;
    await writeText(
      io.stdout,
      `${result.name}: sound (SHA-256 ${file.sha256.slice(0, 16)}…), exported ${file.exportedAt}${by === '' ? '' : ` by ${by}`}: ` +
        `${plural(payload.jobs.length, 'job')}, ${plural(payload.readings.length, 'reading')}, ${plural(payload.assets.length, 'asset')}, ` +
        `${plural(payload.technicians.length, 'technician')}, ${plural(conflicts, 'recorded conflict')}\n`,
    );
    await writeText(io.stdout, `${summaryLine(payload.jobs.length, payload.readings.length)}\n`);
    return EXIT_OK;
  },
};
