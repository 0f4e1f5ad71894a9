/**
 * Export and import through the exchange worker (src/worker/exchange-worker.ts), so writing or
 * checking a large job file does not hold up the screen; in-process where there are no workers.
 */
import type { FileImportReport, ImportProgress } from '../../exchange/import';
import type { IsoTime } from '../../model/job';
import type { Database } from '../../store/schema';
import { exportFromStore, importIntoStore, type ExportRequest, type ExportResult, type IncomingFile } from '../../worker/exchange';
import type { ExchangeReply, ExchangeRequest } from '../../worker/exchange-protocol';

export interface ExchangeClient {
  exportFiles(request: ExportRequest): Promise<ExportResult>;
  importFiles(files: IncomingFile[], storeAt: IsoTime, onProgress?: (progress: ImportProgress) => void): Promise<FileImportReport[]>;
}

type Body = ExchangeRequest extends infer R ? (R extends ExchangeRequest ? Omit<R, 'id'> : never) : never;

let shared: Worker | undefined;
let next = 0;
const waiting = new Map<number, { resolve: (reply: ExchangeReply) => void; reject: (error: unknown) => void; progress?: (progress: ImportProgress) => void }>();

function worker(): Worker {
  if (shared) return shared;
  const started = new Worker(new URL('../../worker/exchange-worker.ts', import.meta.url), { type: 'module', name: 'exchange' });
  started.addEventListener('message', (event: MessageEvent<ExchangeReply>) => {
    const reply = event.data;
    const entry = waiting.get(reply.id);
    if (entry === undefined) return;
    if (reply.ok && reply.type === 'progress') return entry.progress?.(reply.progress);
    waiting.delete(reply.id);
    entry.resolve(reply);
  });
  started.addEventListener('error', (event) => {
    for (const entry of waiting.values()) entry.reject(new Error(event.message || 'the exchange worker stopped'));
    waiting.clear();
    started.terminate();
    shared = undefined;
  });
  shared = started;
  return started;
}

async function send(body: Body, progress?: (progress: ImportProgress) => void): Promise<ExchangeReply> {
  const id = ++next;
  const reply = await new Promise<ExchangeReply>((resolve, reject) => {
    waiting.set(id, progress ? { resolve, reject, progress } : { resolve, reject });
    worker().postMessage({ ...body, id } as ExchangeRequest);
  });
  if (!reply.ok) throw new Error(reply.message);
  return reply;
}

/** Through the exchange worker, on the database named like `db`. */
export function workerExchangeClient(db: Database): ExchangeClient {
  return {
    async exportFiles(request) {
      const reply = await send({ type: 'export', dbName: db.name, request });
      if (!reply.ok || reply.type !== 'export') throw new Error('wrong answer from the exchange worker');
      return reply.result;
    },
    async importFiles(files, storeAt, onProgress) {
      const reply = await send({ type: 'import', dbName: db.name, files, storeAt }, onProgress);
      if (!reply.ok || reply.type !== 'import') throw new Error('wrong answer from the exchange worker');
      return reply.reports;
    },
  };
}

/** The same work on this thread (tests, browsers without module workers). */
export function inProcessExchangeClient(db: Database): ExchangeClient {
  return {
    exportFiles: (request) => exportFromStore(db, request),
    importFiles: (files, storeAt, onProgress) => importIntoStore(db, files, storeAt, onProgress),
  };
}

export function defaultExchangeClient(db: Database): ExchangeClient {
  return typeof Worker === 'function' ? workerExchangeClient(db) : inProcessExchangeClient(db);
}
