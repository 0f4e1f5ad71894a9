/**
 * Importing job files into a store: each file is read, checked and merged in one all-or-nothing
 * transaction, so a bad file changes nothing while the others still import, and importing the
 * same file twice changes nothing the second time.
 *
 * The store is reached only through `ImportStore`, so this runs against IndexedDB in the app
 * (an adapter in src/store), against `MemoryImportStore` in tests, or against anything else.
 */
import type { IsoTime, MergeConflict } from '../model/job';
import type { ExchangeProblem, ExportedBy, JobPayload, RecordConflict } from './format';
import { emptyPayload } from './format';
import { mergePayloads, type MergeCounts, type ReadingClash } from './merge';
import { JobFileReader, readJobFile, type FileContent, type ReadResult } from './parse';
import { VARIANT_SUFFIX } from './schema';

/** The ids a file's records carry, for the store to look up what it already holds. */
export interface PayloadIds {
  jobs: string[];
  readings: string[];
  assets: string[];
  technicians: string[];
}

/** Reads and writes inside one transaction. */
export interface ImportTransaction {
  /**
   * The stored records with these ids: jobs, assets and technicians by id; readings by id and
   * also those whose id is one of these followed by "~" (a merge's renamed copies, merge.ts);
   * the conflicts and record conflicts about these jobs, assets and technicians.
   */
  read(ids: PayloadIds): Promise<JobPayload>;
  /**
   * Adds these records, replacing any stored ones with the same id. `onWritten`, when given, is
   * told now and then how many of the records are written (for progress on large files).
   */
  write(changes: JobPayload, onWritten?: (done: number, total: number) => void): Promise<void>;
}

export interface ImportStore {
  /**
   * Runs `work` as one transaction over all record stores. Resolves with its result once
   * committed; if `work` rejects, nothing it wrote stays and the rejection is passed on.
   */
  transaction<T>(work: (tx: ImportTransaction) => Promise<T>): Promise<T>;
}

/** A file's bytes as they arrive, in order (a browser File's stream, a file on disk). */
export interface ChunkSource {
  /** The file's size in bytes, for progress (0 when not known). */
  size: number;
  chunks(): AsyncIterable<Uint8Array>;
}

export interface ImportFile {
  name: string;
  /** The whole file, or its bytes as they stream in (read a line at a time, never held whole). */
  content: FileContent | ChunkSource;
}

/** Where a long import has got to. */
export interface ImportProgress {
  /** The file being taken in (0 for the first) of how many, and its name. */
  file: number;
  files: number;
  name: string;
  /** "reading": checking the file, `done` of `total` bytes; "saving": writing, `done` of `total` records. */
  stage: 'reading' | 'saving';
  done: number;
  total: number;
}

export type FileImportReport =
  | {
      name: string;
      ok: true;
      exportedAt: IsoTime;
      exportedBy: ExportedBy;
      /** Records in the file. */
      jobs: number;
      readings: number;
      /** What changed in the store. */
      counts: MergeCounts;
      newConflicts: MergeConflict[];
      newRecordConflicts: RecordConflict[];
      readingClashes: ReadingClash[];
    }
  | {
      name: string;
      ok: false;
      /** "file": the file was refused; "store": it was fine, but writing it failed. */
      stage: 'file' | 'store';
      problems: ExchangeProblem[];
      problemCount: number;
    };

export interface ImportOptions {
  /**
   * Dates the stored asset and technician records in the merge (MergeSource.at). "Now" lets
   * what the store holds win over any file exported before now; the losing values are kept as
   * record conflicts either way.
   */
  storeAt: IsoTime;
  /** Name the store's side of a conflict is credited to. Default "this device". */
  storeName?: string;
  /** Called after each file with its report. */
  onFile?: (report: FileImportReport, index: number, total: number) => void;
  /** Called as a file is read and as its records are written (often: throttle what it shows). */
  onProgress?: (progress: ImportProgress) => void;
}

function isChunkSource(content: ImportFile['content']): content is ChunkSource {
  return typeof content === 'object' && !(content instanceof Uint8Array);
}

/** Reads one file to its checked records, reporting the bytes read as they come. */
async function readImportFile(content: ImportFile['content'], name: string, progress: (done: number, total: number) => void): Promise<ReadResult> {
  if (!isChunkSource(content)) {
    const size = typeof content === 'string' ? content.length : content.byteLength;
    progress(0, size);
    const result = await readJobFile(content, name);
    progress(size, size);
    return result;
  }
  const reader = new JobFileReader(name);
  progress(0, content.size);
  for await (const chunk of content.chunks()) {
    reader.push(chunk);
    progress(reader.bytesRead, content.size);
  }
  return reader.finish();
}

function idsOf(payload: JobPayload): PayloadIds {
  return {
    jobs: payload.jobs.map((job) => job.id),
    // A renamed copy "<id>~<hex>" is looked up under its first id too.
    readings: payload.readings.flatMap((reading) => (VARIANT_SUFFIX.test(reading.id) ? [reading.id, reading.id.slice(0, -17)] : [reading.id])),
    assets: payload.assets.map((asset) => asset.id),
    technicians: payload.technicians.map((technician) => technician.id),
  };
}

