// @vitest-environment happy-dom
import { h, render } from 'preact';
import { act } from 'preact/test-utils';
import { afterEach, beforeEach, describe, expect, it, vi } from 'vitest';
import { expectReadings, parseSupplySpec, SpecError } from '../../src/engine';
import { ExpectPage } from '../../src/ui/ExpectPage';
import { formatQuantity } from '../../src/ui/format';
import { buildSpecInput, DEFAULT_FORM } from '../../src/ui/supply-form';

let root: HTMLElement;

beforeEach(() => {
  root = document.createElement('div');
  document.body.append(root);
  act(() => render(h(ExpectPage, {}), root));
});

afterEach(() => {
  act(() => render(null, root));
  root.remove();
});

function field(id: string): HTMLInputElement {
  const element = root.querySelector<HTMLInputElement>(`#${id}`);
  if (element === null) throw new Error(`no field #${id}`);
  return element;
}

async function type(id: string, text: string): Promise<void> {
  await act(() => {
    const input = field(id);
    input.value = text;
    input.dispatchEvent(new Event('input', { bubbles: true }));
  });
}

async function submit(): Promise<void> {
  await act(() => {
    root.querySelector('form')?.dispatchEvent(new Event('submit', { bubbles: true, cancelable: true }));
  });
}

/** The "Expected" cell of the readings row whose label starts with `label`. */
function expectedCell(label: string): string | undefined {
  const rows = [...root.querySelectorAll('table.readings tbody tr')];
  const row = rows.find((candidate) => candidate.querySelector('th')?.textContent?.startsWith(label));
  return row?.querySelector('td')?.textContent ?? undefined;
}

describe('ExpectPage', () => {
  it('shows the mains-safety caution before any figures', () => {
    const text = root.textContent ?? '';
    expect(text).toContain('Mains and charged capacitors can kill');
    expect(text).toContain('Local codes');
    expect(root.querySelector('table')).toBeNull();
  });

  it('shows the engine’s expected readings for the supply in the form', async () => {
    await submit();
    await vi.waitFor(() => expect(root.querySelector('table.readings')).not.toBeNull());
    const built = buildSpecInput(DEFAULT_FORM);
    if (!('input' in built)) throw new Error('the default form must build');
    const result = expectReadings(built.input);
    expect(expectedCell('DC output')).toBe(formatQuantity(result.dc, 'V'));
    expect(expectedCell('Ripple, RMS')).toBe(formatQuantity(result.rippleRms, 'V'));
    expect(expectedCell('Diode peak inverse')).toBe(formatQuantity(result.diodePiv, 'V'));
  });

  it('shows the regulator’s figures and verdict when a linear regulator is chosen', async () => {
    await act(() => {
      const select = root.querySelector<HTMLSelectElement>('#regulatorKind');
      if (select === null) throw new Error('no regulator select');
      select.value = 'linear';
      select.dispatchEvent(new Event('change', { bubbles: true }));
    });
    await type('regulatorVolts', '5');
    await submit();
    await vi.waitFor(() => expect(root.querySelector('table.readings')).not.toBeNull());
    const built = buildSpecInput({ ...DEFAULT_FORM, regulatorKind: 'linear', regulatorVolts: '5' });
    if (!('input' in built)) throw new Error('the regulator form must build');
    const regulator = expectReadings(built.input).regulator;
    expect(regulator).not.toBeNull();
    expect(expectedCell('Regulated output')).toBe(formatQuantity(regulator?.dc ?? NaN, 'V'));
    expect(root.querySelector('.verdict')?.textContent).toMatch(regulator?.inRegulation ? /stays in regulation/ : /drops out/);
  });

  it('puts the SpecError text under the field at fault, marks it invalid and moves focus to it', async () => {
    await type('capacitorMicrofarads', '-5');
    await submit();
    await vi.waitFor(() => expect(root.querySelector('.field-error')).not.toBeNull());

    const built = buildSpecInput({ ...DEFAULT_FORM, capacitorMicrofarads: '-5' });
    if (!('input' in built)) throw new Error('"-5" is a number; the engine should refuse it');
    let specError: SpecError | undefined;
    try {
      parseSupplySpec(built.input);
    } catch (error) {
      if (error instanceof SpecError) specError = error;
    }
    expect(specError).toBeDefined();
    const input = field('capacitorMicrofarads');
    expect(root.querySelector('#capacitorMicrofarads-error')?.textContent).toBe(specError?.problem);
    expect(input.getAttribute('aria-invalid')).toBe('true');
    expect(input.getAttribute('aria-describedby')).toContain('capacitorMicrofarads-error');
    await vi.waitFor(() => expect(document.activeElement).toBe(input));
  });

  it('refuses text that is not a number without showing stale readings', async () => {
    await type('vrms', '12 V');
    await submit();
    expect(root.querySelector('#vrms-error')?.textContent).toBe('“12 V” is not a number.');
    expect(root.querySelector('table')).toBeNull();
  });
});
