/// <reference lib="webworker" />
/**
 * The review worker: reads the jobs and assets straight from IndexedDB (so 50 000 jobs never
 * cross the main thread), builds the review index and answers filters, one message at a time.
 */
import { openStore } from '../store/db';
import { ReviewWork } from './review';
import type { ReviewReply, ReviewRequest } from './review-protocol';

const scope = self as unknown as DedicatedWorkerGlobalScope;
let work: ReviewWork | undefined;
let queue: Promise<unknown> = Promise.resolve();

async function answer(request: ReviewRequest): Promise<ReviewReply> {
  if (request.type === 'load') {
    const db = await openStore(request.dbName === undefined ? {} : { name: request.dbName });
    try {
      const [jobs, assets] = await Promise.all([db.getAll('jobs'), db.getAll('assets')]);
      work = new ReviewWork({ jobs, assets });
      return { id: request.id, ok: true, type: 'load', jobs: jobs.length };
    } finally {
      db.close();
    }
  }
  if (work === undefined) throw new Error('the review has not been loaded');
  return { id: request.id, ok: true, type: 'query', answer: work.query(request.filter) };
}

scope.addEventListener('message', (event: MessageEvent<ReviewRequest>) => {
  const request = event.data;
  queue = queue
    .then(() => answer(request))
    .catch((error: unknown): ReviewReply => ({ id: request.id, ok: false, message: error instanceof Error ? error.message : String(error) }))
    .then((reply) => scope.postMessage(reply));
});
