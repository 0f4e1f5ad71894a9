/**
 * Readings: added, never edited (a correction is a new reading that supersedes the old one, see
 * src/model/job.ts). Each carries its job's asset so the asset history is one index lookup.
 */
import type { Reading } from '../model/job';
import type { Database, StoredReading } from './schema';
import { commit } from './transaction';

/**
 * Stores a new reading (and bumps its job's updated time) in one transaction; resolves once
 * both are on disk, so the screen can show it as saved.
 * @throws Error when the job does not exist; the IndexedDB error (e.g. QuotaExceededError) when the write fails
 */
export async function addReading(db: Database, reading: Reading): Promise<StoredReading> {
  const tx = db.transaction(['jobs', 'readings'], 'readwrite');
  return commit(tx, async () => {
    const jobs = tx.objectStore('jobs');
    const job = await jobs.get(reading.jobId);
    if (job === undefined) throw new Error(`no job ${reading.jobId}`);
    const stored: StoredReading = job.assetId === undefined ? { ...reading } : { ...reading, assetId: job.assetId };
    await tx.objectStore('readings').add(stored);
    if (reading.takenAt > job.updatedAt) await jobs.put({ ...job, updatedAt: reading.takenAt });
    return stored;
  });
}

/** A job's readings in the order they were taken (superseded ones included). */
export async function readingsForJob(db: Database, jobId: string): Promise<StoredReading[]> {
  const readings = await db.getAllFromIndex('readings', 'by-job', jobId);
  return readings.sort(byTime);
}

/** Every reading ever taken on an asset, oldest first. */
export async function readingsForAsset(db: Database, assetId: string): Promise<StoredReading[]> {
  const readings = await db.getAllFromIndex('readings', 'by-asset', assetId);
  return readings.sort(byTime);
}

function byTime(a: Reading, b: Reading): number {
  return a.takenAt < b.takenAt ? -1 : a.takenAt > b.takenAt ? 1 : a.id < b.id ? -1 : 1;
}

/** The readings nothing supersedes: what stands after corrections. */
export function currentReadings<R extends Reading>(readings: readonly R[]): R[] {
  const superseded = new Set(readings.map((reading) => reading.supersedes).filter((id) => id !== undefined));
  return readings.filter((reading) => !superseded.has(reading.id));
}
