/**
 * The solver against closed forms in their limits, small-ripple estimates, and invariants.
 * ngspice cross-checks live in ngspice.test.ts.
 */
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { expectReadings, parseSupplySpec, solveSupply, type SupplySpecInput } from '../../src/engine';
import { expectClose } from '../helpers/tolerance';

const ideal = { preset: 'ideal' as const };

function solve(input: SupplySpecInput, waveformPoints?: number) {
  return expectReadings(input, waveformPoints ? { waveformPoints } : {});
}

describe('unfiltered rectifiers with ideal diodes reach the textbook closed forms', () => {
  // Textbook results for ideal diodes and a sine of peak Vm (DOMAIN.md §2: Millman & Halkias,
  // Integrated Electronics; Sedra & Smith, Microelectronic Circuits).
  const vrms = 100;
  const vm = Math.SQRT2 * vrms;
  // The ideal diode is smoothed over a 1 mV knee: within 0.05 % of the ideal law at 141 V.
  const tol = { rel: 5e-4 };

  it('half-wave: average Vm/π, RMS Vm/2, ripple factor 1.211, ripple at f, PIV Vm', () => {
    const r = solve({ topology: 'half-wave', source: { vrms, hz: 50 }, diode: ideal, load: { ohms: 1000 } });
    expectClose(r.dc, vm / Math.PI, tol, 'average Vm/π (textbook)');
    const rms = Math.hypot(r.dc, r.rippleRms);
    expectClose(rms, vm / 2, tol, 'RMS Vm/2 (textbook)');
    expectClose(r.rippleRms / r.dc, Math.sqrt(Math.PI ** 2 / 4 - 1), { rel: 1e-3 }, 'ripple factor 1.211 (textbook)');
    expect(r.rippleHz).toBe(50);
    expectClose(r.diodePiv, vm, tol, 'PIV Vm, half-wave resistive (textbook)');
  });

  for (const topology of ['center-tap', 'bridge'] as const) {
    it(`${topology}: average 2Vm/π, RMS Vm/√2, ripple factor 0.483, ripple at 2f`, () => {
      const r = solve({ topology, source: { vrms, hz: 60 }, diode: ideal, load: { ohms: 1000 } });
      expectClose(r.dc, (2 * vm) / Math.PI, tol, 'average 2Vm/π (textbook)');
      expectClose(Math.hypot(r.dc, r.rippleRms), vm / Math.SQRT2, tol, 'RMS Vm/√2 (textbook)');
      expectClose(r.rippleRms / r.dc, Math.sqrt(Math.PI ** 2 / 8 - 1), { rel: 1e-3 }, 'ripple factor 0.483 (textbook)');
      expect(r.rippleHz).toBe(120);
      // PIV: centre-tap 2Vm, bridge Vm (textbook, DOMAIN.md §2).
      expectClose(r.diodePiv, topology === 'bridge' ? vm : 2 * vm, tol, 'PIV rule (textbook)');
    });
  }

  it('the full-wave output reads 1.1107 (the sine form factor) as RMS over average', () => {
    // Form factor of a full-wave rectified sine equals that of the sine, π/(2√2) (DOMAIN.md §2).
    const r = solve({ topology: 'bridge', source: { vrms, hz: 50 }, diode: ideal, load: { ohms: 500 } });
    expectClose(Math.hypot(r.dc, r.rippleRms) / r.dc, Math.PI / (2 * Math.SQRT2), { rel: 5e-4 }, 'form factor 1.1107');
  });
});

describe('piecewise-linear diode, half-wave resistive', () => {
  it('averages (Vm·cosθ1)/π − VD·(π − 2θ1)/(2π) with conduction from θ1 = asin(VD/Vm)', () => {
    // Derivation (DOMAIN.md §2): output Vi − VD while Vi > VD.
    for (const [vrms, vd] of [[6, 0.7], [12, 0.7], [24, 1.1], [3, 0.3]] as const) {
      const vm = Math.SQRT2 * vrms;
      const theta1 = Math.asin(vd / vm);
      const expected = (vm * Math.cos(theta1)) / Math.PI - (vd * (Math.PI - 2 * theta1)) / (2 * Math.PI);
      // A load that draws amps, so the 1 mV knee that smooths the switch shifts the drop by well
      // under a millivolt (at milliamps it would be w·ln(w/(I·R)) ≈ 7 mV).
      const r = solve({ topology: 'half-wave', source: { vrms, hz: 60 }, diode: { vf: vd }, load: { ohms: vrms } });
      // Tolerance: the knee and the 1 mΩ floors on the diode and winding resistance.
      expectClose(r.dc, expected, { rel: 1e-3 }, `half-wave average, Vrms ${vrms}, VD ${vd}`);
    }
  });
});

