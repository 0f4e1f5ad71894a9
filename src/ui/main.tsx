import { render } from 'preact';
import { App } from './App';
import { applyRememberedTheme } from './theme';
import './styles.css';

applyRememberedTheme();
const root = document.getElementById('app');
if (root === null) throw new Error('index.html has no #app element');
// The service worker only exists in a build; `vite dev` runs without it.
const startServiceWorker = import.meta.env.PROD
  ? (onUpdateReady: (accept: () => void) => void) => import('./bridges/sw-bridge').then((m) => m.startServiceWorker(onUpdateReady))
  : undefined;
render(<App startServiceWorker={startServiceWorker} />, root);
