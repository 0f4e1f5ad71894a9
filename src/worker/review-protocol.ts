/** Messages between the review bridge (src/ui/bridges/review-bridge.ts) and the review worker. */
import type { ReviewFilter } from '../exchange/review';
import type { ReviewAnswer } from './review';

export type ReviewRequest =
  /** Read every job and asset from the app's database (named, for tests) and build the index. */
  | { id: number; type: 'load'; dbName?: string }
  | { id: number; type: 'query'; filter: ReviewFilter };

export type ReviewReply =
  | { id: number; ok: true; type: 'load'; jobs: number }
  | { id: number; ok: true; type: 'query'; answer: ReviewAnswer }
  | { id: number; ok: false; message: string };
