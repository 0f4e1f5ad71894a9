import { describe, expect, it } from 'vitest';
import { MAINS_REGIONS } from '../../src/engine/diagnosis';
import {
  buildSupply,
  DEFAULT_NAMEPLATE,
  deriveTransformer,
  formFromJob,
  LDO_DROPOUT_VOLTS,
  LINEAR_DROPOUT_VOLTS,
  OFFLINE_SERIES_OHMS,
  parseLoadText,
  regulationFraction,
  type NameplateForm,
} from '../../src/ui/screens/Supply/nameplate';
import { expectClose } from '../helpers/tolerance';

function built(form: Partial<NameplateForm>) {
  const result = buildSupply({ ...DEFAULT_NAMEPLATE, ...form });
  if ('problems' in result) throw new Error(JSON.stringify(result.problems));
  return result;
}

describe('transformer figures from the nameplate', () => {
  it('takes small transformers to regulate worse than big ones, within the typical figures', () => {
    // Typical regulation of small laminated transformers (from memory, see nameplate.ts): about
    // 50 % at 1 VA, 20 % at 10 VA, 8 % at 100 VA.
    expectClose(regulationFraction(1), 0.5, { abs: 0.02 }, 'regulation at 1 VA (from memory)');
    expectClose(regulationFraction(10), 0.2, { abs: 0.005 }, 'regulation at 10 VA (from memory)');
    expectClose(regulationFraction(100), 0.08, { abs: 0.005 }, 'regulation at 100 VA (from memory)');
    expect(regulationFraction(5)).toBeGreaterThan(regulationFraction(50));
  });

  it('chooses the winding resistance that drops the open-circuit volts to the rating at rated current', () => {
    for (const [topology, volts, va] of [['bridge', 12, 20], ['half-wave', 9, 3], ['center-tap', 15, 50], ['doubler', 24, 40]] as const) {
      const d = deriveTransformer(topology, volts, va);
      expectClose(d.openCircuitVolts - d.ratedAmps * d.windingOhms, volts, { rel: 1e-12 }, `${topology}: volts at rated current`);
      // Each half of a centre-tapped winding carries half the VA.
      expectClose(d.ratedAmps * volts, topology === 'center-tap' ? va / 2 : va, { rel: 1e-12 }, `${topology}: VA`);
    }
  });
});

describe('expected load', () => {
  it('reads currents and resistances as typed, decimal comma included', () => {
    expect(parseLoadText('0.5 A')).toEqual({ amps: 0.5 });
    expect(parseLoadText('0,5A')).toEqual({ amps: 0.5 });
    expect(parseLoadText('500 mA')).toEqual({ amps: 0.5 });
    expect(parseLoadText('0.25')).toEqual({ amps: 0.25 });
    expect(parseLoadText('33 Ω')).toEqual({ ohms: 33 });
    expect(parseLoadText('33 ohm')).toEqual({ ohms: 33 });
    expect(parseLoadText('1.2k')).toEqual({ ohms: 1200 });
  });

  it('says what is wrong with a load it cannot read', () => {
    expect(parseLoadText('')).toHaveProperty('problem');
    expect(parseLoadText('0 A')).toHaveProperty('problem');
    expect(parseLoadText('lots')).toHaveProperty('problem');
  });
});

describe('the supply spec from the form', () => {
  it('builds the engine input from the derived transformer figures, the region’s frequency and the parts', () => {
    const result = built({ topology: 'bridge', region: 'ansi-120-a', secondaryVolts: '12,6', transformerVa: '20', capacitorMicrofarads: '2200', loadText: '0.5 A' });
    const d = deriveTransformer('bridge', 12.6, 20);
    expect(result.spec).toEqual({
      topology: 'bridge',
      source: { vrms: d.openCircuitVolts, hz: MAINS_REGIONS['ansi-120-a'].hz, ohms: d.windingOhms },
      diode: { preset: 'silicon' },
      capacitor: { farads: 0.0022 },
      load: { amps: 0.5 },
    });
    expect(result.nameplate).toMatchObject({ region: 'ansi-120-a', secondaryVolts: 12.6, transformerVa: 20, capacitorMicrofarads: 2200 });
  });

  it('uses a measured open-circuit voltage and winding resistance instead of the derived ones', () => {
    const result = built({ openCircuitVolts: '13,9', windingOhms: '0,8' });
    expect(result.spec.source).toMatchObject({ vrms: 13.9, ohms: 0.8 });
  });

  it('feeds the rectifier straight from the mains when there is no transformer', () => {
    const result = built({ transformer: 'none', secondaryVolts: '', transformerVa: '' });
    expect(result.spec.source).toEqual({ vrms: MAINS_REGIONS['en-230'].nominalVolts, hz: 50, ohms: OFFLINE_SERIES_OHMS });
    expect(result.nameplate.secondaryVolts).toBeUndefined();
    expect(result.derivation).toBeNull();
  });

  it('leaves the capacitor out when its field is blank, and sets each regulator kind', () => {
    expect(built({ capacitorMicrofarads: '' }).spec.capacitor).toBeUndefined();
    expect(built({ regulatorKind: 'linear', regulatorVolts: '5' }).spec.regulator).toEqual({ volts: 5, dropout: LINEAR_DROPOUT_VOLTS });
    expect(built({ regulatorKind: 'ldo', regulatorVolts: '3,3' }).spec.regulator).toEqual({ volts: 3.3, dropout: LDO_DROPOUT_VOLTS });
    expect(built({ regulatorKind: 'zener', regulatorVolts: '5.1', seriesOhms: '68' }).spec.regulator).toEqual({ zenerVolts: 5.1, seriesOhms: 68 });
  });

  it('names every field that is missing or not a number at once', () => {
    const result = buildSupply({ ...DEFAULT_NAMEPLATE, secondaryVolts: '', transformerVa: 'twenty', loadText: '', capacitorMicrofarads: '-5' });
    expect('problems' in result && Object.keys(result.problems).sort()).toEqual(['capacitorMicrofarads', 'loadText', 'secondaryVolts', 'transformerVa']);
  });

  it('gives back the same supply from a job that has no saved form text', () => {
    for (const form of [
      { ...DEFAULT_NAMEPLATE },
      { ...DEFAULT_NAMEPLATE, topology: 'center-tap' as const, regulatorKind: 'zener' as const, regulatorVolts: '9.1', seriesOhms: '120', openCircuitVolts: '14.2' },
      { ...DEFAULT_NAMEPLATE, transformer: 'none' as const, windingOhms: '6', capacitorMicrofarads: '47' },
      { ...DEFAULT_NAMEPLATE, regulatorKind: 'ldo' as const, regulatorVolts: '3.3', diodeKind: 'schottky' as const, loadText: '33 Ω' },
    ]) {
      const first = buildSupply(form);
      if ('problems' in first) throw new Error('fixture invalid');
      const again = buildSupply(formFromJob(first.nameplate, first.spec, 'en-230'));
      if ('problems' in again) throw new Error(JSON.stringify(again.problems));
      expect(again.spec).toEqual(first.spec);
    }
  });
});