/**
 * Imports the files one after another, each in its own transaction. Never throws for a bad
 * file or a failed write: every file gets a report saying what came in, or why nothing did.
 */
export async function importJobFiles(files: readonly ImportFile[], store: ImportStore, options: ImportOptions): Promise<FileImportReport[]> {
  const reports: FileImportReport[] = [];
  for (const [index, { name, content }] of files.entries()) {
    let report: FileImportReport;
    const progress = (stage: ImportProgress['stage']) => (done: number, total: number) =>
      options.onProgress?.({ file: index, files: files.length, name, stage, done, total });
    let read: ReadResult;
    try {
      read = await readImportFile(content, name, progress('reading'));
    } catch (error) {
      // The bytes could not be had (a file removed while it was read, a stream that broke).
      const message = `could not be read: ${error instanceof Error ? error.message : String(error)}`;
      read = { ok: false, name, problems: [{ file: name, message }], problemCount: 1 };
    }
    if (!read.ok) {
      report = { name, ok: false, stage: 'file', problems: read.problems, problemCount: read.problemCount };
    } else {
      const file = read.file;
      try {
        const merged = await store.transaction(async (tx) => {
          const stored = await tx.read(idsOf(file.payload));
          // The merge is synchronous, so an IndexedDB transaction stays open across it.
          const result = mergePayloads([{ name, at: file.exportedAt, payload: file.payload }], {
            base: { name: options.storeName ?? 'this device', at: options.storeAt, payload: stored },
          });
          await tx.write(result.changes, progress('saving'));
          return result;
        });
        report = {
          name,
          ok: true,
          exportedAt: file.exportedAt,
          exportedBy: file.exportedBy,
          jobs: file.payload.jobs.length,
          readings: file.payload.readings.length,
          counts: merged.counts,
          newConflicts: merged.newConflicts,
          newRecordConflicts: merged.newRecordConflicts,
          readingClashes: merged.readingClashes,
        };
      } catch (error) {
        const message = `could not be saved, nothing from it was stored: ${error instanceof Error ? error.message : String(error)}`;
        report = { name, ok: false, stage: 'store', problems: [{ file: name, message }], problemCount: 1 };
      }
    }
    reports.push(report);
    options.onFile?.(report, index, files.length);
  }
  return reports;
}

/**
 * An ImportStore in memory: for tests, and for tools that merge without a database.
 * Transactions are all-or-nothing (writes are staged and applied when `work` resolves) and run
 * one at a time.
 */
export class MemoryImportStore implements ImportStore {
  private records: JobPayload;
  private queue: Promise<unknown> = Promise.resolve();

  constructor(initial: JobPayload = emptyPayload()) {
    this.records = copyRecords(initial);
  }

  /** A copy of everything stored. */
  snapshot(): JobPayload {
    return copyRecords(this.records);
  }

  transaction<T>(work: (tx: ImportTransaction) => Promise<T>): Promise<T> {
    const run = this.queue.then(async () => {
      const staged = copyRecords(this.records);
      const tx: ImportTransaction = {
        read: async (ids) => readIds(staged, ids),
        write: async (changes, onWritten) => {
          writeInto(staged, changes);
          const written = Object.values(changes).reduce((sum: number, list: unknown[]) => sum + list.length, 0);
          onWritten?.(written, written);
        },
      };
      const result = await work(tx);
      this.records = staged;
      return result;
    });
    this.queue = run.catch(() => undefined);
    return run;
  }
}

function copyRecords(payload: JobPayload): JobPayload {
  return JSON.parse(JSON.stringify(payload)) as JobPayload;
}

function readIds(records: JobPayload, ids: PayloadIds): JobPayload {
  const jobIds = new Set(ids.jobs);
  const readingIds = new Set(ids.readings);
  const assetIds = new Set(ids.assets);
  const technicianIds = new Set(ids.technicians);
  const isWanted = (id: string) => readingIds.has(id) || (id.includes('~') && readingIds.has(id.slice(0, id.lastIndexOf('~'))));
  return {
    jobs: records.jobs.filter((job) => jobIds.has(job.id)),
    readings: records.readings.filter((reading) => isWanted(reading.id)),
    assets: records.assets.filter((asset) => assetIds.has(asset.id)),
    technicians: records.technicians.filter((technician) => technicianIds.has(technician.id)),
    conflicts: records.conflicts.filter((conflict) => jobIds.has(conflict.jobId)),
    recordConflicts: records.recordConflicts.filter((conflict) =>
      conflict.record === 'asset' ? assetIds.has(conflict.id) : technicianIds.has(conflict.id),
    ),
  };
}

function writeInto(records: JobPayload, changes: JobPayload): void {
  const replace = <T extends { id: string }>(list: T[], incoming: T[]): T[] => {
    const byId = new Map(list.map((record) => [record.id, record] as const));
    for (const record of incoming) byId.set(record.id, record);
    return [...byId.values()];
  };
  records.jobs = replace(records.jobs, changes.jobs);
  records.readings = replace(records.readings, changes.readings);
  records.assets = replace(records.assets, changes.assets);
  records.technicians = replace(records.technicians, changes.technicians);
  records.conflicts = [...records.conflicts, ...changes.conflicts];
  records.recordConflicts = [...records.recordConflicts, ...changes.recordConflicts];
}
