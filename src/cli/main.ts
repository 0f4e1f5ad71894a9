import { EXIT_FAILED, EXIT_OK, EXIT_USAGE, UsageError, writeText, type CliIo, type Command } from './command';
import { checkCommand } from './check';
import { csvCommand } from './csv';
import { demoCommand } from './demo';
import { diagnoseCommand } from './diagnose';
import { expectCommand } from './expect';
import { mergeCommand } from './merge';

/** Every subcommand, in the order `--help` lists them. A new subcommand is one module plus one entry here. */
export const COMMANDS: readonly Command[] = [expectCommand, diagnoseCommand, checkCommand, mergeCommand, csvCommand, demoCommand];

function findCommand(name: string): Command | undefined {
  return COMMANDS.find((command) => command.name === name);
}

/** The top-level usage text, listing every command. */
export function mainUsage(): string {
  const width = Math.max(...COMMANDS.map((command) => command.name.length));
  const list = COMMANDS.map((command) => `  ${command.name.padEnd(width)}  ${command.summary}`).join('\n');
  return `Ripplewright: expected readings for AC-to-DC power supplies, on the command line.

Usage:
  ripplewright COMMAND [options]
  ripplewright help COMMAND      usage of one command
  ripplewright --help            this text

Commands:
${list}

Example:
  ripplewright expect spec.json
`;
}

/**
 * Runs the command line: `argv` is everything after the program name.
 * Returns the exit code: 0 done, 1 the command failed (its message is on stderr), 2 bad usage
 * (message and usage on stderr). Never throws; an unexpected error prints and returns 1.
 */
export async function main(argv: string[], io: CliIo): Promise<number> {
  const [first, ...rest] = argv;
  if (first === undefined) {
    await writeText(io.stderr, mainUsage());
    return EXIT_USAGE;
  }
  if (first === '--help' || first === '-h' || (first === 'help' && rest.length === 0)) {
    await writeText(io.stdout, mainUsage());
    return EXIT_OK;
  }
  if (first === 'help') {
    const topic = findCommand(rest[0] ?? '');
    if (topic === undefined || rest.length > 1) {
      await writeText(io.stderr, `ripplewright: no help for "${rest.join(' ')}"\n\n${mainUsage()}`);
      return EXIT_USAGE;
    }
    await writeText(io.stdout, topic.usage);
    return EXIT_OK;
  }
  const command = findCommand(first);
  if (command === undefined) {
    const what = first.startsWith('-') ? 'unknown option' : 'unknown command';
    await writeText(io.stderr, `ripplewright: ${what} "${first}"\n\n${mainUsage()}`);
    return EXIT_USAGE;
  }
  try {
    return await command.run(rest, io);
  } catch (error) {
    if (error instanceof UsageError) {
      await writeText(io.stderr, `ripplewright ${command.name}: ${error.message}\n\n${command.usage}`);
      return EXIT_USAGE;
    }
    const detail = error instanceof Error ? (error.stack ?? error.message) : String(error);
    await writeText(io.stderr, `ripplewright ${command.name}: unexpected error: ${detail}\n`);
    return EXIT_FAILED;
  }
}
