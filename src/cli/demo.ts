import { DEMO_DEFAULT_END, DEMO_MAX_JOBS, DEMO_SHOP_NAME, demoJobFile } from '../exchange/demo';
import { EXIT_OK, parseCommandArgs, UsageError, writeParts, writeText, type Command } from './command';

const USAGE = `Usage:
  ripplewright demo [--jobs N] [--seed S] [--end TIME] [--months M] > demo.json

Writes a job file for an invented repair shop ("${DEMO_SHOP_NAME}": its technicians,
customers, sites and appliances are all made up): N jobs over the M months up to TIME, with
readings computed by the engine for healthy and faulted supplies, the diagnosis's expected bands
and verdicts, and notes with the awkward cases an export must survive (leading = + - @, quotes,
commas, line breaks, non-ASCII). The same options always give the same file.

Options:
  --jobs N       how many jobs, 1 to ${DEMO_MAX_JOBS} (default 100)
  --seed S       whole number seeding the random choices (default 1)
  --end TIME     end of the period, a UTC date or time (default ${DEMO_DEFAULT_END})
  --months M     length of the period in months, 1 to 120 (default 12)
  -h, --help     show this help

Exit codes: 0 written; 2 bad arguments.
`;

function wholeNumber(text: string | undefined, flag: string, low: number, high: number, fallback: number): number {
  if (text === undefined) return fallback;
  const value = /^-?\d+$/.test(text) ? Number(text) : NaN;
  if (!(value >= low && value <= high)) throw new UsageError(`${flag} wants a whole number from ${low} to ${high}, got "${text}".`);
  return value;
}

function endTime(text: string | undefined): string {
  if (text === undefined) return DEMO_DEFAULT_END;
  // A bare date is that day's end of work, 17:00 UTC.
  const ms = Date.parse(/^\d{4}-\d{2}-\d{2}$/.test(text) ? `${text}T17:00:00Z` : text);
  if (!Number.isFinite(ms)) throw new UsageError(`--end wants a date like 2026-11-27 or a UTC time, got "${text}".`);
  return new Date(ms).toISOString();
}

export const demoCommand: Command = {
  name: 'demo',
  summary: 'a job file of an invented shop\'s jobs, seeded and reproducible',
  usage: USAGE,
  async run(argv, io) {
    const { values, positionals } = parseCommandArgs(argv, {
      jobs: { type: 'string' },
      seed: { type: 'string' },
      end: { type: 'string' },
      months: { type: 'string' },
      help: { type: 'boolean', short: 'h' },
    });
    if (values.help === true) {
      await writeText(io.stdout, USAGE);
      return EXIT_OK;
    }
    if (positionals.length > 0) throw new UsageError(`demo takes no FILE, got: ${positionals.join(' ')}`);
    const parts = await demoJobFile({
      jobs: wholeNumber(values.jobs, '--jobs', 1, DEMO_MAX_JOBS, 100),
      seed: wholeNumber(values.seed, '--seed', -(2 ** 31), 2 ** 32 - 1, 1),
      end: endTime(values.end),
      months: wholeNumber(values.months, '--months', 1, 120, 12),
    });
    await writeParts(io.stdout, parts);
    return EXIT_OK;
  },
};
