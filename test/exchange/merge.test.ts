import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { canonicalJson } from '../../src/exchange/canonical';
import type { JobPayload } from '../../src/exchange/format';
import { mergePayloads, type MergeSource } from '../../src/exchange/merge';
import { readJobFile } from '../../src/exchange/parse';
import { selectForExport, writeJobFile } from '../../src/exchange/write';
import type { Job, Reading } from '../../src/model/job';
import { smallPayload, T1, T2, T3 } from './fixtures';

const copy = <T>(value: T): T => JSON.parse(JSON.stringify(value)) as T;

function source(name: string, at: string, payload: JobPayload): MergeSource {
  return { name, at, payload };
}

/** A device's copy of the small payload, edited. */
function device(edit: (payload: JobPayload) => void): JobPayload {
  const payload = copy(smallPayload());
  edit(payload);
  return payload;
}

function editField<F extends 'complaint' | 'customer' | 'status'>(job: Job, field: F, value: Job[F], at: string): void {
  job[field] = value;
  job.edits[field] = at;
  if (at > job.updatedAt) job.updatedAt = at;
}

describe('merging job files', () => {
  it('keeps every reading of a job from two devices, and the newer edit of a field wins with the other shown', () => {
    const phone = device((p) => {
      editField(p.jobs[0]!, 'complaint', 'Resets mid-cycle, worse when warm', T2);
      p.readings.push({ id: 'r-phone', jobId: 'job-a', kind: 'esr', target: 'C1', value: 0.31, text: '0,31Ω', takenAt: T2, phase: 'before' });
    });
    const tablet = device((p) => {
      editField(p.jobs[0]!, 'complaint', 'Resets when the drum turns', T3);
      editField(p.jobs[0]!, 'status', 'finished', T1);
      p.readings.push({ id: 'r-tablet', jobId: 'job-a', kind: 'capacitance', target: 'C1', value: 0.00048, text: '480µF', takenAt: T3, phase: 'before' });
    });
    const result = mergePayloads([source('phone.json', T2, phone), source('tablet.json', T3, tablet)]);
    const job = result.payload.jobs.find((j) => j.id === 'job-a')!;
    expect(job.complaint).toBe('Resets when the drum turns');
    expect(job.edits.complaint).toBe(T3);
    expect(job.status).toBe('finished');
    expect(job.updatedAt).toBe(T3);
    const ids = result.payload.readings.filter((r) => r.jobId === 'job-a').map((r) => r.id);
    expect(ids.sort()).toEqual(['r-1', 'r-2', 'r-3', 'r-phone', 'r-tablet']);
    expect(result.newConflicts).toEqual([
      { jobId: 'job-a', field: 'complaint', kept: 'Resets when the drum turns', keptEditedAt: T3, dropped: 'Resets mid-cycle, worse when warm', droppedEditedAt: T2, droppedFrom: 'phone.json' },
      { jobId: 'job-a', field: 'status', kept: 'finished', keptEditedAt: T1, dropped: 'open', droppedEditedAt: smallPayload().jobs[0]!.edits.status, droppedFrom: 'phone.json' },
    ]);
    expect(result.payload.conflicts).toEqual(result.newConflicts);
    expect(result.counts.readings.duplicates).toBe(8);
  });

  it('drops identical copies of readings and keeps both of two readings sharing an id', () => {
    const a = smallPayload();
    const b = device((p) => {
      p.readings[0]!.value = 13.85;
      p.readings[0]!.text = '13.85';
    });
    const result = mergePayloads([source('a.json', T3, a), source('b.json', T3, b)]);
    const copies = result.payload.readings.filter((r) => r.id === 'r-1' || r.id.startsWith('r-1~'));
    expect(copies.map((r) => r.value).sort()).toEqual([13.58, 13.85]);
    expect(result.readingClashes).toHaveLength(1);
    const renamed = result.readingClashes[0]!.renamedTo;
    expect(renamed).toMatch(/^r-1~[0-9a-f]{16}$/);
    // Merged again, in either order, with either file: the same records and no new clash.
    for (const again of [
      [source('m.json', T3, result.payload), source('a.json', T3, a)],
      [source('b.json', T3, b), source('m.json', T3, result.payload)],
    ]) {
      const second = mergePayloads(again);
      expect(second.payload).toEqual(result.payload);
      expect(second.readingClashes).toEqual([]);
    }
  });

  it('lets the reading already stored keep its id, renaming the newcomer', () => {
    const stored = smallPayload();
    const incoming = device((p) => {
      p.readings[0]!.value = 1;
      p.readings[0]!.text = '1';
    });
    // "1" sorts before "13.58", so with no base the newcomer would keep the id.
    const result = mergePayloads([source('in.json', T3, incoming)], { base: source('store', T3, stored) });
    expect(result.payload.readings.find((r) => r.id === 'r-1')!.value).toBe(13.58);
    expect(result.changes.readings.map((r) => r.value)).toEqual([1]);
  });

  it('takes asset fields from the later export, a value over none, and keeps the other value', () => {
    const older = device((p) => {
      p.assets[0]!.serial = 'OLD-1';
      delete p.assets[1]!.make;
    });
    const newer = device((p) => {
      p.assets[0]!.serial = 'NEW-2';
      delete p.assets[0]!.tag;
    });
    const result = mergePayloads([source('newer.json', T3, newer), source('older.json', T1, older)]);
    const asset = result.payload.assets.find((a) => a.id === 'asset-1')!;
    expect(asset.serial).toBe('NEW-2');
    expect(asset.tag).toBe('@TAG-7');
    expect(result.newRecordConflicts).toEqual([
      { record: 'asset', id: 'asset-1', field: 'serial', kept: 'NEW-2', keptAt: T3, dropped: 'OLD-1', droppedAt: T1, droppedFrom: 'older.json' },
    ]);
  });

  it('reports only the records that differ from the base as changes', () => {
    const store = smallPayload();
    const file = device((p) => editField(p.jobs[2]!, 'customer', 'Aldmoor Guest House', T3));
    const result = mergePayloads([source('f.json', T3, file)], { base: source('store', T3, store) });
    expect(result.changes.jobs.map((j) => j.id)).toEqual(['job-c']);
    expect(result.changes.readings).toEqual([]);
    expect(result.counts.jobs).toEqual({ added: 0, updated: 1, unchanged: 2 });
  });
});

