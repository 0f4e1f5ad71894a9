/** Messages between the exchange bridge (src/ui/bridges/exchange-bridge.ts) and the exchange worker. */
import type { FileImportReport, ImportFile } from '../exchange/import';
import type { IsoTime } from '../model/job';
import type { ExportRequest, ExportResult } from './exchange';

export type ExchangeRequest =
  | { id: number; type: 'export'; dbName: string; request: ExportRequest }
  | { id: number; type: 'import'; dbName: string; files: ImportFile[]; storeAt: IsoTime };

export type ExchangeReply =
  | { id: number; ok: true; type: 'export'; result: ExportResult }
  | { id: number; ok: true; type: 'import'; reports: FileImportReport[] }
  /** Sent after each imported file, before the final reply. */
  | { id: number; ok: true; type: 'progress'; done: number; total: number }
  | { id: number; ok: false; message: string };
