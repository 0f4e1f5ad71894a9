import { createContext } from 'preact';
import { useContext } from 'preact/hooks';
import type { Technician } from '../model/job';
import type { Database } from '../store/schema';
import type { AppSettings } from '../store/settings';
import type { EngineClient } from './bridges/engine-bridge';
import type { Saver } from './saver';

/** What every screen gets from the app shell. */
export interface AppServices {
  db: Database;
  engine: EngineClient;
  saver: Saver;
  settings: AppSettings;
  /** Saves changed settings and applies them; resolves to false when the write failed. */
  changeSettings(patch: Partial<AppSettings>): Promise<boolean>;
  technicians: Technician[];
  /** Re-reads the technicians after one was added. */
  reloadTechnicians(): Promise<void>;
}

export const AppContext = createContext<AppServices | null>(null);

/** The shell's services; throws outside the shell (a programming error). */
export function useApp(): AppServices {
  const services = useContext(AppContext);
  if (services === null) throw new Error('useApp outside AppContext');
  return services;
}
