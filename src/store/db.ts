import { openDB } from 'idb';
import { MIGRATIONS, type Database, type RipplewrightSchema } from './schema';

export const DB_NAME = 'ripplewright';

export interface OpenOptions {
  /** Database name; tests use a fresh one each. Default "ripplewright". */
  name?: string;
  /** Open at this version (tests of earlier versions); default the current one. */
  version?: number;
  /** Called when another tab wants a newer version: this connection is closed for it. */
  onVersionChange?: () => void;
  /** The migration list (tests put a failing one here); default the app's. */
  migrations?: typeof MIGRATIONS;
}

/**
 * Opens the app's database, running every migration from the version on the device to
 * `version` in order inside the one upgrade transaction.
 * @returns the open database
 * @throws the IndexedDB error when the database cannot be opened (private mode without storage,
 *         a failed migration, which leaves the earlier version untouched)
 */
export async function openStore(options: OpenOptions = {}): Promise<Database> {
  const migrations = options.migrations ?? MIGRATIONS;
  const version = options.version ?? migrations.length - 1;
  if (!(version >= 1 && version < migrations.length)) throw new RangeError(`no schema version ${version}`);
  let migrationError: unknown;
  const db = await openDB<RipplewrightSchema>(options.name ?? DB_NAME, version, {
    upgrade(database, oldVersion, newVersion, transaction) {
      const target = newVersion ?? version;
      void (async () => {
        for (let v = oldVersion + 1; v <= target; v++) await migrations[v]!(database, transaction);
      })().catch((error: unknown) => {
        migrationError = error;
        // The open request reports the abort; the transaction's own promise need not.
        transaction.done.catch(() => undefined);
        transaction.abort();
      });
    },
    blocking() {
      // A newer version in another tab waits for us: let it in rather than block its upgrade.
      db.close();
      options.onVersionChange?.();
    },
  }).catch((error: unknown) => {
    throw migrationError ?? error;
  });
  return db;
}
