/**
 * Meter model, typed-value parser, expected bands and the diagnosis' contract. The ranking of
 * faulted units against the reference simulator is in diagnosis-ngspice.test.ts.
 */
import { describe, expect, it } from 'vitest';
import {
  accuracyHalfWidth,
  DISCHARGE_CAUTION,
  diagnose,
  diagnoseReadings,
  expectedBands,
  MAINS_CAUTION,
  parseMeterText,
  prepareDiagnosis,
  readWaveform,
  resolveMeter,
  SINE_FORM_FACTOR,
  type MeterKind,
  type ReadingBand,
} from '../../src/engine/diagnosis';
import { expectReadings, type SupplySpecInput } from '../../src/engine';
import { expectClose } from '../helpers/tolerance';

const N = 256;
const wave = (f: (x: number) => number): Float64Array => Float64Array.from({ length: N }, (_, i) => f(i / N));
const meterOf = (kind: MeterKind) => resolveMeter({ kind });

describe('meter model (DOMAIN.md §5)', () => {
  const sine = wave((x) => 10 * Math.sin(2 * Math.PI * x));
  const square = wave((x) => (x < 0.5 ? 10 : -10));
  const sawtooth = wave((x) => 20 * x - 10);
  const fullWave = wave((x) => 10 * Math.abs(Math.sin(2 * Math.PI * x)));

  it('an average-responding meter reads a sine right', () => {
    // Scaled by the sine form factor 1.1107, the rectified mean of a sine is its RMS (meter manuals).
    // 256 samples a period: the rectified mean carries a sampling error of about 5e-5.
    expectClose(readWaveform(sine, 60, meterOf('average-responding')).ac, 10 / Math.SQRT2, { rel: 2e-4 }, 'sine, average-responding');
    expectClose(SINE_FORM_FACTOR, 1.1107, { rel: 1e-4 }, 'form factor π/(2√2) (DOMAIN.md §2)');
  });

  it('an average-responding meter reads a square wave 11 % high', () => {
    // Meter manuals: average-responding meters read a square wave 11 % high.
    const wide = resolveMeter({ kind: 'average-responding', acBandwidthHz: [1, 1e6] });
    const trueRms = 10;
    expectClose(readWaveform(square, 1, wide).ac / trueRms, 1.1107, { rel: 2e-3 }, 'square wave reads 11 % high');
  });

  it('on sawtooth ripple it reads about 0.962 of the true RMS', () => {
    // Computed: 1.1107 × (A/2) / (A/√3) = 0.9619 (DOMAIN.md §5).
    const wide = (kind: MeterKind) => resolveMeter({ kind, acBandwidthHz: [1, 1e6] });
    const ratio = readWaveform(sawtooth, 1, wide('average-responding')).ac / readWaveform(sawtooth, 1, wide('true-rms-ac')).ac;
    expectClose(ratio, 0.962, { rel: 2e-3 }, 'sawtooth ratio');
  });

  it('AC-coupled, the AC part of a full-wave rectified sine is 43.5 % of its total RMS', () => {
    // Computed: √(1/2 − 4/π²)/√(1/2) = 0.435 (DOMAIN.md §5).
    const wide = (kind: MeterKind) => resolveMeter({ kind, acBandwidthHz: [1, 1e6] });
    const ac = readWaveform(fullWave, 1, wide('true-rms-ac')).ac;
    const total = readWaveform(fullWave, 1, wide('true-rms-ac-dc')).ac;
    expectClose(ac / total, 0.435, { rel: 2e-3 }, 'AC part of a full-wave rectified sine');
    expectClose(total, 10 / Math.SQRT2, { rel: 1e-6 }, 'AC+DC reads the whole RMS');
    expectClose(readWaveform(fullWave, 1, wide('true-rms-ac')).dc, (2 * 10) / Math.PI, { rel: 2e-4 }, 'DC mode reads the mean 2Vm/π (256 samples)');
  });

  it('harmonics above the AC band are attenuated, inside it they are not', () => {
    const m = resolveMeter(undefined);
    const inBand = readWaveform(sine, 120, m).ac;
    const above = readWaveform(sine, 2000, m).ac;
    expectClose(inBand, 10 / Math.SQRT2, { rel: 1e-9 }, 'in band');
    expect(above).toBeLessThan(0.5 * inBand);
  });

  it('accuracy ±(1 % + 2) at 100.0 V means 98.8–101.2 V', () => {
    // DOMAIN.md §5 worked example.
    expectClose(accuracyHalfWidth(100, { percent: 1, counts: 2 }, 6000), 1.2, { rel: 1e-9 }, '±1.2 V');
    // A 6000-count meter shows 12.34 V to 0.01 V: ±(0.5 % + 2) = ±0.0817 V.
    expectClose(accuracyHalfWidth(12.34, { percent: 0.5, counts: 2 }, 6000), 0.0617 + 0.02, { rel: 1e-9 }, '12.34 V');
  });
});

