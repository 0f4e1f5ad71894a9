/** Form text not yet a record, saved on every keystroke so a killed tab loses nothing. */
import { nowIso } from './ids';
import type { Database, Draft } from './schema';

export function getDraft(db: Database, key: string): Promise<Draft | undefined> {
  return db.get('drafts', key);
}

/** Replaces the draft under `key`; resolves once written. */
export async function putDraft(db: Database, key: string, fields: Record<string, string>): Promise<void> {
  await db.put('drafts', { key, savedAt: nowIso(), fields });
}

export async function deleteDraft(db: Database, key: string): Promise<void> {
  await db.delete('drafts', key);
}
