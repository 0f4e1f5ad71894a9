/**
 * Engine versus ngspice, quantity by quantity: the tolerances of the cross-check and a plain table
 * of deviations. Used by test/engine/ngspice.test.ts; run directly to print the table:
 *   npx tsx test/ngspice/compare.ts [supply-name ...]
 */
import { pathToFileURL } from 'node:url';
import { solveSupply } from '../../src/engine/index';
import type { SupplyResult, SupplySpec } from '../../src/engine/types';
import { referenceMeasures, type ReferenceMeasures } from './run';
import { referenceSupplySpecs } from './supplies';

/** The outside reference named beside every cross-check. */
export const REFERENCE_SOURCE = 'reference simulator: ngspice 39 (Debian package)';

export interface CrossCheck {
  quantity: string;
  unit: 'V' | 'A';
  engine: number;
  reference: number;
  /** Allowed relative deviation. */
  rel: number;
  /** Absolute floor for figures near zero, in `unit`. */
  abs: number;
}

/**
 * The quantities compared and their tolerances (brief): dc 1 %, ripple p-p and RMS 3 %, diode
 * peak current 5 %, PIV 1 %; also the secondary RMS, the filter's load current and the regulated
 * output at 1 % (its ripple at 3 %). Floors for near-zero figures: 1e-4·Vm for voltages (below any
 * meter's resolution on that range), 1 mA for the diode peak, 0.1 mA for load currents, and 1 mV
 * for regulated ripple, which is zero in regulation and only numerical noise in either solver.
 */
export function crossChecks(spec: SupplySpec, engine: SupplyResult, ref: ReferenceMeasures): CrossCheck[] {
  const vFloor = 1e-4 * Math.SQRT2 * spec.source.vrms;
  const checks: CrossCheck[] = [
    { quantity: 'dc', unit: 'V', engine: engine.dc, reference: ref.dc, rel: 0.01, abs: vFloor },
    { quantity: 'ripplePp', unit: 'V', engine: engine.ripplePp, reference: ref.ripplePp, rel: 0.03, abs: vFloor },
    { quantity: 'rippleRms', unit: 'V', engine: engine.rippleRms, reference: ref.rippleRms, rel: 0.03, abs: vFloor },
    { quantity: 'diodePeakA', unit: 'A', engine: engine.diodePeakA, reference: ref.diodePeakA, rel: 0.05, abs: 1e-3 },
    { quantity: 'diodePiv', unit: 'V', engine: engine.diodePiv, reference: ref.diodePiv, rel: 0.01, abs: vFloor },
    {
      quantity: 'secondaryRms',
      unit: 'V',
      engine: engine.secondaryRms,
      reference: ref.secondaryRms,
      rel: 0.01,
      abs: vFloor,
    },
    { quantity: 'loadAmps', unit: 'A', engine: engine.loadAmps, reference: ref.loadAmps, rel: 0.01, abs: 1e-4 },
  ];
  if (ref.regulated || engine.regulator) {
    const r = engine.regulator;
    const q = ref.regulated;
    checks.push(
      { quantity: 'regulated.dc', unit: 'V', engine: r?.dc ?? NaN, reference: q?.dc ?? NaN, rel: 0.01, abs: vFloor },
      {
        quantity: 'regulated.ripplePp',
        unit: 'V',
        engine: r?.ripplePp ?? NaN,
        reference: q?.ripplePp ?? NaN,
        rel: 0.03,
        abs: 1e-3,
      },
      {
        quantity: 'regulated.rippleRms',
        unit: 'V',
        engine: r?.rippleRms ?? NaN,
        reference: q?.rippleRms ?? NaN,
        rel: 0.03,
        abs: 1e-3,
      },
    );
  }
  return checks;
}

/** True when the engine's figure is within the check's tolerance of the reference. */
export function checkPasses(c: CrossCheck): boolean {
  if (!Number.isFinite(c.engine) || !Number.isFinite(c.reference)) return false;
  return Math.abs(c.engine - c.reference) <= Math.max(c.rel * Math.abs(c.reference), c.abs);
}

/** Signed relative deviation (engine − reference)/|reference|, in percent (NaN for a zero reference). */
export function deviationPercent(c: CrossCheck): number {
  return c.reference === 0 ? NaN : (100 * (c.engine - c.reference)) / Math.abs(c.reference);
}

/** One supply's comparison. */
export interface SupplyComparison {
  name: string;
  checks: CrossCheck[];
  engineMs: number;
  ngspiceSeconds: number;
}

/**
 * Solves one supply with the engine and with ngspice and pairs the figures.
 * @throws NgspiceError or the engine's error, as they come.
 */
export function compareSupply(name: string, spec: SupplySpec): SupplyComparison {
  const t0 = performance.now();
  const engine = solveSupply(spec);
  const engineMs = performance.now() - t0;
  const ref = referenceMeasures(spec);
  return { name, checks: crossChecks(spec, engine, ref), engineMs, ngspiceSeconds: ref.run.wallSeconds };
}

/** A plain-text table of deviations in percent, one row per supply; failing cells marked "!". */
export function formatDeviationTable(rows: readonly SupplyComparison[]): string {
  const quantities = [...new Set(rows.flatMap((r) => r.checks.map((c) => c.quantity)))];
  const nameWidth = Math.max(6, ...rows.map((r) => r.name.length));
  const width = Math.max(10, ...quantities.map((q) => q.length)) + 1;
  const head = ['supply'.padEnd(nameWidth), ...quantities.map((q) => q.padStart(width))].join(' ');
  const lines = [head, '-'.repeat(head.length)];
  for (const r of rows) {
    const cells = quantities.map((q) => {
      const c = r.checks.find((x) => x.quantity === q);
      if (!c) return ''.padStart(width);
      const d = deviationPercent(c);
      const text = Number.isNaN(d) ? `${c.engine.toExponential(1)}` : `${d >= 0 ? '+' : ''}${d.toFixed(3)}%`;
      return `${checkPasses(c) ? '' : '!'}${text}`.padStart(width);
    });
    lines.push([r.name.padEnd(nameWidth), ...cells].join(' '));
  }
  lines.push('deviation = (engine − ngspice)/|ngspice|; "!" = outside tolerance');
  return lines.join('\n');
}

if (process.argv[1] && import.meta.url === pathToFileURL(process.argv[1]).href) {
  const wanted = new Set(process.argv.slice(2));
  const rows = referenceSupplySpecs()
    .filter((s) => wanted.size === 0 || wanted.has(s.name))
    .map((s) => compareSupply(s.name, s.spec));
  console.log(formatDeviationTable(rows));
}
