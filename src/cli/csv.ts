import { csvChunks } from '../exchange/csv';
import { printProblems, readJobFileArgument } from './check';
import { EXIT_FAILED, EXIT_OK, parseCommandArgs, UsageError, writeText, type Command } from './command';

const USAGE = `Usage:
  ripplewright csv FILE > readings.csv
  ripplewright csv - < jobs.json > readings.csv

Writes the readings of a job file as CSV (RFC 4180, CRLF line ends, UTF-8 with a byte-order
mark so spreadsheets show µ and Ω): one row per reading with its job, customer, site,
technician, asset, kind, target, value, unit, what was typed, time, phase, expected band and
verdict. Text cells beginning with = + - @ tab, CR or an apostrophe get a leading apostrophe so
a spreadsheet shows them instead of running them (OWASP); number columns are left as they are.
The file is checked first, as "ripplewright check" does.

Options:
  --no-bom       leave out the byte-order mark
  -h, --help     show this help

Exit codes: 0 written; 1 the file could not be read or was refused; 2 bad arguments.
`;

export const csvCommand: Command = {
  name: 'csv',
  summary: 'the readings of a job file as CSV for spreadsheets',
  usage: USAGE,
  async run(argv, io) {
    const { values, positionals } = parseCommandArgs(argv, {
      'no-bom': { type: 'boolean' },
      help: { type: 'boolean', short: 'h' },
    });
    if (values.help === true) {
      await writeText(io.stdout, USAGE);
      return EXIT_OK;
    }
    if (positionals.length !== 1) {
      throw new UsageError(positionals.length === 0 ? 'a job FILE is needed, or - for stdin.' : `csv takes one FILE, got ${positionals.length}: ${positionals.join(' ')}`);
    }
    const result = await readJobFileArgument(positionals[0]!, io, 'csv');
    if (result === undefined) return EXIT_FAILED;
    if (!result.ok) {
      await printProblems(result, io, 'csv');
      return EXIT_FAILED;
    }
    for (const chunk of csvChunks(result.file.payload, { bom: values['no-bom'] !== true })) await writeText(io.stdout, chunk);
    return EXIT_OK;
  },
};