describe('typed meter values (DOMAIN.md §9)', () => {
  const cases: [string, 'V' | 'Hz' | 'F' | 'Ω', number | 'OL'][] = [
    ['4,25', 'V', 4.25],
    ['4.25 V', 'V', 4.25],
    ['425mV', 'V', 0.425],
    ['-0,7', 'V', -0.7],
    ['−0.7 V', 'V', -0.7],
    ['1.2k', 'Ω', 1200],
    ['80 mΩ', 'Ω', 0.08],
    ['0.08 ohm', 'Ω', 0.08],
    ['470 µF', 'F', 470e-6],
    ['470uF', 'F', 470e-6],
    ['2,2 mF', 'F', 2.2e-3],
    ['120 Hz', 'Hz', 120],
    ['OL', 'V', 'OL'],
    ['O.L', 'V', 'OL'],
    ['o.l.', 'V', 'OL'],
    ['1e3', 'V', 1000],
  ];
  for (const [text, unit, value] of cases) {
    it(`reads "${text}" as ${value}`, () => {
      const r = parseMeterText(text, unit);
      expect(r.ok).toBe(true);
      if (r.ok && typeof value === 'number' && typeof r.value === 'number') expectClose(r.value, value, { rel: 1e-12 }, text);
      else if (r.ok) expect(r.value).toBe(value);
    });
  }
  it('a bare number in a µF field is microfarads', () => {
    const r = parseMeterText('470', 'F', 'µ');
    expect(r.ok && r.value).toBeCloseTo(470e-6, 12);
  });
  for (const [text, unit, why] of [
    ['', 'V', /nothing entered/],
    ['abc', 'V', /not a number/],
    ['12 Hz', 'V', /not a unit for volts/],
    ['1,2,3', 'V', /decimal separator/],
    ['12 kg', 'Ω', /not a unit for ohms/],
  ] as const) {
    it(`refuses "${text}" with a message`, () => {
      const r = parseMeterText(text, unit);
      expect(r.ok).toBe(false);
      if (!r.ok) expect(r.message).toMatch(why);
    });
  }
});

const bridge: SupplySpecInput = {
  topology: 'bridge',
  source: { vrms: 12, hz: 50, ohms: 0.4 },
  capacitor: { farads: 2200e-6, esr: 0.05 },
  load: { ohms: 22 },
};

function band(bands: ReadingBand[], kind: string, target?: string): ReadingBand {
  const b = bands.find((x) => x.kind === kind && x.target === target);
  if (!b) throw new Error(`no band for ${kind}`);
  return b;
}

