import type { ThemeChoice } from '../store/settings';

/** Mirror of the theme setting read before the first paint (IndexedDB is asynchronous). */
const THEME_KEY = 'ripplewright-theme';

/** Applies a theme to the page and remembers it for the next start. */
export function applyTheme(theme: ThemeChoice): void {
  document.documentElement.dataset.theme = theme;
  try {
    localStorage.setItem(THEME_KEY, theme);
  } catch {
    // Storage refused (private mode): the theme still applies for this visit.
  }
}

/** The theme remembered from the last visit, applied at once so the page does not flash. */
export function applyRememberedTheme(): void {
  let theme: string | null = null;
  try {
    theme = localStorage.getItem(THEME_KEY);
  } catch {
    theme = null;
  }
  document.documentElement.dataset.theme = theme === 'light' || theme === 'dark' || theme === 'sunlight' ? theme : 'system';
}
