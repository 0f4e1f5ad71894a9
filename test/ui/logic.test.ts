import { describe, expect, it } from 'vitest';
import { judge } from '../../src/engine/diagnosis';
import type { NextReading, ReadingBand } from '../../src/engine/diagnosis/types';
import type { Reading } from '../../src/model/job';
import { formatBand, formatMeterValue } from '../../src/ui/format';
import { latestBySlot, toReadingsInput, verdictFor } from '../../src/ui/readings';
import { parseRoute, routeHash, type Route } from '../../src/ui/router';
import { Saver } from '../../src/ui/saver';
import { currentStep } from '../../src/ui/screens/Test/guide';
import { importProgressWords } from '../../src/ui/screens/Files/FilesScreen';

let n = 0;
function reading(kind: Reading['kind'], value: Reading['value'], extra: Partial<Reading> = {}): Reading {
  n += 1;
  return { id: `r${n}`, jobId: 'j', kind, value, text: String(value), takenAt: `2026-03-02T09:${String(n).padStart(2, '0')}:00.000Z`, phase: 'before', ...extra };
}

describe('readings to the diagnosis input', () => {
  it('takes the latest of each reading, per diode and per capacitor, and leaves out the re-test', () => {
    const input = toReadingsInput([
      reading('dcOut', 14.1),
      reading('dcOut', 13.2),
      reading('diodeForward', 0.55, { target: 'D3' }),
      reading('diodeReverse', 'OL', { target: 'D3' }),
      reading('capacitance', 0.00022, { target: 'C2' }),
      reading('esr', 0.4),
      reading('dcOut', 15, { phase: 'after' }),
    ]);
    expect(input).toEqual({ dcOut: 13.2, diodeTest: { D3: { forward: 0.55, reverse: 'OL' } }, capacitance2: 0.00022, esr: 0.4 });
  });

  it('lets a correction replace the reading it supersedes, even when the correction is older', () => {
    const typo = reading('rippleAc', 41);
    const fixed = reading('rippleAc', 0.41, { supersedes: typo.id, takenAt: '2026-03-02T08:00:00.000Z' });
    expect(latestBySlot([typo, fixed], 'before').get('rippleAc')?.value).toBe(0.41);
  });

  it('gives the same verdicts as the diagnosis', () => {
    const band: ReadingBand = { kind: 'dcOut', unit: 'V', nominal: 15, low: 14, high: 16 };
    const reverse: ReadingBand = { kind: 'diodeReverse', target: 'D1', unit: 'V', nominal: 'OL', low: 0, high: 0, expectOverload: true };
    for (const value of [13.9, 14, 15, 16, 16.1, 'OL'] as const) expect(verdictFor(value, band)).toBe(judge(value, band));
    for (const value of ['OL', 0.02] as const) expect(verdictFor(value, reverse)).toBe(judge(value, reverse));
  });
});

describe('numbers as a meter shows them', () => {
  it('uses the prefix a meter would, and the chosen decimal mark', () => {
    expect(formatMeterValue(14.83, 'V')).toBe('14.8 V');
    expect(formatMeterValue(0.412, 'V')).toBe('412 mV');
    expect(formatMeterValue(0.0022, 'F')).toBe('2200 µF');
    expect(formatMeterValue(4.7e-7, 'F')).toBe('470 nF');
    expect(formatMeterValue(0.08, 'Ω')).toBe('80.0 mΩ');
    expect(formatMeterValue(100, 'Hz')).toBe('100 Hz');
    expect(formatMeterValue('OL', 'V')).toBe('OL');
    expect(formatMeterValue(4.25, 'V', 'comma')).toBe('4,25 V');
    expect(formatBand({ kind: 'dcOut', unit: 'V', nominal: 15, low: 14.2, high: 15.6 })).toBe('14.2 V – 15.6 V');
  });
});

