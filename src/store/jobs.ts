/**
 * Jobs: create, read, list, search, and edit one field at a time (each edit stamps the field's
 * edit time for merging, see src/model/job.ts).
 */
import type { Asset, IsoTime, Job, JobField } from '../model/job';
import { newId, nowIso } from './ids';
import type { Database } from './schema';
import { commit } from './transaction';

export type NewJob = Pick<Job, 'customer' | 'site' | 'technicianId' | 'complaint'> & Partial<Pick<Job, 'assetId' | 'meter' | 'supply' | 'nameplate'>>;

/**
 * Writes a new open job and resolves once it is stored.
 * @param at  creation time (default now)
 * @returns the stored job
 */
export async function createJob(db: Database, fields: NewJob, at: IsoTime = nowIso()): Promise<Job> {
  const edits: Job['edits'] = {};
  for (const key of Object.keys(fields) as JobField[]) edits[key] = at;
  edits.status = at;
  const job: Job = { id: newId(), createdAt: at, updatedAt: at, startedAt: at, status: 'open', ...fields, edits };
  await db.add('jobs', job);
  return job;
}

export function getJob(db: Database, id: string): Promise<Job | undefined> {
  return db.get('jobs', id);
}

/** Every job, most recently changed first. */
export async function listJobs(db: Database): Promise<Job[]> {
  const jobs = await db.getAllFromIndex('jobs', 'by-updated');
  return jobs.reverse();
}

/** Jobs on one asset, most recent first. */
export async function jobsForAsset(db: Database, assetId: string): Promise<Job[]> {
  const jobs = await db.getAllFromIndex('jobs', 'by-asset', assetId);
  return jobs.sort((a, b) => (a.createdAt < b.createdAt ? 1 : -1));
}

/**
 * Sets one field of a job, stamping its edit time and the job's updated time, in one
 * transaction so two quick edits of different fields cannot overwrite each other.
 * @returns the job as stored
 * @throws Error when there is no such job
 */
export async function setJobField<F extends JobField>(db: Database, id: string, field: F, value: Job[F], at: IsoTime = nowIso()): Promise<Job> {
  const tx = db.transaction('jobs', 'readwrite');
  return commit(tx, async () => {
    const job = await tx.store.get(id);
    if (job === undefined) throw new Error(`no job ${id}`);
    const next: Job = { ...job, [field]: value, updatedAt: laterOf(job.updatedAt, at), edits: { ...job.edits, [field]: at } };
    if (value === undefined) delete next[field];
    if (field === 'status') {
      if (value === 'finished') next.finishedAt = at;
      else delete next.finishedAt;
    }
    await tx.store.put(next);
    return next;
  });
}

/**
 * Sets several fields of a job at once (e.g. the supply and its nameplate), stamping each.
 * @returns the job as stored
 * @throws Error when there is no such job
 */
export async function setJobFields(db: Database, id: string, patch: Partial<Pick<Job, JobField>>, at: IsoTime = nowIso()): Promise<Job> {
  const tx = db.transaction('jobs', 'readwrite');
  return commit(tx, async () => {
    const job = await tx.store.get(id);
    if (job === undefined) throw new Error(`no job ${id}`);
    const next: Job = { ...job, updatedAt: laterOf(job.updatedAt, at), edits: { ...job.edits } };
    for (const field of Object.keys(patch) as JobField[]) {
      const value = patch[field];
      if (value === undefined) delete next[field];
      else (next as unknown as Record<string, unknown>)[field] = value;
      next.edits[field] = at;
    }
    if ('status' in patch) {
      if (patch.status === 'finished') next.finishedAt = at;
      else delete next.finishedAt;
    }
    await tx.store.put(next);
    return next;
  });
}

/** Marks a job as changed now (a reading was added) without editing any of its fields. */
export async function touchJob(db: Database, id: string, at: IsoTime = nowIso()): Promise<void> {
  const tx = db.transaction('jobs', 'readwrite');
  await commit(tx, async () => {
    const job = await tx.store.get(id);
    if (job !== undefined) await tx.store.put({ ...job, updatedAt: laterOf(job.updatedAt, at) });
  });
}

function laterOf(a: IsoTime, b: IsoTime): IsoTime {
  return a > b ? a : b;
}

/**
 * The jobs whose customer, site, complaint or asset (kind, make, model, serial, tag) contain
 * every word of `query`, ignoring case and accents. A blank query matches every job.
 * @param assets  the assets by id, for matching a job by its asset
 */
export function matchJobs(jobs: readonly Job[], assets: ReadonlyMap<string, Asset>, query: string): Job[] {
  const words = fold(query).split(/\s+/).filter((word) => word !== '');
  if (words.length === 0) return [...jobs];
  return jobs.filter((job) => {
    const asset = job.assetId === undefined ? undefined : assets.get(job.assetId);
    const haystack = fold(
      [job.customer, job.site, job.complaint, asset?.kind, asset?.make, asset?.model, asset?.serial, asset?.tag]
        .filter((part) => part !== undefined)
        .join(' '),
    );
    return words.every((word) => haystack.includes(word));
  });
}

function fold(text: string): string {
  return text.normalize('NFD').replace(/\p{M}/gu, '').toLowerCase();
}
