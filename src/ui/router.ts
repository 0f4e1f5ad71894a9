/**
 * Screens by the address after "#", so every screen works offline from the one cached page and
 * the back button behaves: #/jobs, #/new, #/settings, #/job/<id>/<tab>, #/files (export and
 * import; #/files/<jobId> offers that one job), #/review (the shop review).
 */

export type JobTab = 'supply' | 'test' | 'waveform' | 'finish' | 'summary';
export const JOB_TABS: readonly JobTab[] = ['supply', 'test', 'waveform', 'finish', 'summary'];

export type Route =
  | { screen: 'jobs' }
  | { screen: 'new' }
  | { screen: 'settings' }
  | { screen: 'files'; jobId?: string }
  | { screen: 'review' }
  | { screen: 'job'; jobId: string; tab: JobTab };

/** The route for a location hash; anything not understood is the jobs list. */
export function parseRoute(hash: string): Route {
  const parts = hash.replace(/^#\/?/, '').split('/').filter((part) => part !== '').map(decodeURIComponent);
  const [first, second, third] = parts;
  if (first === 'new') return { screen: 'new' };
  if (first === 'settings') return { screen: 'settings' };
  if (first === 'files') return second === undefined ? { screen: 'files' } : { screen: 'files', jobId: second };
  if (first === 'review') return { screen: 'review' };
  if (first === 'job' && second !== undefined) {
    const tab = (JOB_TABS as readonly string[]).includes(third ?? '') ? (third as JobTab) : 'test';
    return { screen: 'job', jobId: second, tab };
  }
  return { screen: 'jobs' };
}

/** The hash for a route (the inverse of parseRoute). */
export function routeHash(route: Route): string {
  switch (route.screen) {
    case 'jobs':
      return '#/jobs';
    case 'new':
      return '#/new';
    case 'settings':
      return '#/settings';
    case 'files':
      return route.jobId === undefined ? '#/files' : `#/files/${encodeURIComponent(route.jobId)}`;
    case 'review':
      return '#/review';
    case 'job':
      return `#/job/${encodeURIComponent(route.jobId)}/${route.tab}`;
  }
}

/** Goes to a route (adds a history entry, so Back returns). */
export function navigate(route: Route): void {
  const hash = routeHash(route);
  if (location.hash !== hash) location.hash = hash;
}
