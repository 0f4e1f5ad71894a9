import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { expectClose } from '../helpers/tolerance';
import {
  DIODE_PRESETS,
  SpecError,
  diodeForwardVolts,
  diodeLabels,
  parseSupplySpec,
  thermalVoltage,
} from '../../src/engine/spec';
import { TOPOLOGIES } from '../../src/engine/types';
import type { DiodeModel, SupplySpec, Topology } from '../../src/engine/types';

/** The SpecError `parseSupplySpec` throws for `input`; fails the test on success or another error. */
function specErrorOf(input: unknown): SpecError {
  try {
    parseSupplySpec(input);
  } catch (error) {
    if (error instanceof SpecError) {
      return error;
    }
    throw error;
  }
  throw new Error(`expected a SpecError, but ${JSON.stringify(input)} was accepted`);
}

/** A small valid bridge supply to vary one field at a time. */
function bridge(extra: Record<string, unknown> = {}): Record<string, unknown> {
  return { topology: 'bridge', source: { vrms: 12, hz: 50 }, load: { ohms: 100 }, ...extra };
}

function withSource(source: Record<string, unknown>): Record<string, unknown> {
  return bridge({ source });
}

/** Every number anywhere inside a value. */
function numbersIn(value: unknown): number[] {
  if (typeof value === 'number') return [value];
  if (Array.isArray(value)) return value.flatMap(numbersIn);
  if (typeof value === 'object' && value !== null) return Object.values(value).flatMap(numbersIn);
  return [];
}

