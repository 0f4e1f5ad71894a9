/**
 * The job file as written now: schema version 2, JSON Lines (docs/exchange-format.md). A head line
 * with counts, block lines of one kind of record each (readings as a column table whose `job`
 * column is the job's place among the file's jobs), and a seal line whose digest is a SHA-256
 * hash list over 64 KiB pieces of the bytes before it.
 *
 * Expectations come from the doc, from the inputs, or from independent references: node:crypto
 * for SHA-256 (fixtures.ts `referenceDigestHex`), the doc's shell pipeline, FIPS 180-4's example
 * digest, RFC 8259 for escapes. Hostile files with correct digests come from `sealedLines`.
 * Version-1 files are in file-v1.test.ts.
 */
import { execFileSync, spawnSync } from 'node:child_process';
import { createHash } from 'node:crypto';
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { encodeUtf8 } from '../../src/exchange/canonical';
import { DIGEST_PIECE_BYTES, PieceHasher, pieceDigestHex } from '../../src/exchange/digest';
import { LIMITS, type ExchangeProblem, type JobPayload } from '../../src/exchange/format';
import { sortPayload } from '../../src/exchange/order';
import { formatProblem, formatProblems, JobFileReader, readJobFile, type ReadResult } from '../../src/exchange/parse';
import { buildJobFile, ExportError, joinParts, selectForExport, writeJobFile } from '../../src/exchange/write';
import type { Reading } from '../../src/model/job';
import {
  conflictPayload,
  countsOf,
  demoPayload,
  headLine,
  linesOf,
  PIECE_BYTES,
  readingTable,
  referenceDigestHex,
  sealedLines,
  smallPayload,
  T2,
  T3,
} from './fixtures';

const OPTIONS = { exportedAt: T3, exportedBy: { name: 'Ada Quill', device: 'test phone' } };

/** The doc's words for a digest that does not match ("Reading a file"). */
const ALTERED = 'altered or damaged: the SHA-256 digest does not match the content, so the file changed after it was exported';

/** The kinds of block, in the order the doc's table lists them. */
const KINDS = ['technicians', 'assets', 'jobs', 'readings', 'conflicts', 'recordConflicts'] as const;
/** The reading table's columns in the doc's order, and which of them may be left out. */
const COLUMNS = ['id', 'job', 'kind', 'target', 'value', 'text', 'takenAt', 'phase', 'expectedLow', 'expectedHigh', 'verdict', 'supersedes', 'note'] as const;
type Column = (typeof COLUMNS)[number];
const OPTIONAL_COLUMNS: ReadonlySet<string> = new Set(['target', 'expectedLow', 'expectedHigh', 'verdict', 'supersedes', 'note']);
const REQUIRED_COLUMNS = COLUMNS.filter((column) => !OPTIONAL_COLUMNS.has(column));

type Raw = Record<string, unknown>;

async function read(content: string | Uint8Array, name = 'jobs.json'): Promise<ReadResult> {
  return readJobFile(content, name);
}

function problemsOf(result: ReadResult): string[] {
  return result.ok ? [] : result.problems.map(formatProblem);
}

function problemList(result: ReadResult): ExchangeProblem[] {
  return result.ok ? [] : result.problems;
}

const written = new Map<string, Promise<string>>();
/** A written file, made once per test run. */
function writtenFile(which: 'small' | 'conflicts' | 'demo40' | 'demo300'): Promise<string> {
  let file = written.get(which);
  if (!file) {
    const payload = { small: smallPayload, conflicts: conflictPayload, demo40: () => demoPayload(40), demo300: () => demoPayload(300) }[which]();
    file = writeJobFile(payload, OPTIONS);
    written.set(which, file);
  }
  return file;
}

/** The payload a written file was made from (fresh copies). */
function payloadOf(which: 'small' | 'conflicts' | 'demo40' | 'demo300'): JobPayload {
  return { small: smallPayload, conflicts: conflictPayload, demo40: () => demoPayload(40), demo300: () => demoPayload(300) }[which]();
}

/** Every character beyond ASCII as an RFC 8259 §7 escape, from its UTF-16 code units. */
function escapeNonAscii(text: string): string {
  let out = '';
  for (let i = 0; i < text.length; i++) {
    const unit = text.charCodeAt(i);
    out += unit < 0x80 ? text[i] : `\\u${unit.toString(16).padStart(4, '0')}`;
  }
  return out;
}

/**
 * The records laid out as another writer might: a jobs line per job, each followed by a table of
 * that job's readings, built here (fixtures.ts) rather than by write.ts. Non-ASCII left as is.
 * `readingLine[g]` is the line (1 = head) of the file's reading g.
 */
function layOut(payload: JobPayload): { lines: unknown[]; readingLine: number[]; jobLine: number[]; records: JobPayload } {
  const records = sortPayload(payload);
  const ids = records.jobs.map((job) => job.id);
  const lines: unknown[] = [headLine(countsOf(records))];
  if (records.technicians.length > 0) lines.push({ technicians: records.technicians });
  if (records.assets.length > 0) lines.push({ assets: records.assets });
  const readingLine: number[] = [];
  const jobLine: number[] = [];
  for (const job of records.jobs) {
    lines.push({ jobs: [job] });
    jobLine.push(lines.length);
    const readings = records.readings.filter((reading) => reading.jobId === job.id);
    if (readings.length === 0) continue;
    lines.push({ readings: readingTable(readings, ids) });
    for (let i = 0; i < readings.length; i++) readingLine.push(lines.length);
  }
  if (records.conflicts.length > 0) lines.push({ conflicts: records.conflicts });
  if (records.recordConflicts.length > 0) lines.push({ recordConflicts: records.recordConflicts });
  return { lines, readingLine, jobLine, records };
}

/** In lines laid out by layOut: the table holding the file's reading g, g's row in it, and its line. */
function tableOf(lines: Raw[], readingLine: readonly number[], g: number): { table: Record<string, unknown[]>; k: number; line: number } {
  const line = readingLine[g]!;
  return { table: lines[line - 1]!.readings as Record<string, unknown[]>, k: g - readingLine.indexOf(line), line };
}

/** A deep copy of JSON-able lines, to change one without touching the others. */
const copyLines = (lines: readonly unknown[]) => JSON.parse(JSON.stringify(lines)) as Raw[];

/** Positions just after each line feed of `bytes` (but not its end). */
function afterLineFeeds(bytes: Uint8Array): number[] {
  const out: number[] = [];
  bytes.forEach((byte, i) => {
    if (byte === 0x0a && i + 1 < bytes.length) out.push(i + 1);
  });
  return out;
}

async function readInChunks(bytes: Uint8Array, cuts: readonly number[], name = 'jobs.json'): Promise<ReadResult> {
  const reader = new JobFileReader(name);
  let at = 0;
  for (const cut of [...new Set(cuts)].filter((c) => c > 0 && c < bytes.length).sort((a, b) => a - b).concat(bytes.length)) {
    reader.push(bytes.subarray(at, cut));
    at = cut;
  }
  expect(reader.bytesRead).toBe(bytes.length);
  return reader.finish();
}

// -------------------------------------------------------------------------------------------------

