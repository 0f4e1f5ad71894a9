/**
 * Runs `work` inside an open transaction and resolves when the transaction has committed.
 * A failure inside `work` (a refused add, a quota error) aborts the transaction and rejects
 * with that error; the transaction's own abort rejection is not left unhandled.
 */
export async function commit<T>(tx: { done: Promise<void>; abort(): void }, work: () => Promise<T>): Promise<T> {
  try {
    const result = await work();
    await tx.done;
    return result;
  } catch (error) {
    tx.done.catch(() => undefined);
    try {
      tx.abort();
    } catch {
      // Already finished or aborted by the failed request itself.
    }
    throw error;
  }
}
