import type { Readable } from 'node:stream';
import { diagnose, type DiagnoseInput, type Diagnosis } from '../engine/diagnosis';
import { EXIT_FAILED, EXIT_OK, parseCommandArgs, UsageError, writeText, type Command } from './command';
import { describeFailure, describeReadError, jsonLinesBatch, openLineInput, readSourceText } from './json-lines';

const USAGE = `Usage:
  ripplewright diagnose FILE         rank the likely faults for the readings in FILE (JSON)
  ripplewright diagnose -            the same, input read from stdin
  ripplewright diagnose --batch [FILE|-]
                                     one input JSON per line in, one answer JSON per line out

Input: {"spec": {...supply spec, as for expect...},
        "readings": {"acSecondary": 11.8, "dcOut": "15,2", "rippleAc": "450mV", "rippleHz": 120,
                     "mainsAc": 230, "regulatorOut": 12.0,
                     "diodeTest": {"D1": {"forward": 0.55, "reverse": "OL"}},
                     "capacitance": "2200uF", "esr": "0.05"},
        "meter": {"kind": "true-rms-ac" | "average-responding" | "true-rms-ac-dc", ...},   (optional)
        "tolerances": {"region": "en-230" | "ansi-120-a" | ..., "seed": 1, ...}}        (optional)
Numbers are SI units (volts, hertz, farads, ohms); text is read as typed on the meter
("4,25", "425mV", "OL").

Output: {"ranked": [{"fault", "probability", "why", "part"}, ...] best first,
         "unexplained": true when the readings fit no known fault,
         "bands": [...expected band per reading...], "verdicts": [...in/low/high...],
         "next": {"kind", "target", "instruction", "meterMode", "probes", "powerOff", "caution", "gainBits"},
         "problems": [...readings that could not be understood...]}

Options:
  --batch        line mode; reads stdin unless FILE is given
  -h, --help     show this help

Exit codes: 0 done; 1 an input, file or line failed; 2 bad arguments.
`;

interface DiagnoseArgs {
  source: string;
  batch: boolean;
  help: boolean;
}

function parseDiagnoseArgs(argv: string[]): DiagnoseArgs {
  const { values, positionals } = parseCommandArgs(argv, {
    batch: { type: 'boolean' },
    help: { type: 'boolean', short: 'h' },
  });
  const batch = values.batch === true;
  if (values.help === true) return { source: '-', batch, help: true };
  if (positionals.length > 1) throw new UsageError(`diagnose takes one FILE (or -), got ${positionals.length}: ${positionals.join(' ')}`);
  const source = positionals[0] ?? (batch ? '-' : undefined);
  if (source === undefined) throw new UsageError('an input FILE is needed, or - to read it from stdin.');
  return { source, batch, help: false };
}

/** Checks the outer shape of a diagnosis input; the spec and readings check themselves. */
export function diagnoseValue(value: unknown): Diagnosis {
  if (value === null || typeof value !== 'object' || Array.isArray(value)) {
    throw new Error('input must be a JSON object {"spec": ..., "readings": ...}');
  }
  const v = value as Record<string, unknown>;
  for (const key of Object.keys(v)) {
    if (!['spec', 'readings', 'meter', 'tolerances'].includes(key)) throw new Error(`unknown key "${key}" (expected spec, readings, meter, tolerances)`);
  }
  if (v['spec'] === undefined) throw new Error('"spec" is missing: the supply to diagnose');
  return diagnose({ ...(v as unknown as DiagnoseInput), readings: (v['readings'] ?? {}) as DiagnoseInput['readings'] });
}

function describe(error: unknown): string {
  const f = describeFailure(error);
  return f.message.replace(/^solver failed: /, '');
}

export const diagnoseCommand: Command = {
  name: 'diagnose',
  summary: 'likely faults, bands and the next reading for readings taken on a supply',
  usage: USAGE,
  async run(argv, io) {
    const args = parseDiagnoseArgs(argv);
    if (args.help) {
      await writeText(io.stdout, USAGE);
      return EXIT_OK;
    }
    const name = args.source === '-' ? 'stdin' : args.source;
    if (!args.batch) {
      const text = await readSourceText(args.source, io, 'ripplewright diagnose');
      if (text === null) return EXIT_FAILED;
      let result: Diagnosis;
      try {
        result = diagnoseValue(JSON.parse(text) as unknown);
      } catch (error) {
        await writeText(io.stderr, `ripplewright diagnose: ${name}: ${describe(error)}\n`);
        return EXIT_FAILED;
      }
      await writeText(io.stdout, `${JSON.stringify(result, null, 2)}\n`);
      return EXIT_OK;
    }
    let input: Readable;
    try {
      input = await openLineInput(args.source, io);
    } catch (error) {
      await writeText(io.stderr, `ripplewright diagnose: cannot read ${args.source}: ${describeReadError(error)}\n`);
      return EXIT_FAILED;
    }
    const summary = await jsonLinesBatch(input, io.stdout, diagnoseValue, 'diagnosis input', (d) => (d.problems.length > 0 ? `${d.problems.length} reading(s) not understood` : null), io.stderr, 'ripplewright diagnose');
    if (summary.failed > 0) {
      await writeText(io.stderr, `ripplewright diagnose: ${summary.failed} of ${summary.lines} lines failed\n`);
      return EXIT_FAILED;
    }
    return EXIT_OK;
  },
};