describe('writing and reading a version-2 job file', () => {
  it('reads back exactly the records it wrote, in file order, with who wrote it and when', async () => {
    for (const which of ['small', 'conflicts', 'demo40', 'demo300'] as const) {
      const text = await writtenFile(which);
      const result = await read(text);
      expect(problemsOf(result), which).toEqual([]);
      if (!result.ok) continue;
      expect(result.file.payload, which).toEqual(sortPayload(payloadOf(which)));
      expect(result.file.schemaVersion).toBe(2);
      expect(result.file.exportedAt).toBe(T3);
      expect(result.file.exportedBy).toEqual(OPTIONS.exportedBy);
      // The file's sha256 is the digest its seal holds.
      expect(result.file.sha256).toBe((JSON.parse(linesOf(text).at(-1)!) as { sha256: string }).sha256);
    }
  });

  it('spans many lines for a large payload and still reads back exactly', async () => {
    const lines = linesOf(await writtenFile('demo300'));
    const kinds = lines.slice(1, -1).map((line) => Object.keys(JSON.parse(line) as object)[0]);
    // 300 jobs and 3000 readings are far more than one 64 KiB line of each.
    expect(kinds.filter((kind) => kind === 'jobs').length).toBeGreaterThan(1);
    expect(kinds.filter((kind) => kind === 'readings').length).toBeGreaterThan(1);
  });

  it('writes the same bytes for the same records in any order of records and of their members', async () => {
    const payload = conflictPayload();
    const expected = await writeJobFile(payload, OPTIONS);
    const reverseMembers = (value: unknown): unknown =>
      Array.isArray(value)
        ? value.map(reverseMembers)
        : typeof value === 'object' && value !== null
          ? Object.fromEntries(Object.entries(value).reverse().map(([k, v]) => [k, reverseMembers(v)]))
          : value;
    await fc.assert(
      fc.asyncProperty(fc.infiniteStream(fc.nat()), fc.boolean(), async (randoms, reverse) => {
        const shuffle = <T>(list: readonly T[]): T[] => {
          const out = [...list];
          for (let i = out.length - 1; i > 0; i--) {
            const j = randoms.next().value % (i + 1);
            [out[i], out[j]] = [out[j]!, out[i]!];
          }
          return out;
        };
        let shuffled: JobPayload = {
          jobs: shuffle(payload.jobs),
          readings: shuffle(payload.readings),
          assets: shuffle(payload.assets),
          technicians: shuffle(payload.technicians),
          conflicts: shuffle(payload.conflicts),
          recordConflicts: shuffle(payload.recordConflicts),
        };
        if (reverse) shuffled = reverseMembers(shuffled) as JobPayload;
        expect(await writeJobFile(shuffled, OPTIONS)).toBe(expected);
      }),
      { numRuns: 25 },
    );
    const demo = demoPayload(40);
    const reversed: JobPayload = { ...demo, jobs: [...demo.jobs].reverse(), readings: [...demo.readings].reverse(), assets: [...demo.assets].reverse() };
    expect(await writeJobFile(reversed, OPTIONS)).toBe(await writtenFile('demo40'));
  });

  it('gives its parts as the file’s lines, each with its line feed, adding up to the file', async () => {
    const built = await buildJobFile(smallPayload(), OPTIONS);
    const text = await writtenFile('small');
    expect(joinParts(built.parts)).toEqual(encodeUtf8(text));
    expect(built.bytes).toBe(encodeUtf8(text).byteLength);
    expect(built.parts.map((part) => new TextDecoder().decode(part))).toEqual(linesOf(text).map((line) => `${line}\n`));
    expect(built.file.payload).toEqual(sortPayload(smallPayload()));
  });

  it('leaves the caller’s bytes as they were after reading them', async () => {
    const bytes = encodeUtf8(await writtenFile('small'));
    const before = bytes.slice();
    expect((await read(bytes)).ok).toBe(true);
    expect(bytes).toEqual(before);
  });

  it('reads a file laid out by another writer: a line per job with its readings after it, non-ASCII unescaped', async () => {
    const { lines, records } = layOut(conflictPayload());
    const text = sealedLines(lines);
    expect(/[^\x00-\x7f]/.test(text)).toBe(true);
    const result = await read(text);
    expect(problemsOf(result)).toEqual([]);
    if (result.ok) expect(result.file.payload).toEqual(records);
  });

  it('reads blocks in any order as long as each reading’s job is on an earlier line', async () => {
    const { lines, records } = layOut(conflictPayload());
    const kindOf = (line: unknown) => Object.keys(line as object)[0];
    const byKind = (kind: string) => lines.filter((line, i) => i > 0 && kindOf(line) === kind);
    const jobsAndReadings = lines.filter((line, i) => i > 0 && (kindOf(line) === 'jobs' || kindOf(line) === 'readings'));
    const reordered = [lines[0], ...byKind('recordConflicts'), ...byKind('conflicts'), ...jobsAndReadings, ...byKind('assets'), ...byKind('technicians')];
    expect(reordered).toHaveLength(lines.length);
    const result = await read(sealedLines(reordered));
    expect(problemsOf(result)).toEqual([]);
    if (result.ok) expect(result.file.payload).toEqual(records);
  });

  it('refuses to export records that break the format, naming them', async () => {
    const payload = smallPayload();
    payload.readings[0]!.jobId = 'job-missing';
    await expect(writeJobFile(payload, OPTIONS)).rejects.toThrow(ExportError);
    await expect(writeJobFile(payload, OPTIONS)).rejects.toThrow(/reading r-1.*job-missing/);
  });

  it('exports one job or a date range with everything those jobs need', () => {
    const store = smallPayload();
    const one = selectForExport(store, { kind: 'jobs', jobIds: ['job-b'] });
    expect(one.jobs.map((j) => j.id)).toEqual(['job-b']);
    expect(one.readings.map((r) => r.id).sort()).toEqual(['r-4', 'r-5', 'r-6', 'r-7']);
    expect(one.assets.map((a) => a.id)).toEqual(['asset-2']);
    expect(one.technicians.map((t) => t.id)).toEqual(['tech-2']);
    const range = selectForExport(store, { kind: 'dates', from: T2 });
    expect(range.jobs.map((j) => j.id)).toEqual(['job-c']);
    expect(range.assets).toEqual([]);
  });
});

// -------------------------------------------------------------------------------------------------

