/**
 * Diagnosis speed: the full diagnosis of one set of readings (simulate the supply across its
 * tolerances and every fault, then rank), and the re-ranking alone when one more reading comes
 * in (what the app does per entered value). Main thread, one core.
 */
import { expectReadings } from '../src/engine/index';
import { diagnose, diagnoseReadings, prepareDiagnosis } from '../src/engine/diagnosis';
import type { SupplySpecInput } from '../src/engine/types';
import { median, sig, type BenchSection } from './report';

const UNITS: { name: string; spec: SupplySpecInput }[] = [
  { name: 'bridge 12 V + 9 V regulator', spec: { topology: 'bridge', source: { vrms: 12, hz: 60, ohms: 0.4 }, capacitor: { farads: 2200e-6, esr: 0.05 }, load: { ohms: 22 }, regulator: { volts: 9 } } },
  { name: 'half-wave 12 V', spec: { topology: 'half-wave', source: { vrms: 12, hz: 50, ohms: 0.5 }, capacitor: { farads: 1000e-6, esr: 0.1 }, load: { amps: 0.2 } } },
  { name: 'centre-tap 2 × 15 V', spec: { topology: 'center-tap', source: { vrms: 15, hz: 50, ohms: 0.3 }, capacitor: { farads: 4700e-6, esr: 0.03 }, load: { amps: 1 } } },
  { name: 'doubler 120 V', spec: { topology: 'doubler', source: { vrms: 120, hz: 60, ohms: 1 }, capacitor: { farads: 470e-6, esr: 0.2 }, load: { ohms: 1000 } } },
  { name: 'off-line bridge 230 V', spec: { topology: 'bridge', source: { vrms: 230, hz: 50, ohms: 2 }, capacitor: { farads: 100e-6, esr: 0.5 }, load: { amps: 0.3 } } },
];

const now = (): number => performance.now();

export const diagnosisSection: BenchSection = {
  key: 'diagnosis',
  title: 'Diagnosis: all faults × tolerance samples, then ranking (one core)',
  run(context) {
    const seconds = Number(context.flags.get('seconds') ?? '0.3');
    const rows: (string | number)[][] = [];
    const fullMedians: number[] = [];
    const rankMedians: number[] = [];
    for (const { name, spec } of UNITS) {
      const r = expectReadings(spec);
      const readings = { acSecondary: r.secondaryRms, dcOut: r.dc * 0.97, rippleAc: r.rippleRms * 1.8, rippleHz: r.rippleHz };
      diagnose({ spec, readings }); // warm-up
      const full: number[] = [];
      const until = now() + seconds * 3000;
      while (full.length < 3 || (now() < until && full.length < 50)) {
        const t0 = now();
        diagnose({ spec, readings });
        full.push(now() - t0);
      }
      const prepared = prepareDiagnosis({ spec });
      const rank: number[] = [];
      const until2 = now() + seconds * 1000;
      while (rank.length < 5 || (now() < until2 && rank.length < 500)) {
        const t0 = now();
        diagnoseReadings(prepared, readings);
        rank.push(now() - t0);
      }
      const variants = prepared.model.variants.length;
      rows.push([name, sig(median(full)), sig(median(rank)), variants, prepared.model.samples.length]);
      fullMedians.push(median(full));
      rankMedians.push(median(rank));
    }
    const worstFull = Math.max(...fullMedians);
    return {
      table: { columns: ['supply', 'full diagnosis ms', 'ranking only ms', 'variants', 'tolerance samples'], rows },
      notes: [`full diagnosis: median ${sig(median(fullMedians))} ms, slowest supply ${sig(worstFull)} ms (target under 100 ms)`],
      json: { fullMedianMs: sig(median(fullMedians)), fullWorstMs: sig(worstFull), rankingMedianMs: sig(median(rankMedians)) },
    };
  },
};
