/** The app's settings: one record under the key "app", merged over the defaults on read. */
import type { MainsRegion, MeterSettings } from '../engine/diagnosis/types';
import type { Database } from './schema';
import { commit } from './transaction';

export type ThemeChoice = 'system' | 'light' | 'dark' | 'sunlight';

export interface UnitSettings {
  /** How capacitance is shown and typed by default. */
  capacitance: 'µF' | 'nF';
  /** Decimal mark used when showing numbers (both are always accepted when typing). */
  decimal: 'point' | 'comma';
}

export interface AppSettings {
  /** The technician using this device (a Technician id). */
  technicianId?: string;
  meter: MeterSettings;
  /** Mains region for new jobs. */
  region: Exclude<MainsRegion, 'custom'>;
  units: UnitSettings;
  theme: ThemeChoice;
}

/**
 * Defaults: an AC-coupled true-RMS handheld of 6000 counts with DC ±(0.5 % + 2) and AC ±(1 % + 3)
 * (DOMAIN.md §5, common practice); 230 V 50 Hz mains; µF; decimal point; the system's theme.
 */
export const DEFAULT_SETTINGS: AppSettings = {
  meter: { kind: 'true-rms-ac', dc: { percent: 0.5, counts: 2 }, ac: { percent: 1, counts: 3 }, displayCounts: 6000 },
  region: 'en-230',
  units: { capacitance: 'µF', decimal: 'point' },
  theme: 'system',
};

const KEY = 'app';

/** The stored settings over the defaults (a group missing from the record takes its default). */
export async function getSettings(db: Database): Promise<AppSettings> {
  const stored = (await db.get('settings', KEY)) as Partial<AppSettings> | undefined;
  return mergeSettings(stored);
}

export function mergeSettings(stored: Partial<AppSettings> | undefined): AppSettings {
  return {
    ...DEFAULT_SETTINGS,
    ...stored,
    meter: { ...DEFAULT_SETTINGS.meter, ...stored?.meter },
    units: { ...DEFAULT_SETTINGS.units, ...stored?.units },
  };
}

/**
 * Changes some settings in one read-modify-write transaction.
 * @returns the settings as stored
 */
export async function updateSettings(db: Database, patch: Partial<AppSettings>): Promise<AppSettings> {
  const tx = db.transaction('settings', 'readwrite');
  return commit(tx, async () => {
    const current = mergeSettings((await tx.store.get(KEY)) as Partial<AppSettings> | undefined);
    const next: AppSettings = { ...current, ...patch };
    await tx.store.put(next, KEY);
    return next;
  });
}
