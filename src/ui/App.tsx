import { useEffect, useMemo, useState } from 'preact/hooks';
import type { Technician } from '../model/job';
import { openStore } from '../store/db';
import { requestPersistentStorage } from '../store/errors';
import type { Database } from '../store/schema';
import { getSettings, updateSettings, type AppSettings } from '../store/settings';
import { listTechnicians } from '../store/assets';
import { AppContext, type AppServices } from './app-context';
import { engine as sharedEngine, type EngineClient } from './bridges/engine-bridge';
import { Lazy } from './components/Lazy';
import { SaveFailures, SaveIndicator } from './components/SaveIndicator';
import { UpdatePrompt } from './components/UpdatePrompt';
import { parseRoute, type Route } from './router';
import { Saver } from './saver';
import { JobsScreen } from './screens/Jobs/JobsScreen';
import type { ReviewScreenProps } from './screens/Review/ReviewScreen';
import { applyTheme } from './theme';

// Screens not needed at start load on first use, each its own chunk.
const loadNewJob = () => import('./screens/NewJob/NewJobScreen').then((m) => m.NewJobScreen);
const loadJob = () => import('./screens/Job/JobScreen').then((m) => m.JobScreen);
const loadSettings = () => import('./screens/Settings/SettingsScreen').then((m) => m.SettingsScreen);
const loadFiles = () => import('./screens/Files/FilesScreen').then((m) => m.FilesScreen);
const loadReview = () => import('./screens/Review/ReviewScreen').then((m) => m.ReviewScreen);

export interface AppProps {
  /** Opens the database (tests pass one on fake-indexeddb). Must be a stable function: the store opens once per function. */
  open?: () => Promise<Database>;
  engine?: EngineClient;
  /** Registers the service worker and reports updates (absent in tests and in `vite dev`). */
  startServiceWorker?: (onUpdateReady: (accept: () => void) => void) => Promise<unknown>;
}

type Opening =
  | { state: 'opening' }
  | { state: 'failed'; message: string }
  | { state: 'open'; db: Database; settings: AppSettings; technicians: Technician[] };

/** The app shell: opens the store, routes between screens, shows save status and updates. */
const openAppStore = () => openStore();

export function App({ open = openAppStore, engine = sharedEngine(), startServiceWorker }: AppProps) {
  const [route, setRoute] = useState<Route>(() => parseRoute(location.hash));
  const [opening, setOpening] = useState<Opening>({ state: 'opening' });
  const [update, setUpdate] = useState<{ accept: () => void; hidden: boolean } | null>(null);
  const saver = useMemo(() => new Saver(), []);

  useEffect(() => {
    const onHash = () => setRoute(parseRoute(location.hash));
    addEventListener('hashchange', onHash);
    return () => removeEventListener('hashchange', onHash);
  }, []);

  useEffect(() => {
    let live = true;
    (async () => {
      const db = await open();
      const [settings, technicians] = await Promise.all([getSettings(db), listTechnicians(db)]);
      if (!live) return db.close();
      applyTheme(settings.theme);
      setOpening({ state: 'open', db, settings, technicians });
      void requestPersistentStorage();
    })().catch((error: unknown) => {
      if (live) {
        setOpening({
          state: 'failed',
          message: `This browser will not let the app keep its records (${error instanceof Error ? error.message : String(error)}). ` +
            'Private browsing or full storage can cause this.',
        });
      }
    });
    return () => {
      live = false;
    };
  }, [open]);

  useEffect(() => {
    if (opening.state !== 'open' || startServiceWorker === undefined) return;
    // After the first screen: its code and the worker's are not part of what the first screen waits for.
    const start = () => void startServiceWorker((accept) => setUpdate({ accept, hidden: false })).catch(() => undefined);
    const idle = () => (typeof requestIdleCallback === 'function' ? requestIdleCallback(start, { timeout: 2000 }) : setTimeout(start, 200));
    if (document.readyState === 'complete') idle();
    else addEventListener('load', idle, { once: true });
  }, [opening.state === 'open', startServiceWorker]);

  const services = useMemo<AppServices | null>(() => {
    if (opening.state !== 'open') return null;
    return {
      db: opening.db,
      engine,
      saver,
      settings: opening.settings,
      technicians: opening.technicians,
      async changeSettings(patch) {
        const result = await saver.save('the settings', () => updateSettings(opening.db, patch));
        if (!result.ok) return false;
        applyTheme(result.value.theme);
        setOpening((previous) => (previous.state === 'open' ? { ...previous, settings: result.value } : previous));
        return true;
      },
      async reloadTechnicians() {
        const technicians = await listTechnicians(opening.db);
        setOpening((previous) => (previous.state === 'open' ? { ...previous, technicians } : previous));
      },
    };
  }, [opening, engine, saver]);

  return (
    <div class="app">
      <a class="skip-link" href="#main">Skip to content</a>
      <header class="app-header">
        <a class="app-name" href="#/jobs">Ripplewright</a>
        <SaveIndicator saver={saver} />
        {update !== null && update.hidden ? (
          <button type="button" class="link-button" onClick={update.accept}>
            Update ready
          </button>
        ) : null}
      </header>
      {update !== null && !update.hidden ? (
        <UpdatePrompt jobOpen={route.screen === 'job'} onAccept={update.accept} onLater={() => setUpdate({ ...update, hidden: true })} />
      ) : null}
      <SaveFailures saver={saver} />
      <main id="main">
        {services === null ? (
          opening.state === 'failed' ? (
            <p class="notice problem" role="alert">{opening.message}</p>
          ) : (
            <p class="loading" role="status">Opening your jobs…</p>
          )
        ) : (
          <AppContext.Provider value={services}>
            <Screen route={route} />
          </AppContext.Provider>
        )}
      </main>
      <nav class="app-nav" aria-label="Main">
        <a href="#/jobs" aria-current={route.screen === 'jobs' ? 'page' : undefined}>Jobs</a>
        <a href="#/new" aria-current={route.screen === 'new' ? 'page' : undefined}>New job</a>
        <a href="#/review" aria-current={route.screen === 'review' ? 'page' : undefined}>Review</a>
        <a href="#/files" aria-current={route.screen === 'files' ? 'page' : undefined}>Files</a>
        <a href="#/settings" aria-current={route.screen === 'settings' ? 'page' : undefined}>Settings</a>
      </nav>
    </div>
  );
}

function Screen({ route }: { route: Route }) {
  switch (route.screen) {
    case 'jobs':
      return <JobsScreen />;
    case 'new':
      return <Lazy key="new" load={loadNewJob} props={{}} what="new-job screen" />;
    case 'settings':
      return <Lazy key="settings" load={loadSettings} props={{}} what="settings" />;
    case 'files':
      return <Lazy key="files" load={loadFiles} props={route.jobId === undefined ? {} : { jobId: route.jobId }} what="job files screen" />;
    case 'review':
      return <Lazy<ReviewScreenProps> key="review" load={loadReview} props={{}} what="shop review" />;
    case 'job':
      return <Lazy key="job" load={loadJob} props={{ jobId: route.jobId, tab: route.tab }} what="job" />;
  }
}
