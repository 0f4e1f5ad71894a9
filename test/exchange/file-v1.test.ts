/**
 * Reading version-1 job files (docs/exchange-format.md, "Version 1"): one JSON object whose
 * `sha256` is the SHA-256 of the RFC 8785 canonical JSON of the rest. No longer written, but every
 * file ever exported must still read. test/exchange/files/ holds files the version-1 writer wrote;
 * `sealedText` (fixtures.ts) makes version-1 files with any content and a correct digest.
 */
import { createHash } from 'node:crypto';
import { readFileSync } from 'node:fs';
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { canonicalJson, decodeUtf8Strict, encodeUtf8, sameJson, sha256Hex } from '../../src/exchange/canonical';
import { LIMITS } from '../../src/exchange/format';
import { sortPayload } from '../../src/exchange/order';
import { digestText, formatProblem, JobFileReader, readJobFile, type ReadResult } from '../../src/exchange/parse';
import { writeJobFile } from '../../src/exchange/write';
import { demoPayload, sealedText, smallPayload, T3 } from './fixtures';

const V1_SMALL = readFileSync(new URL('./files/v1-small.json', import.meta.url), 'utf8');
const V1_DEMO = readFileSync(new URL('./files/v1-demo.json', import.meta.url), 'utf8');
/** How the committed files were written: smallPayload() and demoPayload(12) with these. */
const WRITTEN_WITH = { exportedAt: T3, exportedBy: { name: 'Ada Quill', device: 'test phone' } };

const ALTERED = 'altered or damaged: the SHA-256 digest does not match the content, so the file changed after it was exported';

async function read(content: string | Uint8Array, name = 'jobs.json'): Promise<ReadResult> {
  return readJobFile(content, name);
}

function problemsOf(result: ReadResult): string[] {
  return result.ok ? [] : result.problems.map(formatProblem);
}

/** SHA-256 by node:crypto, independent of the WebCrypto code under test. */
const nodeSha256 = (text: string) => createHash('sha256').update(text, 'utf8').digest('hex');

describe('canonical JSON and SHA-256, the version-1 digest', () => {
  it('sorts members by UTF-16 code units as RFC 8785 §3.2.3 shows', () => {
    // The member names of RFC 8785 §3.2.3's sorting example, in its sorted order.
    const sortedNames = ['\r', '1', '\u0080', '\u00f6', '\u20ac', '\ud83d\ude00', '\ufb33'];
    const shuffled = Object.fromEntries([...sortedNames].reverse().map((name, i) => [name, i]));
    const text = canonicalJson(shuffled);
    const names = Object.keys(JSON.parse(text) as object);
    // Integer-like names ("1") come first in any JS object; compare the text order instead.
    const positions = sortedNames.map((name) => text.indexOf(JSON.stringify(name)));
    expect(positions.every((p) => p >= 0)).toBe(true);
    expect(positions).toEqual([...positions].sort((a, b) => a - b));
    expect(names).toHaveLength(sortedNames.length);
  });

  it('writes numbers and strings as ECMAScript JSON.stringify does (RFC 8785 §3.2.2), with no whitespace', () => {
    expect(canonicalJson({ b: [1e21, 0.000001, 1e-7, -0, 'é\n"'], a: { d: true, c: null } })).toBe(
      '{"a":{"c":null,"d":true},"b":[1e+21,0.000001,1e-7,0,"é\\n\\""]}',
    );
  });

  it('computes the FIPS 180-4 / NIST example digest of "abc"', async () => {
    // FIPS 180-4 / NIST CSRC example values: SHA-256("abc").
    expect(await sha256Hex('abc')).toBe('ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad');
  });

  it('calls two values the same exactly when their canonical JSON is the same', () => {
    const json = fc.jsonValue({ maxDepth: 3 });
    const shuffled = (value: unknown): unknown =>
      Array.isArray(value)
        ? value.map(shuffled)
        : typeof value === 'object' && value !== null
          ? Object.fromEntries(Object.entries(value).reverse().map(([k, v]) => [k, shuffled(v)]))
          : value;
    fc.assert(
      fc.property(json, json, (a, b) => {
        expect(sameJson(a, b)).toBe(canonicalJson(a) === canonicalJson(b));
        expect(sameJson(a, shuffled(a))).toBe(true);
      }),
    );
  });

  it('refuses bytes that are not UTF-8 and decodes those that are', () => {
    expect(() => decodeUtf8Strict(new Uint8Array([0x7b, 0xc3, 0x28, 0x7d]))).toThrow();
    expect(decodeUtf8Strict(encodeUtf8('µΩ😕'))).toBe('µΩ😕');
  });
});

