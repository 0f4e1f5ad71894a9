import { describe, expect, it } from 'vitest';
import { launchApp, loadDemo, screenshot, SKIP_REASON, waitForJobs, waitForSaved, waitForServiceWorker } from './browser';
import { takeStep } from './steps';

describe.skipIf(SKIP_REASON !== '')(`offline after the first visit${SKIP_REASON ? ` (skipped: ${SKIP_REASON})` : ''}`, () => {
  it('fetches nothing from the network once installed, and keeps working and saving with no network', async () => {
    const app = await launchApp();
    const { page, context } = app;
    try {
      await waitForJobs(page);
      await waitForServiceWorker(page);

      // Installed: a reload is served entirely by the service worker.
      const fromNetwork: string[] = [];
      page.on('response', (response) => {
        if (!response.fromServiceWorker()) fromNetwork.push(response.url());
      });
      const failed: string[] = [];
      page.on('requestfailed', (request) => failed.push(request.url()));
      await page.reload();
      await waitForJobs(page);
      expect(fromNetwork).toEqual([]);

      // No network at all from here on.
      await context.setOffline(true);
      await page.reload();
      await waitForJobs(page);
      await loadDemo(page);
      await page.locator('.job-card', { hasText: 'Foxmere Laundrette' }).filter({ hasText: 'Open' }).click();
      await page.getByRole('heading', { name: /^Test/, level: 1 }).waitFor();
      const step = await takeStep(page);
      expect(step.kind).not.toBe('done');
      await waitForSaved(page);
      await screenshot(page, 'test-offline');

      // Still offline: a fresh load of the app shows what was saved.
      const rowsBefore = await page.locator('table.taken tbody tr').count();
      await page.reload();
      await page.locator('table.taken').waitFor();
      await expect.poll(() => page.locator('table.taken tbody tr').count()).toBe(rowsBefore);
      expect(failed).toEqual([]);
      expect(fromNetwork).toEqual([]);
    } finally {
      await app.close();
    }
  });
});
