/**
 * The app's two budgets, measured on a production build in Debian's Chromium:
 * - JavaScript fetched before the first screen is usable, gzipped (budget 40 KB): every script
 *   response up to the moment the jobs screen has read the store (FIRST_SCREEN_MARK), each body
 *   gzipped with zlib's default level as a server would send it;
 * - time to a usable first screen with no network after the first visit (budget 1 s): from
 *   navigation start to FIRST_SCREEN_MARK on offline reloads, median and worst of several.
 * - a large job file taken in through the Files screen (the exchange worker reads it as it
 *   streams from disk, then writes it to IndexedDB): time to the import report, and main-thread
 *   tasks over 50 ms meanwhile; then the shop review of those jobs: time to its job table.
 * Skipped with a note when Chromium is missing. Flags: --skip-app, --app-import-jobs=N (5000).
 */
import { existsSync, mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { gzipSync } from 'node:zlib';
import { generateDemo } from '../src/exchange/demo';
import { buildJobFile, joinParts } from '../src/exchange/write';
import { FIRST_SCREEN_MARK } from '../src/ui/marks';
import { buildProduction, CHROMIUM_ARGS, startPreview } from '../test/e2e/served-build';
import { median, type BenchSection } from './report';

// npm run bench runs from the repository root (and bundles this file elsewhere first).
const CHROMIUM = process.env.RIPPLEWRIGHT_CHROMIUM ?? '/usr/bin/chromium';
const BUDGET_GZIP_BYTES = 40 * 1024;
const BUDGET_OFFLINE_MS = 1000;
const OFFLINE_LOADS = 7;

export interface AppBudgetSummary {
  firstScreenJsGzipKb: number;
  firstScreenJsFiles: { file: string; gzipBytes: number }[];
  offlineFirstScreenMedianMs: number;
  offlineFirstScreenMaxMs: number;
  /** Main-thread tasks over 50 ms while the demo is made and a job is tested (count, longest ms). */
  longTasks: { count: number; longestMs: number };
  /** A large job file taken in through the Files screen, then reviewed. */
  bigImport: {
    jobs: number;
    readings: number;
    fileMegabytes: number;
    importSeconds: number;
    /** Until the records were checked and merged with the store and the writing began. */
    checkedSeconds: number;
    importLongTasks: { count: number; longestMs: number };
    reviewSeconds: number;
  };
  budgets: { firstScreenJsGzipKb: number; offlineFirstScreenMs: number };
  withinBudget: boolean;
}


/** Main-thread tasks over 50 ms from now on, kept on the page (Long Tasks API). */
async function watchLongTasks(page: import('playwright-core').Page): Promise<void> {
  await page.evaluate(() => {
    const w = window as unknown as { longTasks: number[] };
    w.longTasks = [];
    new PerformanceObserver((list) => {
      for (const entry of list.getEntries()) w.longTasks.push(entry.duration);
    }).observe({ type: 'longtask' });
  });
}

async function measure(importJobs: number): Promise<AppBudgetSummary> {
  const { chromium } = await import('playwright-core');
  const out = mkdtempSync(join(tmpdir(), 'ripplewright-bench-dist-'));
  const profile = mkdtempSync(join(tmpdir(), 'ripplewright-bench-profile-'));
  await buildProduction(out, 'error');
  const { child: server, url } = await startPreview(out, 'ignore');
  // The server must not outlive the bench, however it ends.
  const stopServer = () => server.exitCode === null && server.kill('SIGTERM');
  process.once('exit', stopServer);
  const context = await (async () => {
    for (let i = 0; i < 100; i++) {
      try {
        if ((await fetch(url)).ok) break;
      } catch {
        await new Promise((resolve) => setTimeout(resolve, 100));
      }
    }
    return chromium.launchPersistentContext(profile, {
      executablePath: CHROMIUM,
      headless: true,
      viewport: { width: 390, height: 844 },
      args: CHROMIUM_ARGS,
    });
  })().catch((error: unknown) => {
    stopServer();
    throw error;
  });
  try {
    const page = context.pages()[0] ?? (await context.newPage());
    // First visit: every script fetched until the first screen is usable.
    const scripts: { url: string; at: number; body: Promise<Buffer> }[] = [];
    const start = Date.now();
    const onResponse = (response: import('playwright-core').Response) => {
      // A body is readable only until the page navigates; the later ones are not counted anyway.
      if (response.request().resourceType() === 'script') scripts.push({ url: response.url(), at: Date.now() - start, body: response.body().catch(() => Buffer.alloc(0)) });
    };
    page.on('response', onResponse);
    await page.goto(url);
    await page.waitForFunction((mark) => performance.getEntriesByName(mark).length > 0, FIRST_SCREEN_MARK);
    const usableAt = Date.now() - start;
    page.off('response', onResponse);
    const before = scripts.filter((s) => s.at <= usableAt);
    const files = await Promise.all(before.map(async (s) => ({ file: new URL(s.url).pathname, gzipBytes: gzipSync(await s.body).length })));
    const gzipBytes = files.reduce((sum, f) => sum + f.gzipBytes, 0);

    // Installed, with the demo shop's jobs in the store: then offline reloads, timed by the page's own clock.
    await page.waitForFunction(() => navigator.serviceWorker.controller?.state === 'activated', null, { timeout: 30_000, polling: 100 });
    // Main-thread tasks over 50 ms while the demo is made and a job opens on its guided test
    // (the engine runs in the worker, so there should be none): Long Tasks API.
    await watchLongTasks(page);
    await page.getByRole('button', { name: 'Try with demo data' }).click();
    await page.waitForFunction(() => document.querySelectorAll('.job-card').length >= 6, null, { timeout: 60_000 });
    await page.locator('.job-card', { hasText: 'Penwhistle Bakery' }).click();
    await page.getByRole('heading', { name: 'Safety first' }).waitFor();
    for (const box of await page.locator('.safety-check input[type=checkbox]').all()) await box.check();
    await page.getByRole('button', { name: 'Start the readings' }).click();
    await page.locator('.step-card .reading-entry input').first().fill('4,9');
    await page.locator('.step-card .reading-entry input').first().press('Enter');
    await page.locator('.last-entered').waitFor();
    await page.locator('.job-tabs').getByRole('link', { name: 'Waveform' }).click();
    await page.locator('.chart-box canvas').waitFor();
    const longTasks = await page.evaluate(() => (window as unknown as { longTasks: number[] }).longTasks);
    await page.goto(url);
    await context.setOffline(true);
    const times: number[] = [];
    for (let i = 0; i < OFFLINE_LOADS; i++) {
      await page.reload();
      const at = await page.waitForFunction((mark) => performance.getEntriesByName(mark)[0]?.startTime, FIRST_SCREEN_MARK);
      times.push((await at.jsonValue()) as number);
    }
    // The first offline load warms the browser's code cache like any later visit would: report all.
    const medianMs = median(times);
    const maxMs = Math.max(...times);
    await context.setOffline(false);

    // A large file from the shop's other technicians, taken in through the Files screen.
    const shop = generateDemo({ jobs: importJobs, seed: 77 });
    const file = join(out, 'other-technicians.json');
    const bytes = joinParts((await buildJobFile(shop, { exportedAt: '2026-11-27T17:00:00.000Z' })).parts);
    writeFileSync(file, bytes);
    await page.goto(`${url}#/files`);
    await page.getByRole('heading', { name: 'Job files', level: 1 }).waitFor();
    await watchLongTasks(page);
    const importStart = Date.now();
    await page.getByLabel('Choose job files').setInputFiles(file);
    // The progress line says when the checking and merging are done and the writing begins.
    await page.locator('.import-progress [role=status]').getByText(/^Saving /).waitFor({ timeout: 30 * 60_000 });
    const checkedSeconds = (Date.now() - importStart) / 1000;
    await page.getByRole('heading', { name: '1 file taken in' }).waitFor({ timeout: 30 * 60_000 });
    const importSeconds = (Date.now() - importStart) / 1000;
    const importLongTasks = await page.evaluate(() => (window as unknown as { longTasks: number[] }).longTasks);
    const reviewStart = Date.now();
    await page.locator('.app-nav').getByRole('link', { name: 'Review' }).click();
    await page.locator('.review-table tbody tr').first().waitFor({ timeout: 10 * 60_000 });
    const reviewSeconds = (Date.now() - reviewStart) / 1000;
    return {
      firstScreenJsGzipKb: Number((gzipBytes / 1024).toFixed(1)),
      firstScreenJsFiles: files,
      offlineFirstScreenMedianMs: Math.round(medianMs),
      offlineFirstScreenMaxMs: Math.round(maxMs),
      longTasks: { count: longTasks.length, longestMs: Math.round(Math.max(0, ...longTasks)) },
      bigImport: {
        jobs: shop.jobs.length,
        readings: shop.readings.length,
        fileMegabytes: Number((bytes.byteLength / 1e6).toFixed(1)),
        importSeconds: Number(importSeconds.toFixed(1)),
        checkedSeconds: Number(checkedSeconds.toFixed(1)),
        importLongTasks: { count: importLongTasks.length, longestMs: Math.round(Math.max(0, ...importLongTasks)) },
        reviewSeconds: Number(reviewSeconds.toFixed(2)),
      },
      budgets: { firstScreenJsGzipKb: BUDGET_GZIP_BYTES / 1024, offlineFirstScreenMs: BUDGET_OFFLINE_MS },
      withinBudget: gzipBytes <= BUDGET_GZIP_BYTES && maxMs <= BUDGET_OFFLINE_MS,
    };
  } finally {
    await context.close();
    stopServer();
    rmSync(profile, { recursive: true, force: true });
    rmSync(out, { recursive: true, force: true });
  }
}

export const appBudgetSection: BenchSection = {
  key: 'appBudget',
  title: 'App budgets: first-screen JavaScript and offline start (production build, Chromium)',
  async run(context) {
    if (context.flags.has('skip-app')) return { notes: ['skipped (--skip-app)'], json: { skipped: '--skip-app' } };
    if (!existsSync(CHROMIUM)) return { notes: [`skipped: no Chromium at ${CHROMIUM} (apt-get install chromium)`], json: { skipped: 'no chromium' } };
    const importJobs = Number(context.flags.get('app-import-jobs') ?? 5000);
    const s = await measure(Number.isInteger(importJobs) && importJobs > 0 ? importJobs : 5000);
    return {
      table: {
        columns: ['measure', 'figure', 'budget'],
        rows: [
          ['JavaScript fetched for the first screen, gzip', `${s.firstScreenJsGzipKb} KB`, `≤ ${s.budgets.firstScreenJsGzipKb} KB`],
          ['first screen usable offline, median', `${s.offlineFirstScreenMedianMs} ms`, `≤ ${s.budgets.offlineFirstScreenMs} ms`],
          ['first screen usable offline, worst', `${s.offlineFirstScreenMaxMs} ms`, `≤ ${s.budgets.offlineFirstScreenMs} ms`],
          ['main-thread tasks over 50 ms (demo, guided test, waveform)', `${s.longTasks.count}, longest ${s.longTasks.longestMs} ms`, 'none'],
          [
            `take in a job file of ${s.bigImport.jobs} jobs / ${s.bigImport.readings} readings (${s.bigImport.fileMegabytes} MB) through the Files screen, to the report`,
            `${s.bigImport.importSeconds} s (read, checked and merged in ${s.bigImport.checkedSeconds} s, then written)`,
            '—',
          ],
          ['main-thread tasks over 50 ms during that import', `${s.bigImport.importLongTasks.count}, longest ${s.bigImport.importLongTasks.longestMs} ms`, 'none'],
          [`shop review of those jobs, to its job table`, `${s.bigImport.reviewSeconds} s`, '—'],
        ],
      },
      notes: [
        `first-screen scripts: ${s.firstScreenJsFiles.map((f) => `${f.file} ${(f.gzipBytes / 1024).toFixed(1)} KB`).join(', ')}`,
        `offline loads: ${OFFLINE_LOADS}, from navigation start to the jobs screen showing the demo shop's stored jobs; ${s.withinBudget ? 'within budget' : 'OVER BUDGET'}`,
      ],
      json: s,
    };
  },
};
