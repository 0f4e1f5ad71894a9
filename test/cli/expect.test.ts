import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { PassThrough, Readable } from 'node:stream';
import { describe, expect, it } from 'vitest';
import { UsageError } from '../../src/cli/command';
import { expectBatch, parseExpectArgs } from '../../src/cli/expect';
import { main } from '../../src/cli/main';
import { expectReadings, parseSupplySpec, SpecError } from '../../src/engine';
import { BAD_CAPACITOR_SPEC, BRIDGE_SPEC, HALF_WAVE_SPEC, memoryIo, TextSink } from './helpers';

/** The SpecError the parser raises for a spec, so tests compare against the engine, not a copy of its wording. */
function specErrorOf(input: unknown): SpecError {
  try {
    parseSupplySpec(input);
  } catch (error) {
    if (error instanceof SpecError) return error;
    throw error;
  }
  throw new Error('expected the spec to be refused');
}

/** Results as they come back through JSON (NaN and Infinity would turn into null). */
function viaJson(value: unknown): unknown {
  return JSON.parse(JSON.stringify(value));
}

function specFile(content: string): string {
  const dir = mkdtempSync(join(tmpdir(), 'ripplewright-cli-'));
  const path = join(dir, 'spec.json');
  writeFileSync(path, content);
  return path;
}

describe('parseExpectArgs', () => {
  it('takes one FILE, or - for stdin', () => {
    expect(parseExpectArgs(['spec.json'])).toEqual({ source: 'spec.json', batch: false, waveformPoints: undefined, help: false });
    expect(parseExpectArgs(['-']).source).toBe('-');
  });

  it('reads stdin in batch mode when no FILE is given', () => {
    expect(parseExpectArgs(['--batch'])).toMatchObject({ source: '-', batch: true });
    expect(parseExpectArgs(['--batch', 'specs.jsonl']).source).toBe('specs.jsonl');
  });

  it('accepts --waveform with a whole number of samples', () => {
    expect(parseExpectArgs(['a.json', '--waveform', '200']).waveformPoints).toBe(200);
    expect(parseExpectArgs(['--waveform=50', 'a.json']).waveformPoints).toBe(50);
  });

  it.each([['0'], ['1'], ['2.5'], ['lots'], ['100001']])('refuses --waveform %s', (points) => {
    expect(() => parseExpectArgs(['a.json', '--waveform', points])).toThrow(UsageError);
  });

  it('refuses unknown flags, a missing FILE and a second FILE', () => {
    expect(() => parseExpectArgs(['a.json', '--fast'])).toThrow(UsageError);
    expect(() => parseExpectArgs([])).toThrow(UsageError);
    expect(() => parseExpectArgs(['a.json', 'b.json'])).toThrow(UsageError);
    expect(() => parseExpectArgs(['a.json', '--waveform'])).toThrow(UsageError);
  });
});

