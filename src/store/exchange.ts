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
        const jobs = tx.objectStore('jobs');
        const readings = tx.objectStore('readings');
        const assets = tx.objectStore('assets');
        const technicians = tx.objectStore('technicians');
        const conflicts = tx.objectStore('conflicts').index('by-job');
        const recordConflicts = tx.objectStore('recordConflicts').index('by-record');
        const present = <V>(values: (V | undefined)[]) => values.filter((value): value is V => value !== undefined);
        const uniqueReadingIds = [...new Set(ids.readings)];
        const [foundJobs, exact, variants, foundAssets, foundTechnicians, jobConflicts, assetConflicts, technicianConflicts] = await Promise.all([
          Promise.all(ids.jobs.map((id) => jobs.get(id))),
          Promise.all(uniqueReadingIds.map((id) => readings.get(id))),
          // A merge's renamed copies "<id>~<hex>" sort right after "<id>~".
          Promise.all(uniqueReadingIds.map((id) => readings.getAll(IDBKeyRange.bound(`${id}~`, `${id}~\uffff`)))),
          Promise.all(ids.assets.map((id) => assets.get(id))),
          Promise.all(ids.technicians.map((id) => technicians.get(id))),
          Promise.all(ids.jobs.map((id) => conflicts.getAll(id))),
          Promise.all(ids.assets.map((id) => recordConflicts.getAll(id))),
          Promise.all(ids.technicians.map((id) => recordConflicts.getAll(id))),
        ]);
        const byId = new Map<string, Reading>();
        for (const reading of [...present(exact), ...variants.flat()]) byId.set(reading.id, toFileReading(reading));
        return {
          jobs: present(foundJobs),
          readings: [...byId.values()],
          assets: present(foundAssets),
          technicians: present(foundTechnicians),
          conflicts: jobConflicts.flat(),
          recordConflicts: [
            ...assetConflicts.flat().filter((conflict) => conflict.record === 'asset'),
            ...technicianConflicts.flat().filter((conflict) => conflict.record === 'technician'),
          ],
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
