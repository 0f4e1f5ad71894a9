/**
 * Diagnosis of faulted units simulated by the reference simulator: for each unit and fault,
 * ngspice (Debian package) simulates the faulted circuit, the meter model turns its waveforms
 * into what a technician would read, and the diagnosis must put the true fault first where its
 * signature is distinct, within the first two among look-alikes, and never flag a healthy unit.
 */
import { afterAll, describe, expect, it } from 'vitest';
import { diagnoseReadings, prepareDiagnosis, resolveMeter, readWaveform, type PreparedDiagnosis, type ReadingsInput } from '../../src/engine/diagnosis';
import { rippleFundamentalHz } from '../../src/engine/measures';
import { estimateSupply, parseSupplySpec, type SupplySpecInput } from '../../src/engine';
import { ngspiceGate, referenceMeasures } from '../ngspice/run';
import { REFERENCE_SOURCE } from '../ngspice/compare';

const gate = ngspiceGate();

interface Unit {
  name: string;
  spec: SupplySpecInput;
  /** Mains nominal of the unit's region (EN 50160 230 V at 50 Hz, ANSI 120 V at 60 Hz). */
  mainsVolts: number;
}

// Generic supplies of the kinds the tool is for (invented values, not any product's).
const UNITS: Unit[] = [
  {
    name: 'bridge 12 V 60 Hz, 2200 µF, 9 V linear regulator',
    spec: { topology: 'bridge', source: { vrms: 12, hz: 60, ohms: 0.4 }, capacitor: { farads: 2200e-6, esr: 0.05 }, load: { ohms: 22 }, regulator: { volts: 9, dropout: 2 } },
    mainsVolts: 120,
  },
  {
    name: 'half-wave 12 V 50 Hz, 1000 µF, 0.2 A',
    spec: { topology: 'half-wave', source: { vrms: 12, hz: 50, ohms: 0.5 }, capacitor: { farads: 1000e-6, esr: 0.1 }, load: { amps: 0.2 } },
    mainsVolts: 230,
  },
  {
    name: 'centre-tap 2 × 15 V 50 Hz, 4700 µF, 1 A',
    spec: { topology: 'center-tap', source: { vrms: 15, hz: 50, ohms: 0.3 }, capacitor: { farads: 4700e-6, esr: 0.03 }, load: { amps: 1 } },
    mainsVolts: 230,
  },
  {
    name: 'doubler on 120 V 60 Hz, 2 × 470 µF, 1 kΩ',
    spec: { topology: 'doubler', source: { vrms: 120, hz: 60, ohms: 1 }, capacitor: { farads: 470e-6, esr: 0.2 }, load: { ohms: 1000 } },
    mainsVolts: 120,
  },
  {
    name: 'off-line bridge on 230 V 50 Hz, 100 µF, 0.3 A',
    spec: { topology: 'bridge', source: { vrms: 230, hz: 50, ohms: 2 }, capacitor: { farads: 100e-6, esr: 0.5 }, load: { amps: 0.3 } },
    mainsVolts: 230,
  },
];

type Fault = string;
/** Look-alikes from live readings: the true fault need only be within the first two. */
function lookAlikes(unit: Unit): Fault[][] {
  const groups: Fault[][] = [['capacitor-low', 'capacitor-esr', 'overload']];
  // On a doubler a shorted diode and an open capacitor both leave a half-wave rectifier.
  if (unit.spec.topology === 'doubler') groups.push(['diode-short', 'capacitor-open']);
  return groups;
}

/** Table ESR of DOMAIN.md §6 (10 µF 5.3 Ω, 100 µF 0.32 Ω, 1000 µF 0.08 Ω), log-log. */
function tableEsr(farads: number): number {
  const uf = farads * 1e6;
  return uf < 100 ? 0.32 * (uf / 100) ** -1.219 : 0.08 * (uf / 1000) ** -0.602;
}