describe('capacitor-input filters approach the small-ripple estimates', () => {
  // Vr(p-p) ≈ I/(f·C) half-wave, I/(2f·C) full-wave (DOMAIN.md §2) assumes the capacitor
  // discharges for the whole period (half period). With ideal diodes and a constant-current
  // load the exact waveform is known (derivation): the capacitor follows the sine past the
  // crest until the sine falls faster than I/C (at φ0 = asin(I/(C·Vm·ω)) after the crest), then
  // falls linearly until the next rising half sine meets it. The estimate overstates the
  // ripple and is approached from below as C grows. Light load, so the charging current through
  // the engine's 1 mΩ resistance floors stays negligible beside the ripple.
  const amps = 0.05;
  const hz = 50;
  const vm = Math.SQRT2 * 12;
  const omega = 2 * Math.PI * hz;
  function idealRipple(farads: number, per: number): number {
    const slope = amps / farads;
    const phi0 = Math.asin(Math.min(1, slope / (vm * omega)));
    const t0 = 1 / (4 * hz) + phi0 / omega;
    const v = (t: number): number => vm * Math.cos(phi0) - slope * (t - t0);
    const tStart = 1 / (per * hz);
    let lo = tStart;
    let hi = tStart + 1 / (4 * hz);
    for (let i = 0; i < 100; i++) {
      const mid = (lo + hi) / 2;
      if (vm * Math.sin(omega * (mid - tStart)) < v(mid)) lo = mid;
      else hi = mid;
    }
    return vm - v(lo);
  }
  const cases = [
    { topology: 'half-wave' as const, per: 1 },
    { topology: 'bridge' as const, per: 2 },
    { topology: 'center-tap' as const, per: 2 },
  ];
  for (const { topology, per } of cases) {
    it(`${topology}: ripple matches the ideal-diode waveform and nears I/(${per}f·C) from below as C grows`, () => {
      const ratios = [100e-6, 470e-6, 2200e-6].map((farads) => {
        const r = solve({ topology, source: { vrms: 12, hz }, diode: ideal, capacitor: { farads }, load: { amps } });
        expectClose(r.ripplePp, idealRipple(farads, per), { rel: 0.01 }, `ideal-diode ripple, C ${farads * 1e6} µF (derivation)`);
        return r.ripplePp / (amps / (per * hz * farads));
      });
      expect(ratios[0]!).toBeLessThan(ratios[1]!);
      expect(ratios[1]!).toBeLessThan(ratios[2]!);
      expect(ratios[2]!).toBeLessThan(1);
      expect(ratios[2]!).toBeGreaterThan(0.9);
    });
  }

  it('a large capacitor holds the output near the peak: Vdc ≈ Vpeak − Vr/2', () => {
    const farads = 0.047;
    const r = solve({ topology: 'bridge', source: { vrms: 12, hz: 60 }, diode: ideal, capacitor: { farads }, load: { amps: 0.2 } });
    const vr = 0.2 / (2 * 60 * farads);
    expectClose(r.dc, Math.SQRT2 * 12 - vr / 2, { rel: 2e-3 }, 'Vdc ≈ Vpeak − Vr/2 (DOMAIN.md §2)');
    // Sawtooth ripple RMS Vr/(2√3) (DOMAIN.md §2).
    expectClose(r.rippleRms, r.ripplePp / (2 * Math.sqrt(3)), { rel: 0.03 }, 'sawtooth RMS Vr/(2√3)');
  });

  it('PIV: half-wave with a capacitor sees about 2Vm, a bridge about Vm', () => {
    // DOMAIN.md §2: half-wave 2Vm with a capacitor; bridge Vm.
    const vm = Math.SQRT2 * 24;
    const hw = solve({ topology: 'half-wave', source: { vrms: 24, hz: 50 }, diode: ideal, capacitor: { farads: 0.01 }, load: { ohms: 1e4 } });
    expectClose(hw.diodePiv, 2 * vm, { rel: 2e-3 }, 'half-wave PIV 2Vm with capacitor');
    const br = solve({ topology: 'bridge', source: { vrms: 24, hz: 50 }, diode: ideal, capacitor: { farads: 0.01 }, load: { ohms: 1e4 } });
    expectClose(br.diodePiv, vm, { rel: 2e-3 }, 'bridge PIV Vm');
  });

  it('a doubler lightly loaded gives about 2Vm with ripple at 2f', () => {
    const vm = Math.SQRT2 * 120;
    const r = solve({ topology: 'doubler', source: { vrms: 120, hz: 60 }, diode: ideal, capacitor: { farads: 470e-6 }, load: { ohms: 1e6 } });
    expectClose(r.dc, 2 * vm, { rel: 2e-3 }, 'doubler no-load output 2Vm (textbook)');
    expect(r.rippleHz).toBe(120);
  });
});

