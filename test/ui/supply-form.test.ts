import { describe, expect, it } from 'vitest';
import { formatQuantity } from '../../src/ui/format';
import { buildSpecInput, DEFAULT_FORM, fieldForSpecPath, parseDecimalText, type SupplyFormValues } from '../../src/ui/supply-form';

function inputOf(patch: Partial<SupplyFormValues>) {
  const built = buildSpecInput({ ...DEFAULT_FORM, ...patch });
  if (!('input' in built)) throw new Error(`unexpected problem: ${built.problem.message}`);
  return built.input;
}

describe('parseDecimalText', () => {
  it('accepts a decimal comma as well as a point (DOMAIN.md §9)', () => {
    expect(parseDecimalText('4,25')).toBe(4.25);
    expect(parseDecimalText(' 4.25 ')).toBe(4.25);
    expect(parseDecimalText('2.2e-3')).toBe(0.0022);
  });

  it('returns undefined for blank text and NaN for text that is not a number', () => {
    expect(parseDecimalText('   ')).toBeUndefined();
    for (const text of ['12x', '1.2.3', 'OL', '1,2,3', '--1']) expect(parseDecimalText(text)).toBeNaN();
  });
});

describe('buildSpecInput', () => {
  it('converts microfarads to farads and passes the other fields through in SI units', () => {
    const input = inputOf({ capacitorMicrofarads: '470', esrOhms: '0,2', vrms: '24', hz: '60', windingOhms: '1.5' });
    expect(input.capacitor).toEqual({ farads: 470e-6, esr: 0.2 });
    expect(input.source).toEqual({ vrms: 24, hz: 60, ohms: 1.5 });
  });

  it('leaves out the capacitor for a blank value, and blank optional fields so the engine defaults apply', () => {
    const input = inputOf({ capacitorMicrofarads: '', windingOhms: '' });
    expect(input).not.toHaveProperty('capacitor');
    expect(input.source).not.toHaveProperty('ohms');
    expect(inputOf({ esrOhms: '' }).capacitor).not.toHaveProperty('esr');
  });

  it('builds a current load and each kind of regulator', () => {
    expect(inputOf({ loadKind: 'amps', loadValue: '0.25' }).load).toEqual({ amps: 0.25 });
    expect(inputOf({ regulatorKind: 'none' })).not.toHaveProperty('regulator');
    expect(inputOf({ regulatorKind: 'linear', regulatorVolts: '5', dropoutVolts: '' }).regulator).toEqual({ volts: 5 });
    expect(inputOf({ regulatorKind: 'zener', zenerVolts: '5.1', seriesOhms: '220' }).regulator).toEqual({ zenerVolts: 5.1, seriesOhms: 220 });
  });

  it('names the field whose text is not a number instead of calling the engine', () => {
    expect(buildSpecInput({ ...DEFAULT_FORM, loadValue: '33 ohm' })).toEqual({
      problem: { field: 'loadValue', message: '“33 ohm” is not a number.' },
    });
  });
});

describe('fieldForSpecPath', () => {
  it('maps spec paths from SpecError to the form field that sets them', () => {
    expect(fieldForSpecPath('capacitor.farads', 'none')).toBe('capacitorMicrofarads');
    expect(fieldForSpecPath('capacitor[1].farads', 'none')).toBe('capacitorMicrofarads');
    expect(fieldForSpecPath('capacitor.esr', 'none')).toBe('esrOhms');
    expect(fieldForSpecPath('source.vrms', 'none')).toBe('vrms');
    expect(fieldForSpecPath('load.amps', 'none')).toBe('loadValue');
    expect(fieldForSpecPath('regulator.dropout', 'linear')).toBe('dropoutVolts');
    expect(fieldForSpecPath('regulator', 'zener')).toBe('zenerVolts');
  });

  it('returns null for a path no single field sets', () => {
    expect(fieldForSpecPath('', 'none')).toBeNull();
    expect(fieldForSpecPath('temperatureC', 'none')).toBeNull();
    expect(fieldForSpecPath('sourceX', 'none')).toBeNull();
  });
});

describe('formatQuantity', () => {
  it('shows three significant figures, with milli below one unit except for hertz', () => {
    expect(formatQuantity(15.5705, 'V')).toBe('15.6 V');
    expect(formatQuantity(0.4821, 'V')).toBe('482 mV');
    expect(formatQuantity(2.5, 'A')).toBe('2.50 A');
    expect(formatQuantity(100, 'Hz')).toBe('100 Hz');
    expect(formatQuantity(0.5, 'Hz')).toBe('0.500 Hz');
    expect(formatQuantity(1234.4, 'V')).toBe('1234 V');
    expect(formatQuantity(0, 'V')).toBe('0.00 V');
    expect(formatQuantity(Number.NaN, 'V')).toBe('—');
  });
});