describe('parseSupplySpec refuses bad input with a SpecError naming the field', () => {
  it('says exactly what is wrong in the documented examples', () => {
    expect(specErrorOf(bridge({ capacitor: { farads: -1 } })).message).toBe(
      'capacitor.farads: must be a positive number of farads (got -1)',
    );
    expect(specErrorOf(bridge({ topology: 'full-bridge' })).message).toBe(
      'topology: unknown topology "full-bridge"; expected one of half-wave, center-tap, bridge, doubler',
    );
    expect(specErrorOf({ topology: 'bridge', source: { vrms: 12, hz: 50 } }).message).toBe(
      'load: missing; give {"ohms": R} or {"amps": I}',
    );
    expect(specErrorOf(withSource({ vrms: 12, hz: 0 })).message).toMatch(/^source\.hz: frequency must be above 0/);
    expect(specErrorOf(bridge({ topology: 'doubler' })).message).toMatch(/^capacitor: a doubler needs its capacitors/);
  });

  const cases: Array<[string, unknown, string, RegExp?]> = [
    // The whole input
    ['null', null, ''],
    ['a list', [bridge()], ''],
    ['a string', 'bridge', ''],
    ['a number', 42, ''],
    ['nothing', undefined, ''],
    // topology
    ['no topology', {}, 'topology', /missing/],
    ['a numeric topology', bridge({ topology: 3 }), 'topology', /got 3/],
    ['a near-miss topology', bridge({ topology: 'centre-tap' }), 'topology', /did you mean "center-tap"/],
    // source
    ['no source', bridge({ source: undefined }), 'source', /missing/],
    ['a bare number for source', bridge({ source: 12 }), 'source'],
    ['no vrms', withSource({ hz: 50 }), 'source.vrms', /missing/],
    ['NaN vrms', withSource({ vrms: Number.NaN, hz: 50 }), 'source.vrms', /finite/],
    ['infinite vrms', withSource({ vrms: Number.POSITIVE_INFINITY, hz: 50 }), 'source.vrms', /finite/],
    ['−∞ vrms', withSource({ vrms: Number.NEGATIVE_INFINITY, hz: 50 }), 'source.vrms', /finite/],
    ['text vrms', withSource({ vrms: 'twelve', hz: 50 }), 'source.vrms', /must be a number of volts/],
    ['vrms with a unit', withSource({ vrms: '12 V', hz: 50 }), 'source.vrms', /write the number alone/],
    ['overflowing vrms text', withSource({ vrms: '1e999', hz: 50 }), 'source.vrms', /finite/],
    ['boolean vrms', withSource({ vrms: true, hz: 50 }), 'source.vrms'],
    ['negative vrms', withSource({ vrms: -1, hz: 50 }), 'source.vrms', /0 V or more/],
    ['vrms above 100 kV', withSource({ vrms: 200e3, hz: 50 }), 'source.vrms', /100 kV/],
    ['negative hz', withSource({ vrms: 12, hz: -50 }), 'source.hz', /frequency must be above 0/],
    ['hz above 10 kHz', withSource({ vrms: 12, hz: 20e3 }), 'source.hz', /10 kHz/],
    ['hz below 1 Hz', withSource({ vrms: 12, hz: 0.5 }), 'source.hz', /1 Hz/],
    ['negative winding ohms', withSource({ vrms: 12, hz: 50, ohms: -1 }), 'source.ohms'],
    // unknown keys, at every level
    ['"capacitance" for "capacitor"', bridge({ capacitance: { farads: 1e-3 } }), 'capacitance', /did you mean "capacitor"/],
    ['"Hz" for "hz"', withSource({ vrms: 12, Hz: 50 }), 'source.Hz', /did you mean "hz"/],
    ['"ESR" for "esr"', bridge({ capacitor: { farads: 1e-3, ESR: 0.1 } }), 'capacitor.ESR', /did you mean "esr"/],
    ['an own "__proto__" key', JSON.parse('{"__proto__": {"x": 1}, "topology": "bridge"}'), '__proto__', /unknown setting/],
    [
      'a nested "__proto__" key',
      JSON.parse('{"topology": "bridge", "source": {"__proto__": null, "vrms": 12, "hz": 50}, "load": {"ohms": 1}}'),
      'source.__proto__',
    ],
    ['a "constructor" key', bridge({ constructor: 1 }), 'constructor'],
    // diode
    ['an unknown preset', bridge({ diode: { preset: 'led' } }), 'diode.preset', /silicon, schottky, germanium, ideal/],
    ['a bare preset name', bridge({ diode: 'silicon' }), 'diode'],
    ['a preset mixed with numbers', bridge({ diode: { preset: 'silicon', is: 1e-9 } }), 'diode.is', /cannot be combined/],
    ['a shockley diode without n', bridge({ diode: { is: 1e-9 } }), 'diode.n', /missing/],
    ['a shockley diode without is', bridge({ diode: { n: 2 } }), 'diode.is', /missing/],
    ['a negative saturation current', bridge({ diode: { is: -1e-9, n: 2 } }), 'diode.is', /positive/],
    ['an unphysical emission coefficient', bridge({ diode: { is: 1e-9, n: 0.1 } }), 'diode.n'],
    ['a negative forward drop', bridge({ diode: { vf: -0.7 } }), 'diode.vf'],
    ['a diode with only ohms', bridge({ diode: { ohms: 1 } }), 'diode'],
    ['both diode forms', bridge({ diode: { is: 1e-9, n: 2, vf: 0.7 } }), 'diode.vf', /cannot be combined/],
    // capacitor
    ['a capacitor without farads', bridge({ capacitor: {} }), 'capacitor.farads', /missing/],
    ['zero farads', bridge({ capacitor: { farads: 0 } }), 'capacitor.farads', /positive/],
    ['farads above 10 F', bridge({ capacitor: { farads: 20 } }), 'capacitor.farads', /10 F/],
    ['farads below 1 pF', bridge({ capacitor: { farads: 1e-15 } }), 'capacitor.farads', /1 pF/],
    ['a negative ESR', bridge({ capacitor: { farads: 1e-3, esr: -0.1 } }), 'capacitor.esr'],
    ['a bare number for capacitor', bridge({ capacitor: 0.0022 }), 'capacitor', /farads/],
    ['a capacitor list on a bridge', bridge({ capacitor: [{ farads: 1e-3 }, { farads: 1e-3 }] }), 'capacitor', /only for the doubler/],
    ['a doubler with one listed capacitor', bridge({ topology: 'doubler', capacitor: [{ farads: 1e-3 }] }), 'capacitor', /exactly two/],
    [
      'a bad second doubler capacitor',
      bridge({ topology: 'doubler', capacitor: [{ farads: 1e-3 }, { farads: -1 }] }),
      'capacitor[1].farads',
    ],
    // load
    ['an empty load', bridge({ load: {} }), 'load'],
    ['both ohms and amps', bridge({ load: { ohms: 10, amps: 1 } }), 'load', /not both/],
    ['a zero-ohm load', bridge({ load: { ohms: 0 } }), 'load.ohms', /above 0/],
    ['a negative load', bridge({ load: { ohms: -5 } }), 'load.ohms'],
    ['a negative load current', bridge({ load: { amps: -1 } }), 'load.amps'],
    ['a text load', bridge({ load: { ohms: 'ten' } }), 'load.ohms'],
    ['a bare number for load', bridge({ load: 100 }), 'load'],
    // regulator
    ['an empty regulator', bridge({ regulator: {} }), 'regulator'],
    ['a linear and zener mix', bridge({ regulator: { volts: 5, zenerVolts: 5.1 } }), 'regulator', /not a mix/],
    ['a linear regulator without volts', bridge({ regulator: { dropout: 2 } }), 'regulator.volts', /missing/],
    ['a negative regulator voltage', bridge({ regulator: { volts: -5 } }), 'regulator.volts'],
    ['a negative quiescent current', bridge({ regulator: { volts: 5, quiescentAmps: -1 } }), 'regulator.quiescentAmps'],
    ['a zero zener voltage', bridge({ regulator: { zenerVolts: 0, seriesOhms: 100 } }), 'regulator.zenerVolts', /above 0/],
    ['a negative zener voltage', bridge({ regulator: { zenerVolts: -1, seriesOhms: 100 } }), 'regulator.zenerVolts'],
    ['a zener without its resistor', bridge({ regulator: { zenerVolts: 5.1 } }), 'regulator.seriesOhms', /missing/],
    ['a zero series resistor', bridge({ regulator: { zenerVolts: 5.1, seriesOhms: 0 } }), 'regulator.seriesOhms'],
    // diodeCondition
    ['D3 on a center-tap', bridge({ topology: 'center-tap', diodeCondition: { D3: 'open' } }), 'diodeCondition.D3', /D1, D2/],
    ['D2 on a half-wave', bridge({ topology: 'half-wave', diodeCondition: { D2: 'short' } }), 'diodeCondition.D2'],
    ['an unknown diode label', bridge({ diodeCondition: { D5: 'open' } }), 'diodeCondition.D5'],
    ['an unknown condition', bridge({ diodeCondition: { D1: 'broken' } }), 'diodeCondition.D1', /ok, open or short/],
    ['a bare condition', bridge({ diodeCondition: 'open' }), 'diodeCondition'],
    // temperature
    ['an absurd temperature', bridge({ temperatureC: 500 }), 'temperatureC'],
    ['a temperature far below freezing', bridge({ temperatureC: -100 }), 'temperatureC'],
    ['a text temperature', bridge({ temperatureC: 'hot' }), 'temperatureC'],
  ];

  it.each(cases)('refuses %s', (_name, input, field, pattern) => {
    const error = specErrorOf(input);
    expect(error.field).toBe(field);
    expect(error.message.startsWith(`${field === '' ? 'supply' : field}: `)).toBe(true);
    expect(error.message).toBe(`${field === '' ? 'supply' : field}: ${error.problem}`);
    if (pattern !== undefined) {
      expect(error.message).toMatch(pattern);
    }
  });
});

