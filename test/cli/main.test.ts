import { spawnSync } from 'node:child_process';
import { fileURLToPath } from 'node:url';
import { describe, expect, it } from 'vitest';
import { COMMANDS, main } from '../../src/cli/main';
import { expectReadings } from '../../src/engine';
import { HALF_WAVE_SPEC, memoryIo } from './helpers';

const BIN = fileURLToPath(new URL('../../bin/ripplewright.js', import.meta.url));

describe('ripplewright command dispatch', () => {
  it('prints the usage with every command on stdout for --help and help, exit 0', async () => {
    for (const argv of [['--help'], ['-h'], ['help']]) {
      const io = memoryIo();
      expect(await main(argv, io)).toBe(0);
      for (const command of COMMANDS) expect(io.stdout.text).toContain(command.name);
      expect(io.stderr.text).toBe('');
    }
  });

  it('prints one command’s usage for help COMMAND and COMMAND --help', async () => {
    const viaHelp = memoryIo();
    expect(await main(['help', 'expect'], viaHelp)).toBe(0);
    const viaFlag = memoryIo();
    expect(await main(['expect', '--help'], viaFlag)).toBe(0);
    expect(viaHelp.stdout.text).toContain('--batch');
    expect(viaFlag.stdout.text).toBe(viaHelp.stdout.text);
  });

  it.each([[[]], [['frobnicate']], [['--verbose']], [['help', 'frobnicate']], [['expect', '--fast', 'a.json']]])(
    'prints usage on stderr and exits 2 for %j',
    async (argv) => {
      const io = memoryIo();
      expect(await main(argv, io)).toBe(2);
      expect(io.stdout.text).toBe('');
      expect(io.stderr.text).toContain('Usage:');
    },
  );
});

describe('bin/ripplewright.js', () => {
  it('runs expect on stdin as a real process and prints the solver result', () => {
    const run = spawnSync(process.execPath, [BIN, 'expect', '-'], { input: JSON.stringify(HALF_WAVE_SPEC), encoding: 'utf8' });
    expect(run.stderr).toBe('');
    expect(run.status).toBe(0);
    expect(JSON.parse(run.stdout)).toEqual(JSON.parse(JSON.stringify(expectReadings(HALF_WAVE_SPEC))));
  });

  it('exits 2 with usage on stderr for an unknown command', () => {
    const run = spawnSync(process.execPath, [BIN, 'frobnicate'], { encoding: 'utf8' });
    expect(run.status).toBe(2);
    expect(run.stderr).toContain('unknown command "frobnicate"');
  });
});
