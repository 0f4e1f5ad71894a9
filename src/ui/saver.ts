/**
 * Every write the screens make goes through one Saver: it counts writes under way, remembers
 * the ones that failed (with a plain message) and runs them again on "Try again", in order.
 * A screen shows a value as saved only once its write has resolved.
 */
import { describeStoreError } from '../store/errors';

export type SaveResult<T> = { ok: true; value: T } | { ok: false; message: string };

export interface SaveStatus {
  /** Writes started and not yet finished. */
  pending: number;
  /** Writes that failed and wait for "Try again", oldest first. */
  failed: { what: string; message: string }[];
  /** When the last write finished (Date.now()), or null before any. */
  savedAt: number | null;
}

type Listener = (status: SaveStatus) => void;

export class Saver {
  private status: SaveStatus = { pending: 0, failed: [], savedAt: null };
  private readonly retries: (() => Promise<unknown>)[] = [];
  private readonly listeners = new Set<Listener>();

  /** Current status (a new object after every change). */
  get current(): SaveStatus {
    return this.status;
  }

  subscribe(listener: Listener): () => void {
    this.listeners.add(listener);
    return () => this.listeners.delete(listener);
  }

  /**
   * Runs one write. On failure the write is kept for `retryFailed` and the message shown.
   * @param what  the thing saved, in words ("DC output reading"), for the failure message
   * @returns the write's value, or the failure's message; never rejects
   */
  async save<T>(what: string, write: () => Promise<T>): Promise<SaveResult<T>> {
    this.set({ pending: this.status.pending + 1 });
    try {
      const value = await write();
      this.set({ pending: this.status.pending - 1, savedAt: Date.now() });
      return { ok: true, value };
    } catch (error) {
      const message = describeStoreError(error);
      this.retries.push(write);
      this.set({ pending: this.status.pending - 1, failed: [...this.status.failed, { what, message }] });
      return { ok: false, message };
    }
  }

  /** Runs the failed writes again, oldest first; those that fail again stay failed. */
  async retryFailed(): Promise<void> {
    const writes = this.retries.splice(0);
    const failed = this.status.failed;
    this.set({ failed: [] });
    for (const [index, write] of writes.entries()) {
      await this.save(failed[index]?.what ?? 'a change', write);
    }
  }

  private set(patch: Partial<SaveStatus>): void {
    this.status = { ...this.status, ...patch };
    for (const listener of this.listeners) listener(this.status);
  }
}
