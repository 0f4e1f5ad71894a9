import AxeBuilder from '@axe-core/playwright';
import type { Page } from 'playwright-core';
import { describe, expect, it } from 'vitest';
import { launchApp, loadDemo, screenshot, SKIP_REASON, waitForJobs, waitForSaved } from './browser';

/** WCAG 2.0–2.2 A and AA rules, plus axe's best practices. */
const TAGS = ['wcag2a', 'wcag2aa', 'wcag21a', 'wcag21aa', 'wcag22aa', 'best-practice'];

async function violations(page: Page): Promise<string[]> {
  const result = await new AxeBuilder({ page }).withTags(TAGS).analyze();
  // axe looked at the page (an empty page passes nothing).
  expect(result.passes.length).toBeGreaterThan(10);
  return result.violations.map((v) => `${v.id}: ${v.help} (${v.nodes.map((n) => n.target.join(' ')).slice(0, 3).join(', ')})`);
}

/** Every interactive element is at least 44 × 44 CSS px (WCAG 2.2 SC 2.5.5, our aim for gloves). */
async function smallTargets(page: Page): Promise<string[]> {
  return page.evaluate(() => {
    const small: string[] = [];
    for (const element of document.querySelectorAll<HTMLElement>('button, a[href], input, select, textarea, summary, label.choice, label.check')) {
      const box = element.getBoundingClientRect();
      if (box.width === 0 && box.height === 0) continue; // not shown
      if (element.matches('input[type=radio], input[type=checkbox]') && element.closest('label')) continue; // the label is the target
      if (element.matches('.skip-link')) continue;
      if (box.height < 44 || box.width < 44) small.push(`${element.tagName.toLowerCase()} "${(element.textContent || element.getAttribute('aria-label') || element.id).trim().slice(0, 30)}" ${Math.round(box.width)}×${Math.round(box.height)}`);
    }
    return small;
  });
}

async function check(page: Page, name: string): Promise<void> {
  await waitForSaved(page);
  await screenshot(page, name);
  expect(await violations(page), `axe on ${name}`).toEqual([]);
  expect(await smallTargets(page), `touch targets on ${name}`).toEqual([]);
}

describe.skipIf(SKIP_REASON !== '')(`accessibility of the main screens${SKIP_REASON ? ` (skipped: ${SKIP_REASON})` : ''}`, () => {
  it('finds no axe violations and no small touch targets on any main screen, in every theme', async () => {
    const app = await launchApp();
    const { page } = app;
    try {
      await waitForJobs(page);
      await check(page, 'a11y-jobs-empty');
      await loadDemo(page);
      await check(page, 'a11y-jobs');

      await page.locator('.app-nav').getByRole('link', { name: 'New job' }).click();
      await page.getByRole('heading', { name: 'New job', level: 1 }).waitFor();
      await check(page, 'a11y-new-job');

      await page.locator('.app-nav').getByRole('link', { name: 'Settings' }).click();
      await page.getByRole('heading', { name: 'Settings', level: 1 }).waitFor();
      await check(page, 'settings');

      await page.locator('.app-nav').getByRole('link', { name: 'Files' }).click();
      await page.getByRole('heading', { name: 'Job files', level: 1 }).waitFor();
      await check(page, 'a11y-files');
      await page.locator('.app-nav').getByRole('link', { name: 'Review' }).click();
      await page.locator('.review-chart canvas').first().waitFor();
      await check(page, 'a11y-review');

      // An open job from the demo, tab by tab.
      await page.locator('.app-nav').getByRole('link', { name: 'Jobs' }).click();
      await waitForJobs(page);
      await page.locator('.job-card', { hasText: 'Penwhistle Bakery' }).click();
      await page.getByRole('heading', { name: 'Safety first' }).waitFor();
      await check(page, 'a11y-test-safety');
      for (const box of await page.locator('.safety-check input[type=checkbox]').all()) await box.check();
      await page.getByRole('button', { name: 'Start the readings' }).click();
      await page.locator('.step-card .reading-entry').first().waitFor();
      await check(page, 'a11y-test-step');

      const tabs = page.locator('.job-tabs');
      await tabs.getByRole('link', { name: 'Supply' }).click();
      await page.getByRole('table', { name: /On your meter/ }).waitFor();
      await check(page, 'a11y-supply');
      await tabs.getByRole('link', { name: 'Waveform' }).click();
      await page.locator('.chart-box canvas').waitFor();
      await check(page, 'a11y-waveform');
      await tabs.getByRole('link', { name: 'Finish' }).click();
      await page.getByRole('button', { name: 'Close the job' }).waitFor();
      await check(page, 'a11y-finish');
      await tabs.getByRole('link', { name: 'Summary' }).click();
      await page.getByRole('heading', { name: /^Summary/, level: 1 }).waitFor();
      await check(page, 'a11y-summary');

      // The other themes on the busiest screen.
      for (const theme of ['Dark', 'Sunlight: highest contrast'] as const) {
        await page.locator('.app-nav').getByRole('link', { name: 'Settings' }).click();
        await page.getByRole('radio', { name: theme }).check();
        await waitForSaved(page);
        await page.goBack();
        await page.goBack();
        await page.locator('.step-card, .job-tabs').first().waitFor();
        await page.locator('.job-tabs').getByRole('link', { name: 'Test' }).click();
        await page.locator('.step-card .reading-entry').first().waitFor();
        await check(page, `test-step-${theme.startsWith('Dark') ? 'dark' : 'sunlight'}`);
      }
      // The review's filters, table and charts in the last theme (sunlight).
      await page.locator('.app-nav').getByRole('link', { name: 'Review' }).click();
      await page.locator('.review-chart canvas').first().waitFor();
      await check(page, 'a11y-review-sunlight');
    } finally {
      await app.close();
    }
  });
});
