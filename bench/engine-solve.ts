/**
 * Engine solve speed on the reference supplies: median ms per solve for each, and solves per
 * second over the whole mix. Runs on the main thread, so on one core.
 */
import { solveSupply } from '../src/engine/index';
import { referenceSupplySpecs } from '../test/ngspice/supplies';
import { median, sig, type BenchSection } from './report';

/** Per-supply engine timing, as other sections read it from the context. */
export interface EngineSolveSummary {
  solvesPerSecond: number;
  medianMs: number;
  supplies: { name: string; medianMs: number; minMs: number; solves: number; iterations: number }[];
}

const now = (): number => performance.now();

export const engineSolveSection: BenchSection = {
  key: 'engineSolve',
  title: 'Engine: periodic steady-state solve (one core)',
  run(context) {
    const perSupplySeconds = Number(context.flags.get('seconds') ?? '0.3');
    const supplies = referenceSupplySpecs();
    const rows: EngineSolveSummary['supplies'] = [];
    for (const { name, spec } of supplies) {
      for (let i = 0; i < 3; i++) solveSupply(spec); // warm-up: JIT and caches
      const times: number[] = [];
      let iterations = 0;
      const until = now() + perSupplySeconds * 1000;
      while (times.length < 5 || (now() < until && times.length < 500)) {
        const t0 = now();
        iterations = solveSupply(spec).iterations;
        times.push(now() - t0);
      }
      rows.push({ name, medianMs: median(times), minMs: Math.min(...times), solves: times.length, iterations });
    }
    // The mix: every supply in turn, for a fixed wall time.
    let solves = 0;
    const mixMs = perSupplySeconds * 1000 * 3;
    const start = now();
    while (now() - start < mixMs || solves < supplies.length) {
      solveSupply(supplies[solves % supplies.length]!.spec);
      solves++;
    }
    const solvesPerSecond = solves / ((now() - start) / 1000);
    const summary: EngineSolveSummary = {
      solvesPerSecond: sig(solvesPerSecond),
      medianMs: sig(median(rows.map((r) => r.medianMs))),
      supplies: rows.map((r) => ({ ...r, medianMs: sig(r.medianMs), minMs: sig(r.minMs) })),
    };
    return {
      table: {
        columns: ['supply', 'median ms', 'min ms', 'solves', 'Newton it.'],
        rows: rows.map((r) => [r.name, sig(r.medianMs), sig(r.minMs), r.solves, r.iterations]),
      },
      notes: [
        `mix of ${supplies.length} supplies: ${sig(solvesPerSecond)} solves/s on one core, ` +
          `median of per-supply medians ${summary.medianMs} ms`,
      ],
      json: summary,
    };
  },
};
