import { spawnSync } from 'node:child_process';
import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { parse } from 'csv-parse/sync';
import { beforeAll, describe, expect, it } from 'vitest';
import { main } from '../../src/cli/main';
import { CSV_HEADERS } from '../../src/exchange/csv';
import { readJobFile } from '../../src/exchange/parse';
import { writeJobFile } from '../../src/exchange/write';
import { smallPayload, T2, T3 } from '../exchange/fixtures';
import { memoryIo } from './helpers';

const BIN = fileURLToPath(new URL('../../bin/ripplewright.js', import.meta.url));
const dir = mkdtempSync(join(tmpdir(), 'ripplewright-exchange-'));
const path = (name: string) => join(dir, name);

function lastLine(text: string): string {
  return text.trimEnd().split('\n').at(-1) ?? '';
}

beforeAll(async () => {
  const phone = smallPayload();
  writeFileSync(path('phone.json'), await writeJobFile(phone, { exportedAt: T2, exportedBy: { device: 'phone' } }));
  const tablet = smallPayload();
  tablet.jobs[0]!.complaint = 'Resets when the drum turns';
  tablet.jobs[0]!.edits.complaint = T3;
  tablet.jobs[0]!.updatedAt = T3;
  tablet.readings.push({ id: 'r-tab', jobId: 'job-a', kind: 'esr', target: 'C1', value: 0.3, text: '0.3', takenAt: T3, phase: 'before' });
  const tabletText = await writeJobFile(tablet, { exportedAt: T3, exportedBy: { device: 'tablet' } });
  writeFileSync(path('tablet.json'), tabletText);
  writeFileSync(path('altered.json'), tabletText.replace('"Resets when the drum turns"', '"Resets when the drum stops"'));
  writeFileSync(path('truncated.json'), tabletText.slice(0, tabletText.length / 2));
  writeFileSync(path('foreign.json'), JSON.stringify({ topology: 'bridge', source: { vrms: 12, hz: 50 }, load: { ohms: 33 } }));
  // A head from a later version: the reader refuses it on its first line.
  writeFileSync(path('newer.json'), tabletText.replace('"schemaVersion":2', '"schemaVersion":3'));
});

describe('ripplewright check', () => {
  it('exits 0 with the one-line summary as the last line for a sound file', async () => {
    const io = memoryIo();
    expect(await main(['check', path('tablet.json')], io)).toBe(0);
    expect(lastLine(io.stdout.text)).toBe('{"jobs": 3, "readings": 9}');
    expect(JSON.parse(lastLine(io.stdout.text))).toEqual({ jobs: 3, readings: 9 });
    expect(io.stderr.text).toBe('');
  });

  it.each([
    ['altered.json', /altered or damaged/],
    ['truncated.json', /truncated/],
    ['foreign.json', /not a Ripplewright job file/],
    ['newer.json', /made by a newer version/],
    ['missing.json', /cannot read .*missing\.json: no such file/],
  ])('exits 1 for %s, saying what is wrong on stderr and nothing on stdout', async (name, message) => {
    const io = memoryIo();
    expect(await main(['check', path(name)], io)).toBe(1);
    expect(io.stdout.text).toBe('');
    expect(io.stderr.text).toMatch(message);
  });

  it('reads the file from stdin with -', async () => {
    const io = memoryIo(await writeJobFile(smallPayload(), { exportedAt: T2 }));
    expect(await main(['check', '-'], io)).toBe(0);
    expect(lastLine(io.stdout.text)).toBe('{"jobs": 3, "readings": 8}');
  });

  it.each([[['check']], [['check', 'a.json', 'b.json']], [['check', '--fast', 'a.json']]])('exits 2 with usage for %j', async (argv) => {
    const io = memoryIo();
    expect(await main(argv, io)).toBe(2);
    expect(io.stderr.text).toContain('Usage:');
  });
});