describe('the lines of a written file', () => {
  const FILES = ['small', 'conflicts', 'demo300'] as const;

  it('is JSON Lines: every line one JSON object ending in LF, no blank lines, no CR', async () => {
    for (const which of FILES) {
      const text = await writtenFile(which);
      expect(text.endsWith('\n'), which).toBe(true);
      expect(text.includes('\r'), which).toBe(false);
      for (const line of linesOf(text)) {
        expect(line.trim(), which).not.toBe('');
        const value = JSON.parse(line) as unknown;
        expect(typeof value === 'object' && value !== null && !Array.isArray(value), line.slice(0, 80)).toBe(true);
      }
    }
  });

  it('starts with the head: format first, then the schema version, who, when and the counts of each kind', async () => {
    for (const which of FILES) {
      const text = await writtenFile(which);
      // The first bytes say what the file is.
      expect(text.startsWith('{"format":"ripplewright-jobs"')).toBe(true);
      const head = JSON.parse(linesOf(text)[0]!) as Raw;
      expect(Object.keys(head)[0]).toBe('format');
      expect(head).toEqual({
        format: 'ripplewright-jobs',
        schemaVersion: 2,
        exportedAt: T3,
        exportedBy: OPTIONS.exportedBy,
        counts: countsOf(payloadOf(which)),
      });
    }
  });

  it('ends with the seal, {"sha256": 64 lowercase hex digits}, and nothing after it', async () => {
    for (const which of FILES) {
      const text = await writtenFile(which);
      const lines = linesOf(text);
      expect(lines.at(-1)).toMatch(/^\{"sha256":"[0-9a-f]{64}"\}$/);
      expect(text.endsWith(`${lines.at(-1)}\n`)).toBe(true);
      // No other line is a seal.
      expect(lines.slice(0, -1).some((line) => line.startsWith('{"sha256"'))).toBe(false);
    }
  });

  it('is pure ASCII, writing µ, Ω and 😕 as RFC 8259 \\u escapes that read back as the same text', async () => {
    const text = await writtenFile('small');
    expect(encodeUtf8(text).every((byte) => byte < 0x80)).toBe(true);
    // U+00B5 MICRO SIGN, U+03A9 GREEK CAPITAL LETTER OMEGA, U+1F615 CONFUSED FACE: the last as the
    // UTF-16 surrogate pair RFC 8259 §7 prescribes (0xD800 + high ten bits, 0xDC00 + low ten bits).
    const emoji = 0x1f615 - 0x10000;
    const pair = `\\u${(0xd800 + (emoji >> 10)).toString(16)}\\u${(0xdc00 + (emoji & 0x3ff)).toString(16)}`;
    expect(pair).toBe('\\ud83d\\ude15');
    for (const escape of ['\\u00b5', '\\u03a9', pair]) expect(text).toContain(escape);
    const complaint = smallPayload().jobs[1]!.complaint;
    expect(text).toContain(escapeNonAscii(JSON.stringify(complaint)));
    const result = await read(text);
    if (!result.ok) throw new Error(problemsOf(result).join('\n'));
    expect(result.file.payload.jobs.find((job) => job.id === 'job-b')!.complaint).toBe(complaint);
  });

  it('keeps any Unicode text exactly while writing only ASCII', async () => {
    await fc.assert(
      fc.asyncProperty(fc.string({ unit: 'binary', maxLength: 40 }), fc.string({ unit: 'grapheme', minLength: 1, maxLength: 20 }), async (complaint, name) => {
        fc.pre(name.trim() !== '' && name.length <= LIMITS.shortTextChars);
        const payload = smallPayload();
        payload.jobs[0]!.complaint = complaint;
        payload.technicians[0]!.name = name;
        const text = await writeJobFile(payload, OPTIONS);
        expect(encodeUtf8(text).every((byte) => byte < 0x80)).toBe(true);
        const result = await read(text);
        if (!result.ok) throw new Error(problemsOf(result).join('\n'));
        expect(result.file.payload.jobs.find((job) => job.id === 'job-a')!.complaint).toBe(complaint);
        expect(result.file.payload.technicians.find((t) => t.id === 'tech-1')!.name).toBe(name);
      }),
      { numRuns: 40 },
    );
  });

  it('writes technicians, assets, then each line of jobs followed by their readings, then conflicts and record conflicts', async () => {
    for (const which of FILES) {
      const lines = linesOf(await writtenFile(which)).slice(1, -1);
      const letters = lines
        .map((line) => {
          const members = Object.keys(JSON.parse(line) as object);
          expect(members, line.slice(0, 60)).toHaveLength(1);
          return 'TAJRCK'[KINDS.indexOf(members[0] as (typeof KINDS)[number])] ?? '?';
        })
        .join('');
      expect(letters, which).toMatch(/^T*A*(JR*)*C*K*$/);
      const payload = payloadOf(which);
      if (payload.conflicts.length > 0) expect(letters).toContain('C');
      if (payload.recordConflicts.length > 0) expect(letters).toContain('K');
    }
  });

  it('writes every job, asset, technician and conflict with its members in sorted order, at every level', async () => {
    const sorted = (value: unknown, where: string): void => {
      if (Array.isArray(value)) value.forEach((item, i) => sorted(item, `${where}[${i}]`));
      else if (typeof value === 'object' && value !== null) {
        const names = Object.keys(value);
        expect(names, where).toEqual([...names].sort());
        for (const [name, member] of Object.entries(value)) sorted(member, `${where}.${name}`);
      }
    };
    for (const which of FILES) {
      for (const line of linesOf(await writtenFile(which)).slice(1, -1)) {
        const block = JSON.parse(line) as Raw;
        if (!('readings' in block)) sorted(Object.values(block)[0], Object.keys(block)[0]!);
      }
    }
  });

  it('writes readings as column tables after the line holding their job, columns in the doc’s order, naming the job by its place', async () => {
    for (const which of FILES) {
      const expected = sortPayload(payloadOf(which));
      const jobs: Raw[] = [];
      const readings: Reading[] = [];
      for (const line of linesOf(await writtenFile(which)).slice(1, -1)) {
        const block = JSON.parse(line) as Raw;
        if ('jobs' in block) jobs.push(...(block.jobs as Raw[]));
        if (!('readings' in block)) continue;
        const table = block.readings as Record<string, unknown[]>;
        const names = Object.keys(table);
        // The doc's column order; required columns always there; all of one length, at least 1.
        expect(names).toEqual(COLUMNS.filter((column) => names.includes(column)));
        for (const column of REQUIRED_COLUMNS) expect(names).toContain(column);
        const n = table.id!.length;
        expect(n).toBeGreaterThan(0);
        for (const name of names) expect(table[name], name).toHaveLength(n);
        for (let k = 0; k < n; k++) {
          const job = table.job![k] as number;
          // The job is on an earlier line: its place is among the jobs read so far.
          expect(Number.isInteger(job) && job >= 0 && job < jobs.length, `job ${job} of ${jobs.length}`).toBe(true);
          const reading: Raw = { jobId: jobs[job]!.id };
          for (const name of names) if (name !== 'job' && table[name]![k] !== null) reading[name] = table[name]![k];
          readings.push(reading as unknown as Reading);
        }
        // An optional column is there exactly when some reading of the table has the field.
        const mine = expected.readings.slice(readings.length - n, readings.length);
        for (const column of OPTIONAL_COLUMNS) {
          expect(names.includes(column), column).toBe(mine.some((reading) => reading[column as keyof Reading] !== undefined));
        }
      }
      expect(readings, which).toEqual(expected.readings);
      expect(jobs).toEqual(expected.jobs);
    }
  });

  /** Bytes each record of a block line takes: a list item, or a reading's values across the columns. */
  const recordBytes = (block: Raw): number[] => {
    const [kind, content] = Object.entries(block)[0]!;
    if (kind !== 'readings') return (content as unknown[]).map((record) => escapeNonAscii(JSON.stringify(record)).length + 1);
    const table = content as Record<string, unknown[]>;
    return table.id!.map((_, k) => Object.values(table).reduce<number>((sum, column) => sum + escapeNonAscii(JSON.stringify(column[k])).length + 1, 0));
  };
  /** Lines that hold no record, or are much above 64 KiB though no record of theirs is as big. */
  const oversized = (text: string): string[] => {
    const out: string[] = [];
    for (const [i, line] of linesOf(text).slice(1, -1).entries()) {
      const sizes = recordBytes(JSON.parse(line) as Raw);
      // "About 64 KiB": a quarter over, plus the record that took it past.
      const bound = 1.25 * 65_536 + Math.max(...sizes);
      const bytes = encodeUtf8(line).byteLength;
      if (sizes.length === 0 || bytes > bound) out.push(`line ${i + 2}: ${bytes} bytes, ${sizes.length} records, largest ${Math.max(...sizes)}`);
    }
    return out;
  };

  it('cuts lines near 64 KiB, each with at least one record, longer only by a record bigger than that', async () => {
    expect(oversized(await writtenFile('demo300'))).toEqual([]);
    const big = smallPayload();
    big.jobs[0]!.complaint = 'Ω'.repeat(LIMITS.longTextChars); // 120 000 bytes once escaped
    const text = await writeJobFile(big, OPTIONS);
    expect(Math.max(...linesOf(text).map((line) => line.length))).toBeGreaterThan(6 * LIMITS.longTextChars);
    expect(oversized(text)).toEqual([]);
    expect((await read(text)).ok).toBe(true);
  });

  it('cuts lines near 64 KiB of bytes as written, also when escaped text beyond ASCII takes 6 bytes a character', async () => {
    const wide = smallPayload();
    const jobA = wide.jobs[0]!;
    wide.jobs = Array.from({ length: 60 }, (_, i) => ({ ...jobA, id: `job-${String(i).padStart(3, '0')}`, complaint: 'Ω'.repeat(2000) }));
    wide.readings = wide.jobs.flatMap((job) =>
      Array.from({ length: 5 }, (_, k) => ({ ...smallPayload().readings[0]!, id: `${job.id}-r${k}`, jobId: job.id, note: 'µ'.repeat(1000) })),
    );
    const text = await writeJobFile(wide, OPTIONS);
    expect((await read(text)).ok).toBe(true);
    expect(oversized(text)).toEqual([]);
  });
});

// -------------------------------------------------------------------------------------------------