// ---------------------------------------------------------------------------------------------
// Properties over devices that each edited their own copy
// ---------------------------------------------------------------------------------------------

const START = Date.parse('2026-03-02T00:00:00.000Z');
const time = fc.integer({ min: 0, max: 10 * 86_400 }).map((s) => new Date(START + s * 1000).toISOString());
const words = fc.constantFrom('Resets', 'Dead', '=E4=', 'Kondensator gewölbt', 'hums, "then" stops', 'fine');

const op = fc.oneof(
  fc.record({ kind: fc.constant('complaint' as const), job: fc.nat(2), value: words, at: time }),
  fc.record({ kind: fc.constant('status' as const), job: fc.nat(2), value: fc.constantFrom('open' as const, 'finished' as const), at: time }),
  fc.record({ kind: fc.constant('finish' as const), job: fc.nat(2), value: words, at: time }),
  // Sources stand for files, and JSON has no -0 (a file's -0 reads back as 0): none is generated.
  fc.record({ kind: fc.constant('reading' as const), job: fc.nat(2), value: fc.double({ min: -50, max: 500, noNaN: true }).map((v) => (v === 0 ? 0 : v)), at: time }),
  fc.record({ kind: fc.constant('clash' as const), reading: fc.nat(7), value: fc.constantFrom(0.5, 12, 'OL' as const) }),
  fc.record({ kind: fc.constant('serial' as const), asset: fc.nat(1), value: words }),
);

const deviceSpec = fc.record({ at: time, ops: fc.array(op, { maxLength: 6 }), jobs: fc.subarray(['job-a', 'job-b', 'job-c'], { minLength: 1 }) });

type Op = typeof op extends fc.Arbitrary<infer T> ? T : never;
type DeviceSpec = typeof deviceSpec extends fc.Arbitrary<infer T> ? T : never;

function buildDevice(index: number, spec: DeviceSpec): MergeSource {
  const p = copy(smallPayload());
  let added = 0;
  for (const o of spec.ops as Op[]) {
    if (o.kind === 'complaint') editField(p.jobs[o.job]!, 'complaint', o.value, o.at);
    else if (o.kind === 'status') editField(p.jobs[o.job]!, 'status', o.value, o.at);
    else if (o.kind === 'finish') {
      const job = p.jobs[o.job]!;
      job.finish = { partsUsed: [o.value], notes: o.value };
      job.edits.finish = o.at;
      if (o.at > job.updatedAt) job.updatedAt = o.at;
    } else if (o.kind === 'reading') {
      const jobId = p.jobs[o.job]!.id;
      p.readings.push({ id: `d${index}-r${added++}`, jobId, kind: 'dcOut', value: o.value, text: String(o.value), takenAt: o.at, phase: 'before' });
    } else if (o.kind === 'clash') {
      const reading = p.readings[o.reading]!;
      reading.value = o.value;
      reading.text = String(o.value);
    } else p.assets[o.asset]!.serial = o.value;
  }
  return { name: `device-${index}.json`, at: spec.at, payload: selectForExport(p, { kind: 'jobs', jobIds: spec.jobs }) };
}

