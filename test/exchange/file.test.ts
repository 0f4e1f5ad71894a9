import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { canonicalJson, decodeUtf8Strict, encodeUtf8, sameJson, sha256Hex } from '../../src/exchange/canonical';
import { LIMITS, type JobPayload } from '../../src/exchange/format';
import { digestText, formatProblem, readJobFile, type ReadResult } from '../../src/exchange/parse';
import { buildJobFile, ExportError, selectForExport, writeJobFile } from '../../src/exchange/write';
import { sortPayload } from '../../src/exchange/order';
import { demoPayload, sealedText, smallPayload, T2, T3 } from './fixtures';

const OPTIONS = { exportedAt: T3, exportedBy: { name: 'Ada Quill', device: 'test phone' } };

async function read(text: string | Uint8Array, name = 'jobs.json'): Promise<ReadResult> {
  return readJobFile(text, name);
}

function problemsOf(result: ReadResult): string[] {
  return result.ok ? [] : result.problems.map(formatProblem);
}

describe('canonical JSON and SHA-256', () => {
  it('sorts members by UTF-16 code units as RFC 8785 §3.2.3 shows', () => {
    // The member names of RFC 8785 §3.2.3's sorting example, in its sorted order.
    const sortedNames = ['\r', '1', '\u0080', '\u00f6', '\u20ac', '\ud83d\ude00', '\ufb33'];
    const shuffled = Object.fromEntries([...sortedNames].reverse().map((name, i) => [name, i]));
    const text = canonicalJson(shuffled);
    const names = Object.keys(JSON.parse(text) as object);
    // Integer-like names ("1") come first in any JS object; compare the text order instead.
    const positions = sortedNames.map((name) => text.indexOf(JSON.stringify(name)));
    expect(positions).toEqual([...positions].sort((a, b) => a - b));
    expect(names).toHaveLength(sortedNames.length);
  });

  it('writes numbers and strings as JSON.stringify does, with no whitespace', () => {
    expect(canonicalJson({ b: [1e21, 0.000001, 1e-7, -0, 'é\n"'], a: { d: true, c: null } })).toBe(
      '{"a":{"c":null,"d":true},"b":[1e+21,0.000001,1e-7,0,"é\\n\\""]}',
    );
  });

  it('computes the FIPS 180-4 example digest of "abc"', async () => {
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

  it('refuses bytes that are not UTF-8', () => {
    expect(() => decodeUtf8Strict(new Uint8Array([0x7b, 0xc3, 0x28, 0x7d]))).toThrow();
    expect(decodeUtf8Strict(encodeUtf8('µΩ😕'))).toBe('µΩ😕');
  });
});

describe('writing and reading a job file', () => {
  it('reads back exactly the records it wrote', async () => {
    for (const payload of [smallPayload(), demoPayload(40)]) {
      const result = await read(await writeJobFile(payload, OPTIONS));
      expect(problemsOf(result)).toEqual([]);
      if (!result.ok) continue;
      expect(result.file.payload).toEqual(sortPayload(payload));
      expect(result.file.exportedAt).toBe(T3);
      expect(result.file.exportedBy).toEqual(OPTIONS.exportedBy);
    }
  });

  it('writes the same bytes for the same records in any order', async () => {
    const payload = smallPayload();
    const reversed: JobPayload = { ...payload, jobs: [...payload.jobs].reverse(), readings: [...payload.readings].reverse() };
    expect(await writeJobFile(reversed, OPTIONS)).toBe(await writeJobFile(payload, OPTIONS));
  });

  it('is RFC 8785 canonical JSON as a whole, and the digest covers everything but itself', async () => {
    const { text, file } = await buildJobFile(demoPayload(10), OPTIONS);
    const parsed = JSON.parse(text) as Record<string, unknown>;
    expect(text).toBe(`${canonicalJson(parsed)}\n`);
    const { sha256, ...rest } = parsed;
    expect(sha256).toBe(await sha256Hex(canonicalJson(rest)));
    // The fast path (rebuilt records + JSON.stringify) gives the reference canonical text.
    expect(digestText(file)).toBe(canonicalJson(rest));
  });

  it('reads a file re-indented by another tool, since the digest is over content', async () => {
    const text = await writeJobFile(smallPayload(), OPTIONS);
    const result = await read(JSON.stringify(JSON.parse(text), null, 2));
    expect(result.ok).toBe(true);
  });

  it('leaves the caller’s bytes as they were after reading them', async () => {
    const bytes = encodeUtf8(await writeJobFile(smallPayload(), OPTIONS));
    const before = bytes.slice();
    expect((await read(bytes)).ok).toBe(true);
    expect(bytes).toEqual(before);
  });

  it('ignores a leading byte-order mark', async () => {
    const text = await writeJobFile(smallPayload(), OPTIONS);
    expect((await read(encodeUtf8(`\uFEFF${text}`))).ok).toBe(true);
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

describe('damaged, altered and foreign files', () => {
  it('refuses every truncation of a small file, saying it is truncated or not JSON', async () => {
    const text = await writeJobFile(smallPayload(), OPTIONS);
    const content = text.trimEnd();
    for (let length = 0; length < content.length; length++) {
      const result = await read(content.slice(0, length));
      expect(result.ok, `truncated to ${length}`).toBe(false);
      if (!result.ok) expect(result.problems[0]!.message).toMatch(/truncated|empty|not valid JSON/);
    }
  });

  it('detects any single-byte change: refused, or (a same-value spelling) read back unchanged', async () => {
    const text = await writeJobFile(smallPayload(), OPTIONS);
    const bytes = encodeUtf8(text);
    const original = await read(bytes);
    if (!original.ok) throw new Error('fixture must read');
    await fc.assert(
      fc.asyncProperty(fc.nat({ max: bytes.length - 2 }), fc.integer({ min: 1, max: 255 }), async (position, delta) => {
        const altered = bytes.slice();
        altered[position] = (altered[position]! + delta) & 0xff;
        const result = await read(altered);
        if (result.ok) expect(result.file.payload).toEqual(original.file.payload);
        else expect(result.problems.length).toBeGreaterThan(0);
      }),
      { numRuns: 400 },
    );
  });

  it('says a changed value was altered after export', async () => {
    const text = (await writeJobFile(smallPayload(), OPTIONS)).replace('"13.58"', '"13.85"');
    expect(problemsOf(await read(text, 'a.json'))).toEqual([
      'a.json: sha256: altered or damaged: the SHA-256 digest does not match the content, so the file changed after it was exported',
    ]);
  });

  it('says a file from a newer version needs a newer Ripplewright', async () => {
    for (const version of [2, 7, 1000]) {
      const text = await sealedText({ schemaVersion: version, payload: smallPayload() });
      expect(problemsOf(await read(text, 'new.json'))[0]).toMatch(/^new\.json: schemaVersion: made by a newer version of Ripplewright \(schema version \d+; this one reads version 1\)/);
    }
  });

  it('refuses unknown or mistyped schema versions', async () => {
    for (const version of [0, -1, 1.5, '1', null]) {
      const result = await read(await sealedText({ schemaVersion: version, payload: smallPayload() }));
      expect(problemsOf(result)[0]).toMatch(/schemaVersion: (unknown schema version|the schema version should be a whole number)/);
    }
  });

  it('says a JSON file that is not a job file is not one', async () => {
    const cases = ['[1,2,3]', '"text"', '{"topology":"bridge"}', '{"format":"someone-else","schemaVersion":1}', 'null'];
    for (const text of cases) expect(problemsOf(await read(text))[0]).toMatch(/not a Ripplewright job file/);
    expect(problemsOf(await read('job_id,customer\r\n1,2\r\n'))[0]).toMatch(/not valid JSON/);
    expect(problemsOf(await read(''))[0]).toMatch(/empty/);
  });

  it('refuses text longer than the limits, naming the field', async () => {
    const payload = smallPayload();
    payload.readings[1]!.note = 'x'.repeat(LIMITS.longTextChars + 1);
    payload.jobs[0]!.customer = 'y'.repeat(1_000_000);
    const problems = problemsOf(await read(await sealedText({ payload })));
    expect(problems).toContain(`jobs.json: job job-a: payload.jobs[0].customer: text too long (1000000 characters; at most ${LIMITS.shortTextChars})`);
    expect(problems).toContain(`jobs.json: job job-a: reading r-2: payload.readings[1].note: text too long (${LIMITS.longTextChars + 1} characters; at most ${LIMITS.longTextChars})`);
  });

  it('refuses lists longer than the limits and deeply nested values without crashing', async () => {
    const payload = smallPayload();
    payload.jobs[1]!.finish!.partsUsed = Array.from({ length: 100_000 }, () => 'fuse');
    const deep = `${'['.repeat(100_000)}"bottom"${']'.repeat(100_000)}`;
    const text = (await sealedText({ payload })).replace('"note":"=1+1 from the office"', `"note":${deep}`);
    const problems = problemsOf(await read(text));
    expect(problems).toContain(`jobs.json: job job-b: payload.jobs[1].finish.partsUsed: too many parts (100000; at most ${LIMITS.partsPerJob})`);
    expect(problems).toContain('jobs.json: job job-a: reading r-2: payload.readings[1].note: expected text, got a list');
  });

  it('refuses a file larger than the byte limit before parsing it', async () => {
    const huge = new Uint8Array(LIMITS.fileBytes + 1);
    expect(problemsOf(await read(huge))[0]).toMatch(/too large/);
  });

  it('never lets "__proto__", "constructor" or "prototype" keys reach an object', async () => {
    type Raw = Record<string, unknown>;
    const jobs = (p: Raw) => p.jobs as Raw[];
    const places: ((payload: Raw) => Raw)[] = [
      (p) => jobs(p)[0]!,
      (p) => jobs(p)[1]!.edits as Raw,
      (p) => jobs(p)[1]!.finish as Raw,
      (p) => jobs(p)[0]!.supply as Raw,
      (p) => ((jobs(p)[0]!.supply as Raw).source as Raw),
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
        expect(problemsOf(result).some((line) => line.includes(`"${key}" is not allowed as a field name`))).toBe(true);
        expect(({} as Raw).polluted).toBeUndefined();
      }
    }
  });

  it('refuses a "__proto__" member written in the file text itself', async () => {
    const good = await writeJobFile(smallPayload(), OPTIONS);
    const hostile = good.replace('"jobs":[{', '"jobs":[{"__proto__":{"isAdmin":true},');
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
    const problems = problemsOf(await read(await sealedText({ payload }), 'shop.json'));
    expect(problems).toContain('shop.json: job job-zz: reading r-1: payload.readings[0]: belongs to job job-zz, which is not in the file');
    expect(problems).toContain('shop.json: job job-a: reading r-2: payload.readings[8]: the id r-2 appears twice in this file');
    expect(problems).toContain("shop.json: job job-c: payload.jobs[2]: names technician tech-9, who is not in the file's technicians");
  });

  it('adds "altered" to the problems when a refused file was also changed after export', async () => {
    const text = (await sealedText({ payload: { ...smallPayload(), extra: [] } })).replace('"Ada Quill"', '"Ada Quilt"');
    const problems = problemsOf(await read(text));
    expect(problems[0]).toMatch(/altered or damaged/);
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