describe('the digest', () => {
  /** FIPS 180-4 / NIST CSRC example: SHA-256("abc"). */
  const ABC = 'ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad';

  it('checks the independent reference against the FIPS 180-4 / NIST example digest of "abc"', () => {
    expect(createHash('sha256').update('abc').digest('hex')).toBe(ABC);
    // One piece: the list digest is the SHA-256 of that piece's 32-byte digest.
    expect(referenceDigestHex(encodeUtf8('abc'))).toBe(createHash('sha256').update(Buffer.from(ABC, 'hex')).digest('hex'));
  });

  it('hashes a one-piece body as SHA-256 of the FIPS 180-4 / NIST example digest of "abc"', async () => {
    expect(await pieceDigestHex(encodeUtf8('abc'))).toBe(createHash('sha256').update(Buffer.from(ABC, 'hex')).digest('hex'));
  });

  it('cuts pieces of 65 536 bytes, as the doc says', () => {
    expect(DIGEST_PIECE_BYTES).toBe(PIECE_BYTES);
  });

  it('agrees with node:crypto over 64 KiB pieces at piece boundaries, however the bytes are added', async () => {
    const random = new Uint8Array(3 * PIECE_BYTES + 7);
    let state = 12345;
    for (let i = 0; i < random.length; i++) {
      state = (state * 1103515245 + 12345) >>> 0;
      random[i] = state >>> 24;
    }
    for (const size of [1, PIECE_BYTES - 1, PIECE_BYTES, PIECE_BYTES + 1, 2 * PIECE_BYTES, 2 * PIECE_BYTES + 1, random.length]) {
      const body = random.subarray(0, size);
      expect(await pieceDigestHex(body), `${size} bytes`).toBe(referenceDigestHex(body));
    }
    // Two bodies that differ only in their last piece have different digests.
    const changed = random.slice();
    changed[changed.length - 1]! ^= 1;
    expect(await pieceDigestHex(changed)).not.toBe(await pieceDigestHex(random));
    await fc.assert(
      fc.asyncProperty(fc.uniqueArray(fc.integer({ min: 1, max: random.length - 1 }), { maxLength: 12 }), async (cuts) => {
        const hasher = new PieceHasher();
        let at = 0;
        for (const cut of [...cuts].sort((a, b) => a - b).concat(random.length)) {
          const slice = random.slice(at, cut);
          hasher.add(slice);
          slice.fill(0); // add() copies what it is given
          at = cut;
        }
        expect(hasher.length).toBe(random.length);
        expect(await hasher.finish()).toBe(referenceDigestHex(random));
      }),
      { numRuns: 30 },
    );
  });

  it('seals each written file with the digest of its body, computed independently with node:crypto', async () => {
    for (const which of ['small', 'conflicts', 'demo300'] as const) {
      const text = await writtenFile(which);
      const seal = linesOf(text).at(-1)!;
      const body = encodeUtf8(text.slice(0, text.length - seal.length - 1));
      if (which === 'demo300') expect(body.byteLength).toBeGreaterThan(4 * PIECE_BYTES);
      expect(JSON.parse(seal)).toEqual({ sha256: referenceDigestHex(body) });
    }
  });

  it('is what the doc’s shell pipeline (head, split, sha256sum, perl) prints for the file', async (ctx) => {
    const missing = ['perl', 'split', 'head', 'sha256sum'].filter((tool) => spawnSync('sh', ['-c', `command -v ${tool}`]).status !== 0);
    if (missing.length > 0) ctx.skip(`skipped: ${missing.join(', ')} not found on this machine`);
    const text = await writtenFile('demo300');
    expect(text.length).toBeGreaterThan(5 * PIECE_BYTES);
    const dir = mkdtempSync(join(tmpdir(), 'ripplewright-digest-'));
    try {
      const file = join(dir, 'demo.json');
      writeFileSync(file, text);
      const pipeline = String.raw`head -n -1 "$1" | split -b 65536 --filter='sha256sum | head -c 64 | perl -pe "\$_=pack(q(H*),\$_)"' | sha256sum`;
      const printed = execFileSync('sh', ['-c', pipeline, 'sh', file], { encoding: 'utf8' });
      const digest = printed.slice(0, 64);
      expect(digest).toMatch(/^[0-9a-f]{64}$/);
      expect(JSON.parse(linesOf(text).at(-1)!)).toEqual({ sha256: digest });
    } finally {
      rmSync(dir, { recursive: true, force: true });
    }
  });
});

// -------------------------------------------------------------------------------------------------

describe('JobFileReader', () => {
  const BOM = [0xef, 0xbb, 0xbf];
  const withBom = (bytes: Uint8Array) => Uint8Array.from([...BOM, ...bytes]);

  /** The small file four ways: as written, with raw UTF-8 (another writer), each with a BOM; and one refused. */
  async function variants(): Promise<{ label: string; bytes: Uint8Array; sound: boolean }[]> {
    const escaped = encodeUtf8(await writtenFile('small'));
    const raw = encodeUtf8(sealedLines(layOut(smallPayload()).lines));
    expect(raw.some((byte) => byte >= 0x80)).toBe(true);
    const broken = copyLines(layOut(smallPayload()).lines);
    ((broken[4]!.readings as Raw).value as unknown[])[1] = '1,93';
    return [
      { label: 'escaped', bytes: escaped, sound: true },
      { label: 'raw UTF-8', bytes: raw, sound: true },
      { label: 'escaped + BOM', bytes: withBom(escaped), sound: true },
      { label: 'raw UTF-8 + BOM', bytes: withBom(raw), sound: true },
      { label: 'refused', bytes: encodeUtf8(sealedLines(broken)), sound: false },
    ];
  }

  it('reads the same whatever the chunks: random cuts, inside the head, inside a UTF-8 character, after a line feed', async () => {
    for (const { label, bytes, sound } of await variants()) {
      const whole = await read(bytes);
      expect(whole.ok, label).toBe(sound);
      if (whole.ok) expect(whole.file.payload).toEqual(sortPayload(smallPayload()));
      const headEnd = bytes.indexOf(0x0a);
      // Inside a multi-byte character: before each continuation byte (10xxxxxx).
      const insideChars = [...bytes.keys()].filter((i) => (bytes[i]! & 0xc0) === 0x80);
      const interesting = [...new Set([1, 2, 3, 4, 10, 11, headEnd - 1, headEnd, headEnd + 1, ...afterLineFeeds(bytes), ...insideChars.slice(0, 40)])];
      await fc.assert(
        fc.asyncProperty(
          fc.subarray(interesting, { maxLength: Math.min(25, interesting.length) }),
          fc.uniqueArray(fc.integer({ min: 1, max: bytes.length - 1 }), { maxLength: 24 }),
          async (special, random) => {
            expect(await readInChunks(bytes, [...special, ...random])).toEqual(whole);
          },
        ),
        { numRuns: 40 },
      );
    }
  });

  it('reads the same given one byte at a time, or with empty chunks between', async () => {
    for (const { label, bytes } of await variants()) {
      const whole = await read(bytes);
      expect(await readInChunks(bytes, [...bytes.keys()]), label).toEqual(whole);
      const reader = new JobFileReader('jobs.json');
      const half = bytes.length >> 1;
      for (const chunk of [new Uint8Array(0), bytes.subarray(0, half), new Uint8Array(0), bytes.subarray(half), new Uint8Array(0)]) reader.push(chunk);
      expect(await reader.finish(), label).toEqual(whole);
    }
  });

  it('ignores a leading byte-order mark, which is not part of the digest', async () => {
    const bytes = encodeUtf8(await writtenFile('small'));
    const plain = await read(bytes);
    const marked = await read(withBom(bytes));
    expect(problemsOf(marked)).toEqual([]);
    expect(marked).toEqual(plain);
    // The mark alone, split over chunks, before a damaged file: the problems are the same too.
    const damaged = encodeUtf8((await writtenFile('small')).replace('"13.58"', '"13.85"'));
    expect(await readInChunks(withBom(damaged), [1, 2, 3])).toEqual(await read(damaged));
  });
});

// -------------------------------------------------------------------------------------------------

