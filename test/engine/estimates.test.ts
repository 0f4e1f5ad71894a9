import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { expectClose } from '../helpers/tolerance';
import { estimateSupply } from '../../src/engine/estimates';
import { DIODE_PRESETS, diodeForwardVolts, parseSupplySpec } from '../../src/engine/spec';
import { TOPOLOGIES } from '../../src/engine/types';
import type { SupplyEstimates, SupplySpec, Topology } from '../../src/engine/types';

function estimate(input: Record<string, unknown>): SupplyEstimates {
  return estimateSupply(parseSupplySpec(input));
}

const VRMS = 24;
const HZ = 50;
const VM = Math.SQRT2 * VRMS;
const IDEAL = { preset: 'ideal' };

function ideal(topology: Topology, extra: Record<string, unknown> = {}): SupplyEstimates {
  return estimate({ topology, source: { vrms: VRMS, hz: HZ }, diode: IDEAL, load: { ohms: 100 }, ...extra });
}

describe('unfiltered estimates follow the textbook closed forms', () => {
  // Textbook: Millman & Halkias, Integrated Electronics; Sedra & Smith, Microelectronic Circuits
  // (DOMAIN.md §2), ideal diodes and a resistive load.
  it('half-wave: average Vm/π, RMS Vm/2, ripple factor 1.211 at f', () => {
    const e = ideal('half-wave');
    expectClose(e.dc, VM / Math.PI, { abs: 1e-9 * VM }, 'half-wave average Vm/π (textbook)');
    expectClose(Math.hypot(e.dc, e.rippleRms), VM / 2, { abs: 1e-9 * VM }, 'half-wave RMS Vm/2 (textbook)');
    expectClose(e.rippleRms / e.dc, 1.211, { abs: 5e-4 }, 'half-wave ripple factor 1.211 (textbook)');
    expect(e.rippleHz).toBe(HZ);
    expectClose(e.ripplePp, VM, { abs: 1e-9 * VM }, 'e.ripplePp ≈ VM');
  });

  it.each(['center-tap', 'bridge'] as const)('%s: average 2Vm/π, RMS Vm/√2, ripple factor 0.483 at 2f', (topology) => {
    const e = ideal(topology);
    expectClose(e.dc, (2 * VM) / Math.PI, { abs: 1e-9 * VM }, 'full-wave average 2Vm/π (textbook)');
    expectClose(Math.hypot(e.dc, e.rippleRms), VM / Math.SQRT2, { abs: 1e-9 * VM }, 'full-wave RMS Vm/√2 (textbook)');
    expectClose(e.rippleRms / e.dc, 0.483, { abs: 5e-4 }, 'full-wave ripple factor 0.483 (textbook)');
    expect(e.rippleHz).toBe(2 * HZ);
  });

  it('half-wave with a fixed drop VD averages (Vm·cos θ1)/π − VD·(π − 2θ1)/(2π)', () => {
    // DOMAIN.md §2, piecewise-linear diode (derivation), θ1 = asin(VD/Vm).
    const vd = 0.7;
    const e = estimate({ topology: 'half-wave', source: { vrms: 6, hz: 60 }, diode: { vf: vd }, load: { ohms: 47 } });
    const vm = Math.SQRT2 * 6;
    const theta1 = Math.asin(vd / vm);
    expectClose(e.dc, (vm * Math.cos(theta1)) / Math.PI - (vd * (Math.PI - 2 * theta1)) / (2 * Math.PI), { abs: 1e-9 }, 'e.dc ≈ (vm * Math.cos(theta1)) / Math.PI - (vd * (Math.PI - 2 * theta1)) / (2 * Math.PI)');
    expectClose(e.vpeakVolts, vm - vd, { abs: 1e-9 }, 'e.vpeakVolts ≈ vm - vd');
  });

  it('bridge takes two fixed drops in each path', () => {
    // DOMAIN.md §2: two diode drops for a bridge; full-wave is twice the half-wave average.
    const vd = 0.7;
    const e = estimate({ topology: 'bridge', source: { vrms: 6, hz: 60 }, diode: { vf: vd }, load: { ohms: 47 } });
    const vm = Math.SQRT2 * 6;
    const theta1 = Math.asin((2 * vd) / vm);
    expectClose(e.dc, (2 * vm * Math.cos(theta1)) / Math.PI - (2 * vd * (Math.PI - 2 * theta1)) / Math.PI, { abs: 1e-9 }, 'e.dc ≈ (2 * vm * Math.cos(theta1)) / Math.PI - (2 * vd * (Math.PI - 2 * theta1)) / Math.PI');
    expectClose(e.vpeakVolts, vm - 2 * vd, { abs: 1e-9 }, 'e.vpeakVolts ≈ vm - 2 * vd');
  });

  it('winding resistance divides the unfiltered output with the load', () => {
    // Ideal switches into R through Rw: the output is |vs|·RL/(RL + Rw) (circuit divider).
    const e = estimate({ topology: 'bridge', source: { vrms: VRMS, hz: HZ, ohms: 25 }, diode: IDEAL, load: { ohms: 100 } });
    expectClose(e.dc, ((2 * VM) / Math.PI) * (100 / 125), { abs: 1e-9 * VM }, 'e.dc ≈ ((2 * VM) / Math.PI) * (100 / 125)');
  });
});

