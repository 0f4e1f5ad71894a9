import { formatProblems } from '../exchange/parse';
import { mergePayloads, type MergeResult, type MergeSource } from '../exchange/merge';
import { buildJobFile } from '../exchange/write';
import { canonicalJson } from '../exchange/canonical';
import { readJobFileArgument } from './check';
import { EXIT_FAILED, EXIT_OK, parseCommandArgs, UsageError, writeParts, writeText, type Command } from './command';

const USAGE = `Usage:
  ripplewright merge FILE... > merged.json

Merges job files into one job file on stdout: jobs by id, field by field (the newer edit wins;
the other value is kept in the file as a conflict), every reading kept once, assets and
technicians by id. The order of the files does not matter, and merging a file into a result that
already holds it changes nothing. A summary and the new conflicts go to stderr.

Every file is checked first (as "ripplewright check" does); if any is refused, nothing is
written to stdout, so no file's records are lost by accident.

Options:
  --by NAME      who made the merged file (its exportedBy name)
  -h, --help     show this help

The merged file's exportedAt is the latest exportedAt of the inputs, so the same inputs always
give the same file.

Exit codes: 0 merged; 1 a file could not be read or was refused; 2 bad arguments.
`;

/** How many conflicts the summary lists one by one before counting the rest. */
const CONFLICTS_LISTED = 20;

function shortValue(value: unknown): string {
  if (value === undefined) return '(none)';
  const text = canonicalJson(value);
  return text.length > 60 ? `${text.slice(0, 57)}...` : text;
}

/** The stderr summary of a merge: counts, then the conflicts it found. */
export function mergeSummary(result: MergeResult, files: number): string[] {
  const { counts, payload } = result;
  const lines = [
    `merged ${files} file${files === 1 ? '' : 's'}: ${payload.jobs.length} jobs, ${payload.readings.length} readings ` +
      `(${counts.readings.duplicates} duplicate copies dropped), ${payload.assets.length} assets, ${payload.technicians.length} technicians`,
  ];
  const newConflicts = result.newConflicts.length + result.newRecordConflicts.length;
  lines.push(`${newConflicts} new conflict${newConflicts === 1 ? '' : 's'} (kept in the file), ${payload.conflicts.length + payload.recordConflicts.length} in all`);
  const conflictLines = [
    ...result.newConflicts.map(
      (c) => `  job ${c.jobId} ${c.field}: kept ${shortValue(c.kept)} (${c.keptEditedAt}), dropped ${shortValue(c.dropped)} (${c.droppedEditedAt}) from ${c.droppedFrom ?? '?'}`,
    ),
    ...result.newRecordConflicts.map(
      (c) => `  ${c.record} ${c.id} ${c.field}: kept ${shortValue(c.kept)}, dropped ${shortValue(c.dropped)} from ${c.droppedFrom ?? '?'}`,
    ),
  ];
  lines.push(...conflictLines.slice(0, CONFLICTS_LISTED));
  if (conflictLines.length > CONFLICTS_LISTED) lines.push(`  and ${conflictLines.length - CONFLICTS_LISTED} more`);
  for (const clash of result.readingClashes) {
    lines.push(`  reading ${clash.id} of job ${clash.jobId} came in with two different contents; the other is kept as ${clash.renamedTo}`);
  }
  return lines;
}

export const mergeCommand: Command = {
  name: 'merge',
  summary: 'merge job files into one on stdout: nothing lost, nothing twice',
  usage: USAGE,
  async run(argv, io) {
    const { values, positionals } = parseCommandArgs(argv, {
      by: { type: 'string' },
      help: { type: 'boolean', short: 'h' },
    });
    if (values.help === true) {
      await writeText(io.stdout, USAGE);
      return EXIT_OK;
    }
    if (positionals.length === 0) throw new UsageError('merge needs at least one job FILE.');
    if (positionals.filter((path) => path === '-').length > 1) throw new UsageError('stdin (-) can be read only once.');
    const sources: MergeSource[] = [];
    let failed = false;
    for (const path of positionals) {
      const result = await readJobFileArgument(path, io, 'merge');
      if (result === undefined) failed = true;
      else if (!result.ok) {
        failed = true;
        for (const line of formatProblems(result)) await writeText(io.stderr, `ripplewright merge: ${line}\n`);
      } else sources.push({ name: result.name, at: result.file.exportedAt, payload: result.file.payload });
    }
    if (failed) {
      await writeText(io.stderr, 'ripplewright merge: nothing written: fix or leave out the files above\n');
      return EXIT_FAILED;
    }
    const merged = mergePayloads(sources);
    const exportedAt = sources.reduce((latest, source) => (source.at > latest ? source.at : latest), sources[0]!.at);
    const by = typeof values.by === 'string' ? values.by : undefined;
    const built = await buildJobFile(merged.payload, { exportedAt, exportedBy: { device: 'ripplewright merge', ...(by === undefined ? {} : { name: by }) } });
    await writeParts(io.stdout, built.parts);
    for (const line of mergeSummary(merged, sources.length)) await writeText(io.stderr, `ripplewright merge: ${line}\n`);
    return EXIT_OK;
  },
};