describe('damaged version-2 files', () => {
  it('refuses every truncation of a small file, saying it is truncated and on which line', async () => {
    const text = await writtenFile('small');
    const bytes = encodeUtf8(text);
    const headEnd = bytes.indexOf(0x0a);
    const wrong: string[] = [];
    // Every cut but the last line feed's (see the next test).
    for (let length = 0; length < bytes.length - 1; length++) {
      const result = await read(bytes.subarray(0, length), 'cut.json');
      if (result.ok) {
        wrong.push(`${length}: read as sound`);
        continue;
      }
      const first = formatProblem(result.problems[0]!);
      if (!first.startsWith('cut.json: ')) wrong.push(`${length}: ${first}`);
      if (length === 0) {
        if (!/the file is empty/.test(first)) wrong.push(`${length}: ${first}`);
        continue;
      }
      if (!/truncated|ends before its seal|not valid JSON/.test(first)) wrong.push(`${length}: ${first}`);
      if (length <= headEnd) continue;
      // Past the head: the line the file ends on (or, for a line cut just before its line feed,
      // the missing line after it) is named.
      const line = text.slice(0, length).split('\n').length;
      const ok =
        (result.problems[0]!.line === line && (bytes[length - 1] === 0x0a ? /ends before its seal line/ : /ends in the middle of line/).test(first)) ||
        (bytes[length] === 0x0a && result.problems[0]!.line === line + 1 && /ends before its seal line/.test(first));
      if (!ok) wrong.push(`${length}: ${first}`);
      if (result.problemCount !== 1) wrong.push(`${length}: ${result.problemCount} problems: ${problemsOf(result).join(' | ')}`);
    }
    expect(wrong).toEqual([]);
  });

  it('says where a file cut in the middle of a line ends, in the doc’s words', async () => {
    const text = await writtenFile('small');
    const lines = linesOf(text);
    const cut = text.indexOf('\n', text.indexOf('\n') + 1) + 10; // ten bytes into line 3
    expect(problemsOf(await read(text.slice(0, cut), 'shop.json'))).toEqual([
      'shop.json: line 3: the file ends in the middle of line 3: it is truncated (an interrupted copy or download?)',
    ]);
    expect(lines.length).toBeGreaterThan(3);
  });

  it('reads a file whose seal line lost its final line feed: the body the seal covers is whole', async () => {
    const text = await writtenFile('small');
    const whole = await read(text, 'whole.json');
    const result = await read(text.slice(0, -1), 'cut.json');
    expect(result.ok).toBe(true);
    if (result.ok && whole.ok) expect(result.file.payload).toEqual(whole.file.payload);
    // One byte more gone, and the seal itself is cut: refused.
    expect((await read(text.slice(0, -2), 'cut.json')).ok).toBe(false);
  });

  it('detects any single-byte change: refused naming the file, or (a same-value spelling) read back unchanged', async () => {
    const bytes = encodeUtf8(await writtenFile('small'));
    const original = await read(bytes);
    if (!original.ok) throw new Error('fixture must read');
    await fc.assert(
      fc.asyncProperty(fc.nat({ max: bytes.length - 1 }), fc.integer({ min: 1, max: 255 }), async (position, delta) => {
        const altered = bytes.slice();
        altered[position] = (altered[position]! + delta) & 0xff;
        const result = await read(altered, 'x.json');
        if (result.ok) expect(result.file.payload).toEqual(original.file.payload);
        else {
          expect(result.problems.length).toBeGreaterThan(0);
          for (const problem of result.problems) expect(problem.file).toBe('x.json');
        }
      }),
      { numRuns: 400 },
    );
  });

  it('says a changed value was altered after export, on the seal line, and nothing else', async () => {
    const text = await writtenFile('small');
    const sealLine = linesOf(text).length;
    const changes: [string, string][] = [
      ['"13.58"', '"13.85"'], // a reading's typed text
      ['"Ada Quill"}', '"Ada Quilt"}'], // the head's exportedBy
      ['"Resets mid-cycle"', '"Resets mid-cycle!"'], // a job
      ['"job":[0,0,0,1,1,1,1,2]', '"job":[0,0,0,1,1,1,1,1]'], // a reading moved to another job
    ];
    for (const [from, to] of changes) {
      const altered = text.replace(from, to);
      expect(altered, from).not.toBe(text);
      expect(problemsOf(await read(altered, 'a.json')), from).toEqual([`a.json: line ${sealLine}: sha256: ${ALTERED}`]);
    }
    // A change in the last of many pieces.
    const demo = await writtenFile('demo300');
    const at = demo.lastIndexOf('"kind":"') + 8;
    const alteredDemo = `${demo.slice(0, at)}${demo[at] === 'd' ? 'e' : 'd'}${demo.slice(at + 1)}`;
    expect(problemsOf(await read(alteredDemo, 'a.json'))[0]).toBe(`a.json: line ${linesOf(demo).length}: sha256: ${ALTERED}`);
  });

  it('says a file whose lines end in CR LF was altered, with a hint about text-mode copies', async () => {
    const text = await writtenFile('small');
    const result = await read(text.replaceAll('\n', '\r\n'), 'crlf.json');
    const problems = problemList(result);
    expect(problems).toHaveLength(1);
    expect(problems[0]).toMatchObject({ file: 'crlf.json', line: linesOf(text).length, field: 'sha256' });
    expect(problems[0]!.message.startsWith(ALTERED)).toBe(true);
    expect(problems[0]!.message).toMatch(/CR LF/);
  });

  it('refuses a blank line, naming it', async () => {
    const { lines } = layOut(smallPayload());
    for (const blank of ['', '   ', '\t']) {
      const withBlank = [...lines.slice(0, 3), blank, ...lines.slice(3)];
      const problems = problemList(await read(sealedLines(withBlank), 'blank.json'));
      expect(problems, JSON.stringify(blank)).toHaveLength(1);
      expect(problems[0]).toMatchObject({ file: 'blank.json', line: 4 });
      expect(problems[0]!.message).toMatch(/blank line/);
    }
  });

  it('reads a file with white space after its seal, as editors add it (nothing else may follow)', async () => {
    const text = await writtenFile('small');
    for (const tail of ['\n', '\n\n', '  \r\n', '\t']) expect((await read(`${text}${tail}`, 'tail.json')).ok, JSON.stringify(tail)).toBe(true);
  });

  it('refuses anything after the seal, naming the line', async () => {
    const text = await writtenFile('small');
    const sealLine = linesOf(text).length;
    for (const extra of ['{"jobs":[]}', linesOf(text)[1]!, linesOf(text).at(-1)!, 'x']) {
      const problems = problemList(await read(`${text}${extra}\n`, 'tail.json'));
      expect(problems.length, extra).toBeGreaterThan(0);
      expect(problems[0]).toMatchObject({ file: 'tail.json', line: sealLine + 1 });
      expect(problems[0]!.message).toMatch(new RegExp(`follows the seal on line ${sealLine}`));
    }
  });

  it('refuses a line longer than the limit as it streams in, without waiting for its end', async () => {
    const head = encodeUtf8(`${JSON.stringify(headLine({ technicians: 1 }))}\n{"technicians":[`);
    const spaces = new Uint8Array(1 << 20).fill(0x20);
    const reader = new JobFileReader('big.json');
    reader.push(head);
    // Pushing the same buffer again and again: the reader may keep only references to it.
    const times = Math.ceil(LIMITS.lineBytes / spaces.length) + 2;
    for (let i = 0; i < times; i++) reader.push(spaces);
    const result = await reader.finish();
    expect(result.ok).toBe(false);
    const problems = problemsOf(result);
    expect(problems).toHaveLength(1);
    expect(problems[0]).toMatch(/^big\.json: line 2 is too long .*16777216/);
  });

  it('reads a line of exactly the limit and refuses one byte more', async () => {
    const start = '{"technicians":[{"id":"t-1","name":"Ada"}';
    const padded = (bytes: number) => `${start}${' '.repeat(bytes - start.length - 2)}]}`;
    const head = headLine({ technicians: 1 });
    const atLimit = await read(sealedLines([head, padded(LIMITS.lineBytes)]), 'edge.json');
    expect(problemsOf(atLimit)).toEqual([]);
    if (atLimit.ok) expect(atLimit.file.payload.technicians).toEqual([{ id: 't-1', name: 'Ada' }]);
    const over = await read(sealedLines([head, padded(LIMITS.lineBytes + 1)]), 'edge.json');
    expect(problemsOf(over)).toHaveLength(1);
    expect(problemsOf(over)[0]).toMatch(/^edge\.json: line 2 is too long/);
  });

  it('refuses a file with more records of a kind than its head says, on the line that has one too many', async () => {
    const { lines, jobLine } = layOut(smallPayload());
    const head = lines[0] as Raw;
    const fewer = { ...head, counts: { ...(head.counts as Raw), jobs: 2 } };
    const problems = problemList(await read(sealedLines([fewer, ...lines.slice(1)]), 'count.json'));
    expect(problems).toHaveLength(1);
    expect(problems[0]).toMatchObject({ file: 'count.json', line: jobLine[2] });
    expect(problems[0]!.message).toMatch(/more jobs than the head line says \(2\)/);
  });

  it('refuses a file with fewer records of a kind than its head says, on the head line', async () => {
    const { lines } = layOut(smallPayload());
    const head = lines[0] as Raw;
    for (const kind of KINDS) {
      const more = { ...head, counts: { ...(head.counts as Raw), [kind]: ((head.counts as Raw)[kind] as number) + 1 } };
      const problems = problemList(await read(sealedLines([more, ...lines.slice(1)]), 'count.json'));
      expect(problems, kind).toHaveLength(1);
      expect(problems[0]).toMatchObject({ file: 'count.json', line: 1 });
      const label = { technicians: 'technician', assets: 'asset', jobs: 'job', readings: 'reading', conflicts: 'conflict', recordConflicts: 'record conflict' }[kind];
      expect(problems[0]!.message).toContain(`${label}s`);
    }
  });

  it('refuses a head without counts, with a count missing or not a whole number, or with an unknown member', async () => {
    const { lines } = layOut(smallPayload());
    const head = lines[0] as Raw;
    const counts = head.counts as Raw;
    const { counts: _dropped, ...noCounts } = head;
    const { recordConflicts: _none, ...countsMissingOne } = counts;
    const cases: [Raw, string][] = [
      [noCounts, 'counts'],
      [{ ...head, counts: countsMissingOne }, 'counts.recordConflicts'],
      [{ ...head, counts: { ...counts, jobs: 1.5 } }, 'counts.jobs'],
      [{ ...head, counts: { ...counts, jobs: -3 } }, 'counts.jobs'],
      [{ ...head, counts: { ...counts, jobs: '3' } }, 'counts.jobs'],
      [{ ...head, counts: { ...counts, widgets: 0 } }, 'counts.widgets'],
      [{ ...head, counts: [3] }, 'counts'],
      [{ ...head, extra: true }, 'extra'],
      [{ ...head, sha256: '0'.repeat(64) }, 'sha256'],
    ];
    for (const [bad, field] of cases) {
      const problems = problemList(await read(sealedLines([bad, ...lines.slice(1)]), 'head.json'));
      expect(problems.length, field).toBeGreaterThan(0);
      expect(problems.some((p) => p.line === 1 && p.field === field && p.file === 'head.json'), `${field}: ${JSON.stringify(problems)}`).toBe(true);
    }
  });

  it('refuses a block with two members, none, an unknown kind, or a value that is not a list', async () => {
    const { lines, records } = layOut(smallPayload());
    const cases: [unknown, RegExp][] = [
      [{ technicians: records.technicians, assets: records.assets }, /one member/],
      [{}, /one member/],
      [{ widgets: [{ id: 'w' }] }, /"widgets"/],
      [[1, 2], /a list/],
      [7, /number/],
      [{ technicians: { id: 'tech-1' } }, /expected a list of technicians/],
    ];
    for (const [block, pattern] of cases) {
      const hostile = [...lines.slice(0, 1), block, ...lines.slice(1)];
      const problems = problemList(await read(sealedLines(hostile), 'block.json'));
      expect(problems.length, JSON.stringify(block)).toBeGreaterThan(0);
      expect(problems[0], JSON.stringify(block)).toMatchObject({ file: 'block.json', line: 2 });
      expect(problems[0]!.message, JSON.stringify(block)).toMatch(pattern);
    }
  });

  it('refuses a line that is not UTF-8 or not JSON, naming the line', async () => {
    const { lines } = layOut(smallPayload());
    const body = [...lines.map((line) => encodeUtf8(`${JSON.stringify(line)}\n`))];
    const bad = encodeUtf8('{"technicians":[{"id":"t-x","name":"Ad\u00e1"}]}\n');
    // Replace the two bytes of "á" (C3 A1) by a byte that begins no UTF-8 sequence.
    const at = bad.indexOf(0xc3);
    const notUtf8 = Uint8Array.from([...bad.subarray(0, at), 0xff, ...bad.subarray(at + 2)]);
    for (const [line, pattern] of [
      [notUtf8, /not UTF-8/],
      [encodeUtf8('{"technicians":[}\n'), /not valid JSON/],
    ] as const) {
      const parts = [body[0]!, line, ...body.slice(1)];
      const joined = joinParts(parts);
      const file = joinParts([joined, encodeUtf8(`{"sha256":"${referenceDigestHex(joined)}"}\n`)]);
      const problems = problemList(await read(file, 'bytes.json'));
      expect(problems).toHaveLength(1);
      expect(problems[0]).toMatchObject({ file: 'bytes.json', line: 2 });
      expect(problems[0]!.message).toMatch(pattern);
    }
  });
});

