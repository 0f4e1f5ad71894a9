import type { Readable, Writable } from 'node:stream';
import { expectReadings } from '../engine';
import type { SolveOptions, SupplyResult } from '../engine/types';
import {
  EXIT_FAILED,
  EXIT_OK,
  parseCommandArgs,
  UsageError,
  writeText,
  type CliIo,
  type Command,
} from './command';
import { describeFailure, describeReadError, jsonLinesBatch, openLineInput, readSourceText, type BatchSummary } from './json-lines';

export type { BatchErrorLine, BatchSummary } from './json-lines';

/** The engine call the command makes; tests pass the real one, the seam keeps the loop testable. */
export type ExpectReadings = (input: unknown, options?: SolveOptions) => SupplyResult;

export interface ExpectArgs {
  /** Spec file path, or "-" for stdin. */
  source: string;
  /** One spec per input line, one result per output line. */
  batch: boolean;
  /** Waveform samples to include in each result; undefined for none. */
  waveformPoints: number | undefined;
  help: boolean;
}

// Enough for a smooth plot of one period; more only bloats the JSON.
const MAX_WAVEFORM_POINTS = 100_000;

const USAGE = `Usage:
  ripplewright expect FILE          expected readings for the supply spec in FILE (JSON)
  ripplewright expect -             the same, spec read from stdin
  ripplewright expect --batch [FILE|-]
                                    one spec JSON per line in, one result JSON per line out

Options:
  --waveform N   include about N waveform samples per result (t, vOut, vSecondary, iDiode)
  --batch        line mode; reads stdin unless FILE is given
  -h, --help     show this help

Output: one JSON object (the solver's SupplyResult): dc, ripplePp, rippleRms, rippleHz,
secondaryRms, diodePeakA, diodePiv, per-diode stress, regulator, and the textbook estimates.
Single mode prints it indented; batch mode prints one object per line in input order.

Batch errors: a line that is blank, not JSON or not a valid spec prints
  {"error":"line N: ...","line":N,"field":"..."}
on its own output line and the batch goes on; the exit code is then 1.

Exit codes: 0 done; 1 a spec, file or line failed; 2 bad arguments.
A result that did not converge is still printed, with a warning on stderr.
`;

/**
 * Parses the arguments after `expect`.
 * Returns the source ("-" for stdin), batch flag and waveform size; throws UsageError on a bad
 * flag, a missing FILE outside batch mode, more than one FILE, or a --waveform that is not an
 * integer in 2..100000.
 */
export function parseExpectArgs(argv: string[]): ExpectArgs {
  const { values, positionals } = parseCommandArgs(argv, {
    batch: { type: 'boolean' },
    waveform: { type: 'string' },
    help: { type: 'boolean', short: 'h' },
  });
  const batch = values.batch === true;
  if (values.help === true) return { source: '-', batch, waveformPoints: undefined, help: true };
  if (positionals.length > 1) {
    throw new UsageError(`expect takes one FILE (or -), got ${positionals.length}: ${positionals.join(' ')}`);
  }
  const source = positionals[0] ?? (batch ? '-' : undefined);
  if (source === undefined) throw new UsageError('a spec FILE is needed, or - to read the spec from stdin.');
  return { source, batch, waveformPoints: parseWaveformPoints(values.waveform), help: false };
}

function parseWaveformPoints(text: string | undefined): number | undefined {
  if (text === undefined) return undefined;
  const points = /^\d+$/.test(text) ? Number(text) : NaN;
  if (!(points >= 2 && points <= MAX_WAVEFORM_POINTS)) {
    throw new UsageError(`--waveform wants a whole number of samples from 2 to ${MAX_WAVEFORM_POINTS}, got "${text}".`);
  }
  return points;
}

function solveText(text: string, expect: ExpectReadings, options: SolveOptions): SupplyResult {
  return expect(JSON.parse(text) as unknown, options);
}

function solveOptionsFrom(args: ExpectArgs): SolveOptions {
  return args.waveformPoints === undefined ? {} : { waveformPoints: args.waveformPoints };
}

/**
 * Reads specs one per line from `input` and writes one JSON line per input line to `output`,
 * in order: the SupplyResult, or a BatchErrorLine for a blank line, bad JSON or a bad spec.
 * Blank lines get an error line rather than being skipped, so output line N always answers
 * input line N. Lines are read and written as a stream (readline, honouring 'drain'), so input
 * size is not limited by memory. Warnings for results that did not converge go to `warnings`.
 * Returns how many lines were read and how many failed; never throws for a bad line.
 */
export async function expectBatch(
  input: Readable,
  output: Writable,
  expect: ExpectReadings,
  options: SolveOptions = {},
  warnings?: Writable,
): Promise<BatchSummary> {
  return jsonLinesBatch(
    input,
    output,
    (value) => expect(value, options),
    'spec',
    (result) => (result.converged ? null : convergenceWarning(result)),
    warnings,
    'ripplewright expect',
  );
}

function convergenceWarning(result: SupplyResult): string {
  return `did not converge after ${result.iterations} iterations (residual ${result.residualVolts.toPrecision(3)} V); figures are approximate`;
}

/**
 * Runs `expect` for one spec (file or stdin): prints the result as indented JSON on stdout.
 * Returns 0, or 1 after a message on stderr when the source cannot be read, is not JSON, or
 * the spec is invalid.
 */
export async function expectSingle(args: ExpectArgs, io: CliIo, expect: ExpectReadings): Promise<number> {
  const name = args.source === '-' ? 'stdin' : args.source;
  const text = await readSourceText(args.source, io, 'ripplewright expect');
  if (text === null) return EXIT_FAILED;
  let result: SupplyResult;
  try {
    result = solveText(text, expect, solveOptionsFrom(args));
  } catch (error) {
    await writeText(io.stderr, `ripplewright expect: ${name}: ${describeFailure(error).message}\n`);
    return EXIT_FAILED;
  }
  await writeText(io.stdout, `${JSON.stringify(result, null, 2)}\n`);
  if (!result.converged) await writeText(io.stderr, `ripplewright expect: ${name}: ${convergenceWarning(result)}\n`);
  return EXIT_OK;
}


export const expectCommand: Command = {
  name: 'expect',
  summary: 'expected meter readings for a supply spec (JSON), one or a batch',
  usage: USAGE,
  async run(argv, io) {
    const args = parseExpectArgs(argv);
    if (args.help) {
      await writeText(io.stdout, USAGE);
      return EXIT_OK;
    }
    if (!args.batch) return expectSingle(args, io, expectReadings);
    let input: Readable;
    try {
      input = await openLineInput(args.source, io);
    } catch (error) {
      await writeText(io.stderr, `ripplewright expect: cannot read ${args.source}: ${describeReadError(error)}\n`);
      return EXIT_FAILED;
    }
    const summary = await expectBatch(input, io.stdout, expectReadings, solveOptionsFrom(args), io.stderr);
    if (summary.failed > 0) {
      await writeText(io.stderr, `ripplewright expect: ${summary.failed} of ${summary.lines} lines failed\n`);
      return EXIT_FAILED;
    }
    return EXIT_OK;
  },
};
