/**
 * The app's only contact with its service worker (workbox-window, loaded after the first
 * screen). A new version that has installed waits; the app shows a prompt and activates it
 * only when the user says so, then reloads once the new worker controls the page.
 */

/**
 * Registers the service worker and reports a waiting new version.
 * @param onUpdateReady  called with a function that activates the new version and reloads
 * @returns false when the browser has no service workers (the app still works online)
 */
export async function startServiceWorker(onUpdateReady: (accept: () => void) => void): Promise<boolean> {
  if (!('serviceWorker' in navigator)) return false;
  const { Workbox } = await import('workbox-window');
  const base = import.meta.env.BASE_URL;
  const wb = new Workbox(`${base}sw.js`, { scope: base, type: 'classic' });
  wb.addEventListener('waiting', () => {
    onUpdateReady(() => {
      wb.addEventListener('controlling', () => location.reload());
      wb.messageSkipWaiting();
    });
  });
  // The app itself asks the network for nothing more: the browser checks sw.js for a new version
  // when the app is opened, and that is the only request an installed app leaves to the network.
  await wb.register();
  return true;
}
