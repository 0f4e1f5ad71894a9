import { describe, expect, it } from 'vitest';
import { openStore } from '../../src/store/db';
import { DB_VERSION, MIGRATIONS } from '../../src/store/schema';
import { assetFixture, freshName, jobFixture, readingFixture } from './fixtures';

/** Store and index names of an open database, for comparing schemas. */
function shape(db: IDBDatabase | { objectStoreNames: DOMStringList; transaction: IDBDatabase['transaction'] }) {
  const stores = [...db.objectStoreNames].sort();
  const tx = db.transaction(stores, 'readonly');
  return stores.map((name) => {
    const store = tx.objectStore(name);
    return { name, keyPath: store.keyPath, indexes: [...store.indexNames].sort() };
  });
}

describe('schema migrations', () => {
  it('opens a new device at the current version with every store', async () => {
    const db = await openStore({ name: freshName() });
    expect(db.version).toBe(DB_VERSION);
    expect([...db.objectStoreNames].sort()).toEqual(['assets', 'conflicts', 'drafts', 'jobs', 'readings', 'recordConflicts', 'settings', 'technicians']);
    db.close();
  });

  it.each(Array.from({ length: DB_VERSION - 1 }, (_, i) => i + 1))('upgrades a version-%i database to the same schema a new device gets', async (version) => {
    const name = freshName();
    const old = await openStore({ name, version });
    old.close();
    const upgraded = await openStore({ name });
    const fresh = await openStore({ name: freshName() });
    expect(shape(upgraded as unknown as IDBDatabase)).toEqual(shape(fresh as unknown as IDBDatabase));
    upgraded.close();
    fresh.close();
  });

  it.each([1, 2])('keeps version-%i records through the upgrade to the conflict stores (v3), which start empty', async (version) => {
    const name = freshName();
    const asset = assetFixture();
    const job = jobFixture({ assetId: asset.id });
    const reading = readingFixture(job.id);
    const old = await openStore({ name, version });
    await old.put('assets', asset);
    await old.put('jobs', job);
    await old.put('readings', version >= 2 ? { ...reading, assetId: asset.id } : reading);
    old.close();
    const v3 = await openStore({ name, version: 3 });
    expect(await v3.get('jobs', job.id)).toEqual(job);
    expect(await v3.get('assets', asset.id)).toEqual(asset);
    expect(await v3.get('readings', reading.id)).toEqual({ ...reading, assetId: asset.id });
    expect(await v3.count('conflicts')).toBe(0);
    expect(await v3.count('recordConflicts')).toBe(0);
    await v3.add('conflicts', { jobId: job.id, field: 'customer', kept: 'a', keptEditedAt: job.createdAt, dropped: 'b', droppedEditedAt: job.createdAt });
    expect(await v3.getAllFromIndex('conflicts', 'by-job', job.id)).toHaveLength(1);
    v3.close();
  });

  it('keeps version-1 jobs and readings and files old readings under their job’s asset', async () => {
    const name = freshName();
    const asset = assetFixture();
    const onAsset = jobFixture({ assetId: asset.id });
    const noAsset = jobFixture();
    const r1 = readingFixture(onAsset.id);
    const r2 = readingFixture(noAsset.id, { kind: 'acSecondary', value: 13.1 });
    const v1 = await openStore({ name, version: 1 });
    // Version-1 records, written through the version-1 schema.
    await v1.put('assets', asset);
    await v1.put('jobs', onAsset);
    await v1.put('jobs', noAsset);
    await v1.put('readings', r1);
    await v1.put('readings', r2);
    v1.close();

    const v2 = await openStore({ name, version: 2 });
    expect(await v2.get('jobs', onAsset.id)).toEqual(onAsset);
    expect(await v2.get('readings', r1.id)).toEqual({ ...r1, assetId: asset.id });
    expect(await v2.get('readings', r2.id)).toEqual(r2);
    expect((await v2.getAllFromIndex('readings', 'by-asset', asset.id)).map((r) => r.id)).toEqual([r1.id]);
    expect((await v2.getAllFromIndex('jobs', 'by-asset', asset.id)).map((j) => j.id)).toEqual([onAsset.id]);
    v2.close();
  });

  it('leaves the earlier version and its data untouched when a migration fails', async () => {
    const name = freshName();
    const job = jobFixture();
    const v1 = await openStore({ name, version: 1 });
    await v1.put('jobs', job);
    v1.close();
    const failing = [
      ...MIGRATIONS.slice(0, 2),
      (db: Parameters<(typeof MIGRATIONS)[2]>[0]) => {
        db.createObjectStore('drafts', { keyPath: 'key' });
        throw new Error('migration broke');
      },
    ];
    await expect(openStore({ name, migrations: failing })).rejects.toThrow('migration broke');
    const again = await openStore({ name, version: 1 });
    expect(again.version).toBe(1);
    expect([...again.objectStoreNames]).not.toContain('drafts');
    expect(await again.get('jobs', job.id)).toEqual(job);
    again.close();
  });

  it('refuses a version this build does not know', async () => {
    await expect(openStore({ name: freshName(), version: DB_VERSION + 1 })).rejects.toThrow(RangeError);
  });
});