describe('parseSupplySpec normalises valid input', () => {
  it('fills in the documented defaults for a minimal supply', () => {
    const spec = parseSupplySpec(bridge());
    const expected: SupplySpec = {
      topology: 'bridge',
      source: { vrms: 12, hz: 50, ohms: 0 },
      diode: DIODE_PRESETS.silicon,
      capacitors: [],
      load: { kind: 'resistive', ohms: 100 },
      regulator: null,
      diodeCondition: ['ok', 'ok', 'ok', 'ok'],
      temperatureC: 25,
    };
    expect(spec).toEqual(expected);
  });

  it('treats null optional fields as not given', () => {
    const spec = parseSupplySpec(
      bridge({ diode: null, capacitor: null, regulator: null, diodeCondition: null, temperatureC: null }),
    );
    expect(spec).toEqual(parseSupplySpec(bridge()));
  });

  it('accepts plain decimal strings as numbers', () => {
    const spec = parseSupplySpec(bridge({ source: { vrms: '12', hz: ' 60 ' }, capacitor: { farads: '2.2e-3' } }));
    expect(spec.source).toEqual({ vrms: 12, hz: 60, ohms: 0 });
    expect(spec.capacitors).toEqual([{ farads: 2.2e-3, esrOhms: 0 }]);
  });

  it('keeps the given values with their units', () => {
    const spec = parseSupplySpec({
      topology: 'center-tap',
      source: { vrms: 9, hz: 60, ohms: 0.4 },
      diode: { vf: 0.7, ohms: 0.05 },
      capacitor: { farads: 4.7e-3, esr: 0.03 },
      load: { amps: 0.8 },
      temperatureC: 40,
    });
    expect(spec.source).toEqual({ vrms: 9, hz: 60, ohms: 0.4 });
    expect(spec.diode).toEqual({ kind: 'pwl', forwardVolts: 0.7, ohms: 0.05 });
    expect(spec.capacitors).toEqual([{ farads: 4.7e-3, esrOhms: 0.03 }]);
    expect(spec.load).toEqual({ kind: 'current', amps: 0.8 });
    expect(spec.temperatureC).toBe(40);
  });

  it('reads a Shockley diode with its series resistance defaulting to 0', () => {
    expect(parseSupplySpec(bridge({ diode: { is: 1e-9, n: 1.8 } })).diode).toEqual({
      kind: 'shockley',
      saturationAmps: 1e-9,
      emission: 1.8,
      ohms: 0,
    });
  });

  it('resolves each preset to a copy of its model', () => {
    for (const name of ['silicon', 'schottky', 'germanium', 'ideal'] as const) {
      const spec = parseSupplySpec(bridge({ diode: { preset: name } }));
      expect(spec.diode).toEqual(DIODE_PRESETS[name]);
      expect(spec.diode).not.toBe(DIODE_PRESETS[name]);
    }
  });

  it('gives both doubler capacitors from one object, as independent copies', () => {
    const spec = parseSupplySpec(bridge({ topology: 'doubler', capacitor: { farads: 1e-3, esr: 0.1 } }));
    expect(spec.capacitors).toEqual([
      { farads: 1e-3, esrOhms: 0.1 },
      { farads: 1e-3, esrOhms: 0.1 },
    ]);
    expect(spec.capacitors[0]).not.toBe(spec.capacitors[1]);
  });

  it('keeps a doubler capacitor list in the order C1, C2', () => {
    const spec = parseSupplySpec(bridge({ topology: 'doubler', capacitor: [{ farads: 1e-3 }, { farads: 2e-3, esr: 0.2 }] }));
    expect(spec.capacitors).toEqual([
      { farads: 1e-3, esrOhms: 0 },
      { farads: 2e-3, esrOhms: 0.2 },
    ]);
  });

  it('fills in 2 V dropout and 5 mA quiescent current for a linear regulator', () => {
    expect(parseSupplySpec(bridge({ regulator: { volts: 5 } })).regulator).toEqual({
      kind: 'linear',
      volts: 5,
      dropoutVolts: 2,
      quiescentAmps: 0.005,
    });
    expect(parseSupplySpec(bridge({ regulator: { volts: 3.3, dropout: 0.3, quiescentAmps: 0 } })).regulator).toEqual({
      kind: 'linear',
      volts: 3.3,
      dropoutVolts: 0.3,
      quiescentAmps: 0,
    });
  });

  it('fills in a 5 Ω dynamic resistance for a zener shunt', () => {
    expect(parseSupplySpec(bridge({ regulator: { zenerVolts: 5.1, seriesOhms: 47 } })).regulator).toEqual({
      kind: 'zener',
      zenerVolts: 5.1,
      seriesOhms: 47,
      zenerOhms: 5,
    });
  });

  it('expands diode conditions to one per diode, "ok" where not given', () => {
    expect(parseSupplySpec(bridge({ diodeCondition: { D3: 'open' } })).diodeCondition).toEqual([
      'ok',
      'ok',
      'open',
      'ok',
    ]);
    const ct = parseSupplySpec(bridge({ topology: 'center-tap', diodeCondition: { D2: 'short' } }));
    expect(ct.diodeCondition).toEqual(['ok', 'short']);
  });

  it('names the diodes of each topology in label order', () => {
    expect(diodeLabels('half-wave')).toEqual(['D1']);
    expect(diodeLabels('center-tap')).toEqual(['D1', 'D2']);
    expect(diodeLabels('bridge')).toEqual(['D1', 'D2', 'D3', 'D4']);
    expect(diodeLabels('doubler')).toEqual(['D1', 'D2']);
  });
});