// -------------------------------------------------------------------------------------------------

describe('reading tables', () => {
  /** The small payload as a line per job with its readings after it; reading g is on readingLine[g]. */
  const layout = () => layOut(smallPayload());

  it('names the file, line, job, reading and global path of a refused value, as the doc’s example does', async () => {
    const { lines, readingLine, records } = layout();
    const hostile = copyLines(lines);
    const g = 5; // r-6, in job-b's table: not the first table, not its first row
    const { table, k, line } = tableOf(hostile, readingLine, g);
    expect(k).toBeGreaterThan(0);
    table.value![k] = '1,93';
    const reading = records.readings[g]!;
    expect(problemsOf(await read(sealedLines(hostile), 'shop.json'))).toEqual([
      `shop.json: line ${line}: job ${reading.jobId}: reading ${reading.id}: payload.readings[${g}].value: expected a number or "OL", got text "1,93"`,
    ]);
  });

  it('refuses a value of the wrong type in any column, naming line, job, reading and payload.readings[g].column', async () => {
    const { lines, readingLine, jobLine, records } = layout();
    /** The doc's "Values" and "The reading table", written out independently of schema.ts. */
    const isId = (v: unknown) => typeof v === 'string' && /^[A-Za-z0-9._:~-]{1,100}(~[0-9a-f]{16})?$/.test(v);
    const isTime = (v: unknown) => typeof v === 'string' && !Number.isNaN(Date.parse(v)) && new Date(v).toISOString() === v;
    const isNumber = (v: unknown) => typeof v === 'number' && Number.isFinite(v);
    const valid = (column: Column, v: unknown, jobsBefore: number): boolean => {
      if (OPTIONAL_COLUMNS.has(column) && v === null) return true;
      switch (column) {
        case 'id':
        case 'supersedes':
          return isId(v);
        case 'job':
          return Number.isInteger(v) && (v as number) >= 0 && (v as number) < jobsBefore;
        case 'kind':
          return ['mainsAc', 'acSecondary', 'dcOut', 'rippleAc', 'rippleHz', 'regulatorOut', 'diodeForward', 'diodeReverse', 'capacitance', 'esr'].includes(v as string);
        case 'target':
          return typeof v === 'string' && v.length >= 1 && v.length <= 20;
        case 'value':
          return isNumber(v) || v === 'OL';
        case 'text':
          return typeof v === 'string' && v.length <= LIMITS.shortTextChars;
        case 'note':
          return typeof v === 'string' && v.length <= LIMITS.longTextChars;
        case 'takenAt':
          return isTime(v);
        case 'phase':
          return v === 'before' || v === 'after';
        case 'expectedLow':
        case 'expectedHigh':
          return isNumber(v);
        case 'verdict':
          return v === 'in' || v === 'low' || v === 'high';
      }
    };
    const values = fc.oneof(
      fc.constant(null),
      fc.double({ noNaN: true, noDefaultInfinity: true }),
      fc.integer({ min: -5, max: 10 }),
      fc.string({ maxLength: 12 }),
      fc.boolean(),
      fc.array(fc.nat(), { maxLength: 2 }),
      fc.constant({ x: 1 }),
      fc.constantFrom('OL ', 'ol', 'Before', 'IN', '2026-03-02T09:30:00Z', '2026-02-30T09:30:00.000Z', 'x'.repeat(501), 'a b', ''),
    );
    await fc.assert(
      fc.asyncProperty(fc.nat({ max: records.readings.length - 1 }), fc.constantFrom(...COLUMNS), values, async (g, column, value) => {
        const hostile = copyLines(lines);
        const { table, k, line } = tableOf(hostile, readingLine, g);
        const jobsBefore = jobLine.filter((l) => l < line).length;
        fc.pre(!valid(column, value, jobsBefore));
        // A column the table left out is added, null for the other readings.
        table[column] ??= table.id!.map(() => null);
        table[column]![k] = value;
        const result = await read(sealedLines(hostile), 'types.json');
        expect(result.ok).toBe(false);
        const reading = records.readings[g]!;
        const match = problemList(result).find((p) => (p.field ?? '').startsWith(`payload.readings[${g}].${column}`));
        expect(match, JSON.stringify(problemList(result))).toBeDefined();
        expect(match).toMatchObject({ file: 'types.json', line });
        if (column !== 'job') expect(match!.jobId).toBe(reading.jobId);
        if (column !== 'id') expect(match!.record).toBe(`reading ${reading.id}`);
      }),
      { numRuns: 200 },
    );
  });

  it('refuses null in every required column, naming the reading', async () => {
    const { lines, readingLine, records } = layout();
    const g = 6;
    for (const column of REQUIRED_COLUMNS) {
      const hostile = copyLines(lines);
      const { table, k, line } = tableOf(hostile, readingLine, g);
      table[column]![k] = null;
      const problems = problemList(await read(sealedLines(hostile), 'null.json'));
      const match = problems.find((p) => p.field === `payload.readings[${g}].${column}`);
      expect(match, `${column}: ${JSON.stringify(problems)}`).toMatchObject({ file: 'null.json', line });
      if (column !== 'id') expect(match!.record).toBe(`reading ${records.readings[g]!.id}`);
    }
  });

  it('refuses columns of unequal length, a missing required column and an empty table, on their line', async () => {
    const { lines, readingLine } = layout();
    const line = readingLine[3]!;
    const cases: [(table: Record<string, unknown[]>) => void, string][] = [
      [(t) => t.kind!.pop(), 'readings.kind'],
      [(t) => t.value!.push(1), 'readings.value'],
      [(t) => t.note!.pop(), 'readings.note'],
      ...REQUIRED_COLUMNS.map((column): [(t: Record<string, unknown[]>) => void, string] => [(t) => delete t[column], `readings.${column}`]),
      [(t) => { for (const name of Object.keys(t)) t[name] = []; }, 'readings.id'],
      [(t) => (t.job = 0 as unknown as unknown[]), 'readings.job'],
    ];
    for (const [change, field] of cases) {
      const hostile = copyLines(lines);
      change(hostile[line - 1]!.readings as Record<string, unknown[]>);
      const problems = problemList(await read(sealedLines(hostile), 'table.json'));
      expect(problems.length, field).toBeGreaterThan(0);
      expect(problems.some((p) => p.file === 'table.json' && p.line === line && (p.field ?? '').startsWith(field)), `${field}: ${JSON.stringify(problems)}`).toBe(true);
    }
  });

  it('refuses a reading whose job is on a later line, out of range or not a place', async () => {
    const { lines, readingLine, jobLine, records } = layout();
    // job-b's table moved before job-b's jobs line: its readings name a job not yet read.
    const g = records.readings.findIndex((reading) => reading.jobId === 'job-b');
    const tableLine = readingLine[g]!;
    const early = [...lines];
    const [table] = early.splice(tableLine - 1, 1);
    early.splice(jobLine[1]! - 1, 0, table);
    const problems = problemList(await read(sealedLines(early), 'order.json'));
    const moved = problems.find((p) => p.field === `payload.readings[${g}].job`);
    expect(moved, JSON.stringify(problems)).toMatchObject({ file: 'order.json', line: jobLine[1], record: `reading ${records.readings[g]!.id}` });
    // In place, but naming a job that comes on a later line (job-b, from job-a's table), or a place no job has.
    for (const [reading, place] of [[0, 1], [0, 2], [g, records.jobs.length], [g, 99], [g, -1], [g, 0.5]] as const) {
      const hostile = copyLines(lines);
      const { table: t, k, line } = tableOf(hostile, readingLine, reading);
      t.job![k] = place;
      const found = problemList(await read(sealedLines(hostile), 'order.json')).find((p) => p.field === `payload.readings[${reading}].job`);
      expect(found, `reading ${reading}, job ${place}`).toMatchObject({ file: 'order.json', line, record: `reading ${records.readings[reading]!.id}` });
    }
  });

  it('refuses a table before any jobs line', async () => {
    const { lines, readingLine } = layout();
    const firstTable = lines[readingLine[0]! - 1];
    const hostile = [lines[0], firstTable, ...lines.slice(1).filter((line) => line !== firstTable)];
    const problems = problemList(await read(sealedLines(hostile), 'order.json'));
    expect(problems.some((p) => p.line === 2 && p.field === 'payload.readings[0].job')).toBe(true);
  });
});

