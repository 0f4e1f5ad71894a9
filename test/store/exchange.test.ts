import { describe, expect, it } from 'vitest';
import { emptyPayload, type JobPayload } from '../../src/exchange/format';
import { importJobFiles, MemoryImportStore } from '../../src/exchange/import';
import { mergePayloads } from '../../src/exchange/merge';
import { sortPayload } from '../../src/exchange/order';
import { selectForExport, writeJobFile } from '../../src/exchange/write';
import { idbImportStore, loadExchangePayload } from '../../src/store/exchange';
import type { Database } from '../../src/store/schema';
import { demoPayload, smallPayload, T3 } from '../exchange/fixtures';
import { openFresh } from './fixtures';

const NOW = '2026-12-01T12:00:00.000Z';
const copy = <T>(value: T): T => JSON.parse(JSON.stringify(value)) as T;

function fileOf(payload: JobPayload, exportedAt = T3): Promise<string> {
  return writeJobFile(payload, { exportedAt, exportedBy: { device: 'test' } });
}

/** Every record in every store, as stored (readings with their assetId). */
async function everything(db: Database) {
  const stores = ['jobs', 'readings', 'assets', 'technicians', 'conflicts', 'recordConflicts'] as const;
  return Object.fromEntries(await Promise.all(stores.map(async (name) => [name, await db.getAll(name)] as const)));
}