describe('diode presets and helpers', () => {
  it('silicon preset gives about 0.57/0.81/0.96 V at 1 mA/100 mA/1 A', () => {
    // DOMAIN.md §3: the published 1N4001 model (IS=14.11n N=1.984 RS=33.89m).
    expectClose(diodeForwardVolts(DIODE_PRESETS.silicon, 1e-3), 0.57, { abs: 0.01 }, 'silicon VF at 1 mA (DOMAIN.md §3, published 1N4001 model)');
    expectClose(diodeForwardVolts(DIODE_PRESETS.silicon, 0.1), 0.81, { abs: 0.01 }, 'silicon VF at 100 mA (DOMAIN.md §3, published 1N4001 model)');
    expectClose(diodeForwardVolts(DIODE_PRESETS.silicon, 1), 0.96, { abs: 0.01 }, 'silicon VF at 1 A (DOMAIN.md §3, published 1N4001 model)');
    // DOMAIN.md §3, datasheets: 1N400x up to 1.0–1.1 V max at 1 A.
    expect(diodeForwardVolts(DIODE_PRESETS.silicon, 1)).toBeLessThanOrEqual(1.1);
  });

  it('schottky preset drops 0.45–0.6 V at 1 A and 0.15–0.3 V at 1 mA', () => {
    const atOneAmp = diodeForwardVolts(DIODE_PRESETS.schottky, 1);
    // DOMAIN.md §3, datasheets: 1 A schottky parts 0.45–0.6 V max at 1 A.
    expect(atOneAmp).toBeGreaterThanOrEqual(0.45);
    expect(atOneAmp).toBeLessThanOrEqual(0.6);
    const atOneMilliamp = diodeForwardVolts(DIODE_PRESETS.schottky, 1e-3);
    // DOMAIN.md §3, from memory: 0.15–0.3 V at small current.
    expect(atOneMilliamp).toBeGreaterThanOrEqual(0.15);
    expect(atOneMilliamp).toBeLessThanOrEqual(0.3);
  });

  it('germanium preset drops about 0.3 V at small current, below silicon', () => {
    // DOMAIN.md §3: germanium about 0.3 V (weak source); ±0.05 V allowed for that.
    expectClose(diodeForwardVolts(DIODE_PRESETS.germanium, 1e-3), 0.3, { abs: 0.05 }, 'germanium VF at 1 mA (DOMAIN.md §3, about 0.3 V)');
    for (const amps of [1e-3, 0.1, 1]) {
      expect(diodeForwardVolts(DIODE_PRESETS.germanium, amps)).toBeLessThan(
        diodeForwardVolts(DIODE_PRESETS.silicon, amps),
      );
    }
  });

  it('ideal preset drops nothing at any current', () => {
    for (const amps of [0, 1e-3, 1, 100]) {
      expect(diodeForwardVolts(DIODE_PRESETS.ideal, amps)).toBe(0);
    }
  });

  it('thermal voltage is k·T/q: 25.69 mV at 25 °C, 25.85 mV at 300 K', () => {
    // k·T/q with the exact SI 2019 constants (CODATA 2018) at 298.15 K is 25.693 mV. DOMAIN.md §2
    // quotes "25.85 mV at 25 °C", but that is the 300 K (26.85 °C) value; both are checked.
    expectClose(thermalVoltage(25), 0.025693, { abs: 1e-6 }, 'Vt at 25 °C (k·T/q, CODATA 2018)');
    expectClose(thermalVoltage(26.85), 0.02585, { abs: 1e-5 }, 'Vt at 300 K (DOMAIN.md §2, 25.85 mV)');
    // Proportional to absolute temperature.
    expectClose(thermalVoltage(100) / thermalVoltage(0), 373.15 / 273.15, { abs: 1e-12 }, 'Vt ratio 100 °C / 0 °C (proportional to kelvin)');
  });

  it('forward voltage inverts the Shockley law with series resistance', () => {
    // I = Is·(exp((V − I·Rs)/(n·Vt)) − 1) (DOMAIN.md §2) must give back the current.
    const model: DiodeModel = { kind: 'shockley', saturationAmps: 5e-9, emission: 1.7, ohms: 0.2 };
    for (const temperatureC of [-20, 25, 120]) {
      const vt = thermalVoltage(temperatureC);
      for (const amps of [1e-6, 1e-3, 0.5, 3]) {
        const volts = diodeForwardVolts(model, amps, temperatureC);
        const back = model.saturationAmps * Math.expm1((volts - amps * model.ohms) / (model.emission * vt));
        expectClose(back / amps, 1, { abs: 1e-9 }, 'current recovered through the Shockley law / given current');
      }
    }
  });

  it('piecewise-linear forward voltage is the drop plus I·R', () => {
    expect(diodeForwardVolts({ kind: 'pwl', forwardVolts: 0.7, ohms: 0.5 }, 2)).toBeCloseTo(1.7, 12);
    expect(diodeForwardVolts({ kind: 'pwl', forwardVolts: 0.7, ohms: 0.5 }, 0)).toBe(0.7);
  });

  it('refuses negative currents and temperatures below absolute zero', () => {
    expect(() => diodeForwardVolts(DIODE_PRESETS.silicon, -1)).toThrow(RangeError);
    expect(() => diodeForwardVolts(DIODE_PRESETS.silicon, Number.NaN)).toThrow(RangeError);
    expect(() => thermalVoltage(-300)).toThrow(RangeError);
  });
});

