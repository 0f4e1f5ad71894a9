/** The app's local store: IndexedDB through idb, one module per record kind. */
export { openStore, DB_NAME, type OpenOptions } from './db';
export { DB_VERSION, type Database, type Draft, type StoredReading } from './schema';
export * from './jobs';
export * from './readings';
export * from './assets';
export * from './drafts';
export * from './settings';
export { describeStoreError, requestPersistentStorage } from './errors';
export { newId, nowIso } from './ids';
export { idbImportStore, loadExchangePayload, toFileReading } from './exchange';