/** The faulted circuit, written from the spec (not from the engine's fault catalogue). */
function faulted(unit: Unit, fault: Fault): { spec: SupplySpecInput; lineFactor: number } | null {
  const s = structuredClone(unit.spec) as SupplySpecInput & { capacitor: { farads: number; esr: number } };
  const cap = s.capacitor;
  switch (fault) {
    case 'healthy':
      return { spec: s, lineFactor: 1 };
    case 'healthy-low-corner':
      // Within tolerance: line −4 %, capacitor −15 %, load +15 %.
      s.source.vrms *= 0.96;
      s.capacitor = { ...cap, farads: cap.farads * 0.85 };
      if ('ohms' in s.load) s.load = { ohms: s.load.ohms / 1.15 };
      else s.load = { amps: s.load.amps * 1.15 };
      return { spec: s, lineFactor: 0.96 };
    case 'healthy-high-corner':
      s.source.vrms *= 1.04;
      s.capacitor = { ...cap, farads: cap.farads * 1.15 };
      if ('ohms' in s.load) s.load = { ohms: s.load.ohms * 1.15 };
      else s.load = { amps: s.load.amps / 1.15 };
      return { spec: s, lineFactor: 1.04 };
    case 'no-ac':
      s.source.vrms = 1e-6;
      return { spec: s, lineFactor: 1 };
    case 'line-low':
      s.source.vrms *= 0.8;
      return { spec: s, lineFactor: 0.8 };
    case 'line-high':
      s.source.vrms *= 1.17;
      return { spec: s, lineFactor: 1.17 };
    case 'diode-open':
      // On a doubler an open D2 leaves the winding with no DC path (only leakage sets its
      // level, and a transient never settles): D1 there.
      s.diodeCondition = { [s.topology === 'half-wave' || s.topology === 'doubler' ? 'D1' : 'D2']: 'open' };
      return { spec: s, lineFactor: 1 };
    case 'diode-short':
      s.diodeCondition = { D1: 'short' };
      return { spec: s, lineFactor: 1 };
    case 'capacitor-low':
      s.capacitor = { ...cap, farads: cap.farads * 0.35, esr: Math.max(cap.esr * 2, tableEsr(cap.farads * 0.35)) };
      return { spec: s, lineFactor: 1 };
    case 'capacitor-open': {
      if (s.topology === 'doubler') {
        (s as SupplySpecInput).capacitor = [{ farads: cap.farads * 1e-3, esr: cap.esr }, { ...cap }];
      } else delete (s as Partial<SupplySpecInput>).capacitor;
      return { spec: s, lineFactor: 1 };
    }
    case 'capacitor-esr':
      s.capacitor = { ...cap, esr: 30 * tableEsr(cap.farads) };
      return { spec: s, lineFactor: 1 };
    case 'overload':
      if ('ohms' in s.load) s.load = { ohms: s.load.ohms / 2.2 };
      else s.load = { amps: s.load.amps * 2.2 };
      return { spec: s, lineFactor: 1 };
    case 'regulator-dropout':
      if (!s.regulator || !('volts' in s.regulator)) return null;
      s.regulator = { ...s.regulator, dropout: 5.5 };
      return { spec: s, lineFactor: 1 };
    case 'regulator-failed':
      if (!s.regulator || !('volts' in s.regulator)) return null;
      s.regulator = { ...s.regulator, volts: 0.001 };
      return { spec: s, lineFactor: 1 };
  }
  return null;
}

const FAULT_CASES: Fault[] = [
  'healthy',
  'healthy-low-corner',
  'healthy-high-corner',
  'no-ac',
  'line-low',
  'line-high',
  'diode-open',
  'diode-short',
  'capacitor-low',
  'capacitor-open',
  'capacitor-esr',
  'overload',
  'regulator-dropout',
  'regulator-failed',
];

const meter = resolveMeter(undefined);

