/**
 * Cross-check of the engine's periodic steady state against ngspice transients run to steady
 * state, on the reference supplies (test/ngspice/supplies.ts). The netlists are written from the
 * circuit definitions (test/ngspice/netlist.ts), not from the engine's code; the harness itself is
 * checked against closed forms in test/ngspice/harness.test.ts.
 *
 * Skips with a message when ngspice is absent; fails instead when RIPPLEWRIGHT_REQUIRE_NGSPICE=1.
 */
import { afterAll, describe, expect, it } from 'vitest';
import {
  checkPasses,
  compareSupply,
  deviationPercent,
  formatDeviationTable,
  REFERENCE_SOURCE,
  type SupplyComparison,
} from '../ngspice/compare';
import { ngspiceGate, ngspiceVersion } from '../ngspice/run';
import { referenceSupplySpecs } from '../ngspice/supplies';

const gate = ngspiceGate();
if (!gate.run && !gate.mustFail) console.warn(`ngspice.test.ts: ${gate.reason}`);

describe.runIf(gate.mustFail)('engine against ngspice', () => {
  it('has ngspice installed (RIPPLEWRIGHT_REQUIRE_NGSPICE=1)', () => {
    throw new Error(gate.reason);
  });
});

describe.runIf(gate.run)('engine against ngspice', () => {
  const done: SupplyComparison[] = [];
  afterAll(() => {
    if (done.length > 0) console.log(`${REFERENCE_SOURCE}; found ${ngspiceVersion()}\n${formatDeviationTable(done)}`);
  });

  for (const { name, description, spec } of referenceSupplySpecs()) {
    it(
      `${name} (${description}): dc within 1 %, ripple within 3 %, diode peak 5 %, PIV 1 % of ngspice`,
      () => {
        const row = compareSupply(name, spec);
        done.push(row);
        for (const c of row.checks) {
          const d = deviationPercent(c);
          // Source: reference simulator: ngspice 39 (Debian package); tolerances in compare.ts.
          expect
            .soft(
              checkPasses(c),
              `${REFERENCE_SOURCE}: ${name} ${c.quantity}: engine ${c.engine.toPrecision(6)} ${c.unit}, ` +
                `ngspice ${c.reference.toPrecision(6)} ${c.unit} (${Number.isNaN(d) ? 'n/a' : d.toFixed(3)} %; ` +
                `allowed ${(c.rel * 100).toFixed(0)} % or ${c.abs.toExponential(1)} ${c.unit})`,
            )
            .toBe(true);
        }
      },
      60_000,
    );
  }
});
