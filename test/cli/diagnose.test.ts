import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { diagnoseValue } from '../../src/cli/diagnose';
import { main } from '../../src/cli/main';
import { diagnose, type DiagnoseInput } from '../../src/engine/diagnosis';
import { BRIDGE_SPEC, memoryIo } from './helpers';

const input = { spec: BRIDGE_SPEC, readings: { dcOut: '15,1', rippleAc: '0.5 V', rippleHz: 100 } };

function file(content: string): string {
  const dir = mkdtempSync(join(tmpdir(), 'ripplewright-diagnose-'));
  const path = join(dir, 'input.json');
  writeFileSync(path, content);
  return path;
}

describe('ripplewright diagnose', () => {
  it('prints the same diagnosis the engine gives, ranked best first', async () => {
    const io = memoryIo();
    expect(await main(['diagnose', file(JSON.stringify(input))], io)).toBe(0);
    const out = JSON.parse(io.stdout.text) as ReturnType<typeof diagnose>;
    expect(out).toEqual(JSON.parse(JSON.stringify(diagnose(input as unknown as DiagnoseInput))));
    const p = out.ranked.map((r) => r.probability);
    expect([...p].sort((a, b) => b - a)).toEqual(p);
    expect(out.next).not.toBeNull();
  });

  it('batch: one answer per line in order, a bad line gets an error line and exit 1', async () => {
    const lines = [JSON.stringify(input), '{"readings": {}}', '', JSON.stringify({ ...input, readings: { dcOut: 0, acSecondary: 0 } })].join('\n');
    const io = memoryIo(`${lines}\n`);
    expect(await main(['diagnose', '--batch'], io)).toBe(1);
    const out = io.stdout.lines().map((l) => JSON.parse(l) as Record<string, unknown>);
    expect(out).toHaveLength(4);
    expect(out[0]!['ranked']).toBeDefined();
    expect(String(out[1]!['error'])).toMatch(/line 2: .*"spec" is missing/);
    expect(String(out[2]!['error'])).toMatch(/line 3: blank line/);
    expect((out[3]!['ranked'] as { fault: string }[])[0]!.fault).toBe('no-ac');
    expect(io.stderr.text).toMatch(/2 of 4 lines failed/);
  });

  it('refuses an unknown top-level key and a bad spec with plain messages', () => {
    expect(() => diagnoseValue({ ...input, reading: {} })).toThrow(/unknown key "reading"/);
    expect(() => diagnoseValue({ spec: { ...BRIDGE_SPEC, topology: 'full' }, readings: {} })).toThrow(/topology/);
  });

  it('bad arguments are a usage error (exit 2)', async () => {
    const io = memoryIo();
    expect(await main(['diagnose'], io)).toBe(2);
    expect(io.stderr.text).toMatch(/input FILE is needed/);
  });
});
