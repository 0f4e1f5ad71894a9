/**
 * Export and import over the app's database, runnable in the exchange worker (exchange-worker.ts)
 * or in-process: writing a job file of tens of thousands of jobs, or checking and merging one,
 * takes seconds of CPU that should not hold up the screen.
 */
import { csvRecords } from '../exchange/csv';
import type { ExportedBy } from '../exchange/format';
import { importJobFiles, type FileImportReport, type ImportFile } from '../exchange/import';
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
    result.files.push({ name: `${request.stem}.json`, type: 'application/json', blob: new Blob([built.text], { type: 'application/json' }) });
  }
  if (request.csv) result.files.push({ name: `${request.stem}.csv`, type: 'text/csv', blob: new Blob([...csvRecords(payload)], { type: 'text/csv' }) });
  return result;
}

/** Imports the files into the store, one transaction each (src/exchange/import.ts). */
export function importIntoStore(
  db: Database,
  files: readonly ImportFile[],
  storeAt: IsoTime,
  onFile?: (done: number, total: number) => void,
): Promise<FileImportReport[]> {
  return importJobFiles(files, idbImportStore(db), { storeAt, ...(onFile ? { onFile: (_report, index, total) => onFile(index + 1, total) } : {}) });
}