// -------------------------------------------------------------------------------------------------

describe('hostile version-2 files', () => {
  const POLLUTING = ['__proto__', 'constructor', 'prototype'];

  /** The line as JSON text with one more member `"key": value` (as an attacker's file would have it). */
  const withMember = (line: unknown, key: string, value: string) => JSON.stringify(line).replace(/^\{/, `{"${key}":${value},`);

  it('never lets "__proto__", "constructor" or "prototype" reach an object: as a block, head, column or record member', async () => {
    const { lines, readingLine, jobLine } = layOut(smallPayload());
    const technicianLine = 2;
    for (const key of POLLUTING) {
      const places: [string, (copy: unknown[]) => number][] = [
        ['block member', (copy) => (copy.splice(1, 0, `{"${key}":[{"polluted":true}]}`), 2)],
        ['head member', (copy) => ((copy[0] = withMember(copy[0], key, '{"polluted":true}')), 1)],
        [
          'table column',
          (copy) => {
            const line = readingLine[0]!;
            const table = (copy[line - 1] as Raw).readings as Record<string, unknown[]>;
            copy[line - 1] = `{"readings":${withMember(table, key, JSON.stringify(table.id!.map(() => ({ polluted: true }))))}}`;
            return line;
          },
        ],
        [
          'job member',
          (copy) => {
            const job = ((copy[jobLine[1]! - 1] as Raw).jobs as Raw[])[0]!;
            copy[jobLine[1]! - 1] = `{"jobs":[${withMember(job, key, '{"polluted":true}')}]}`;
            return jobLine[1]!;
          },
        ],
        [
          'member of a job’s supply',
          (copy) => {
            const job = ((copy[jobLine[0]! - 1] as Raw).jobs as Raw[])[0]!;
            const supply = withMember(job.supply, key, '{"polluted":true}');
            copy[jobLine[0]! - 1] = `{"jobs":[${JSON.stringify({ ...job, supply: 'SUPPLY' }).replace('"SUPPLY"', supply)}]}`;
            return jobLine[0]!;
          },
        ],
        [
          'technician member',
          (copy) => {
            const [first, ...rest] = (copy[technicianLine - 1] as Raw).technicians as Raw[];
            copy[technicianLine - 1] = `{"technicians":[${withMember(first, key, '{"polluted":true}')}${rest.map((t) => `,${JSON.stringify(t)}`).join('')}]}`;
            return technicianLine;
          },
        ],
      ];
      for (const [where, place] of places) {
        const copy: unknown[] = copyLines(lines);
        const line = place(copy);
        const text = sealedLines(copy);
        expect(text, where).toContain(`"${key}":`);
        const result = await read(text, 'evil.json');
        expect(result.ok, `${key} as ${where}`).toBe(false);
        const problems = problemList(result);
        expect(
          problems.some((p) => p.line === line && p.message.includes(`"${key}" is not allowed as a field name`)),
          `${key} as ${where}: ${JSON.stringify(problems)}`,
        ).toBe(true);
        expect(({} as Raw).polluted).toBeUndefined();
        expect(Object.hasOwn(Object.prototype, 'polluted')).toBe(false);
      }
    }
  });

  it('says a file from a newer version needs a newer Ripplewright, at once, in the doc’s words', async () => {
    for (const version of [3, 7, 1000]) {
      // Whatever follows the head is not looked at.
      const text = sealedLines([headLine({}, { schemaVersion: version }), '{"widgets":1}', 'not even JSON']);
      expect(problemsOf(await read(text, 'new.json'))).toEqual([
        `new.json: line 1: schemaVersion: made by a newer version of Ripplewright (schema version ${version}; this one reads versions 1 and 2): update Ripplewright to import it`,
      ]);
    }
  });

  it('refuses unknown or mistyped schema versions in a head, on line 1', async () => {
    const { lines } = layOut(smallPayload());
    const { schemaVersion: _version, ...noVersion } = lines[0] as Raw;
    const cases: [Raw, RegExp][] = [
      [{ ...(lines[0] as Raw), schemaVersion: 0 }, /unknown schema version 0/],
      [{ ...(lines[0] as Raw), schemaVersion: -1 }, /unknown schema version -1/],
      [{ ...(lines[0] as Raw), schemaVersion: 2.5 }, /whole number/],
      [{ ...(lines[0] as Raw), schemaVersion: '2' }, /whole number/],
      [{ ...(lines[0] as Raw), schemaVersion: null }, /whole number/],
      [noVersion, /whole number/],
    ];
    for (const [head, pattern] of cases) {
      const problems = problemList(await read(sealedLines([head, ...lines.slice(1)]), 'v.json'));
      expect(problems, JSON.stringify(head.schemaVersion)).toHaveLength(1);
      expect(problems[0]).toMatchObject({ file: 'v.json', line: 1, field: 'schemaVersion' });
      expect(problems[0]!.message).toMatch(pattern);
    }
  });

  it('says a file that is not a job file is not one', async () => {
    const cases: [string | Uint8Array, RegExp][] = [
      ['[1,2,3]', /not a Ripplewright job file/],
      ['"text"', /not a Ripplewright job file/],
      ['null', /not a Ripplewright job file/],
      ['{"topology":"bridge"}', /not a Ripplewright job file/],
      ['{"format":"someone-else","schemaVersion":2}\n', /not a Ripplewright job file/],
      ['{"format":"someone-else"}\n{"rows":[1]}\n', /not a (Ripplewright )?job file/],
      ['job_id,customer\r\n1,2\r\n', /not valid JSON/],
      ['', /the file is empty/],
      ['\n\n', /the file is empty/],
      [Uint8Array.from([0xff, 0xfe, 0x7b, 0x00]), /not UTF-8/],
    ];
    for (const [content, pattern] of cases) {
      const problems = problemsOf(await read(content, 'other.json'));
      expect(problems, String(content)).toHaveLength(1);
      expect(problems[0], String(content)).toMatch(/^other\.json: /);
      expect(problems[0], String(content)).toMatch(pattern);
    }
  });

  it('refuses a file larger than the byte limit as it streams in', async () => {
    const chunk = new Uint8Array(1 << 20).fill(0x20);
    const reader = new JobFileReader('huge.json');
    for (let pushed = 0; pushed <= LIMITS.fileBytes; pushed += chunk.length) reader.push(chunk);
    expect(reader.bytesRead).toBeGreaterThan(LIMITS.fileBytes);
    expect(problemsOf(await reader.finish())[0]).toMatch(/^huge\.json: .*too large/);
  });

  it('lists at most the problem limit and counts the rest', async () => {
    const payload = smallPayload();
    payload.readings = Array.from({ length: 300 }, (_, i) => ({ ...payload.readings[0]!, id: `r${i}` }));
    const { lines } = layOut(payload);
    const hostile = copyLines(lines);
    for (const line of hostile) if (line.readings) (line.readings as Raw).value = ((line.readings as Raw).value as unknown[]).map(() => 'high');
    const result = await read(sealedLines(hostile));
    expect(result.ok).toBe(false);
    if (result.ok) return;
    expect(result.problems).toHaveLength(LIMITS.problemsListed);
    expect(result.problemCount).toBe(300);
    expect(formatProblems(result).at(-1)).toMatch(new RegExp(`^jobs\\.json: and ${300 - LIMITS.problemsListed} more`));
  });

  it('names file, job, reading and field for broken references and duplicates', async () => {
    const { lines, readingLine, jobLine, records } = layOut(smallPayload());
    const find = async (hostile: unknown[]) => problemList(await read(sealedLines(hostile), 'shop.json'));
    const ids = records.jobs.map((job) => job.id);

    // The same reading id on two lines: a second table after job-c's holding r-2 again.
    const dup = records.readings[1]!;
    const duplicated = [...lines];
    const lastTable = readingLine.at(-1)!;
    duplicated.splice(lastTable, 0, { readings: readingTable([dup], ids) });
    duplicated[0] = { ...(lines[0] as Raw), counts: { ...countsOf(records), readings: records.readings.length + 1 } };
    expect(await find(duplicated)).toContainEqual(
      expect.objectContaining({ file: 'shop.json', jobId: dup.jobId, record: `reading ${dup.id}`, field: `payload.readings[${records.readings.length}]`, message: expect.stringMatching(/r-2.*twice/) }),
    );

    // A correction of another job's reading.
    const corrections = copyLines(lines);
    const g = records.readings.findIndex((reading) => reading.supersedes !== undefined);
    const { table, k } = tableOf(corrections, readingLine, g);
    table.supersedes![k] = 'r-1';
    expect(await find(corrections)).toContainEqual(
      expect.objectContaining({ file: 'shop.json', jobId: records.readings[g]!.jobId, record: `reading ${records.readings[g]!.id}`, field: `payload.readings[${g}]`, message: expect.stringMatching(/r-1.*another job/) }),
    );

    // A job naming a technician, or an asset, not in the file.
    for (const [member, value] of [['technicianId', 'tech-9'], ['assetId', 'asset-9']] as const) {
      const jobs = copyLines(lines);
      ((jobs[jobLine[2]! - 1]!.jobs as Raw[])[0]!)[member] = value;
      expect(await find(jobs)).toContainEqual(
        expect.objectContaining({ file: 'shop.json', jobId: 'job-c', record: 'job job-c', field: 'payload.jobs[2]', message: expect.stringContaining(value) }),
      );
    }

    // Conflicts about records not in the file.
    const withConflicts = layOut(conflictPayload());
    const orphan = copyLines(withConflicts.lines);
    const conflictsLine = orphan.find((line) => line.conflicts)!;
    (conflictsLine.conflicts as Raw[])[0]!.jobId = 'job-zz';
    const recordConflictsLine = orphan.find((line) => line.recordConflicts)!;
    (recordConflictsLine.recordConflicts as Raw[])[0]!.id = 'asset-zz';
    const problems = await find(orphan);
    expect(problems).toContainEqual(expect.objectContaining({ file: 'shop.json', jobId: 'job-zz', field: 'payload.conflicts[0]', message: expect.stringContaining('job-zz') }));
    expect(problems).toContainEqual(expect.objectContaining({ file: 'shop.json', field: 'payload.recordConflicts[0]', message: expect.stringContaining('asset-zz') }));
  });

  it('names the line of the record a broken reference is on', async () => {
    const { lines, readingLine, jobLine, records } = layOut(smallPayload());
    const ids = records.jobs.map((job) => job.id);
    const dup = records.readings[1]!;
    const duplicated = [...lines];
    duplicated.splice(readingLine.at(-1)!, 0, { readings: readingTable([dup], ids) });
    duplicated[0] = { ...(lines[0] as Raw), counts: { ...countsOf(records), readings: records.readings.length + 1 } };
    const dupProblem = problemList(await read(sealedLines(duplicated), 'shop.json')).find((p) => p.record === `reading ${dup.id}`);
    expect(dupProblem).toMatchObject({ line: readingLine.at(-1)! + 1 });

    const jobs = copyLines(lines);
    ((jobs[jobLine[2]! - 1]!.jobs as Raw[])[0]!).technicianId = 'tech-9';
    const jobProblem = problemList(await read(sealedLines(jobs), 'shop.json')).find((p) => p.record === 'job job-c');
    expect(jobProblem).toMatchObject({ line: jobLine[2] });
  });

  it('puts "altered" first when a refused file was also changed after export', async () => {
    const { lines } = layOut(smallPayload());
    const hostile = [...lines];
    hostile[0] = { ...(lines[0] as Raw), exportedBy: { name: 'Ada Quill' }, extra: 1 };
    const text = sealedLines(hostile).replace('"Ada Quill"', '"Ada Quilt"');
    expect(text).toContain('"Ada Quilt"');
    const result = await read(text, 'both.json');
    const problems = problemsOf(result);
    expect(problems[0]).toBe(`both.json: line ${linesOf(text).length}: sha256: ${ALTERED}`);
    expect(problems).toContain('both.json: line 1: extra: unknown field "extra"');
    expect(result.ok ? 0 : result.problemCount).toBe(problems.length);
  });
});

// -------------------------------------------------------------------------------------------------

describe('formatProblem', () => {
  it('prints "FILE: line N: job J: record: field: message", leaving out what is not known', () => {
    expect(
      formatProblem({ file: 'shop.json', line: 14, jobId: 'J', record: 'reading R', field: 'payload.readings[1212].value', message: 'expected a number' }),
    ).toBe('shop.json: line 14: job J: reading R: payload.readings[1212].value: expected a number');
    expect(formatProblem({ file: 'a.json', message: 'the file is empty' })).toBe('a.json: the file is empty');
    expect(formatProblem({ file: 'a.json', line: 3, message: 'm' })).toBe('a.json: line 3: m');
    expect(formatProblem({ file: 'a.json', jobId: 'J', field: 'payload.conflicts[0]', message: 'm' })).toBe('a.json: job J: payload.conflicts[0]: m');
  });

  it('names a job once when the record is the job itself', () => {
    expect(formatProblem({ file: 'a.json', line: 4, jobId: 'job-c', record: 'job job-c', field: 'payload.jobs[2]', message: 'm' })).toBe(
      'a.json: line 4: job job-c: payload.jobs[2]: m',
    );
  });
});
