/** Driving the guided test like a technician: read the band on screen, type a value, press Enter. */
import type { Page } from 'playwright-core';

/**
 * What to type for a reading, given its band, so the readings tell one story: the filter
 * capacitor has lost most of its capacitance (DC a little low, ripple well up, DOMAIN.md §7).
 * Typed the ways a technician types: decimal comma, a unit prefix, "OL".
 */
export function valueFor(slot: string, low: number, high: number, overload: boolean): string {
  const kind = slot.split(':')[0];
  const mid = (low + high) / 2;
  const comma = (value: number) => value.toPrecision(3).replace('.', ',');
  if (overload) return 'OL';
  switch (kind) {
    case 'dcOut':
      return comma(low - 0.06 * (high - low) - 0.2);
    case 'rippleAc':
      return `${Math.round(high * 2.5 * 1000)}mV`;
    case 'capacitance':
      return `${Math.round(low * 0.3 * 1e6)}uF`;
    case 'rippleHz':
      return String(Math.round(mid));
    default:
      return comma(mid);
  }
}

export type StepOutcome = 'reading' | 'discharge' | 'done';

/** The current step of the test tab. */
export async function currentStep(page: Page): Promise<{ kind: StepOutcome; slot: string }> {
  await page.locator('.step-card').first().waitFor();
  if (await page.getByRole('heading', { name: 'Enough readings to decide' }).isVisible()) return { kind: 'done', slot: '' };
  const slot = (await page.locator('.step-card .reading-entry').first().getAttribute('data-reading')) ?? '';
  return { kind: slot === 'discharge' ? 'discharge' : 'reading', slot };
}

/** Takes the step on screen; resolves once it is saved and the next step is showing. */
export async function takeStep(page: Page): Promise<{ kind: StepOutcome; slot: string; typed: string }> {
  const step = await currentStep(page);
  if (step.kind === 'done') return { ...step, typed: '' };
  const entry = page.locator('.step-card .reading-entry').first();
  let typed: string;
  if (step.kind === 'discharge') {
    typed = '0,3';
    await page.getByLabel('Voltage left across the capacitor').fill(typed);
    await page.getByLabel('Voltage left across the capacitor').press('Enter');
  } else {
    const ack = page.getByLabel('I have read this and I am ready to measure');
    if (await ack.isVisible()) await ack.check();
    const low = Number(await entry.getAttribute('data-band-low'));
    const high = Number(await entry.getAttribute('data-band-high'));
    const overload = (await entry.getAttribute('data-band-overload')) === 'yes';
    typed = valueFor(step.slot, low, high, overload);
    const input = entry.locator('input');
    await input.fill(typed);
    await input.press('Enter');
    await page.locator('.last-entered', { hasText: 'saved' }).waitFor();
  }
  // The next step replaces this one once the diagnosis has answered.
  await page.waitForFunction(
    (previous) => {
      const shown = document.querySelector('.step-card .reading-entry')?.getAttribute('data-reading');
      return shown !== previous;
    },
    step.slot,
    { timeout: 30_000 },
  );
  return { ...step, typed };
}