/** What the default meter shows on the reference waveforms (the meter model of DOMAIN.md §5). */
function readingsFromReference(unit: Unit, spec: SupplySpecInput, lineFactor: number): ReadingsInput {
  const parsed = parseSupplySpec(spec);
  // Diagnosis needs the readings to a tenth of a per cent, not the cross-check's 1e-6: a coarser
  // step and tolerance, and a start from the textbook estimate (not from the engine) so slow
  // modes settle sooner; the runner's settling checks are unchanged.
  const est = estimateSupply(parsed);
  const start = parsed.topology === 'doubler' ? [est.dc / 2, est.dc / 2] : parsed.capacitors.map(() => est.dc);
  const ref = referenceMeasures(parsed, { stepsPerPeriod: 1000, relTol: 1e-5, initialCapacitorVolts: start });
  const hz = parsed.source.hz;
  const out = readWaveform(ref.waveform.vOut, hz, meter);
  const sec = readWaveform(ref.waveform.vSecondary, hz, meter);
  const n = ref.waveform.vOut.length;
  const weights = new Float64Array(n).fill(1 / n);
  const readings: ReadingsInput = {
    mainsAc: lineFactor * unit.mainsVolts,
    acSecondary: sec.ac,
    dcOut: out.dc,
    rippleAc: out.ac,
    rippleHz: rippleFundamentalHz(ref.waveform.vOut, weights, hz, 1e-6 * Math.max(1, Math.abs(out.dc))),
  };
  if (ref.waveform.vRegulated) readings.regulatorOut = readWaveform(ref.waveform.vRegulated, hz, meter).dc;
  return readings;
}

const table: string[] = [];
afterAll(() => {
  if (table.length > 0) console.log(`\nDiagnosis of ngspice-simulated units (rank of the true fault, top cause):\n${table.join('\n')}`);
});

describe.runIf(gate.run)(`diagnosis of faulted units (${REFERENCE_SOURCE})`, () => {
  for (const unit of UNITS) {
    describe(unit.name, () => {
      let prepared: PreparedDiagnosis | undefined;
      const prepare = (): PreparedDiagnosis => (prepared ??= prepareDiagnosis({ spec: unit.spec }));
      for (const fault of FAULT_CASES) {
        const made = faulted(unit, fault);
        if (made === null) continue;
        const truth = fault.startsWith('healthy') ? 'healthy' : fault;
        it(`${fault}: ranked ${lookAlikes(unit).some((g) => g.includes(truth)) ? 'within the first two' : 'first'}${truth === 'healthy' ? ', not flagged' : ''}`, () => {
          let readings: ReadingsInput;
          try {
            readings = readingsFromReference(unit, made.spec, made.lineFactor);
          } catch (error) {
            throw new Error(`${unit.name}, ${fault}: ${(error as Error).message}`);
          }
          const d = diagnoseReadings(prepare(), readings);
          const rank = d.ranked.findIndex((r) => r.fault === truth) + 1;
          table.push(
            `  ${unit.name.padEnd(52)} ${fault.padEnd(20)} rank ${rank}  top ${d.ranked[0]!.fault} ${(100 * d.ranked[0]!.probability).toFixed(0)} %${d.unexplained ? '  (fits nothing)' : ''}`,
          );
          const group = lookAlikes(unit).find((g) => g.includes(truth));
          const allowed = group ? 2 : 1;
          expect(rank, `${truth} ranked ${rank}: ${d.ranked.slice(0, 3).map((r) => `${r.fault} ${(100 * r.probability).toFixed(1)} %`).join(', ')}`).toBeGreaterThan(0);
          expect(rank).toBeLessThanOrEqual(allowed);
          if (rank === 2) expect(group).toContain(d.ranked[0]!.fault);
          if (truth === 'healthy') expect(d.unexplained).toBe(false);
        }, 120_000);
      }
    });
  }
});

describe.skipIf(gate.run)('diagnosis of faulted units (ngspice missing)', () => {
  it(gate.reason, () => {
    if (gate.mustFail) throw new Error(gate.reason);
  });
});