// ---------------------------------------------------------------------------------------------
// Properties
// ---------------------------------------------------------------------------------------------

/** Log-uniform in [min, max]: spreads over the decades as real component values do. */
function logUniform(min: number, max: number): fc.Arbitrary<number> {
  return fc
    .double({ min: Math.log(min), max: Math.log(max), noNaN: true })
    .map((x) => Math.min(max, Math.max(min, Math.exp(x))));
}

const capacitorInput = fc.record(
  { farads: logUniform(1e-9, 10), esr: logUniform(1e-4, 100) },
  { requiredKeys: ['farads'] },
);

const diodeInput = fc.oneof(
  fc.record({ preset: fc.constantFrom('silicon', 'schottky', 'germanium', 'ideal') }),
  fc.record(
    { is: logUniform(1e-15, 1e-3), n: fc.double({ min: 0.5, max: 5, noNaN: true }), ohms: logUniform(1e-4, 10) },
    { requiredKeys: ['is', 'n'] },
  ),
  fc.record({ vf: fc.double({ min: 0, max: 5, noNaN: true }), ohms: logUniform(1e-4, 10) }, { requiredKeys: ['vf'] }),
);

const loadInput = fc.oneof(
  fc.record({ ohms: logUniform(1e-2, 1e9) }),
  fc.record({ amps: fc.double({ min: 0, max: 100, noNaN: true }) }),
);