describe('version-1 files written by the version-1 writer', () => {
  it('reads v1-small.json as exactly the small fixture’s records in file order, with who and when', async () => {
    const result = await read(V1_SMALL, 'v1-small.json');
    expect(problemsOf(result)).toEqual([]);
    if (!result.ok) return;
    expect(result.file.schemaVersion).toBe(1);
    expect(result.file.payload).toEqual(sortPayload(smallPayload()));
    expect(result.file.exportedAt).toBe(WRITTEN_WITH.exportedAt);
    expect(result.file.exportedBy).toEqual(WRITTEN_WITH.exportedBy);
    expect(result.file.sha256).toBe((JSON.parse(V1_SMALL) as { sha256: string }).sha256);
  });

  it('reads v1-demo.json as exactly the demo of 12 jobs, from bytes as from text', async () => {
    for (const content of [V1_DEMO, encodeUtf8(V1_DEMO)]) {
      const result = await read(content, 'v1-demo.json');
      expect(problemsOf(result)).toEqual([]);
      if (result.ok) expect(result.file.payload).toEqual(sortPayload(demoPayload(12)));
    }
  });

  it('holds RFC 8785 canonical JSON with the digest over everything but itself (checked with node:crypto)', async () => {
    for (const text of [V1_SMALL, V1_DEMO]) {
      const parsed = JSON.parse(text) as Record<string, unknown>;
      // As written: the canonical JSON of the whole object, then a line feed.
      expect(text).toBe(`${canonicalJson(parsed)}\n`);
      const { sha256, ...rest } = parsed;
      expect(sha256).toBe(nodeSha256(canonicalJson(rest)));
      // The reader's fast digest text (records rebuilt in sorted order) is the reference text.
      const result = await read(text);
      if (!result.ok) throw new Error(problemsOf(result).join('\n'));
      expect(digestText(result.file)).toBe(canonicalJson(rest));
    }
  });

  it('reads a version-1 file re-indented, or with its members reordered, by another tool', async () => {
    const parsed = JSON.parse(V1_SMALL) as Record<string, unknown>;
    const reversed = (value: unknown): unknown =>
      Array.isArray(value)
        ? value.map(reversed)
        : typeof value === 'object' && value !== null
          ? Object.fromEntries(Object.entries(value).reverse().map(([k, v]) => [k, reversed(v)]))
          : value;
    for (const text of [JSON.stringify(parsed, null, 2), JSON.stringify(reversed(parsed)), `\n  ${V1_SMALL.trim()}\r\n\r\n`]) {
      const result = await read(text);
      expect(problemsOf(result)).toEqual([]);
      if (result.ok) expect(result.file.payload).toEqual(sortPayload(smallPayload()));
    }
  });

  it('ignores a leading byte-order mark', async () => {
    const result = await read(encodeUtf8(`\uFEFF${V1_SMALL}`));
    expect(problemsOf(result)).toEqual([]);
    if (result.ok) expect(result.file.payload).toEqual(sortPayload(smallPayload()));
  });

  it('leaves the caller’s bytes as they were after reading them', async () => {
    for (const text of [V1_SMALL, V1_SMALL.replace('"13.58"', '"13.85"')]) {
      const bytes = encodeUtf8(text);
      const before = bytes.slice();
      await read(bytes);
      expect(bytes).toEqual(before);
    }
  });

  it('reads the same whatever chunks a JobFileReader is given', async () => {
    const bytes = encodeUtf8(V1_SMALL);
    const whole = await read(bytes);
    expect(whole.ok).toBe(true);
    await fc.assert(
      fc.asyncProperty(fc.uniqueArray(fc.integer({ min: 1, max: bytes.length - 1 }), { maxLength: 49 }), async (cuts) => {
        const reader = new JobFileReader('jobs.json');
        let at = 0;
        for (const cut of [...cuts].sort((a, b) => a - b).concat(bytes.length)) {
          reader.push(bytes.subarray(at, cut));
          at = cut;
        }
        expect(await reader.finish()).toEqual(whole);
      }),
      { numRuns: 40 },
    );
  });

  it('gives the same records, who and when after reading a version-1 file and writing it as version 2', async () => {
    for (const [text, expected] of [
      [V1_SMALL, sortPayload(smallPayload())],
      [V1_DEMO, sortPayload(demoPayload(12))],
    ] as const) {
      const v1 = await read(text, 'old.json');
      if (!v1.ok) throw new Error(problemsOf(v1).join('\n'));
      const written = await writeJobFile(v1.file.payload, { exportedAt: v1.file.exportedAt, exportedBy: v1.file.exportedBy });
      // Version 2 as the doc describes it: JSON Lines whose head says schema version 2.
      expect((JSON.parse(written.slice(0, written.indexOf('\n'))) as { schemaVersion: unknown }).schemaVersion).toBe(2);
      const v2 = await read(written, 'new.json');
      expect(problemsOf(v2)).toEqual([]);
      if (!v2.ok) continue;
      expect(v2.file.schemaVersion).toBe(2);
      expect(v2.file.payload).toEqual(v1.file.payload);
      expect(v2.file.payload).toEqual(expected);
      expect(v2.file.exportedAt).toBe(v1.file.exportedAt);
      expect(v2.file.exportedBy).toEqual(v1.file.exportedBy);
    }
  });
});

