import { useEffect, useRef, useState } from 'preact/hooks';
import { deleteDraft, getDraft, putDraft } from '../store/drafts';
import type { Database } from '../store/schema';
import type { Saver } from './saver';

/**
 * Form text kept in the drafts store: read once, then written on every change, so a killed tab
 * or a reload keeps a half-typed value. IndexedDB runs writes to one store in the order they
 * were made, so the last keystroke is the one that stays.
 * @param initial  the form when there is no draft (may depend on the record being edited)
 * @returns the values (null until the draft has been read), a setter, and a way to drop the draft
 */
export function useDraft<T extends Record<string, string>>(
  db: Database,
  saver: Saver,
  key: string,
  initial: () => T,
  what: string,
  /** Keep fields the initial form does not name (forms whose fields vary, e.g. one per reading). */
  keepUnknown = false,
): { values: T | null; change: (patch: Partial<T>) => T; discard: () => Promise<void> } {
  const [values, setValues] = useState<T | null>(null);
  const current = useRef<T | null>(null);
  useEffect(() => {
    let live = true;
    current.current = null;
    setValues(null);
    void getDraft(db, key).then((draft) => {
      if (!live) return;
      const base = initial();
      const loaded = { ...base, ...pickKnown(draft?.fields, base, keepUnknown) } as T;
      current.current = loaded;
      setValues(loaded);
    });
    return () => {
      live = false;
    };
  }, [db, key]);
  return {
    values,
    change(patch) {
      const next = { ...(current.current ?? initial()), ...patch } as T;
      current.current = next;
      setValues(next);
      void saver.save(what, () => putDraft(db, key, next));
      return next;
    },
    async discard() {
      await saver.save(what, () => deleteDraft(db, key));
    },
  };
}

function pickKnown(fields: Record<string, string> | undefined, base: Record<string, string>, keepUnknown: boolean): Record<string, string> {
  const known: Record<string, string> = {};
  if (fields === undefined) return known;
  for (const name of keepUnknown ? Object.keys(fields) : Object.keys(base)) {
    const value = fields[name];
    if (typeof value === 'string') known[name] = value;
  }
  return known;
}
