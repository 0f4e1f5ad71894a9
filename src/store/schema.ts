/**
 * The IndexedDB schema and its migrations.
 *
 * Versions only go up. Each migration takes the database from version N − 1 to N inside the
 * upgrade transaction, so a device on any earlier version reaches the current one in order, and a
 * failure part-way aborts the whole upgrade and leaves the old version as it was (IndexedDB's
 * versionchange transaction is all-or-nothing). test/store/migrations.test.ts opens every
 * earlier version with data, then upgrades it.
 *
 * v1: jobs (by updated time), readings (by job), assets, technicians, settings.
 * v2: the asset history — readings carry their job's asset id and are indexed by it, jobs are
 *     indexed by asset; a drafts store keeps half-typed form text.
 * v3: imported job files — conflicts (job fields that lost a merge, by job) and recordConflicts
 *     (asset and technician fields that lost one, by record id), both with generated keys since
 *     a conflict has no id of its own.
 */
import type { DBSchema, IDBPDatabase, IDBPTransaction, StoreNames } from 'idb';
import type { RecordConflict } from '../exchange/format';
import type { Asset, Job, MergeConflict, Reading, Technician } from '../model/job';

/** A reading as stored: the job record's reading plus its job's asset (for the asset history). */
export interface StoredReading extends Reading {
  assetId?: string;
}

/** Text typed into a form but not yet a record (a half-typed "4,"), kept so a killed tab loses nothing. */
export interface Draft {
  /** "<jobId>:<form>", e.g. "4f…:supply", or "new-job" for the new-job form. */
  key: string;
  savedAt: string;
  fields: Record<string, string>;
}

export interface RipplewrightSchema extends DBSchema {
  jobs: { key: string; value: Job; indexes: { 'by-updated': string; 'by-asset': string } };
  readings: { key: string; value: StoredReading; indexes: { 'by-job': string; 'by-asset': string } };
  assets: { key: string; value: Asset };
  technicians: { key: string; value: Technician };
  /** One record per setting group, keyed by its name. */
  settings: { key: string; value: unknown };
  drafts: { key: string; value: Draft };
  conflicts: { key: number; value: MergeConflict; indexes: { 'by-job': string } };
  recordConflicts: { key: number; value: RecordConflict; indexes: { 'by-record': string } };
}

export type Database = IDBPDatabase<RipplewrightSchema>;
type UpgradeTransaction = IDBPTransaction<RipplewrightSchema, StoreNames<RipplewrightSchema>[], 'versionchange'>;

/**
 * The migration to each version, by version number (index 0 unused). Each is written against
 * the version before it only; it must not assume anything a later migration adds.
 */
export const MIGRATIONS: ReadonlyArray<(db: Database, tx: UpgradeTransaction) => Promise<void> | void> = [
  () => undefined,
  // v1
  (db) => {
    const jobs = db.createObjectStore('jobs', { keyPath: 'id' });
    jobs.createIndex('by-updated', 'updatedAt');
    const readings = db.createObjectStore('readings', { keyPath: 'id' });
    readings.createIndex('by-job', 'jobId');
    db.createObjectStore('assets', { keyPath: 'id' });
    db.createObjectStore('technicians', { keyPath: 'id' });
    db.createObjectStore('settings');
  },
  // v2
  async (db, tx) => {
    tx.objectStore('jobs').createIndex('by-asset', 'assetId');
    const readings = tx.objectStore('readings');
    readings.createIndex('by-asset', 'assetId');
    db.createObjectStore('drafts', { keyPath: 'key' });
    // Copy each job's asset onto its readings, so the new index finds the old readings too.
    const assetOfJob = new Map<string, string>();
    for (const job of await tx.objectStore('jobs').getAll()) {
      if (job.assetId !== undefined) assetOfJob.set(job.id, job.assetId);
    }
    let cursor = await readings.openCursor();
    while (cursor) {
      const assetId = assetOfJob.get(cursor.value.jobId);
      if (assetId !== undefined && cursor.value.assetId !== assetId) await cursor.update({ ...cursor.value, assetId });
      cursor = await cursor.continue();
    }
  },
  // v3
  (db) => {
    db.createObjectStore('conflicts', { autoIncrement: true }).createIndex('by-job', 'jobId');
    db.createObjectStore('recordConflicts', { autoIncrement: true }).createIndex('by-record', 'id');
  },
];

/** The schema version this build writes. */
export const DB_VERSION = MIGRATIONS.length - 1;
