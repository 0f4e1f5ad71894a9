import { readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { DIST_DIR, launchApp, loadDemo, screenshot, SKIP_REASON, waitForJobs, waitForSaved, waitForServiceWorker } from './browser';
import { takeStep } from './steps';

describe.skipIf(SKIP_REASON !== '')(`a new version${SKIP_REASON ? ` (skipped: ${SKIP_REASON})` : ''}`, () => {
  it('shows a quiet prompt while a job is open, never reloads by itself, and updates when asked', async () => {
    const app = await launchApp();
    const { page } = app;
    const swPath = join(DIST_DIR, 'sw.js');
    const original = readFileSync(swPath, 'utf8');
    try {
      await waitForJobs(page);
      await waitForServiceWorker(page);
      await loadDemo(page);
      await page.locator('.job-card', { hasText: 'Foxmere Laundrette' }).filter({ hasText: 'Open' }).click();
      await page.getByRole('heading', { name: /^Test/, level: 1 }).waitFor();
      await takeStep(page);
      await waitForSaved(page);
      const jobUrl = page.url();
      const rows = await page.locator('table.taken tbody tr').count();
      await page.evaluate(() => ((window as unknown as { sameDocument: boolean }).sameDocument = true));

      // A new version is published; the browser finds it on its next check.
      writeFileSync(swPath, `${original}\n// the next version\n`);
      await page.evaluate(async () => {
        await (await navigator.serviceWorker.getRegistration())?.update();
      });
      const prompt = page.getByRole('region', { name: 'App update' });
      await prompt.waitFor();
      await expect.poll(() => page.evaluate(async () => (await navigator.serviceWorker.getRegistration())?.waiting?.state)).toBe('installed');
      await expect(prompt.textContent()).resolves.toContain('Your readings are saved');
      await screenshot(page, 'update-prompt');
      expect(await page.evaluate(() => (window as unknown as { sameDocument?: boolean }).sameDocument)).toBe(true);

      // "Later": the prompt goes, the job stays, nothing reloads.
      await prompt.getByRole('button', { name: 'Later' }).click();
      await prompt.waitFor({ state: 'detached' });
      const later = page.getByRole('button', { name: 'Update ready' });
      await later.waitFor();
      expect(await page.evaluate(() => (window as unknown as { sameDocument?: boolean }).sameDocument)).toBe(true);
      expect(page.url()).toBe(jobUrl);

      // Asked: the new worker takes over and the page reloads onto the same job, readings intact.
      const reloaded = page.waitForEvent('load');
      await later.click();
      await reloaded;
      await page.locator('table.taken').waitFor();
      expect(await page.evaluate(() => (window as unknown as { sameDocument?: boolean }).sameDocument)).toBeUndefined();
      expect(page.url()).toBe(jobUrl);
      await expect.poll(() => page.locator('table.taken tbody tr').count()).toBe(rows);
      await expect.poll(() => page.evaluate(async () => (await navigator.serviceWorker.getRegistration())?.waiting ?? null)).toBeNull();
    } finally {
      writeFileSync(swPath, original);
      await app.close();
    }
  });
});
