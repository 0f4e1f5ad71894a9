/** Messages between the exchange bridge (src/ui/bridges/exchange-bridge.ts) and the exchange worker. */
import type { FileImportReport, ImportProgress } from '../exchange/import';
import type { IsoTime } from '../model/job';
import type { ExportRequest, ExportResult, IncomingFile } from './exchange';

export type ExchangeRequest =
  | { id: number; type: 'export'; dbName: string; request: ExportRequest }
  | { id: number; type: 'import'; dbName: string; files: IncomingFile[]; storeAt: IsoTime };

export type ExchangeReply =
  | { id: number; ok: true; type: 'export'; result: ExportResult }
  | { id: number; ok: true; type: 'import'; reports: FileImportReport[] }
  /** Sent while files are read and written, before the final reply. */
  | { id: number; ok: true; type: 'progress'; progress: ImportProgress }
  | { id: number; ok: false; message: string };