const devices = fc.array(deviceSpec, { minLength: 1, maxLength: 4 }).map((specs) => specs.map((spec, i) => buildDevice(i, spec)));

function readingIdentity(reading: Reading): string {
  const { id, ...content } = reading;
  return `${id.replace(/~[0-9a-f]{16}$/, '')}|${canonicalJson(content)}`;
}

describe('merge properties', () => {
  it('gives the same records whatever the order of the files', () => {
    fc.assert(
      fc.property(devices, fc.array(fc.nat(), { minLength: 4, maxLength: 4 }), (sources, keys) => {
        const shuffled = sources.map((s, i) => [keys[i] ?? 0, i, s] as const).sort((a, b) => a[0] - b[0] || a[1] - b[1]).map(([, , s]) => s);
        expect(mergePayloads(shuffled).payload).toEqual(mergePayloads(sources).payload);
        expect(mergePayloads([...sources].reverse()).payload).toEqual(mergePayloads(sources).payload);
      }),
      { numRuns: 150 },
    );
  });

  it('changes nothing when a file already merged is merged again', () => {
    fc.assert(
      fc.property(devices, (sources) => {
        const merged = mergePayloads(sources);
        const latest = sources.reduce((t, s) => (s.at > t ? s.at : t), sources[0]!.at);
        const result = source('merged.json', latest, merged.payload);
        for (const again of [...sources, result]) {
          const second = mergePayloads([result, again]);
          expect(second.payload).toEqual(merged.payload);
          expect(second.newConflicts).toEqual([]);
          expect(second.newRecordConflicts).toEqual([]);
          expect(second.readingClashes).toEqual([]);
        }
        // As an import: the merged store takes a file it holds and writes nothing.
        const asImport = mergePayloads([sources[0]!], { base: source('store', latest, merged.payload) });
        expect(asImport.changes).toEqual({ jobs: [], readings: [], assets: [], technicians: [], conflicts: [], recordConflicts: [] });
      }),
      { numRuns: 150 },
    );
  });

  it('loses no reading: every reading of every file is in the result, once', () => {
    fc.assert(
      fc.property(devices, (sources) => {
        const merged = mergePayloads(sources).payload;
        const present = new Set(merged.readings.map(readingIdentity));
        for (const s of sources) for (const r of s.payload.readings) expect(present.has(readingIdentity(r))).toBe(true);
        expect(present.size).toBe(merged.readings.length);
        expect(new Set(merged.readings.map((r) => r.id)).size).toBe(merged.readings.length);
      }),
      { numRuns: 150 },
    );
  });

  it('keeps the newest edit of each field and records every other value as a conflict', () => {
    fc.assert(
      fc.property(devices, (sources) => {
        const merged = mergePayloads(sources).payload;
        for (const job of merged.jobs) {
          for (const field of ['complaint', 'status', 'finish'] as const) {
            const versions = sources.flatMap((s) => s.payload.jobs.filter((j) => j.id === job.id));
            const newest = versions.map((v) => v.edits[field] ?? v.createdAt).sort().at(-1);
            expect(job.edits[field] ?? job.createdAt).toBe(newest);
            const losing = new Set(versions.map((v) => canonicalJson(v[field] ?? null)).filter((text) => text !== canonicalJson(job[field] ?? null)));
            const recorded = new Set(merged.conflicts.filter((c) => c.jobId === job.id && c.field === field).map((c) => canonicalJson(c.dropped ?? null)));
            for (const text of losing) expect(recorded.has(text)).toBe(true);
          }
        }
      }),
      { numRuns: 150 },
    );
  });

  it('writes a merged result that reads back as a sound file', async () => {
    await fc.assert(
      fc.asyncProperty(devices, async (sources) => {
        const merged = mergePayloads(sources).payload;
        const result = await readJobFile(await writeJobFile(merged, { exportedAt: T3 }), 'merged.json');
        expect(result.ok).toBe(true);
        if (result.ok) expect(result.file.payload).toEqual(merged);
      }),
      { numRuns: 60 },
    );
  });
});
