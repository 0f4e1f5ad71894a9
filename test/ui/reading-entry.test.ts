// @vitest-environment happy-dom
import { fireEvent, render, screen, waitFor } from '@testing-library/preact';
import { h } from 'preact';
import { useState } from 'preact/hooks';
import { afterEach, describe, expect, it } from 'vitest';
import { cleanup } from '@testing-library/preact';
import type { ReadingBand } from '../../src/engine/diagnosis/types';
import { DEFAULT_SETTINGS } from '../../src/store/settings';
import { ReadingEntry, type EnteredReading } from '../../src/ui/components/ReadingEntry';
import { expectClose } from '../helpers/tolerance';
import { deferred } from './helpers';

afterEach(cleanup);

const band: ReadingBand = { kind: 'dcOut', unit: 'V', nominal: 15, low: 14.2, high: 15.6 };

function Harness({ onSave, entryBand = band, kind = 'dcOut' as const }: { onSave: (entry: EnteredReading) => Promise<boolean>; entryBand?: ReadingBand; kind?: 'dcOut' | 'diodeReverse' | 'capacitance' }) {
  const [text, setText] = useState('');
  return h(ReadingEntry, { id: 't', kind, target: kind === 'diodeReverse' ? 'D1' : undefined, band: entryBand, units: DEFAULT_SETTINGS.units, draftText: text, onDraft: setText, onSave });
}

describe('a reading entry', () => {
  it('shows the expected band and the unit before anything is typed', () => {
    render(h(Harness, { onSave: async () => true }));
    expect(screen.getByText(/Expect/).textContent).toBe('Expect 14.2 V – 15.6 V');
    const input = screen.getByLabelText('DC output');
    expect(input.getAttribute('inputmode')).toBe('decimal');
    expect(screen.getByText('V').id).toBe('t-unit');
  });

  it('takes a decimal comma, shows the verdict at once in words and icon, and “Saved” only after the write', async () => {
    const write = deferred<boolean>();
    const saved: EnteredReading[] = [];
    render(h(Harness, { onSave: (entry: EnteredReading) => (saved.push(entry), write.promise) }));
    const input = screen.getByLabelText('DC output');
    fireEvent.input(input, { target: { value: '13,1' } });
    fireEvent.keyDown(input, { key: 'Enter' });
    await waitFor(() => expect(screen.getByText('Low')).toBeTruthy());
    expect(document.querySelector('[data-verdict=low]')?.textContent).toContain('▼');
    expect(screen.getByText('Saving…')).toBeTruthy();
    expect(screen.queryByText('✓ Saved')).toBeNull();
    expect(saved).toEqual([{ text: '13,1', value: 13.1, band, verdict: 'low' }]);
    write.resolve(true);
    await waitFor(() => expect(screen.getByText('✓ Saved')).toBeTruthy());
  });

  it('says so plainly when the write failed', async () => {
    render(h(Harness, { onSave: async () => false }));
    const input = screen.getByLabelText('DC output');
    fireEvent.input(input, { target: { value: '15' } });
    fireEvent.click(screen.getByRole('button', { name: 'Enter' }));
    await waitFor(() => expect(screen.getByText('⚠ Not saved yet')).toBeTruthy());
    expect(screen.getByText('In range')).toBeTruthy();
  });

  it('accepts the meter’s OL, in range where a good part reads OL', async () => {
    const reverse: ReadingBand = { kind: 'diodeReverse', target: 'D1', unit: 'V', nominal: 'OL', low: 0, high: 0, expectOverload: true };
    render(h(Harness, { kind: 'diodeReverse', entryBand: reverse, onSave: async () => true }));
    expect(screen.getByText(/Expect/).textContent).toContain('OL');
    const input = screen.getByLabelText('D1 reverse');
    fireEvent.input(input, { target: { value: 'OL' } });
    fireEvent.blur(input);
    await waitFor(() => expect(screen.getByText('In range')).toBeTruthy());
  });

  it('reads a bare capacitance in µF and a prefixed one as written', async () => {
    const capBand: ReadingBand = { kind: 'capacitance', target: 'C1', unit: 'F', nominal: 0.001, low: 0.0008, high: 0.0012 };
    const saved: EnteredReading[] = [];
    render(h(Harness, { kind: 'capacitance', entryBand: capBand, onSave: async (entry: EnteredReading) => (saved.push(entry), true) }));
    const input = screen.getByLabelText('capacitance', { exact: false });
    fireEvent.input(input, { target: { value: '220' } });
    fireEvent.keyDown(input, { key: 'Enter' });
    await waitFor(() => expect(saved).toHaveLength(1));
    fireEvent.input(input, { target: { value: '0.9mF' } });
    fireEvent.keyDown(input, { key: 'Enter' });
    await waitFor(() => expect(saved).toHaveLength(2));
    expect(saved.map((e) => e.verdict)).toEqual(['low', 'in']);
    expectClose(saved[0]!.value as number, 220e-6, { rel: 1e-12 }, '220 typed in µF');
    expectClose(saved[1]!.value as number, 0.9e-3, { rel: 1e-12 }, '0.9mF');
  });

  it('explains text it cannot read and stores nothing', async () => {
    const saved: EnteredReading[] = [];
    render(h(Harness, { onSave: async (entry: EnteredReading) => (saved.push(entry), true) }));
    const input = screen.getByLabelText('DC output');
    fireEvent.input(input, { target: { value: 'twelve' } });
    fireEvent.keyDown(input, { key: 'Enter' });
    await waitFor(() => expect(screen.getByRole('alert').textContent).toContain('not a number'));
    expect(input.getAttribute('aria-invalid')).toBe('true');
    expect(saved).toEqual([]);
  });
});