describe('expected bands', () => {
  const prepared = prepareDiagnosis({ spec: bridge });
  const bands = expectedBands(prepared);

  it('the mains band is EN 50160 ±10 % at 230 V, widened only by the meter accuracy', () => {
    const b = band(bands, 'mainsAc');
    // EN 50160: 207–253 V (DOMAIN.md §4); the meter's ±(1 % + 3) adds about 2.4 V each side.
    expectClose(b.low, 207 - accuracyHalfWidth(207, { percent: 1, counts: 3 }, 6000), { rel: 1e-9 }, 'EN 50160 low edge');
    expectClose(b.high, 253 + accuracyHalfWidth(253, { percent: 1, counts: 3 }, 6000), { rel: 1e-9 }, 'EN 50160 high edge');
  });

  it('ANSI C84.1 Range A gives 114–126 V at 120 V', () => {
    const b = band(expectedBands(prepareDiagnosis({ spec: { ...bridge, source: { vrms: 12, hz: 60, ohms: 0.4 } } })), 'mainsAc');
    // ANSI C84.1 Range A (from memory, DOMAIN.md §4).
    expectClose(b.low, 114 - accuracyHalfWidth(114, { percent: 1, counts: 3 }, 6000), { rel: 1e-9 }, 'Range A low');
    expectClose(b.high, 126 + accuracyHalfWidth(126, { percent: 1, counts: 3 }, 6000), { rel: 1e-9 }, 'Range A high');
  });

  it('the capacitance band follows ±20 % (IEC 60062 letter M) plus the ageing allowance', () => {
    const noAgeing = expectedBands(prepareDiagnosis({ spec: bridge, tolerances: { capacitorAgeingFraction: 0 } }));
    const b = band(noAgeing, 'capacitance', 'C1');
    expectClose(b.low, 0.8 * 2200e-6, { rel: 1e-12 }, 'IEC 60062 M low');
    expectClose(b.high, 1.2 * 2200e-6, { rel: 1e-12 }, 'IEC 60062 M high');
    expectClose(band(bands, 'capacitance', 'C1').low, 0.7 * 2200e-6, { rel: 1e-12 }, 'with 10 % ageing');
  });

  it('the live bands contain the nominal unit and the same seed gives the same bands', () => {
    const r = expectReadings(bridge);
    const dc = band(bands, 'dcOut');
    expect(dc.low).toBeLessThan(r.dc);
    expect(dc.high).toBeGreaterThan(r.dc);
    // Wider than the meter alone: the line alone moves DC by ±10 %.
    expect(dc.high - dc.low).toBeGreaterThan(0.1 * r.dc);
    const again = expectedBands(prepareDiagnosis({ spec: bridge }));
    expect(again).toEqual(bands);
    const other = expectedBands(prepareDiagnosis({ spec: bridge, tolerances: { seed: 99 } }));
    expect(band(other, 'dcOut').low).not.toBe(dc.low);
  });

  it('a good silicon diode is expected at 0.4–0.9 V forward and OL reversed', () => {
    // DOMAIN.md §3: a good junction reads 0.4–0.9 V forward and OL reversed.
    const f = band(bands, 'diodeForward', 'D1');
    expect(f.low).toBeGreaterThanOrEqual(0.4);
    expect(f.high).toBeLessThanOrEqual(0.9);
    expect(band(bands, 'diodeReverse', 'D1').expectOverload).toBe(true);
  });
});