describe('faulted circuits', () => {
  const base: SupplySpecInput = {
    topology: 'bridge',
    source: { vrms: 12, hz: 60, ohms: 0.4 },
    diode: { preset: 'silicon' },
    capacitor: { farads: 2200e-6, esr: 0.05 },
    load: { ohms: 22 },
  };

  it('one open bridge diode moves the ripple to the line frequency and about doubles it', () => {
    // DOMAIN.md §7: one diode open (bridge): ripple about 2×, at f.
    const ok = solve(base);
    const open = solve({ ...base, diodeCondition: { D3: 'open' } });
    expect(ok.rippleHz).toBe(120);
    expect(open.rippleHz).toBe(60);
    expect(open.ripplePp / ok.ripplePp).toBeGreaterThan(1.6);
    expect(open.ripplePp / ok.ripplePp).toBeLessThan(2.6);
    expect(open.dc).toBeLessThan(ok.dc);
  });

  it('a half-wave supply with its diode open gives 0 V out', () => {
    // DOMAIN.md §7: for a half-wave supply an open diode gives 0 V out.
    const r = solve({ ...base, topology: 'half-wave', diodeCondition: { D1: 'open' } });
    expect(r.converged).toBe(true);
    expect(Math.abs(r.dc)).toBeLessThan(1e-6);
    expect(r.rippleHz).toBe(0);
  });

  it('no AC gives nothing at all, and says it converged', () => {
    const r = solve({ ...base, source: { vrms: 0, hz: 60 } });
    expect(r.converged).toBe(true);
    expect(Math.abs(r.dc)).toBeLessThan(1e-6);
    expect(r.diodePeakA).toBeLessThan(1e-6);
  });

  it('a shorted bridge diode draws a large secondary current and collapses the secondary', () => {
    // DOMAIN.md §7: diode shorted — secondary collapses (the fuse would then blow).
    const ok = solve(base);
    const short = solve({ ...base, diodeCondition: { D1: 'short' } });
    expect(short.secondaryRmsAmps).toBeGreaterThan(3 * ok.secondaryRmsAmps);
    expect(short.secondaryRms).toBeLessThan(0.9 * ok.secondaryRms);
    expect(short.rippleHz).toBe(60);
  });
});

describe('regulators', () => {
  it('a linear regulator holds its set voltage while the valley clears it, and drops out below', () => {
    const spec: SupplySpecInput = {
      topology: 'bridge',
      source: { vrms: 12, hz: 50, ohms: 0.3 },
      capacitor: { farads: 4700e-6 },
      load: { ohms: 20 },
      regulator: { volts: 9, dropout: 2 },
    };
    const r = solve(spec);
    expect(r.regulator?.inRegulation).toBe(true);
    expectClose(r.regulator!.dc, 9, { abs: 1e-9 }, 'regulated output');
    // Dissipation (Vin − Vout)·I + Vin·Iq (DOMAIN.md §6), with Iq 5 mA by default.
    const approx = (r.dc - 9) * (9 / 20) + r.dc * 0.005;
    expectClose(r.regulator!.dissipationWatts, approx, { rel: 0.02 }, 'regulator dissipation');
    const low = solve({ ...spec, source: { vrms: 9, hz: 50, ohms: 0.3 }, regulator: { volts: 12, dropout: 2 } });
    expect(low.regulator?.inRegulation).toBe(false);
    expect(low.regulator!.headroom).toBeLessThan(0);
    expect(low.regulator!.ripplePp).toBeGreaterThan(0.1);
  });

  it('a zener shunt holds near its voltage and reports its feed', () => {
    const r = solve({
      topology: 'center-tap',
      source: { vrms: 9, hz: 60, ohms: 0.3 },
      capacitor: { farads: 1000e-6 },
      load: { ohms: 200 },
      regulator: { zenerVolts: 5.1, seriesOhms: 47 },
    });
    expect(r.regulator?.kind).toBe('zener');
    expect(r.regulator!.inRegulation).toBe(true);
    expect(r.regulator!.dc).toBeGreaterThan(5.1);
    expect(r.regulator!.dc).toBeLessThan(5.6);
    expect(r.regulator!.ripplePp).toBeLessThan(r.ripplePp / 5);
  });
});

