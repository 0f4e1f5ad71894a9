/**
 * The job exchange over IndexedDB: the records an export carries, and src/exchange's
 * `ImportStore` so an imported file is read, merged and written in one transaction over every
 * record store (a bad write leaves nothing behind).
 */
import { unwrap } from 'idb';
import type { ImportStore, ImportTransaction, PayloadIds } from '../exchange/import';
import type { JobPayload } from '../exchange/format';
import type { Reading } from '../model/job';
import type { Database, StoredReading } from './schema';
import { commit } from './transaction';

const EXCHANGE_STORES = ['jobs', 'readings', 'assets', 'technicians', 'conflicts', 'recordConflicts'] as const;

/** A stored reading as the file format has it: without the store's own assetId. */
export function toFileReading(stored: StoredReading): Reading {
  const { assetId: _assetId, ...reading } = stored;
  return reading;
}

/**
 * Everything the store holds, as a job file's records (readings without the store's assetId).
 * Select from it with src/exchange's selectForExport.
 */
export async function loadExchangePayload(db: Database): Promise<JobPayload> {
  const tx = db.transaction([...EXCHANGE_STORES], 'readonly');
  const [jobs, readings, assets, technicians, conflicts, recordConflicts] = await Promise.all([
    tx.objectStore('jobs').getAll(),
    tx.objectStore('readings').getAll(),
    tx.objectStore('assets').getAll(),
    tx.objectStore('technicians').getAll(),
    tx.objectStore('conflicts').getAll(),
    tx.objectStore('recordConflicts').getAll(),
  ]);
  await tx.done;
  return { jobs, readings: readings.map(toFileReading), assets, technicians, conflicts, recordConflicts };
}

/** The parts of an idb object store that heldRecords uses. */
interface KeyedStore<V> {
  count(): Promise<number>;
  getAllKeys(): Promise<IDBValidKey[]>;
  getAll(query?: IDBKeyRange): Promise<V[]>;
  get(key: string): Promise<V | undefined>;
}

/**
 * The stored records whose keys a file names. One request per key costs a large file hundreds of
 * thousands of requests (most finding nothing when the file is new); so when the file names
 * about as many keys as the store holds, the store's keys come in one request and only the held
 * ones are fetched: one by one when few, all at once when most of the store is wanted.
 *
 * @param wanted      the keys the file names
 * @param isWanted    whether a stored key is one of them (or goes with one)
 * @param alsoRange   for each wanted key, a key range of stored records that go with it (the
 *                    merge's renamed readings), looked up when asking key by key
 */
async function heldRecords<V>(store: KeyedStore<V>, wanted: readonly string[], isWanted: (key: string) => boolean, alsoRange?: (key: string) => IDBKeyRange): Promise<V[]> {
  if (wanted.length === 0) return [];
  const stored = await store.count();
  if (stored === 0) return [];
  if (stored > 4 * wanted.length) {
    const [exact, ranges] = await Promise.all([
      Promise.all(wanted.map((key) => store.get(key))),
      alsoRange === undefined ? [] : Promise.all(wanted.map((key) => store.getAll(alsoRange(key)))),
    ]);
    return [...exact.filter((record): record is Awaited<V> => record !== undefined), ...ranges.flat()] as V[];
  }
  const held = (await store.getAllKeys()).filter((key): key is string => typeof key === 'string' && isWanted(key));
  if (held.length === 0) return [];
  if (held.length * 2 > stored) {
    const heldSet = new Set(held);
    return (await store.getAll()).filter((record) => heldSet.has((record as { id: string }).id));
  }
  return (await Promise.all(held.map((key) => store.get(key)))).filter((record): record is Awaited<V> => record !== undefined) as V[];
}

/**
 * src/exchange's ImportStore over the app's database. Each transaction spans every record
 * store; `work` must await only this transaction's requests (and synchronous work) so
 * IndexedDB keeps it open, which importJobFiles does. A rejection in `work` aborts it.
 */