describe('diagnosis contract', () => {
  const prepared = prepareDiagnosis({ spec: bridge });

  it('with no readings the next step is a live reading, not a power-off test', () => {
    const d = diagnoseReadings(prepared, {});
    expect(d.next).not.toBeNull();
    expect(d.next!.powerOff).toBe(false);
    expect(d.unexplained).toBe(false);
    const total = d.ranked.reduce((s, r) => s + r.probability, 0);
    expectClose(total, 1, { rel: 1e-9 }, 'probabilities add up to 1');
  });

  it('power-off suggestions carry the discharge caution, mains readings the mains caution', () => {
    // Live readings that leave only power-off tests to separate the candidates.
    const r = expectReadings({ ...bridge, capacitor: { farads: 700e-6, esr: 0.1 } });
    const d = diagnoseReadings(prepared, { mainsAc: 230, acSecondary: r.secondaryRms, dcOut: r.dc, rippleAc: r.rippleRms, rippleHz: r.rippleHz });
    expect(d.next?.powerOff).toBe(true);
    expect(d.next?.caution).toBe(DISCHARGE_CAUTION);
    const mains = diagnoseReadings(prepared, { dcOut: 0, acSecondary: 0, rippleAc: 0 });
    expect(mains.ranked[0]!.fault).toBe('no-ac');
    expect(mains.next?.kind).toBe('mainsAc');
    expect(mains.next?.caution).toBe(MAINS_CAUTION);
  });

  it('typed readings are understood, and what is not understood is reported', () => {
    const d = diagnoseReadings(prepared, { dcOut: '15,2', rippleAc: 'lots', capacitance: '470', diodeTest: { D7: { forward: '0.5' } } as never });
    expect(d.verdicts.find((v) => v.kind === 'dcOut')?.value).toBe(15.2);
    const fields = d.problems.map((p) => p.field).sort();
    expect(fields).toEqual(['capacitance', 'diodeTest.D7', 'rippleAc']);
  });

  it('verdicts say low, in or high against the band', () => {
    const bands = expectedBands(prepared);
    const dc = band(bands, 'dcOut');
    const d = diagnoseReadings(prepared, { dcOut: dc.low - 1, rippleAc: (band(bands, 'rippleAc').low + band(bands, 'rippleAc').high) / 2, acSecondary: band(bands, 'acSecondary').high + 1 });
    expect(Object.fromEntries(d.verdicts.map((v) => [v.kind, v.verdict]))).toEqual({ dcOut: 'low', rippleAc: 'in', acSecondary: 'high' });
  });

  it('diode tests find the open diode', () => {
    const d = diagnoseReadings(prepared, { diodeTest: { D1: { forward: '0.55', reverse: 'OL' }, D2: { forward: 'OL', reverse: 'OL' } } });
    expect(d.ranked[0]!.fault).toBe('diode-open');
    expect(d.ranked[0]!.part).toBe('D2');
  });

  it('readings that fit nothing say so rather than forcing a fault', () => {
    const r = expectReadings(bridge);
    // DC far above anything the secondary could give, with the secondary normal.
    const d = diagnoseReadings(prepared, { acSecondary: r.secondaryRms, dcOut: 3 * r.dc, rippleAc: r.rippleRms });
    expect(d.unexplained).toBe(true);
  });

  it('with a cause at 90 % or more it asks for that cause\'s confirming test, then for nothing', () => {
    // DOMAIN.md §7: an open diode is confirmed by a diode test reading OL both ways.
    const r = expectReadings({ ...bridge, diodeCondition: { D2: 'open' } });
    const live = { acSecondary: r.secondaryRms, dcOut: r.dc, rippleAc: r.rippleRms, rippleHz: r.rippleHz };
    const d = diagnoseReadings(prepared, live);
    expect(d.ranked[0]!.fault).toBe('diode-open');
    expect(d.ranked[0]!.probability).toBeGreaterThan(0.9);
    const part = d.ranked[0]!.part!;
    expect(d.next).toMatchObject({ kind: 'diodeForward', target: part, powerOff: true, caution: DISCHARGE_CAUTION });
    const done = diagnoseReadings(prepared, { ...live, diodeTest: { [part]: { forward: 'OL', reverse: 'OL' } } });
    expect(done.ranked[0]!.fault).toBe('diode-open');
    expect(done.next).toBeNull();
  });

  it('the one-shot form gives the same answer as prepare then diagnose', () => {
    const readings = { dcOut: 14.1, rippleAc: 0.5 };
    expect(diagnose({ spec: bridge, readings })).toEqual(diagnoseReadings(prepared, readings));
  });
});