describe('the IndexedDB import store', () => {
  it('stores an imported file so an export gives back the same records', async () => {
    const db = await openFresh();
    const payload = smallPayload();
    const [report] = await importJobFiles([{ name: 'shop.json', content: await fileOf(payload) }], idbImportStore(db), { storeAt: NOW });
    expect(report?.ok).toBe(true);
    expect(sortPayload(await loadExchangePayload(db))).toEqual(sortPayload(payload));
    db.close();
  });

  it('files imported readings under their job’s asset and strips that field again on export', async () => {
    const db = await openFresh();
    await importJobFiles([{ name: 'shop.json', content: await fileOf(smallPayload()) }], idbImportStore(db), { storeAt: NOW });
    const onAsset1 = (await db.getAllFromIndex('readings', 'by-asset', 'asset-1')).map((r) => r.id).sort();
    expect(onAsset1).toEqual(['r-1', 'r-2', 'r-3']);
    expect((await loadExchangePayload(db)).readings.every((r) => !('assetId' in r))).toBe(true);
    db.close();
  });

  it('says how many records it has written as the writes complete, ending at all of them', async () => {
    const db = await openFresh();
    const payload = smallPayload();
    const saving: [number, number][] = [];
    await importJobFiles([{ name: 'shop.json', content: await fileOf(payload) }], idbImportStore(db), {
      storeAt: NOW,
      onProgress: (p) => {
        if (p.stage === 'saving') saving.push([p.done, p.total]);
      },
    });
    const records = payload.jobs.length + payload.readings.length + payload.assets.length + payload.technicians.length;
    expect(saving[0]).toEqual([0, records]);
    expect(saving.at(-1)).toEqual([records, records]);
    expect(saving.map(([done]) => done)).toEqual([...saving.map(([done]) => done)].sort((a, b) => a - b));
    db.close();
  });

  it('finds what the store holds of a file the same whether the store is much larger, about as large, or mostly the file', async () => {
    // The store: the demo shop, plus the small payload with a renamed reading and a conflict
    // already in it. The files: one job (store far larger), a few dozen jobs (about as large),
    // everything again (most of the store). Each must merge as the memory store merges it.
    const shop = demoPayload(60, 4);
    const small = smallPayload();
    const changed = copy(small);
    const later = '2026-03-05T08:00:00.000Z';
    changed.jobs[0]!.customer = 'Foxmere Bakery Ltd';
    changed.jobs[0]!.edits.customer = later;
    changed.jobs[0]!.updatedAt = later;
    changed.readings[0]!.value = 13.9;
    changed.readings[0]!.text = '13.9';
    const setup = [
      { name: 'shop.json', content: await fileOf(shop) },
      { name: 'a.json', content: await fileOf(small) },
      { name: 'b.json', content: await fileOf(changed, later) },
    ];
    const files = [
      await fileOf(selectForExport(changed, { kind: 'jobs', jobIds: ['job-a'] }), later),
      await fileOf(selectForExport(shop, { kind: 'jobs', jobIds: shop.jobs.slice(0, 25).map((job) => job.id) })),
      await fileOf(mergePayloads([{ name: 'x', at: T3, payload: shop }, { name: 'y', at: later, payload: changed }]).payload, later),
    ];
    for (const [i, text] of files.entries()) {
      const db = await openFresh();
      const memory = new MemoryImportStore();
      for (const store of [idbImportStore(db), memory]) await importJobFiles(setup, store, { storeAt: NOW });
      const [viaDb] = await importJobFiles([{ name: 'next.json', content: text }], idbImportStore(db), { storeAt: NOW });
      const [viaMemory] = await importJobFiles([{ name: 'next.json', content: text }], memory, { storeAt: NOW });
      expect(viaDb, `file ${i}`).toEqual(viaMemory);
      expect(sortPayload(await loadExchangePayload(db)), `file ${i}`).toEqual(sortPayload(memory.snapshot()));
      db.close();
    }
  });

  it('changes nothing when the same file is imported twice', async () => {
    const db = await openFresh();
    const store = idbImportStore(db);
    const text = await fileOf(smallPayload());
    await importJobFiles([{ name: 'a.json', content: text }], store, { storeAt: NOW });
    const before = await everything(db);
    const [again] = await importJobFiles([{ name: 'a.json', content: text }], store, { storeAt: NOW });
    expect(again?.ok).toBe(true);
    expect(await everything(db)).toEqual(before);
    db.close();
  });

  it('keeps a refused file out entirely while the other files still import', async () => {
    const db = await openFresh();
    const other = copy(smallPayload());
    for (const job of other.jobs) job.id = `x-${job.id}`;
    for (const r of other.readings) {
      r.id = `x-${r.id}`;
      r.jobId = `x-${r.jobId}`;
      if (r.supersedes) r.supersedes = `x-${r.supersedes}`;
    }
    const bad = (await fileOf(other)).replace('"Ada Quill"', '"Ada Quilt"');
    const reports = await importJobFiles(
      [
        { name: 'bad.json', content: bad },
        { name: 'good.json', content: await fileOf(smallPayload()) },
      ],
      idbImportStore(db),
      { storeAt: NOW },
    );
    expect(reports.map((r) => r.ok)).toEqual([false, true]);
    const stored = await loadExchangePayload(db);
    expect(stored.jobs.map((j) => j.id).sort()).toEqual(['job-a', 'job-b', 'job-c']);
    db.close();
  });

  it('rolls back every write of a transaction whose work fails', async () => {
    const db = await openFresh();
    await importJobFiles([{ name: 'a.json', content: await fileOf(smallPayload()) }], idbImportStore(db), { storeAt: NOW });
    const before = await everything(db);
    const extra = copy(smallPayload());
    extra.jobs[0]!.customer = 'Someone else';
    extra.conflicts = [];
    await expect(
      idbImportStore(db).transaction(async (tx) => {
        await tx.write({ ...emptyPayload(), jobs: extra.jobs, readings: extra.readings.map((r) => ({ ...r, id: `${r.id}-new` })) });
        throw new Error('disk full');
      }),
    ).rejects.toThrow('disk full');
    expect(await everything(db)).toEqual(before);
    db.close();
  });

  it('records a merge’s conflicts and finds them and renamed readings again by id', async () => {
    const db = await openFresh();
    const store = idbImportStore(db);
    await importJobFiles([{ name: 'a.json', content: await fileOf(smallPayload()) }], store, { storeAt: NOW });
    const changed = copy(smallPayload());
    const later = '2026-03-05T08:00:00.000Z';
    changed.jobs[0]!.customer = 'Foxmere Bakery Ltd';
    changed.jobs[0]!.edits.customer = later;
    changed.jobs[0]!.updatedAt = later;
    changed.readings[0]!.value = 13.9; // same id, other value: kept under a renamed id
    changed.readings[0]!.text = '13.9';
    changed.assets[0]!.make = 'Ostrell';
    const [report] = await importJobFiles([{ name: 'b.json', content: await fileOf(changed, later) }], store, { storeAt: NOW });
    if (!report?.ok) throw new Error('import should succeed');
    expect(report.newConflicts.map((c) => [c.jobId, c.field])).toEqual([['job-a', 'customer']]);
    expect(report.newRecordConflicts.map((c) => [c.id, c.field])).toEqual([['asset-1', 'make']]);
    const renamed = (await db.getAll('readings')).filter((r) => r.id.startsWith('r-1~'));
    expect(renamed).toHaveLength(1);
    const read = await store.transaction((tx) => tx.read({ jobs: ['job-a'], readings: ['r-1'], assets: ['asset-1'], technicians: [] }));
    expect(read.readings.map((r) => r.id).sort()).toEqual(['r-1', renamed[0]!.id]);
    expect(read.conflicts).toHaveLength(1);
    expect(read.recordConflicts).toHaveLength(1);
    // And importing that second file again adds nothing.
    const before = await everything(db);
    await importJobFiles([{ name: 'b.json', content: await fileOf(changed, later) }], store, { storeAt: NOW });
    expect(await everything(db)).toEqual(before);
    db.close();
  });
});
