/**
 * The job exchange over IndexedDB: the records an export carries, and src/exchange's
 * `ImportStore` so an imported file is read, merged and written in one transaction over every
 * record store (a bad write leaves nothing behind).
 */
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
      const write = async (changes: JobPayload): Promise<void> => {
        const jobs = tx.objectStore('jobs');
        const readings = tx.objectStore('readings');
        const assetOfJob = new Map<string, string | undefined>(changes.jobs.map((job) => [job.id, job.assetId]));
        for (const jobId of new Set(changes.readings.map((reading) => reading.jobId))) {
          if (!assetOfJob.has(jobId)) assetOfJob.set(jobId, (await jobs.get(jobId))?.assetId);
        }
        const puts: Promise<unknown>[] = [];
        for (const job of changes.jobs) puts.push(jobs.put(job));
        for (const reading of changes.readings) {
          // The asset history index (schema v2) finds imported readings too.
          const assetId = assetOfJob.get(reading.jobId);
          puts.push(readings.put(assetId === undefined ? { ...reading } : { ...reading, assetId }));
        }
        for (const asset of changes.assets) puts.push(tx.objectStore('assets').put(asset));
        for (const technician of changes.technicians) puts.push(tx.objectStore('technicians').put(technician));
        for (const conflict of changes.conflicts) puts.push(tx.objectStore('conflicts').add(conflict));
        for (const conflict of changes.recordConflicts) puts.push(tx.objectStore('recordConflicts').add(conflict));
        await Promise.all(puts);
      };
      return commit(tx, () => work({ read, write }));
    },
  };
}