describe('invariants over random supplies (fast-check)', () => {
  const topology = fc.constantFrom('half-wave' as const, 'center-tap' as const, 'bridge' as const, 'doubler' as const);
  const supply = fc.record({
    topology,
    vrms: fc.double({ min: 5, max: 250, noNaN: true }),
    hz: fc.constantFrom(50, 60),
    ohms: fc.double({ min: 0, max: 5, noNaN: true }),
    farads: fc.double({ min: 47e-6, max: 10_000e-6, noNaN: true }),
    esr: fc.double({ min: 0, max: 1, noNaN: true }),
    preset: fc.constantFrom('silicon' as const, 'schottky' as const, 'germanium' as const, 'ideal' as const),
    loadFraction: fc.double({ min: 0.05, max: 1, noNaN: true }),
    resistive: fc.boolean(),
  });
  // Keep loads sane: a load current that the capacitor can carry through a cycle.
  type Supply = typeof supply extends fc.Arbitrary<infer T> ? T : never;
  function toSpec(s: Supply, scale = 1, extraFarads = 1): SupplySpecInput {
    const vm = Math.SQRT2 * s.vrms;
    const amps = s.loadFraction * 2 * 50 * s.farads * vm * 0.3;
    return {
      topology: s.topology,
      source: { vrms: s.vrms, hz: s.hz, ohms: s.ohms },
      diode: { preset: s.preset },
      capacitor: { farads: s.farads * extraFarads, esr: s.esr },
      load: s.resistive ? { ohms: vm / (amps * scale) } : { amps: amps * scale },
    };
  }

  it('every valid supply converges with finite figures', () => {
    fc.assert(
      fc.property(supply, (s) => {
        const r = solve(toSpec(s), 16);
        expect(r.converged).toBe(true);
        for (const x of [r.dc, r.ripplePp, r.rippleRms, r.rippleHz, r.diodePeakA, r.diodePiv, r.secondaryRms, r.loadAmps]) {
          expect(Number.isFinite(x)).toBe(true);
        }
        for (const x of r.waveform!.vOut) expect(Number.isFinite(x)).toBe(true);
      }),
      { numRuns: 60, seed: 20261201 },
    );
  });

  it('more capacitance gives less ripple', () => {
    fc.assert(
      fc.property(supply, (s) => {
        const a = solve(toSpec(s));
        const b = solve(toSpec(s, 1, 1.5));
        expect(b.ripplePp).toBeLessThan(a.ripplePp);
      }),
      { numRuns: 40, seed: 7 },
    );
  });

  it('more load gives a lower dc output', () => {
    fc.assert(
      fc.property(supply, (s) => {
        const a = solve(toSpec(s));
        const b = solve(toSpec(s, 1.3));
        expect(b.dc).toBeLessThan(a.dc);
      }),
      { numRuns: 40, seed: 11 },
    );
  });

  it('charge balance: the mean diode current into the output equals the mean load current', () => {
    // At steady state the capacitors' mean current is zero, so what the diodes deliver on
    // average is what the load takes (Kirchhoff's current law over one period).
    fc.assert(
      fc.property(supply, (s) => {
        const spec = parseSupplySpec(toSpec(s));
        const r = solveSupply(spec);
        // Diodes whose cathode is output +: D1 (and D2) except in the doubler, where D1 feeds +
        // and D2 carries the same mean current through the lower capacitor.
        const feeding = spec.topology === 'bridge' ? ['D1', 'D2'] : spec.topology === 'doubler' ? ['D1'] : ['D1', 'D2'];
        const delivered = r.diodes.filter((d) => feeding.includes(d.label)).reduce((sum, d) => sum + d.averageAmps, 0);
        expectClose(delivered, r.loadAmps, { rel: 2e-3, abs: 1e-6 }, 'mean diode current = mean load current');
        if (spec.topology === 'doubler') {
          expectClose(r.diodes[1]!.averageAmps, r.loadAmps, { rel: 2e-3, abs: 1e-6 }, 'doubler lower diode carries the load mean');
        }
      }),
      { numRuns: 40, seed: 3 },
    );
  });
});

describe('contract', () => {
  it('waveform samples cover one period and start where they end', () => {
    const r = solve({ topology: 'bridge', source: { vrms: 12, hz: 50, ohms: 0.5 }, capacitor: { farads: 1e-3 }, load: { ohms: 50 } }, 200);
    const w = r.waveform!;
    expect(w.t.length).toBe(201);
    expectClose(w.t[w.t.length - 1]!, 0.02, { rel: 1e-9 }, 'last sample at the period');
    expectClose(w.vOut[0]!, w.vOut[w.vOut.length - 1]!, { abs: 1e-4 }, 'periodic output');
    expect(w.iDiode.length).toBe(4);
  });

  it('the mean of the waveform is the dc figure', () => {
    const r = solve({ topology: 'half-wave', source: { vrms: 12, hz: 60, ohms: 0.5 }, capacitor: { farads: 470e-6 }, load: { ohms: 100 } }, 2000);
    const w = r.waveform!;
    const mean = w.vOut.slice(0, -1).reduce((a, b) => a + b, 0) / (w.vOut.length - 1);
    expectClose(mean, r.dc, { rel: 2e-3 }, 'resampled mean vs dc');
  });
});
