/** Launching Debian's Chromium on the served app, and the waits and screenshots the tests share. */
import { mkdirSync, mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { chromium, type BrowserContext, type Page } from 'playwright-core';
import { inject } from 'vitest';
import { CHROMIUM_ARGS } from './served-build';

export const CHROMIUM = inject('chromium');
export const BASE_URL = inject('baseUrl');
export const DIST_DIR = inject('distDir');
export const SKIP_REASON = CHROMIUM === '' ? 'Chromium not installed (apt-get install chromium)' : '';

const SCREENS = fileURLToPath(new URL('../../test-output/screens/', import.meta.url));

/** A phone: 390 × 844 CSS px, as in the brief. */
export const PHONE = { width: 390, height: 844 };

export interface App {
  context: BrowserContext;
  page: Page;
  close(): Promise<void>;
}

/** A fresh browser profile (its own IndexedDB and service worker) on the app. */
export async function launchApp(path = ''): Promise<App> {
  const profile = mkdtempSync(join(tmpdir(), 'ripplewright-e2e-'));
  const context = await chromium.launchPersistentContext(profile, {
    executablePath: CHROMIUM,
    headless: true,
    viewport: PHONE,
    args: CHROMIUM_ARGS,
  });
  const page = context.pages()[0] ?? (await context.newPage());
  const errors: string[] = [];
  page.on('pageerror', (error) => errors.push(error.message));
  await page.goto(BASE_URL + path);
  return {
    context,
    page,
    async close() {
      await context.close();
      rmSync(profile, { recursive: true, force: true });
      if (errors.length > 0) throw new Error(`errors in the page: ${errors.join('; ')}`);
    },
  };
}

/** Waits until a service worker is activated and controls the page (so it works offline). */
export async function waitForServiceWorker(page: Page): Promise<void> {
  // A synchronous check: waitForFunction takes a returned promise itself as truthy.
  await page.waitForFunction(() => navigator.serviceWorker.controller?.state === 'activated', null, { timeout: 30_000, polling: 100 });
}

/** The jobs screen has read the store. */
export async function waitForJobs(page: Page): Promise<void> {
  await page.getByRole('heading', { name: 'Jobs', level: 1 }).waitFor();
  await page.waitForFunction(() => document.querySelector('.loading') === null);
}

/**
 * Saves a full-page PNG of the screen as test-output/screens/<name>.png. The bottom bar and the
 * job tabs are laid out in the flow for the picture, so they do not float over the middle of a
 * tall page.
 */
export async function screenshot(page: Page, name: string): Promise<void> {
  mkdirSync(SCREENS, { recursive: true });
  const style = await page.addStyleTag({ content: '.app-nav, .job-tabs { position: static !important; }' });
  try {
    await page.screenshot({ path: join(SCREENS, `${name}.png`), fullPage: true, animations: 'disabled' });
  } finally {
    await style.evaluate((element) => (element as Element).remove());
  }
}

/** Waits until every write has finished (the header shows no "Saving…"). */
export async function waitForSaved(page: Page): Promise<void> {
  await page.waitForFunction(() => {
    const state = document.querySelector('[data-save-state]')?.getAttribute('data-save-state');
    return state === 'saved' || state === 'idle';
  });
}

/** Loads the demo shop from the empty jobs screen. */
export async function loadDemo(page: Page): Promise<void> {
  await page.getByRole('button', { name: 'Try with demo data' }).click();
  await page.waitForFunction(() => document.querySelectorAll('.job-card').length >= 6, null, { timeout: 60_000 });
  await waitForSaved(page);
}
