import AxeBuilder from '@axe-core/playwright';
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import type { Page } from 'playwright-core';
import { describe, expect, it } from 'vitest';
import { generateDemo } from '../../src/exchange/demo';
import { buildJobFile, joinParts } from '../../src/exchange/write';
import { launchApp, loadDemo, screenshot, SKIP_REASON, waitForJobs, waitForSaved } from './browser';

const TAGS = ['wcag2a', 'wcag2aa', 'wcag21a', 'wcag21aa', 'wcag22aa', 'best-practice'];

async function axeViolations(page: Page): Promise<string[]> {
  const result = await new AxeBuilder({ page }).withTags(TAGS).analyze();
  expect(result.passes.length).toBeGreaterThan(10);
  return result.violations.map((v) => `${v.id}: ${v.help} (${v.nodes.map((n) => n.target.join(' ')).slice(0, 3).join(', ')})`);
}

/** Pixels drawn on each chart canvas (alpha above zero): a chart that drew nothing counts 0. */
function drawnPixels(page: Page): Promise<number[]> {
  return page.evaluate(() =>
    [...document.querySelectorAll<HTMLCanvasElement>('.review-chart canvas')].map((canvas) => {
      const context = canvas.getContext('2d');
      if (context === null || canvas.width === 0 || canvas.height === 0) return 0;
      const { data } = context.getImageData(0, 0, canvas.width, canvas.height);
      let drawn = 0;
      for (let i = 3; i < data.length; i += 4) if (data[i]! > 0) drawn += 1;
      return drawn;
    }),
  );
}