const regulatorInput = fc.oneof(
  fc.record(
    {
      volts: logUniform(1, 1000),
      dropout: fc.double({ min: 0, max: 5, noNaN: true }),
      quiescentAmps: fc.double({ min: 0, max: 0.02, noNaN: true }),
    },
    { requiredKeys: ['volts'] },
  ),
  fc.record(
    { zenerVolts: logUniform(1, 400), seriesOhms: logUniform(1, 1e5), zenerOhms: logUniform(1e-2, 100) },
    { requiredKeys: ['zenerVolts', 'seriesOhms'] },
  ),
);

function conditionInput(topology: Topology): fc.Arbitrary<Record<string, string>> {
  return fc
    .subarray(diodeLabels(topology))
    .chain((labels) =>
      fc.tuple(...labels.map(() => fc.constantFrom('ok', 'open', 'short'))).map((conditions) =>
        Object.fromEntries(labels.map((label, i) => [label, conditions[i] ?? 'ok'])),
      ),
    );
}

/** Valid `SupplySpecInput` objects over the whole accepted range. */
const validInput: fc.Arbitrary<Record<string, unknown>> = fc.constantFrom(...TOPOLOGIES).chain((topology) =>
  fc.record(
    {
      topology: fc.constant(topology),
      source: fc.record(
        { vrms: logUniform(0.1, 1e5), hz: logUniform(1, 1e4), ohms: logUniform(1e-3, 1e3) },
        { requiredKeys: ['vrms', 'hz'] },
      ),
      diode: diodeInput,
      capacitor:
        topology === 'doubler' ? fc.oneof(capacitorInput, fc.tuple(capacitorInput, capacitorInput)) : capacitorInput,
      load: loadInput,
      regulator: regulatorInput,
      diodeCondition: conditionInput(topology),
      temperatureC: fc.double({ min: -60, max: 200, noNaN: true }),
    },
    { requiredKeys: topology === 'doubler' ? ['topology', 'source', 'load', 'capacitor'] : ['topology', 'source', 'load'] },
  ),
);