describe('capacitor-input estimates follow the small-ripple rules', () => {
  // Textbook small-ripple estimate (DOMAIN.md §2): Vr = I/(f·C) half-wave, I/(2f·C) full-wave,
  // Vdc = Vpeak − Vr/2, ripple RMS Vr/(2√3); ideal diodes, constant-current load.
  const amps = 0.5;
  const farads = 2.2e-3;
  const filtered = (topology: Topology): SupplyEstimates =>
    ideal(topology, { capacitor: { farads }, load: { amps } });

  it('half-wave: ripple I/(f·C) at f', () => {
    const e = filtered('half-wave');
    const vr = amps / (HZ * farads);
    expectClose(e.ripplePp, vr, { abs: 1e-12 }, 'e.ripplePp ≈ vr');
    expectClose(e.dc, VM - vr / 2, { abs: 1e-9 }, 'e.dc ≈ VM - vr / 2');
    expectClose(e.rippleRms, vr / (2 * Math.sqrt(3)), { abs: 1e-12 }, 'e.rippleRms ≈ vr / (2 * Math.sqrt(3))');
    expectClose(e.vpeakVolts, VM, { abs: 1e-12 }, 'e.vpeakVolts ≈ VM');
    expect(e.rippleHz).toBe(HZ);
  });

  it.each(['center-tap', 'bridge'] as const)('%s: ripple I/(2f·C) at 2f', (topology) => {
    const e = filtered(topology);
    const vr = amps / (2 * HZ * farads);
    expectClose(e.ripplePp, vr, { abs: 1e-12 }, 'e.ripplePp ≈ vr');
    expectClose(e.dc, VM - vr / 2, { abs: 1e-9 }, 'e.dc ≈ VM - vr / 2');
    expectClose(e.rippleRms, vr / (2 * Math.sqrt(3)), { abs: 1e-12 }, 'e.rippleRms ≈ vr / (2 * Math.sqrt(3))');
    expect(e.rippleHz).toBe(2 * HZ);
  });

  it('subtracts the diode drops at the load current and the winding I·R from the peak', () => {
    // DOMAIN.md §2: Vpeak = Vm minus one diode drop (two for a bridge) minus the winding's I·R.
    const ohms = 0.8;
    const silicon = (topology: Topology): SupplyEstimates =>
      estimate({ topology, source: { vrms: VRMS, hz: HZ, ohms }, capacitor: { farads }, load: { amps } });
    const vf = diodeForwardVolts(DIODE_PRESETS.silicon, amps);
    expectClose(silicon('bridge').vpeakVolts, VM - 2 * vf - amps * ohms, { abs: 1e-9 }, 'silicon(\'bridge\').vpeakVolts ≈ VM - 2 * vf - amps * ohms');
    expectClose(silicon('center-tap').vpeakVolts, VM - vf - amps * ohms, { abs: 1e-9 }, 'silicon(\'center-tap\').vpeakVolts ≈ VM - vf - amps * ohms');
    expectClose(silicon('half-wave').vpeakVolts, VM - vf - amps * ohms, { abs: 1e-9 }, 'silicon(\'half-wave\').vpeakVolts ≈ VM - vf - amps * ohms');
  });

  it('finds the dc a resistive load draws its own current at', () => {
    const e = estimate({ topology: 'bridge', source: { vrms: 12, hz: 60, ohms: 0.5 }, capacitor: { farads: 1e-3 }, load: { ohms: 22 } });
    const amps = e.dc / 22;
    const vf = diodeForwardVolts(DIODE_PRESETS.silicon, amps);
    expectClose(e.vpeakVolts, Math.SQRT2 * 12 - 2 * vf - amps * 0.5, { abs: 1e-9 }, 'e.vpeakVolts ≈ Math.SQRT2 * 12 - 2 * vf - amps * 0.5');
    expectClose(e.dc, e.vpeakVolts - amps / (2 * 60 * 1e-3) / 2, { abs: 1e-9 }, 'e.dc ≈ e.vpeakVolts - amps / (2 * 60 * 1e-3) / 2');
  });

  it('ignores ESR and diode conditions', () => {
    const plain = ideal('bridge', { capacitor: { farads } });
    expect(ideal('bridge', { capacitor: { farads, esr: 2 }, diodeCondition: { D1: 'open', D4: 'short' } })).toEqual(plain);
  });

  it('has no ripple and no ripple frequency with no load current', () => {
    const e = ideal('bridge', { capacitor: { farads }, load: { amps: 0 } });
    expect(e.ripplePp).toBe(0);
    expect(e.rippleHz).toBe(0);
    expectClose(e.dc, VM, { abs: 1e-12 }, 'e.dc ≈ VM');
  });

  it('clamps instead of going negative when the ripple would exceed the peak', () => {
    const e = ideal('half-wave', { capacitor: { farads: 1e-9 }, load: { amps: 10 } });
    expect(e.ripplePp).toBeLessThanOrEqual(e.vpeakVolts);
    expect(e.dc).toBe(0);
    expect(e.rippleRms).toBeLessThanOrEqual(e.ripplePp / (2 * Math.sqrt(3)) + 1e-12);
  });
});