describe('expectBatch', () => {
  it('answers every input line on the same output line, errors included, and goes on after a bad line', async () => {
    const input = [JSON.stringify(BRIDGE_SPEC), '', '{"topology": "bridge",', JSON.stringify(BAD_CAPACITOR_SPEC), JSON.stringify(HALF_WAVE_SPEC)];
    const output = new TextSink();
    const summary = await expectBatch(Readable.from([`${input.join('\n')}\n`]), output, expectReadings);

    expect(summary).toEqual({ lines: 5, failed: 3 });
    const lines = output.lines().map((line) => JSON.parse(line) as Record<string, unknown>);
    expect(lines).toHaveLength(5);
    expect(lines[0]).toEqual(viaJson(expectReadings(BRIDGE_SPEC)));
    expect(lines[1]).toMatchObject({ line: 2 });
    expect(lines[1]?.error).toMatch(/^line 2: blank line/);
    expect(lines[2]).toMatchObject({ line: 3 });
    expect(lines[2]?.error).toMatch(/^line 3: not valid JSON/);
    const specError = specErrorOf(BAD_CAPACITOR_SPEC);
    expect(lines[3]).toEqual({ error: `line 4: ${specError.message}`, line: 4, field: specError.field });
    expect(lines[4]).toEqual(viaJson(expectReadings(HALF_WAVE_SPEC)));
  });

  it('writes each result before the next input line arrives', async () => {
    const input = new PassThrough();
    const output = new TextSink();
    const done = expectBatch(input, output, expectReadings);
    input.write(`${JSON.stringify(BRIDGE_SPEC)}\n`);
    await output.untilLines(1);
    expect(output.lines()).toHaveLength(1);
    input.end(`${JSON.stringify(HALF_WAVE_SPEC)}\n`);
    expect(await done).toEqual({ lines: 2, failed: 0 });
    expect(output.lines()).toHaveLength(2);
  });

  it('reads CRLF line ends and a last line without a newline', async () => {
    const output = new TextSink();
    const text = `${JSON.stringify(HALF_WAVE_SPEC)}\r\n${JSON.stringify(HALF_WAVE_SPEC)}`;
    expect(await expectBatch(Readable.from([text]), output, expectReadings)).toEqual({ lines: 2, failed: 0 });
    expect(output.lines().map((line) => JSON.parse(line))).toEqual([viaJson(expectReadings(HALF_WAVE_SPEC)), viaJson(expectReadings(HALF_WAVE_SPEC))]);
  });

  it('passes the waveform size to the solver for every line', async () => {
    const output = new TextSink();
    await expectBatch(Readable.from([`${JSON.stringify(HALF_WAVE_SPEC)}\n`]), output, expectReadings, { waveformPoints: 40 });
    const result = JSON.parse(output.lines()[0] ?? '{}') as { waveform?: { t: number[] } };
    expect(result.waveform?.t.length).toBeGreaterThan(1);
  });
});

describe('ripplewright expect', () => {
  it('prints the solver result for a spec file and exits 0', async () => {
    const io = memoryIo();
    expect(await main(['expect', specFile(JSON.stringify(BRIDGE_SPEC))], io)).toBe(0);
    expect(JSON.parse(io.stdout.text)).toEqual(viaJson(expectReadings(BRIDGE_SPEC)));
    expect(io.stderr.text).toBe('');
  });

  it('reads the spec from stdin with -, and leaves out the waveform unless asked', async () => {
    const io = memoryIo(JSON.stringify(HALF_WAVE_SPEC));
    expect(await main(['expect', '-'], io)).toBe(0);
    const result = JSON.parse(io.stdout.text) as Record<string, unknown>;
    expect(result).not.toHaveProperty('waveform');
    expect(result).toEqual(viaJson(expectReadings(HALF_WAVE_SPEC)));
  });

  it('includes the waveform with --waveform N', async () => {
    const io = memoryIo(JSON.stringify(HALF_WAVE_SPEC));
    expect(await main(['expect', '-', '--waveform', '64'], io)).toBe(0);
    const result = JSON.parse(io.stdout.text) as { waveform?: { t: number[]; vOut: number[] } };
    expect(result.waveform?.t.length).toBeGreaterThan(1);
    expect(result.waveform?.vOut).toHaveLength(result.waveform?.t.length ?? -1);
  });

  it('prints the SpecError message on stderr and exits 1 for an invalid spec', async () => {
    const io = memoryIo(JSON.stringify(BAD_CAPACITOR_SPEC));
    expect(await main(['expect', '-'], io)).toBe(1);
    expect(io.stdout.text).toBe('');
    expect(io.stderr.text).toContain(specErrorOf(BAD_CAPACITOR_SPEC).message);
  });

  it('says what is wrong and exits 1 for a missing file or text that is not JSON', async () => {
    const missing = memoryIo();
    expect(await main(['expect', join(tmpdir(), 'ripplewright-no-such-dir', 'spec.json')], missing)).toBe(1);
    expect(missing.stderr.text).toMatch(/cannot read .*spec\.json: no such file/);

    const notJson = memoryIo('topology: bridge');
    expect(await main(['expect', '-'], notJson)).toBe(1);
    expect(notJson.stderr.text).toMatch(/stdin: not valid JSON/);
  });

  it('exits 1 after a batch with a failed line, having answered every line', async () => {
    const io = memoryIo(`${JSON.stringify(HALF_WAVE_SPEC)}\nnot json\n`);
    expect(await main(['expect', '--batch'], io)).toBe(1);
    expect(io.stdout.lines()).toHaveLength(2);
    expect(io.stderr.text).toContain('1 of 2 lines failed');
  });
});