describe('ripplewright merge', () => {
  it('writes one sound file with every reading once and the conflict summarised on stderr', async () => {
    const io = memoryIo();
    expect(await main(['merge', path('phone.json'), path('tablet.json'), path('phone.json')], io)).toBe(0);
    const result = await readJobFile(io.stdout.text, 'merged.json');
    expect(result.ok).toBe(true);
    if (!result.ok) return;
    const { payload } = result.file;
    expect(payload.readings.map((r) => r.id).sort()).toEqual(['r-1', 'r-2', 'r-3', 'r-4', 'r-5', 'r-6', 'r-7', 'r-8', 'r-tab']);
    expect(payload.jobs.find((j) => j.id === 'job-a')!.complaint).toBe('Resets when the drum turns');
    expect(payload.conflicts).toHaveLength(1);
    expect(result.file.exportedAt).toBe(T3);
    expect(io.stderr.text).toMatch(/merged 3 files: 3 jobs, 9 readings \(16 duplicate copies dropped\)/);
    expect(io.stderr.text).toMatch(/job job-a complaint: kept "Resets when the drum turns"/);
  });

  it('gives the same bytes whatever the order of the files', async () => {
    const a = memoryIo();
    const b = memoryIo();
    await main(['merge', path('phone.json'), path('tablet.json')], a);
    await main(['merge', path('tablet.json'), path('phone.json')], b);
    expect(a.stdout.text).toBe(b.stdout.text);
  });

  it('refuses to write anything when one file is refused', async () => {
    const io = memoryIo();
    expect(await main(['merge', path('phone.json'), path('altered.json')], io)).toBe(1);
    expect(io.stdout.text).toBe('');
    expect(io.stderr.text).toMatch(/altered\.json: line \d+: sha256: altered or damaged/);
    expect(io.stderr.text).toMatch(/nothing written/);
  });

  it('exits 2 with no files', async () => {
    const io = memoryIo();
    expect(await main(['merge'], io)).toBe(2);
  });
});

describe('ripplewright csv', () => {
  it('writes the readings as CSV that a standard parser reads', async () => {
    const io = memoryIo();
    expect(await main(['csv', path('tablet.json')], io)).toBe(0);
    const rows = parse(io.stdout.text, { bom: true }) as string[][];
    expect(rows[0]).toEqual(CSV_HEADERS);
    expect(rows).toHaveLength(10);
    expect(io.stdout.text.charCodeAt(0)).toBe(0xfeff);
    const plain = memoryIo();
    await main(['csv', '--no-bom', path('tablet.json')], plain);
    expect(plain.stdout.text).toBe(io.stdout.text.slice(1));
  });

  it('exits 1 for a damaged file and writes no CSV', async () => {
    const io = memoryIo();
    expect(await main(['csv', path('truncated.json')], io)).toBe(1);
    expect(io.stdout.text).toBe('');
  });
});

describe('ripplewright demo', () => {
  it('writes a sound, reproducible job file of the asked size', async () => {
    const first = memoryIo();
    expect(await main(['demo', '--jobs', '8', '--seed', '3'], first)).toBe(0);
    const second = memoryIo();
    await main(['demo', '--jobs', '8', '--seed', '3'], second);
    expect(second.stdout.text).toBe(first.stdout.text);
    const result = await readJobFile(first.stdout.text, 'demo.json');
    expect(result.ok && result.file.payload.jobs.length).toBe(8);
  });

  it.each([[['demo', '--jobs', '0']], [['demo', '--jobs', 'many']], [['demo', '--seed', '1.5']], [['demo', '--end', 'someday']], [['demo', 'file.json']]])('exits 2 with usage for %j', async (argv) => {
    const io = memoryIo();
    expect(await main(argv, io)).toBe(2);
    expect(io.stderr.text).toContain('Usage:');
  });
});

describe('bin/ripplewright.js with job files', () => {
  it('runs demo | check as real processes: exit 0 and the summary as the last line', () => {
    const demo = spawnSync(process.execPath, [BIN, 'demo', '--jobs', '5', '--seed', '2'], { encoding: 'utf8' });
    expect(demo.status).toBe(0);
    const check = spawnSync(process.execPath, [BIN, 'check', '-'], { input: demo.stdout, encoding: 'utf8' });
    expect(check.status).toBe(0);
    const summary = JSON.parse(lastLine(check.stdout)) as { jobs: number; readings: number };
    expect(summary.jobs).toBe(5);
    // The head line of the file says how many readings it holds.
    const head = JSON.parse(demo.stdout.slice(0, demo.stdout.indexOf('\n'))) as { counts: { readings: number } };
    expect(summary.readings).toBe(head.counts.readings);
    expect(summary.readings).toBeGreaterThan(5);
  });

  it('exits non-zero with a plain message for an altered file', () => {
    const run = spawnSync(process.execPath, [BIN, 'check', path('altered.json')], { encoding: 'utf8' });
    expect(run.status).toBe(1);
    expect(run.stdout).toBe('');
    expect(run.stderr).toMatch(/altered or damaged/);
  });
});
