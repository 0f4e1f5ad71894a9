/**
 * What the same supplies cost in ngspice, the way one usually simulates them: a transient from
 * rest, 1 s simulated, 20 µs largest step, ngspice's default tolerances, wall-clock of the whole
 * process. Reported as the ratio ngspice time / engine median solve time. Needs the engine
 * section's results; skipped when ngspice is absent or with --skip-ngspice.
 */
import { ngspiceAvailable, ngspiceVersion, timeNgspiceTransient } from '../test/ngspice/run';
import { referenceSupplySpecs } from '../test/ngspice/supplies';
import type { EngineSolveSummary } from './engine-solve';
import { geometricMean, sig, type BenchSection } from './report';

export const ngspiceTransientSection: BenchSection = {
  key: 'ngspiceTransient',
  title: 'ngspice transient of the same supplies (1 s simulated, 20 µs max step), against the engine',
  run(context) {
    if (context.flags.has('skip-ngspice')) return { notes: ['skipped (--skip-ngspice)'], json: { skipped: true } };
    if (!ngspiceAvailable()) return { notes: ['skipped: ngspice not installed'], json: { skipped: true } };
    const engine = context.results.get('engineSolve') as EngineSolveSummary | undefined;
    const rows: { name: string; ngspiceMs: number; engineMs: number; ratio: number }[] = [];
    for (const { name, spec } of referenceSupplySpecs()) {
      const ngspiceMs = timeNgspiceTransient(spec, { stopSeconds: 1, maxStepSeconds: 20e-6 }) * 1000;
      const engineMs = engine?.supplies.find((s) => s.name === name)?.medianMs ?? NaN;
      rows.push({ name, ngspiceMs, engineMs, ratio: ngspiceMs / engineMs });
    }
    const totalNgspice = rows.reduce((a, r) => a + r.ngspiceMs, 0);
    const totalEngine = rows.reduce((a, r) => a + r.engineMs, 0);
    const ratioTotal = totalNgspice / totalEngine;
    const ratioGeoMean = geometricMean(rows.map((r) => r.ratio));
    return {
      table: {
        columns: ['supply', 'ngspice ms', 'engine ms', 'ngspice/engine'],
        rows: rows.map((r) => [r.name, sig(r.ngspiceMs), sig(r.engineMs), sig(r.ratio)]),
      },
      notes: [
        `${ngspiceVersion()}: total ${sig(totalNgspice)} ms against ${sig(totalEngine)} ms for the engine, ` +
          `ratio ${sig(ratioTotal)} (geometric mean of ratios ${sig(ratioGeoMean)})`,
        'ngspice time includes process start-up; its 1 s transient starts from rest and need not have settled.',
      ],
      json: {
        version: ngspiceVersion(),
        ratioTotal: sig(ratioTotal),
        ratioGeometricMean: sig(ratioGeoMean),
        supplies: rows.map((r) => ({ name: r.name, ngspiceMs: sig(r.ngspiceMs), ratio: sig(r.ratio) })),
      },
    };
  },
};