describe('full-wave doubler estimates', () => {
  // Derivation in src/engine/estimates.ts (doublerFigures): each capacitor charges once a cycle,
  // output ripple I/(f·C) at 2f, dc 2·Vpeak − I/(f·C).
  const amps = 0.2;
  const doubler = (capacitor: unknown, extra: Record<string, unknown> = {}): SupplyEstimates =>
    estimate({ topology: 'doubler', source: { vrms: VRMS, hz: HZ }, diode: IDEAL, capacitor, load: { amps }, ...extra });

  it('equal capacitors: ripple I/(f·C) at 2f, dc 2·Vm − I/(f·C)', () => {
    const farads = 1e-3;
    const e = doubler({ farads });
    const vr = amps / (HZ * farads);
    expectClose(e.ripplePp, vr, { abs: 1e-12 }, 'e.ripplePp ≈ vr');
    expectClose(e.dc, 2 * VM - vr, { abs: 1e-9 }, 'e.dc ≈ 2 * VM - vr');
    expectClose(e.rippleRms, vr / (2 * Math.sqrt(3)), { abs: 1e-12 }, 'e.rippleRms ≈ vr / (2 * Math.sqrt(3))');
    expectClose(e.vpeakVolts, 2 * VM, { abs: 1e-12 }, 'e.vpeakVolts ≈ 2 * VM');
    expect(e.rippleHz).toBe(2 * HZ);
  });

  it('gives the same figures with C1 and C2 swapped, ripple set by the smaller one', () => {
    const a = doubler([{ farads: 1e-3 }, { farads: 3.3e-3 }]);
    const b = doubler([{ farads: 3.3e-3 }, { farads: 1e-3 }]);
    expect(b).toEqual(a);
    expectClose(a.ripplePp, amps / (HZ * 1e-3), { abs: 1e-12 }, 'a.ripplePp ≈ amps / (HZ * 1e-3)');
  });

  it('takes one diode drop per capacitor', () => {
    const e = doubler({ farads: 1e-3 }, { diode: { vf: 0.8 } });
    expectClose(e.vpeakVolts, 2 * (VM - 0.8), { abs: 1e-12 }, 'e.vpeakVolts ≈ 2 * (VM - 0.8)');
  });

  it('gives no output without its capacitors', () => {
    const spec: SupplySpec = { ...parseSupplySpec({ topology: 'doubler', source: { vrms: 24, hz: 50 }, capacitor: { farads: 1e-3 }, load: { ohms: 100 } }), capacitors: [] };
    const e = estimateSupply(spec);
    expect([e.dc, e.ripplePp, e.rippleRms, e.rippleHz]).toEqual([0, 0, 0, 0]);
  });
});

