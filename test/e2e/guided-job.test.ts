import { describe, expect, it } from 'vitest';
import { launchApp, screenshot, SKIP_REASON, waitForJobs, waitForSaved } from './browser';
import { currentStep, takeStep } from './steps';

describe.skipIf(SKIP_REASON !== '')(`a guided job on a 390 × 844 phone${SKIP_REASON ? ` (skipped: ${SKIP_REASON})` : ''}`, () => {
  it('goes from a new job through the guided test to a closed job, and a reload mid-job loses nothing', async () => {
    const app = await launchApp();
    const { page } = app;
    try {
      await waitForJobs(page);
      await screenshot(page, 'jobs-empty');

      // New job
      await page.locator('.app-nav').getByRole('link', { name: 'New job' }).click();
      await page.getByLabel('Customer', { exact: true }).fill('Harbour View Flats');
      await page.getByLabel('Site or address').fill('Plant room, Block C');
      await page.getByLabel('What it is').fill('boiler controller');
      await page.getByLabel('Make').fill('Corrindale');
      await page.getByLabel('Model').fill('CX-9');
      await page.getByLabel('Serial number').fill('CX9-001187');
      await page.getByLabel('Your name').fill('Sam Okafor');
      await page.getByLabel('Complaint').fill('Resets every few minutes');
      await screenshot(page, 'new-job');
      await page.getByRole('button', { name: 'Start the job' }).click();

      // Supply: a bridge from a 12 V 20 VA transformer into 1000 µF, 0.5 A load
      await page.getByRole('heading', { name: /^Supply/, level: 1 }).waitFor();
      await page.getByRole('radio', { name: /^Full-wave bridge/ }).check();
      await page.getByLabel('Secondary rating').fill('12');
      await page.getByLabel('Power rating').fill('20');
      await page.getByLabel('Filter capacitor', { exact: true }).fill('1000');
      await page.getByLabel('Expected load').fill('0,5 A');
      await page.getByRole('table', { name: /On your meter/ }).waitFor();
      await page.waitForFunction(() => !document.querySelector('table.bands caption')?.textContent?.includes('updating'));
      await waitForSaved(page);
      await screenshot(page, 'supply');
      await page.getByRole('link', { name: 'Start the readings' }).click();

      // Safety check first
      await page.getByRole('heading', { name: 'Safety first' }).waitFor();
      await screenshot(page, 'test-safety');
      for (const box of await page.locator('.safety-check input[type=checkbox]').all()) await box.check();
      await page.getByRole('button', { name: 'Start the readings' }).click();

      // Readings as the diagnosis asks for them
      const taken: string[] = [];
      let sawDischarge = false;
      for (let step = 0; step < 14; step++) {
        const now = await currentStep(page);
        if (now.kind === 'done') break;
        if (step === 0) await screenshot(page, 'test-step');
        if (now.kind === 'discharge' && !sawDischarge) {
          sawDischarge = true;
          await screenshot(page, 'test-discharge');
        }
        const done = await takeStep(page);
        if (done.kind === 'reading') taken.push(done.slot);

        if (taken.length === 2 && done.kind === 'reading') {
          // Half-type the next value, then reload: the readings and the half-typed text survive.
          const next = await currentStep(page);
          if (next.kind === 'reading') {
            const input = page.locator('.step-card .reading-entry input').first();
            await input.fill('12,');
            await waitForSaved(page);
            await page.reload();
            await page.locator('.step-card .reading-entry').first().waitFor();
            await expect.poll(() => page.locator('.step-card .reading-entry input').first().inputValue()).toBe('12,');
            await expect.poll(() => page.locator('table.taken tbody tr').count()).toBe(2);
            await page.locator('.step-card .reading-entry input').first().fill('');
          }
        }
      }
      expect(taken.length).toBeGreaterThanOrEqual(3);
      expect(taken).toContain('dcOut');
      // The ranking follows the readings: a capacitor fault leads.
      const leading = await page.locator('.fault-list .fault-name').first().textContent();
      expect(leading).toMatch(/capacitor/i);
      await screenshot(page, 'test-ranking');

      // Waveform
      await page.locator('.job-tabs').getByRole('link', { name: 'Waveform' }).click();
      await page.locator('.chart-box canvas').waitFor();
      await page.getByRole('table', { name: 'Expected and measured' }).waitFor();
      await screenshot(page, 'waveform');

      // Finish: take the diagnosis's part, re-test, close
      await page.locator('.job-tabs').getByRole('link', { name: 'Finish' }).click();
      const useIt = page.getByRole('button', { name: 'Use this' });
      if (await useIt.isVisible()) await useIt.click();
      await page.getByLabel('Action taken').fill('Replaced C1 (1000 µF 25 V).');
      await page.getByLabel('Parts used').fill('1000 µF 25 V electrolytic');
      for (const entry of await page.locator('.finish-tab .reading-entry').all()) {
        const low = Number(await entry.getAttribute('data-band-low'));
        const high = Number(await entry.getAttribute('data-band-high'));
        const input = entry.locator('input');
        await input.fill(String((low + high) / 2).replace('.', ','));
        await input.press('Enter');
        await entry.getByText('✓ Saved').waitFor();
      }
      await page.getByRole('radio', { name: 'Fixed', exact: true }).check();
      await waitForSaved(page);
      await screenshot(page, 'finish');
      await page.getByRole('button', { name: 'Close the job' }).click();

      await page.getByRole('heading', { name: /^Summary/, level: 1 }).waitFor();
      await expect.poll(() => page.locator('.summary').textContent()).toContain('Fixed');
      await expect.poll(() => page.getByRole('table', { name: 'Re-test after the repair' }).locator('[data-verdict=in]').count()).toBeGreaterThan(0);
      await screenshot(page, 'summary');

      await page.locator('.app-nav').getByRole('link', { name: 'Jobs' }).click();
      await waitForJobs(page);
      await expect.poll(() => page.locator('.job-card', { hasText: 'Harbour View Flats' }).textContent()).toContain('Fixed');
      await screenshot(page, 'jobs');
    } finally {
      await app.close();
    }
  });
});
