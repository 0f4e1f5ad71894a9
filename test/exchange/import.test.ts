import { describe, expect, it } from 'vitest';
import { emptyPayload, type JobPayload } from '../../src/exchange/format';
import { importJobFiles, MemoryImportStore, type ImportProgress, type ImportStore } from '../../src/exchange/import';
import { sortPayload } from '../../src/exchange/order';
import { writeJobFile } from '../../src/exchange/write';
import { demoPayload, sealedText, smallPayload, T1, T2, T3 } from './fixtures';

const NOW = '2026-12-01T12:00:00.000Z';
const copy = <T>(value: T): T => JSON.parse(JSON.stringify(value)) as T;

async function fileOf(payload: JobPayload, exportedAt = T3): Promise<string> {
  return writeJobFile(payload, { exportedAt, exportedBy: { device: 'test' } });
}

function otherShop(): JobPayload {
  const p = copy(smallPayload());
  for (const job of p.jobs) job.id = `x-${job.id}`;
  for (const r of p.readings) {
    r.id = `x-${r.id}`;
    r.jobId = `x-${r.jobId}`;
    if (r.supersedes) r.supersedes = `x-${r.supersedes}`;
  }
  return p;
}

describe('importing job files into a store', () => {
  it('imports good files, refuses a bad one without changing anything, and reports each', async () => {
    const store = new MemoryImportStore();
    const good = await fileOf(smallPayload());
    const bad = (await fileOf(otherShop())).replace('"Ada Quill"', '"Ada Quilt"');
    const alsoGood = await fileOf(otherShop());
    const reports = await importJobFiles(
      [
        { name: 'good.json', content: good },
        { name: 'bad.json', content: bad },
        { name: 'also-good.json', content: alsoGood },
      ],
      store,
      { storeAt: NOW },
    );
    expect(reports.map((r) => [r.name, r.ok])).toEqual([
      ['good.json', true],
      ['bad.json', false],
      ['also-good.json', true],
    ]);
    const refused = reports[1]!;
    if (!refused.ok) expect(refused.problems[0]!.message).toMatch(/altered or damaged/);
    const stored = store.snapshot();
    expect(stored.jobs).toHaveLength(6);
    expect(stored.readings).toHaveLength(16);
  });

  it('reads a file streamed in small chunks, reporting the bytes read and then the records saved', async () => {
    const store = new MemoryImportStore();
    const bytes = new TextEncoder().encode(await fileOf(demoPayload(60)));
    const chunkBytes = 4096;
    const source = {
      size: bytes.byteLength,
      async *chunks() {
        for (let at = 0; at < bytes.byteLength; at += chunkBytes) yield bytes.slice(at, at + chunkBytes);
      },
    };
    const seen: ImportProgress[] = [];
    const [report] = await importJobFiles([{ name: 'streamed.json', content: source }], store, { storeAt: NOW, onProgress: (p) => seen.push(p) });
    expect(report?.ok).toBe(true);
    expect(store.snapshot().readings).toHaveLength(demoPayload(60).readings.length);
    const reading = seen.filter((p) => p.stage === 'reading');
    // One report per chunk after the first, bytes rising to the whole file.
    expect(reading.length).toBeGreaterThanOrEqual(Math.ceil(bytes.byteLength / chunkBytes));
    expect(reading.map((p) => p.done)).toEqual([...reading.map((p) => p.done)].sort((a, b) => a - b));
    expect(reading.at(-1)).toMatchObject({ file: 0, files: 1, name: 'streamed.json', done: bytes.byteLength, total: bytes.byteLength });
    // Then the saving: every job, reading, asset and technician of the file, all new here.
    const records = (['jobs', 'readings', 'assets', 'technicians'] as const).reduce((sum, kind) => sum + demoPayload(60)[kind].length, 0);
    expect(seen.filter((p) => p.stage === 'saving').at(-1)).toMatchObject({ done: records, total: records });
    expect(seen.findIndex((p) => p.stage === 'saving')).toBeGreaterThan(seen.findLastIndex((p) => p.stage === 'reading'));
  });

  it('reports a stream that breaks as a file that could not be read, and goes on with the next', async () => {
    const store = new MemoryImportStore();
    const broken = {
      size: 100,
      async *chunks(): AsyncGenerator<Uint8Array> {
        yield new TextEncoder().encode('{"format":"ripplewright-jobs"');
        throw new Error('the file was removed while it was read');
      },
    };
    const reports = await importJobFiles(
      [
        { name: 'gone.json', content: broken },
        { name: 'good.json', content: await fileOf(smallPayload()) },
      ],
      store,
      { storeAt: NOW },
    );
    expect(reports[0]).toMatchObject({ ok: false, stage: 'file', problems: [{ file: 'gone.json', message: 'could not be read: the file was removed while it was read' }] });
    expect(reports[1]?.ok).toBe(true);
  });

  it('changes nothing when the same file is imported twice', async () => {
    const store = new MemoryImportStore();
    const text = await fileOf(smallPayload());
    const [first] = await importJobFiles([{ name: 'a.json', content: text }], store, { storeAt: NOW });
    const before = store.snapshot();
    const [second] = await importJobFiles([{ name: 'a.json', content: text }], store, { storeAt: NOW });
    expect(store.snapshot()).toEqual(before);
    if (!first?.ok || !second?.ok) throw new Error('both imports should succeed');
    expect(first.counts.jobs.added).toBe(3);
    expect(second.counts).toEqual({
      jobs: { added: 0, updated: 0, unchanged: 3 },
      readings: { added: 0, duplicates: 8 },
      assets: { added: 0, updated: 0, unchanged: 2 },
      technicians: { added: 0, updated: 0, unchanged: 2 },
    });
  });

  it('merges a second device’s edits into what is stored, keeping both sides’ readings', async () => {
    const store = new MemoryImportStore(smallPayload());
    const tablet = copy(smallPayload());
    tablet.jobs[0]!.complaint = 'Resets when the drum turns';
    tablet.jobs[0]!.edits.complaint = T2;
    tablet.jobs[0]!.updatedAt = T2;
    tablet.readings.push({ id: 'r-new', jobId: 'job-a', kind: 'esr', target: 'C1', value: 0.3, text: '0.3', takenAt: T2, phase: 'before' });
    const [report] = await importJobFiles([{ name: 'tablet.json', content: await fileOf(tablet) }], store, { storeAt: NOW });
    if (!report?.ok) throw new Error('import should succeed');
    expect(report.newConflicts).toHaveLength(1);
    const stored = store.snapshot();
    expect(stored.jobs.find((j) => j.id === 'job-a')!.complaint).toBe('Resets when the drum turns');
    expect(stored.readings.map((r) => r.id)).toContain('r-new');
    expect(stored.conflicts).toEqual(report.newConflicts);
  });

  it('leaves the store unchanged for hostile files', async () => {
    const store = new MemoryImportStore(smallPayload());
    const before = store.snapshot();
    const payload = copy(smallPayload()) as unknown as Record<string, unknown>;
    Object.defineProperty((payload.jobs as Record<string, unknown>[])[0]!, '__proto__', { value: { x: 1 }, enumerable: true });
    const hostile = [
      await sealedText({ payload }),
      await sealedText({ schemaVersion: 9, payload: smallPayload() }),
      (await fileOf(smallPayload())).slice(0, 500),
      await sealedText({ payload: { ...smallPayload(), jobs: 'many' } }),
    ];
    const reports = await importJobFiles(hostile.map((content, i) => ({ name: `h${i}.json`, content })), store, { storeAt: NOW });
    expect(reports.every((r) => !r.ok)).toBe(true);
    expect(store.snapshot()).toEqual(before);
  });

  it('writes nothing from a file when the store fails part-way, and says so', async () => {
    const inner = new MemoryImportStore();
    const failing: ImportStore = {
      transaction: (work) =>
        inner.transaction(async (tx) =>
          work({
            read: tx.read,
            write: async (changes) => {
              await tx.write(changes);
              throw new Error('quota exceeded');
            },
          }),
        ),
    };
    const [report] = await importJobFiles([{ name: 'a.json', content: await fileOf(smallPayload()) }], failing, { storeAt: NOW });
    expect(report).toMatchObject({ ok: false, stage: 'store' });
    if (report && !report.ok) expect(report.problems[0]!.message).toMatch(/nothing from it was stored: quota exceeded/);
    expect(inner.snapshot()).toEqual(emptyPayload());
  });

  it('gives the store the records it asks for by id, including renamed copies', async () => {
    const stored = smallPayload();
    stored.readings.push({ ...stored.readings[0]!, id: 'r-1~0123456789abcdef', value: 1, text: '1' });
    const store = new MemoryImportStore(stored);
    const ids: string[][] = [];
    await store.transaction(async (tx) => {
      const found = await tx.read({ jobs: ['job-a'], readings: ['r-1'], assets: [], technicians: ['tech-1'] });
      ids.push(found.readings.map((r) => r.id).sort(), found.jobs.map((j) => j.id), found.technicians.map((t) => t.id));
    });
    expect(ids).toEqual([['r-1', 'r-1~0123456789abcdef'], ['job-a'], ['tech-1']]);
    expect(sortPayload(store.snapshot())).toEqual(sortPayload(stored));
  });

  it('reports progress after each file', async () => {
    const seen: [string, number, number][] = [];
    const content = await fileOf(smallPayload(), T1);
    await importJobFiles([{ name: 'a.json', content }, { name: 'b.json', content: 'nope' }], new MemoryImportStore(), {
      storeAt: NOW,
      onFile: (report, index, total) => seen.push([report.name, index, total]),
    });
    expect(seen).toEqual([
      ['a.json', 0, 2],
      ['b.json', 1, 2],
    ]);
  });
});