describe('peak inverse voltage rules', () => {
  // DOMAIN.md §2 (textbook): half-wave Vm (2Vm with a capacitor); center-tap 2Vm; bridge Vm;
  // doubler 2Vm.
  const cap = { capacitor: { farads: 1e-3 } };
  it.each<[string, Topology, Record<string, unknown>, number]>([
    ['half-wave unfiltered', 'half-wave', {}, VM],
    ['half-wave with a capacitor', 'half-wave', cap, 2 * VM],
    ['center-tap unfiltered', 'center-tap', {}, 2 * VM],
    ['center-tap with a capacitor', 'center-tap', cap, 2 * VM],
    ['bridge unfiltered', 'bridge', {}, VM],
    ['bridge with a capacitor', 'bridge', cap, VM],
    ['doubler', 'doubler', cap, 2 * VM],
  ])('%s', (_name, topology, extra, piv) => {
    expectClose(ideal(topology, extra).diodePiv, piv, { abs: 1e-12 }, 'ideal(topology, extra).diodePiv ≈ piv');
  });
});

describe('regulators as the filter load', () => {
  const farads = 2.2e-3;
  it('linear: the filter carries the output current plus the quiescent current', () => {
    const e = ideal('bridge', { capacitor: { farads }, load: { ohms: 10 }, regulator: { volts: 5, quiescentAmps: 0.006 } });
    expectClose(e.ripplePp, (5 / 10 + 0.006) / (2 * HZ * farads), { abs: 1e-12 }, 'e.ripplePp ≈ (5 / 10 + 0.006) / (2 * HZ * farads)');
  });

  it('zener: the filter carries the feed current (Vfilter − Vz)/Rseries', () => {
    const e = ideal('bridge', { capacitor: { farads }, load: { ohms: 1000 }, regulator: { zenerVolts: 12, seriesOhms: 100 } });
    const amps = (e.dc - 12) / 100;
    expectClose(e.ripplePp, amps / (2 * HZ * farads), { abs: 1e-9 }, 'e.ripplePp ≈ amps / (2 * HZ * farads)');
  });

  it('starved zener: the series resistor and load simply share the filter voltage', () => {
    const e = ideal('bridge', { capacitor: { farads }, load: { ohms: 100 }, regulator: { zenerVolts: 30, seriesOhms: 100 } });
    expectClose(e.ripplePp, e.dc / 200 / (2 * HZ * farads), { abs: 1e-9 }, 'e.ripplePp ≈ e.dc / 200 / (2 * HZ * farads)');
  });

  it('says what the filter load is in the basis', () => {
    expect(ideal('bridge', { capacitor: { farads }, regulator: { volts: 5 } }).basis).toMatch(/5 mA quiescent/);
    expect(ideal('bridge', { capacitor: { farads }, regulator: { zenerVolts: 5.1, seriesOhms: 100 } }).basis).toMatch(
      /Vz\)\/Rseries/,
    );
  });
});

describe('basis', () => {
  it('names the ripple rule used, in one sentence', () => {
    const cases: Array<[SupplyEstimates, RegExp]> = [
      [ideal('half-wave', { capacitor: { farads: 1e-3 } }), /I\/\(f·C\)/],
      [ideal('bridge', { capacitor: { farads: 1e-3 } }), /I\/\(2f·C\)/],
      [ideal('doubler', { capacitor: { farads: 1e-3 } }), /I\/\(f·C\) at 2f/],
      [ideal('center-tap'), /2Vm\/π/],
      [ideal('half-wave'), /Vm\/π/],
    ];
    for (const [e, pattern] of cases) {
      expect(e.basis).toMatch(pattern);
      expect(e.basis.endsWith('.')).toBe(true);
      expect(e.basis.slice(0, -1)).not.toMatch(/\.\s/);
    }
  });
});

// ---------------------------------------------------------------------------------------------
// Properties
// ---------------------------------------------------------------------------------------------

