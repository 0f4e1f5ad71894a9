/**
 * Export and import over the app's database, runnable in the exchange worker (exchange-worker.ts)
 * or in-process: writing a job file of tens of thousands of jobs, or checking and merging one,
 * takes seconds of CPU that should not hold up the screen.
 */
import { csvChunks } from '../exchange/csv';
import type { ExportedBy } from '../exchange/format';
import { importJobFiles, type ChunkSource, type FileImportReport, type ImportProgress } from '../exchange/import';
import { buildJobFile, selectForExport, type ExportSelection } from '../exchange/write';
import type { IsoTime } from '../model/job';
import { idbImportStore, loadExchangePayload } from '../store/exchange';
import type { Database } from '../store/schema';

export interface ExportRequest {
  selection: ExportSelection;
  json: boolean;
  csv: boolean;
  /** File name without extension. */
  stem: string;
  exportedAt: IsoTime;
  exportedBy: ExportedBy;
}

export interface ExportResult {
  files: { name: string; type: string; blob: Blob }[];
  jobs: number;
  readings: number;
  /** The job file's digest, "" without one. */
  sha256: string;
}

/** The chosen jobs as a job file and/or CSV (no files when nothing matched: `jobs` is 0). */
export async function exportFromStore(db: Database, request: ExportRequest): Promise<ExportResult> {
  const payload = selectForExport(await loadExchangePayload(db), request.selection);
  const result: ExportResult = { files: [], jobs: payload.jobs.length, readings: payload.readings.length, sha256: '' };
  if (payload.jobs.length === 0) return result;
  if (request.json) {
    const built = await buildJobFile(payload, { exportedAt: request.exportedAt, exportedBy: request.exportedBy });
    result.sha256 = built.file.sha256;
    result.files.push({ name: `${request.stem}.json`, type: 'application/json', blob: new Blob(built.parts as BlobPart[], { type: "application/json" }) });
  }
  if (request.csv) result.files.push({ name: `${request.stem}.csv`, type: 'text/csv', blob: new Blob([...csvChunks(payload)], { type: 'text/csv' }) });
  return result;
}

/** A chosen file as it travels to the worker: a File (a Blob) is passed by reference, not copied. */
export interface IncomingFile {
  name: string;
  blob: Blob;
}

/** A Blob's bytes as they stream in; one piece where the runtime has no Blob streams. */
export function blobSource(blob: Blob): ChunkSource {
  return {
    size: blob.size,
    async *chunks() {
      if (typeof blob.stream !== 'function') {
        yield new Uint8Array(await blob.arrayBuffer());
        return;
      }
      const reader = blob.stream().getReader();
      try {
        for (;;) {
          const { done, value } = await reader.read();
          if (done) return;
          yield value;
        }
      } finally {
        reader.releaseLock();
      }
    },
  };
}

/**
 * Imports the files into the store, one transaction each (src/exchange/import.ts), reading each
 * as it streams from the disk. `onProgress` hears where it has got to at most every 100 ms (and
 * at each new file and stage), so a worker can pass it on without flooding the screen.
 */
export function importIntoStore(
  db: Database,
  files: readonly IncomingFile[],
  storeAt: IsoTime,
  onProgress?: (progress: ImportProgress) => void,
): Promise<FileImportReport[]> {
  let last = 0;
  let lastKey = '';
  const throttled = (progress: ImportProgress) => {
    const key = `${progress.file}:${progress.stage}`;
    const now = Date.now();
    if (key === lastKey && now - last < 100 && progress.done < progress.total) return;
    last = now;
    lastKey = key;
    onProgress?.(progress);
  };
  return importJobFiles(
    files.map((file) => ({ name: file.name, content: blobSource(file.blob) })),
    idbImportStore(db),
    { storeAt, ...(onProgress ? { onProgress: throttled } : {}) },
  );
}
