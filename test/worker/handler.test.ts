import { describe, expect, it } from 'vitest';
import { expectReadings } from '../../src/engine';
import { diagnose as diagnoseOnce } from '../../src/engine/diagnosis';
import { createHandler } from '../../src/worker/handler';
import type { SupplySpecInput } from '../../src/engine/types';

const spec: SupplySpecInput = {
  topology: 'bridge',
  source: { vrms: 13.6, hz: 50, ohms: 0.9 },
  diode: { preset: 'silicon' },
  capacitor: { farads: 0.0022 },
  load: { amps: 0.5 },
};

describe('engine worker handler', () => {
  it('answers an expect request with the engine’s own result', () => {
    const handler = createHandler();
    const answer = handler.handle({ id: 7, type: 'expect', spec });
    expect(answer).toEqual({ id: 7, ok: true, type: 'expect', result: expectReadings(spec) });
  });

  it('answers a diagnose request as the one-shot diagnosis does, with a guide for every band', () => {
    const handler = createHandler();
    const readings = { dcOut: '15,1', rippleAc: '0.9' };
    const answer = handler.handle({ id: 1, type: 'diagnose', setup: { spec }, readings });
    if (!answer.ok || answer.type !== 'diagnose') throw new Error('diagnose failed');
    expect(answer.result.diagnosis).toEqual(diagnoseOnce({ spec, readings }));
    expect(answer.result.guides.map((guide) => [guide.kind, guide.target])).toEqual(
      answer.result.diagnosis.bands.map((band) => [band.kind, band.target]),
    );
  });

  it('simulates a supply once and reuses it for later readings', () => {
    let clock = 0;
    const handler = createHandler(() => (clock += 5));
    const first = handler.handle({ id: 1, type: 'diagnose', setup: { spec }, readings: {} });
    const second = handler.handle({ id: 2, type: 'diagnose', setup: { spec }, readings: { dcOut: 15 } });
    if (!first.ok || first.type !== 'diagnose' || !second.ok || second.type !== 'diagnose') throw new Error('diagnose failed');
    expect(first.result.prepareMs).toBeGreaterThan(0);
    expect(second.result.prepareMs).toBe(0);
  });

  it('names the field of a supply that is not valid', () => {
    const handler = createHandler();
    const answer = handler.handle({ id: 3, type: 'expect', spec: { ...spec, capacitor: { farads: -1 } } });
    expect(answer.ok).toBe(false);
    if (answer.ok) return;
    expect(answer.error.kind).toBe('spec');
    expect(answer.error.field).toBe('capacitor.farads');
    expect(answer.id).toBe(3);
  });
});