describe('the order of the guided test', () => {
  const live: NextReading = { kind: 'dcOut', instruction: '', meterMode: 'V DC', probes: { red: 'out+', black: 'out-' }, powerOff: false, gainBits: 1 };
  const off: NextReading = { ...live, kind: 'diodeForward', target: 'D1', meterMode: 'diode test', powerOff: true };
  const base = { safetyDone: true, hasSupply: true, ready: true, discharged: false, chosen: null, suggested: live };

  it('starts with the safety check, before anything else', () => {
    expect(currentStep({ ...base, safetyDone: false }).kind).toBe('safety');
    expect(currentStep({ ...base, safetyDone: false, hasSupply: false }).kind).toBe('safety');
  });

  it('asks for the supply, then follows the diagnosis’s next reading', () => {
    expect(currentStep({ ...base, hasSupply: false }).kind).toBe('no-supply');
    expect(currentStep(base)).toEqual({ kind: 'reading', guide: live, chosen: false, powerBackOn: false });
  });

  it('puts a discharge-and-verify step before any power-off test', () => {
    expect(currentStep({ ...base, suggested: off })).toEqual({ kind: 'discharge', next: off });
    expect(currentStep({ ...base, suggested: off, discharged: true })).toMatchObject({ kind: 'reading', guide: off });
  });

  it('takes the technician’s own choice over the suggestion, and warns when it needs the power back', () => {
    expect(currentStep({ ...base, suggested: off, chosen: live })).toMatchObject({ kind: 'reading', guide: live, chosen: true });
    expect(currentStep({ ...base, discharged: true })).toMatchObject({ kind: 'reading', guide: live, powerBackOn: true });
  });

  it('is done only when the diagnosis has answered and has nothing more to ask', () => {
    expect(currentStep({ ...base, suggested: null }).kind).toBe('done');
    expect(currentStep({ ...base, suggested: null, ready: false }).kind).toBe('waiting');
  });
});

describe('routes', () => {
  it('reads back every route it writes, and sends anything else to the jobs', () => {
    const routes: Route[] = [{ screen: 'jobs' }, { screen: 'new' }, { screen: 'settings' }, { screen: 'review' }, { screen: 'files' }, { screen: 'files', jobId: 'x/y' }, { screen: 'job', jobId: 'a b/c', tab: 'finish' }];
    for (const route of routes) expect(parseRoute(routeHash(route))).toEqual(route);
    expect(parseRoute('#/nowhere')).toEqual({ screen: 'jobs' });
    expect(parseRoute('')).toEqual({ screen: 'jobs' });
    expect(parseRoute('#/job/x/bogus')).toEqual({ screen: 'job', jobId: 'x', tab: 'test' });
  });
});

describe('the saver', () => {
  it('keeps a failed write with a plain message and runs it again on retry', async () => {
    const saver = new Saver();
    let attempts = 0;
    const write = async () => {
      attempts += 1;
      if (attempts === 1) throw new DOMException('full', 'QuotaExceededError');
      return 'stored';
    };
    const first = await saver.save('the DC reading', write);
    expect(first.ok).toBe(false);
    expect(saver.current.failed).toEqual([{ what: 'the DC reading', message: expect.stringContaining('storage for this app is full') }]);
    await saver.retryFailed();
    expect(attempts).toBe(2);
    expect(saver.current.failed).toEqual([]);
    expect(saver.current.pending).toBe(0);
    expect(saver.current.savedAt).not.toBeNull();
  });
});

describe('import progress in words', () => {
  it('says which file is checked and how far, then how many records are saved', () => {
    const reading = importProgressWords({ file: 1, files: 3, name: 'ada.json', stage: 'reading', done: 450, total: 1000 });
    expect(reading).toEqual({ text: 'Checking file 2 of 3, ada.json: 45 %', fraction: 0.45 });
    const saving = importProgressWords({ file: 0, files: 1, name: 'shop.json', stage: 'saving', done: 12000, total: 550000 });
    expect(saving.text).toBe('Saving file 1 of 1, shop.json: 12,000 of 550,000 records');
    expect(saving.fraction).toBeCloseTo(12000 / 550000, 12);
  });

  it('leaves the bar indeterminate when the file’s size is not known', () => {
    expect(importProgressWords({ file: 0, files: 1, name: 'x.json', stage: 'reading', done: 10, total: 0 })).toEqual({ text: 'Checking file 1 of 1, x.json', fraction: undefined });
  });
});