/** Paths (lists of keys) to every value inside an object or list. */
function pathsIn(value: unknown, prefix: Array<string | number> = []): Array<Array<string | number>> {
  if (typeof value !== 'object' || value === null) return [];
  const entries: Array<[string | number, unknown]> = Array.isArray(value)
    ? value.map((v, i) => [i, v])
    : Object.entries(value);
  return entries.flatMap(([key, v]) => [[...prefix, key], ...pathsIn(v, [...prefix, key])]);
}

/** A deep copy of `root` with the value at `path` replaced (or deleted when `replacement` is absent). */
function mutate(root: unknown, path: Array<string | number>, replacement: { value: unknown } | null): unknown {
  const copy: unknown = JSON.parse(JSON.stringify(root));
  let parent = copy as Record<string | number, unknown>;
  for (const key of path.slice(0, -1)) {
    parent = parent[key] as Record<string | number, unknown>;
  }
  const last = path[path.length - 1];
  if (last === undefined) return copy;
  if (replacement === null) {
    delete parent[last];
  } else {
    parent[last] = replacement.value;
  }
  return copy;
}

/** Parses and checks the only ways out: a spec of finite numbers, or a SpecError. */
function parseOrSpecError(input: unknown): void {
  let spec: SupplySpec;
  try {
    spec = parseSupplySpec(input);
  } catch (error) {
    expect(error).toBeInstanceOf(SpecError);
    const specError = error as SpecError;
    expect(typeof specError.field).toBe('string');
    expect(specError.message.startsWith(specError.field === '' ? 'supply: ' : `${specError.field}: `)).toBe(true);
    return;
  }
  for (const n of numbersIn(spec)) {
    expect(Number.isFinite(n)).toBe(true);
  }
}

const anyValue = fc.anything({
  withBigInt: true,
  withBoxedValues: true,
  withDate: true,
  withMap: true,
  withSet: true,
  withNullPrototype: true,
  withObjectString: true,
  withSparseArray: true,
  withTypedArray: true,
});

describe('parseSupplySpec on arbitrary input', () => {
  it('throws nothing but SpecError for any value at all', () => {
    fc.assert(fc.property(anyValue, parseOrSpecError), { numRuns: 300 });
  });

  it('throws nothing but SpecError for any JSON value', () => {
    fc.assert(fc.property(fc.jsonValue(), parseOrSpecError), { numRuns: 300 });
  });

  it('throws nothing but SpecError when one part of a valid spec is replaced or removed', () => {
    const mutated = validInput.chain((input) => {
      const paths = pathsIn(input);
      return fc.tuple(
        fc.constant(input),
        fc.constantFrom(...paths),
        fc.option(anyValue.map((value) => ({ value })), { nil: null }),
      );
    });
    fc.assert(
      fc.property(mutated, ([input, path, replacement]) => parseOrSpecError(mutate(input, path, replacement))),
      { numRuns: 300 },
    );
  });

  it('refuses an own "__proto__" key beside a valid spec', () => {
    fc.assert(
      fc.property(validInput, fc.jsonValue(), (input, value) => {
        const text = `{"__proto__": ${JSON.stringify(value)}, ${JSON.stringify(input).slice(1)}`;
        expect(specErrorOf(JSON.parse(text)).field).toBe('__proto__');
      }),
      { numRuns: 100 },
    );
  });

  it('parses every valid spec to finite numbers of the right shape', () => {
    fc.assert(
      fc.property(validInput, (input) => {
        const spec = parseSupplySpec(input);
        for (const n of numbersIn(spec)) {
          expect(Number.isFinite(n)).toBe(true);
        }
        expect(spec.topology).toBe(input.topology);
        expect(spec.diodeCondition).toHaveLength(diodeLabels(spec.topology).length);
        const expectedCapacitors = spec.topology === 'doubler' ? 2 : input.capacitor === undefined ? 0 : 1;
        expect(spec.capacitors).toHaveLength(expectedCapacitors);
        expect(spec.source.vrms).toBe((input.source as { vrms: number }).vrms);
      }),
      { numRuns: 300 },
    );
  });
});
