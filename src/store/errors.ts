/**
 * Storage failures in words a technician can act on. Every write in the app is awaited and a
 * failure shown with one of these; what was typed stays on screen to try again.
 */

/** A plain sentence for a failed read or write. */
export function describeStoreError(error: unknown): string {
  const name = error instanceof DOMException || error instanceof Error ? error.name : '';
  switch (name) {
    case 'QuotaExceededError':
      return 'The phone’s storage for this app is full. Free some space (old photos, other apps’ data), then try again.';
    case 'InvalidStateError':
    case 'TransactionInactiveError':
      return 'The database was closed, perhaps by an update in another tab. Reload the app to carry on.';
    case 'VersionError':
      return 'A newer version of the app has already changed the stored data. Reload to get that version.';
    case 'UnknownError':
      return 'The browser could not write to its storage (it may be in private mode or low on space).';
    default:
      return `Saving failed: ${error instanceof Error ? error.message : String(error)}`;
  }
}

/**
 * Asks the browser to keep this app's storage when space runs low (StorageManager.persist).
 * @returns true when storage is persistent, false when refused or not supported; never throws
 */
export async function requestPersistentStorage(storage: StorageManager | undefined = globalThis.navigator?.storage): Promise<boolean> {
  try {
    if (storage?.persisted && (await storage.persisted())) return true;
    return (await storage?.persist?.()) ?? false;
  } catch {
    return false;
  }
}
