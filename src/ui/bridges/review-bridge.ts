/**
 * The shop review's way to its worker (src/worker/review-worker.ts): the index over every job
 * is built there, so the screen stays responsive with tens of thousands of jobs.
 */
import type { ReviewFilter } from '../../exchange/review';
import type { Database } from '../../store/schema';
import { ReviewWork, type ReviewAnswer } from '../../worker/review';
import type { ReviewReply, ReviewRequest } from '../../worker/review-protocol';

export interface ReviewClient {
  /** Reads the store and builds the index; resolves to the number of jobs. */
  load(): Promise<number>;
  query(filter: ReviewFilter): Promise<ReviewAnswer>;
  close(): void;
}

type Body = ReviewRequest extends infer R ? (R extends ReviewRequest ? Omit<R, 'id'> : never) : never;

/** A client over the review worker, reading the database of `db` (by its name). */
export function workerReviewClient(db: Database): ReviewClient {
  const worker = new Worker(new URL('../../worker/review-worker.ts', import.meta.url), { type: 'module', name: 'review' });
  const waiting = new Map<number, { resolve: (reply: ReviewReply) => void; reject: (error: unknown) => void }>();
  let next = 0;
  worker.addEventListener('message', (event: MessageEvent<ReviewReply>) => {
    const entry = waiting.get(event.data.id);
    waiting.delete(event.data.id);
    entry?.resolve(event.data);
  });
  worker.addEventListener('error', (event) => {
    for (const entry of waiting.values()) entry.reject(new Error(event.message || 'the review worker stopped'));
    waiting.clear();
  });
  const send = async (body: Body): Promise<ReviewReply> => {
    const id = ++next;
    const reply = await new Promise<ReviewReply>((resolve, reject) => {
      waiting.set(id, { resolve, reject });
      worker.postMessage({ ...body, id } as ReviewRequest);
    });
    if (!reply.ok) throw new Error(reply.message);
    return reply;
  };
  return {
    async load() {
      const reply = await send({ type: 'load', dbName: db.name });
      return reply.ok && reply.type === 'load' ? reply.jobs : 0;
    },
    async query(filter) {
      const reply = await send({ type: 'query', filter });
      if (!reply.ok || reply.type !== 'query') throw new Error('wrong answer from the review worker');
      return reply.answer;
    },
    close() {
      worker.terminate();
    },
  };
}

/** The same work on this thread: for tests, and browsers without module workers. */
export function inProcessReviewClient(db: Database): ReviewClient {
  let work: ReviewWork | undefined;
  return {
    async load() {
      const [jobs, assets] = await Promise.all([db.getAll('jobs'), db.getAll('assets')]);
      work = new ReviewWork({ jobs, assets });
      return jobs.length;
    },
    async query(filter) {
      if (work === undefined) throw new Error('the review has not been loaded');
      return work.query(filter);
    },
    close() {},
  };
}

/** The worker where module workers exist, else in-process. */
export function defaultReviewClient(db: Database): ReviewClient {
  return typeof Worker === 'function' ? workerReviewClient(db) : inProcessReviewClient(db);
}