describe('damaged, altered and hostile version-1 files', () => {
  it('says a changed value was altered after export', async () => {
    const text = V1_SMALL.replace('"13.58"', '"13.85"');
    expect(text).not.toBe(V1_SMALL);
    expect(problemsOf(await read(text, 'a.json'))).toEqual([`a.json: sha256: ${ALTERED}`]);
  });

  it('says a re-indented file with a changed value was altered', async () => {
    const parsed = JSON.parse(V1_SMALL) as { exportedBy: { name: string } };
    parsed.exportedBy.name = 'Ada Quilt';
    expect(problemsOf(await read(JSON.stringify(parsed, null, 2), 'a.json'))).toEqual([`a.json: sha256: ${ALTERED}`]);
  });

  it('refuses every truncation of a version-1 file, saying it is truncated, empty or not JSON', async () => {
    const content = V1_SMALL.trimEnd();
    for (let length = 0; length < content.length; length++) {
      const result = await read(content.slice(0, length), 'cut.json');
      expect(result.ok, `truncated to ${length}`).toBe(false);
      if (result.ok) continue;
      const first = formatProblem(result.problems[0]!);
      expect(first.startsWith('cut.json: '), first).toBe(true);
      expect(first, `truncated to ${length}`).toMatch(length === 0 ? /the file is empty/ : /truncated|not valid JSON/);
    }
  });

  it('detects any single-byte change: refused, or (a same-value spelling) read back unchanged', async () => {
    const bytes = encodeUtf8(V1_SMALL);
    const original = await read(bytes);
    if (!original.ok) throw new Error('fixture must read');
    await fc.assert(
      fc.asyncProperty(fc.nat({ max: bytes.length - 2 }), fc.integer({ min: 1, max: 255 }), async (position, delta) => {
        const altered = bytes.slice();
        altered[position] = (altered[position]! + delta) & 0xff;
        const result = await read(altered, 'x.json');
        if (result.ok) expect(result.file.payload).toEqual(original.file.payload);
        else expect(result.problems.length).toBeGreaterThan(0);
      }),
      { numRuns: 300 },
    );
  });

  it('says a one-object file claiming version 2 is not laid out as version 2', async () => {
    const problems = problemsOf(await read(await sealedText({ schemaVersion: 2, payload: smallPayload() }), 'odd.json'));
    expect(problems).toHaveLength(1);
    expect(problems[0]).toMatch(/^odd\.json: schemaVersion: .*schema version 1.*2/);
  });

  it('says a one-object file of a newer version needs a newer Ripplewright', async () => {
    for (const version of [3, 7, 1000]) {
      const problems = problemsOf(await read(await sealedText({ schemaVersion: version, payload: smallPayload() }), 'new.json'));
      expect(problems[0]).toBe(
        `new.json: schemaVersion: made by a newer version of Ripplewright (schema version ${version}; this one reads versions 1 and 2): update Ripplewright to import it`,
      );
    }
  });

  it('refuses unknown or mistyped schema versions in a one-object file', async () => {
    for (const [version, pattern] of [
      [0, /^jobs\.json: schemaVersion: unknown schema version 0/],
      [-1, /^jobs\.json: schemaVersion: unknown schema version -1/],
      [1.5, /^jobs\.json: schemaVersion: the schema version should be a whole number/],
      ['1', /^jobs\.json: schemaVersion: the schema version should be a whole number/],
      [null, /^jobs\.json: schemaVersion: the schema version should be a whole number/],
    ] as const) {
      const result = await read(await sealedText({ schemaVersion: version, payload: smallPayload() }));
      expect(problemsOf(result)[0], String(version)).toMatch(pattern);
    }
  });

  it('refuses text longer than the limits, naming the field', async () => {
    const payload = smallPayload();
    payload.readings[1]!.note = 'x'.repeat(LIMITS.longTextChars + 1);
    payload.jobs[0]!.customer = 'y'.repeat(1_000_000);
    const problems = problemsOf(await read(await sealedText({ payload })));
    expect(problems).toContain(`jobs.json: job job-a: payload.jobs[0].customer: text too long (1000000 characters; at most ${LIMITS.shortTextChars})`);
    expect(problems).toContain(`jobs.json: job job-a: reading r-2: payload.readings[1].note: text too long (${LIMITS.longTextChars + 1} characters; at most ${LIMITS.longTextChars})`);
  });

  it('accepts text exactly at the limits', async () => {
    const payload = smallPayload();
    payload.readings[1]!.note = 'x'.repeat(LIMITS.longTextChars);
    payload.jobs[0]!.customer = 'y'.repeat(LIMITS.shortTextChars);
    payload.jobs[1]!.finish!.partsUsed = Array.from({ length: LIMITS.partsPerJob }, (_, i) => `part ${i}`);
    const result = await read(await sealedText({ payload }));
    expect(problemsOf(result)).toEqual([]);
  });

  it('refuses lists longer than the limits and deeply nested values without crashing', async () => {
    const payload = smallPayload();
    payload.jobs[1]!.finish!.partsUsed = Array.from({ length: 100_000 }, () => 'fuse');
    const deep = `${'['.repeat(100_000)}"bottom"${']'.repeat(100_000)}`;
    const text = (await sealedText({ payload })).replace('"note":"=1+1 from the office"', `"note":${deep}`);
    expect(text).toContain(deep);
    const problems = problemsOf(await read(text));
    expect(problems).toContain(`jobs.json: job job-b: payload.jobs[1].finish.partsUsed: too many parts (100000; at most ${LIMITS.partsPerJob})`);
    expect(problems).toContain('jobs.json: job job-a: reading r-2: payload.readings[1].note: expected text, got a list');
  });

  it('never lets "__proto__", "constructor" or "prototype" keys reach an object', async () => {
    type Raw = Record<string, unknown>;
    const jobs = (p: Raw) => p.jobs as Raw[];
    const places: ((payload: Raw) => Raw)[] = [
      (p) => jobs(p)[0]!,
      (p) => jobs(p)[1]!.edits as Raw,
      (p) => jobs(p)[1]!.finish as Raw,
      (p) => jobs(p)[0]!.supply as Raw,
      (p) => (jobs(p)[0]!.supply as Raw).source as Raw,
      (p) => (p.readings as Raw[])[2]!,
      (p) => (p.assets as Raw[])[0]!,
      (p) => p,
    ];
    for (const key of ['__proto__', 'constructor', 'prototype']) {
      for (const [i, place] of places.entries()) {
        const payload = JSON.parse(JSON.stringify(smallPayload())) as Raw;
        // An own member named like this, as JSON.parse makes from an attacker's file.
        Object.defineProperty(place(payload), key, { value: { polluted: true }, enumerable: true, configurable: true, writable: true });
        const text = await sealedText({ payload });
        expect(text).toContain(`"${key}":{"polluted":true}`);
        const result = await read(text);
        expect(result.ok, `${key} at place ${i}`).toBe(false);
        expect(problemsOf(result).some((line) => line.includes(`"${key}" is not allowed as a field name`)), `${key} at place ${i}`).toBe(true);
        expect(({} as Raw).polluted).toBeUndefined();
      }
    }
  });

  it('refuses a "__proto__" member written in the file text itself', async () => {
    const hostile = V1_SMALL.replace('"jobs":[{', '"jobs":[{"__proto__":{"isAdmin":true},');
    expect(hostile).not.toBe(V1_SMALL);
    const result = await read(hostile);
    expect(problemsOf(result).some((line) => /payload\.jobs\[0\]\.__proto__: "__proto__" is not allowed as a field name/.test(line))).toBe(true);
    expect(({} as Record<string, unknown>).isAdmin).toBeUndefined();
  });

  it('refuses a value of the wrong type anywhere in a record, naming its path', async () => {
    const payload = smallPayload();
    const targets = [
      ...payload.jobs.flatMap((job, i) => Object.keys(job).filter((k) => k !== 'id').map((k) => ['jobs', i, k] as const)),
      ...payload.readings.flatMap((r, i) => Object.keys(r).filter((k) => k !== 'id').map((k) => ['readings', i, k] as const)),
      ...payload.assets.flatMap((a, i) => Object.keys(a).filter((k) => k !== 'id').map((k) => ['assets', i, k] as const)),
    ];
    const typeOf = (v: unknown) => (v === null ? 'null' : Array.isArray(v) ? 'array' : typeof v);
    const values = fc.oneof(fc.constant(null), fc.double({ noNaN: true, noDefaultInfinity: true }), fc.string(), fc.boolean(), fc.array(fc.nat(), { maxLength: 2 }), fc.constant({ x: 1 }));
    await fc.assert(
      fc.asyncProperty(fc.constantFrom(...targets), values, async ([list, index, key], value) => {
        const records = JSON.parse(JSON.stringify(payload)) as Record<string, Record<string, unknown>[]>;
        const record = records[list]![index]!;
        fc.pre(typeOf(value) !== typeOf(record[key]));
        // A reading's value may be a number or "OL": a number in place of "OL" is fine.
        fc.pre(!(key === 'value' && typeof value === 'number'));
        record[key] = value;
        const result = await read(await sealedText({ payload: records }));
        expect(result.ok).toBe(false);
        if (!result.ok) expect(result.problems.map((p) => p.field ?? '').some((field) => field.startsWith(`payload.${list}[${index}].${key}`))).toBe(true);
      }),
      { numRuns: 150 },
    );
  });

  it('names file, job, record and field for broken references and duplicates', async () => {
    const payload = smallPayload();
    payload.readings[0]!.jobId = 'job-zz';
    payload.readings.push({ ...payload.readings[1]! });
    payload.jobs[2]!.technicianId = 'tech-9';
    payload.readings[6]!.supersedes = 'r-1';
    const problems = problemsOf(await read(await sealedText({ payload }), 'shop.json'));
    expect(problems).toContain('shop.json: job job-zz: reading r-1: payload.readings[0]: belongs to job job-zz, which is not in the file');
    expect(problems).toContain('shop.json: job job-a: reading r-2: payload.readings[8]: the id r-2 appears twice in this file');
    expect(problems).toContain("shop.json: job job-c: payload.jobs[2]: names technician tech-9, who is not in the file's technicians");
    expect(problems).toContain('shop.json: job job-b: reading r-7: payload.readings[6]: corrects reading r-1 of another job');
  });

  it('puts "altered" first when a refused file was also changed after export', async () => {
    const text = (await sealedText({ payload: { ...smallPayload(), extra: [] } })).replace('"Ada Quill"', '"Ada Quilt"');
    expect(text).toContain('"Ada Quilt"');
    const problems = problemsOf(await read(text));
    expect(problems[0]).toBe(`jobs.json: sha256: ${ALTERED}`);
    expect(problems).toContain('jobs.json: payload.extra: unknown field "extra"');
  });

  it('lists at most the problem limit and counts the rest', async () => {
    const payload = smallPayload();
    payload.readings = Array.from({ length: 300 }, (_, i) => ({ ...payload.readings[0]!, id: `r${i}`, value: 'high' as unknown as number }));
    const result = await read(await sealedText({ payload }));
    expect(result.ok).toBe(false);
    if (!result.ok) {
      expect(result.problems).toHaveLength(LIMITS.problemsListed);
      expect(result.problemCount).toBe(300);
    }
  });
});