describe.skipIf(SKIP_REASON !== '')(`job files between two devices${SKIP_REASON ? ` (skipped: ${SKIP_REASON})` : ''}`, () => {
  it('exports the demo shop from one profile, imports it into another, and reviews it with charts', async () => {
    const scratch = mkdtempSync(join(tmpdir(), 'ripplewright-files-'));
    const sender = await launchApp();
    let exported: string;
    let jobCount: number;
    try {
      const { page } = sender;
      await waitForJobs(page);
      await loadDemo(page);
      jobCount = await page.locator('.job-card').count();
      await page.locator('.app-nav').getByRole('link', { name: 'Files' }).click();
      await page.getByRole('heading', { name: 'Job files', level: 1 }).waitFor();
      // Linux Chromium cannot share files, so the export is a download.
      const download = page.waitForEvent('download');
      await page.getByRole('button', { name: 'Send or save' }).click();
      exported = join(scratch, (await download).suggestedFilename());
      await (await download).saveAs(exported);
      await page.getByText(/^Downloaded ripplewright-jobs-.*\.json/).waitFor();
    } finally {
      await sender.close();
    }
    expect(exported).toMatch(/ripplewright-jobs-\d{4}-\d\d-\d\d\.json$/);
    const broken = join(scratch, 'damaged.json');
    writeFileSync(broken, '{"format":"ripplewright-jobs","schemaVersion":1}');

    const receiver = await launchApp();
    try {
      const { page } = receiver;
      await waitForJobs(page);
      await page.locator('.app-nav').getByRole('link', { name: 'Files' }).click();
      await page.getByLabel('Choose job files').setInputFiles([broken, exported]);
      await page.getByRole('heading', { name: '1 file taken in, 1 file left out' }).waitFor();
      await expect(page.locator('.report-refused').textContent()).resolves.toMatch(/damaged\.json: .*payload/);
      await expect(page.locator('.report-ok').textContent()).resolves.toMatch(new RegExp(`${jobCount} new jobs`));
      await waitForSaved(page);
      await screenshot(page, 'import-report');
      expect(await axeViolations(page), 'axe on the import report').toEqual([]);

      // The same file again changes nothing.
      await page.getByLabel('Choose job files').setInputFiles([exported]);
      await page.getByText('Nothing new: everything in it was already here.').waitFor();

      await page.locator('.app-nav').getByRole('link', { name: 'Review' }).click();
      await page.getByText(`${jobCount} of ${jobCount} jobs`).waitFor();
      await page.locator('.review-chart canvas').first().waitFor();
      await page.waitForFunction(() => document.querySelectorAll('.review-chart canvas').length >= 3);
      const pixels = await drawnPixels(page);
      expect(pixels.length).toBeGreaterThanOrEqual(3);
      for (const drawn of pixels) expect(drawn).toBeGreaterThan(100);
      await screenshot(page, 'review');
      expect(await axeViolations(page), 'axe on the review').toEqual([]);

      // The import and the review ran in their workers, not on the page's thread.
      const scripts = await page.evaluate(() => performance.getEntriesByType('resource').map((entry) => entry.name));
      expect(scripts.some((name) => /exchange-worker-[\w-]+\.js$/.test(name))).toBe(true);
      expect(scripts.some((name) => /review-worker-[\w-]+\.js$/.test(name))).toBe(true);

      // The dark theme: charts take the theme's colours and axe still finds nothing.
      await page.locator('.app-nav').getByRole('link', { name: 'Settings' }).click();
      await page.getByRole('radio', { name: 'Dark' }).check();
      await waitForSaved(page);
      await page.locator('.app-nav').getByRole('link', { name: 'Review' }).click();
      await page.getByText(`${jobCount} of ${jobCount} jobs`).waitFor();
      await page.waitForFunction(() => document.querySelectorAll('.review-chart canvas').length >= 3);
      await screenshot(page, 'review-dark');
      expect(await axeViolations(page), 'axe on the review, dark').toEqual([]);

      // A row leads to its job.
      await page.locator('.review-table tbody tr', { hasText: 'Fixed' }).first().getByRole('link').click();
      await page.getByRole('heading', { name: /^Summary/, level: 1 }).waitFor();
      expect(new URL(page.url()).hash).toMatch(/^#\/job\/.+\/summary$/);

      // Printed, the report is the job alone: no bars, tabs or buttons, the cautions kept.
      await page.emulateMedia({ media: 'print' });
      expect(await page.locator('.app-nav').isVisible()).toBe(false);
      expect(await page.getByRole('button', { name: 'Print the report' }).isVisible()).toBe(false);
      expect(await page.getByRole('note', { name: 'Power-off tests' }).isVisible()).toBe(true);
      await screenshot(page, 'job-report-print');
      await page.emulateMedia({ media: 'screen' });
    } finally {
      await receiver.close();
      rmSync(scratch, { recursive: true, force: true });
    }
  });

  it('takes in a large file in the worker, saying how far it has got, and lists its jobs in the review', async () => {
    const scratch = mkdtempSync(join(tmpdir(), 'ripplewright-files-'));
    // An invented shop's year from another technician's phone: a file of many lines.
    const shop = generateDemo({ jobs: 1200, seed: 31 });
    const file = join(scratch, 'other-phone.json');
    writeFileSync(file, joinParts((await buildJobFile(shop, { exportedAt: '2026-11-27T17:00:00.000Z' })).parts));
    const app = await launchApp();
    try {
      const { page } = app;
      await waitForJobs(page);
      await page.locator('.app-nav').getByRole('link', { name: 'Files' }).click();
      await page.getByLabel('Choose job files').setInputFiles(file);
      // The progress: checking the bytes, then saving the records, then the report.
      const status = page.locator('.import-progress [role=status]');
      await status.getByText(/^(Checking|Saving) file 1 of 1, other-phone\.json/).waitFor();
      await page.locator('.import-progress progress').waitFor();
      await status.getByText(/^Saving file 1 of 1, other-phone\.json: [\d,]+ of [\d,]+ records$/).waitFor({ timeout: 120_000 });
      await screenshot(page, 'import-progress');
      await page.getByRole('heading', { name: '1 file taken in' }).waitFor({ timeout: 120_000 });
      await expect(page.locator('.report-ok').textContent()).resolves.toMatch(new RegExp(`${shop.jobs.length.toLocaleString('en-GB').replace(',', ',?')} new jobs, ${shop.readings.length.toLocaleString('en-GB').replace(',', ',?')} new readings`));
      expect(await page.locator('.import-progress').count()).toBe(0);
      await page.locator('.app-nav').getByRole('link', { name: 'Review' }).click();
      // The count as the page's locale writes it ("1,200" or "1200").
      const count = String(shop.jobs.length).split('').join('[,.\\s\\u202f]?');
      await page.getByText(new RegExp(`^${count} of ${count} jobs`)).waitFor({ timeout: 60_000 });
    } finally {
      await app.close();
      rmSync(scratch, { recursive: true, force: true });
    }
  });
});