export function idbImportStore(db: Database): ImportStore {
  return {
    transaction<T>(work: (tx: ImportTransaction) => Promise<T>): Promise<T> {
      const tx = db.transaction([...EXCHANGE_STORES], 'readwrite');
      const read = async (ids: PayloadIds): Promise<JobPayload> => {
        const jobIds = new Set(ids.jobs);
        const readingIds = new Set(ids.readings);
        const assetIds = new Set(ids.assets);
        const technicianIds = new Set(ids.technicians);
        // A merge's renamed copy "<id>~<16 hex>" is wanted with its first id.
        const wantedReading = (key: string) => readingIds.has(key) || (key.length > 17 && key.charCodeAt(key.length - 17) === 0x7e && readingIds.has(key.slice(0, -17)));
        const [foundJobs, foundReadings, foundAssets, foundTechnicians, jobConflicts, recordConflicts] = await Promise.all([
          heldRecords(tx.objectStore('jobs'), ids.jobs, (key) => jobIds.has(key)),
          heldRecords(tx.objectStore('readings'), [...readingIds], wantedReading, (id) => IDBKeyRange.bound(`${id}~`, `${id}~\uffff`)),
          heldRecords(tx.objectStore('assets'), ids.assets, (key) => assetIds.has(key)),
          heldRecords(tx.objectStore('technicians'), ids.technicians, (key) => technicianIds.has(key)),
          // Conflicts are few: all of them, kept when they are about these records.
          tx.objectStore('conflicts').getAll(),
          tx.objectStore('recordConflicts').getAll(),
        ]);
        return {
          jobs: foundJobs,
          readings: foundReadings.map(toFileReading),
          assets: foundAssets,
          technicians: foundTechnicians,
          conflicts: jobConflicts.filter((conflict) => jobIds.has(conflict.jobId)),
          recordConflicts: recordConflicts.filter((conflict) => (conflict.record === 'asset' ? assetIds : technicianIds).has(conflict.id)),
        };
      };
      const write = async (changes: JobPayload, onWritten?: (done: number, total: number) => void): Promise<void> => {
        const jobs = tx.objectStore('jobs');
        const assetOfJob = new Map<string, string | undefined>(changes.jobs.map((job) => [job.id, job.assetId]));
        for (const jobId of new Set(changes.readings.map((reading) => reading.jobId))) {
          if (!assetOfJob.has(jobId)) assetOfJob.set(jobId, (await jobs.get(jobId))?.assetId);
        }
        // Plain IndexedDB requests, no promise each: a failed one aborts the transaction, and
        // commit() rejects with its error. Requests complete in the order made, so the n-th
        // request's success means n records are written.
        const total = changes.jobs.length + changes.readings.length + changes.assets.length + changes.technicians.length + changes.conflicts.length + changes.recordConflicts.length;
        const every = Math.max(1, Math.floor(total / 200));
        let made = 0;
        const track = (request: IDBRequest) => {
          made += 1;
          if (onWritten !== undefined && (made % every === 0 || made === total)) {
            const done = made;
            request.addEventListener('success', () => onWritten(done, total));
          }
        };
        onWritten?.(0, total);
        const store = (name: (typeof EXCHANGE_STORES)[number]) => unwrap(tx.objectStore(name));
        const jobStore = store('jobs');
        for (const job of changes.jobs) track(jobStore.put(job));
        const readingStore = store('readings');
        for (const reading of changes.readings) {
          // The asset history index (schema v2) finds imported readings too.
          const assetId = assetOfJob.get(reading.jobId);
          track(readingStore.put(assetId === undefined ? reading : { ...reading, assetId }));
        }
        const assetStore = store('assets');
        for (const asset of changes.assets) track(assetStore.put(asset));
        const technicianStore = store('technicians');
        for (const technician of changes.technicians) track(technicianStore.put(technician));
        const conflictStore = store('conflicts');
        for (const conflict of changes.conflicts) track(conflictStore.add(conflict));
        const recordConflictStore = store('recordConflicts');
        for (const conflict of changes.recordConflicts) track(recordConflictStore.add(conflict));
      };
      return commit(tx, () => work({ read, write }));
    },
  };
}