function logUniform(min: number, max: number): fc.Arbitrary<number> {
  return fc
    .double({ min: Math.log(min), max: Math.log(max), noNaN: true })
    .map((x) => Math.min(max, Math.max(min, Math.exp(x))));
}

const regulatorInput = fc.option(
  fc.oneof(
    fc.record({ volts: logUniform(1, 400), dropout: fc.double({ min: 0, max: 3, noNaN: true }) }),
    fc.record({ zenerVolts: logUniform(1, 400), seriesOhms: logUniform(1, 1e4) }),
  ),
  { nil: undefined },
);

/** Valid supplies with a capacitor filter, parsed. */
const filteredSpec: fc.Arbitrary<SupplySpec> = fc
  .record({
    topology: fc.constantFrom(...TOPOLOGIES),
    source: fc.record({ vrms: logUniform(0.1, 1e5), hz: logUniform(1, 1e4), ohms: fc.oneof(fc.constant(0), logUniform(1e-3, 1e3)) }),
    diode: fc.record({ preset: fc.constantFrom('silicon', 'schottky', 'germanium', 'ideal') }),
    capacitor: fc.record({ farads: logUniform(1e-12, 10) }),
    load: fc.oneof(fc.record({ ohms: logUniform(1e-6, 1e12) }), fc.record({ amps: fc.double({ min: 0, max: 1e3, noNaN: true }) })),
    regulator: regulatorInput,
    temperatureC: fc.double({ min: -60, max: 200, noNaN: true }),
  })
  .map((input) => parseSupplySpec(input));

/** The same supplies, sometimes unfiltered (the doubler always keeps its capacitors). */
const anySpec: fc.Arbitrary<SupplySpec> = fc
  .tuple(filteredSpec, fc.boolean())
  .map(([spec, unfiltered]) => (unfiltered && spec.topology !== 'doubler' ? { ...spec, capacitors: [] } : spec));

describe('estimates over arbitrary valid supplies', () => {
  it('are finite, non-negative and consistent', () => {
    fc.assert(
      fc.property(anySpec, (spec) => {
        const e = estimateSupply(spec);
        for (const n of [e.vmVolts, e.vpeakVolts, e.dc, e.ripplePp, e.rippleRms, e.rippleHz, e.diodePiv]) {
          expect(Number.isFinite(n)).toBe(true);
          expect(n).toBeGreaterThanOrEqual(0);
        }
        const slack = 1e-9 * e.vmVolts;
        const peakLimit = spec.topology === 'doubler' ? 2 * e.vmVolts : e.vmVolts;
        expect(e.vpeakVolts).toBeLessThanOrEqual(peakLimit + slack);
        expect(e.dc).toBeLessThanOrEqual(e.vpeakVolts + slack);
        expect(e.ripplePp).toBeLessThanOrEqual(e.vpeakVolts + slack);
        expect(e.rippleRms).toBeLessThanOrEqual(e.ripplePp + slack);
        expect(e.basis.length).toBeGreaterThan(0);
      }),
      { numRuns: 300 },
    );
  });

  it('more capacitance never gives more ripple or less dc', () => {
    fc.assert(
      fc.property(filteredSpec, fc.double({ min: 1.01, max: 100, noNaN: true }), (spec, factor) => {
        const bigger: SupplySpec = {
          ...spec,
          capacitors: spec.capacitors.map((c) => ({ ...c, farads: c.farads * factor })),
        };
        const small = estimateSupply(spec);
        const large = estimateSupply(bigger);
        const slack = 1e-9 * small.vmVolts;
        expect(large.ripplePp).toBeLessThanOrEqual(small.ripplePp + slack);
        expect(large.dc).toBeGreaterThanOrEqual(small.dc - slack);
      }),
      { numRuns: 300 },
    );
  });

  it('more capacitance gives strictly less ripple on an ordinary supply', () => {
    const ripple = (farads: number): number =>
      estimate({ topology: 'bridge', source: { vrms: 12, hz: 50, ohms: 0.3 }, capacitor: { farads }, load: { ohms: 20 } }).ripplePp;
    expect(ripple(4.7e-3)).toBeLessThan(ripple(2.2e-3));
    expect(ripple(2.2e-3)).toBeLessThan(ripple(1e-3));
  });
});
