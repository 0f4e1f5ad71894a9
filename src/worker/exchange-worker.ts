/// <reference lib="webworker" />
/**
 * The exchange worker: writes export files and checks and merges imported ones against
 * IndexedDB, which it opens itself, one request at a time.
 */
import { openStore } from '../store/db';
import { exportFromStore, importIntoStore } from './exchange';
import type { ExchangeReply, ExchangeRequest } from './exchange-protocol';

const scope = self as unknown as DedicatedWorkerGlobalScope;
let queue: Promise<unknown> = Promise.resolve();

async function answer(request: ExchangeRequest): Promise<ExchangeReply> {
  const db = await openStore({ name: request.dbName });
  try {
    if (request.type === 'export') return { id: request.id, ok: true, type: 'export', result: await exportFromStore(db, request.request) };
    const reports = await importIntoStore(db, request.files, request.storeAt, (progress) =>
      scope.postMessage({ id: request.id, ok: true, type: 'progress', progress } satisfies ExchangeReply),
    );
    return { id: request.id, ok: true, type: 'import', reports };
  } finally {
    db.close();
  }
}

scope.addEventListener('message', (event: MessageEvent<ExchangeRequest>) => {
  const request = event.data;
  queue = queue
    .then(() => answer(request))
    .catch((error: unknown): ExchangeReply => ({ id: request.id, ok: false, message: error instanceof Error ? error.message : String(error) }))
    .then((reply) => scope.postMessage(reply));
});
