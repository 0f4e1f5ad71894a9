import type { SupplyResult } from '../../engine/types';
import { formatQuantity, type DisplayUnit } from '../format';

interface ReadingRow {
  label: string;
  /** Where on the meter: the mode the technician selects. */
  meter: string;
  unit: DisplayUnit;
  expected: number;
  estimate: number | null;
}

function readingRows(result: SupplyResult): ReadingRow[] {
  const { estimates } = result;
  return [
    { label: 'DC output', meter: 'DC V', unit: 'V', expected: result.dc, estimate: estimates.dc },
    { label: 'Ripple, peak to peak', meter: 'scope', unit: 'V', expected: result.ripplePp, estimate: estimates.ripplePp },
    { label: 'Ripple, RMS', meter: 'AC V, true RMS', unit: 'V', expected: result.rippleRms, estimate: estimates.rippleRms },
    { label: 'Ripple frequency', meter: 'Hz on AC V', unit: 'Hz', expected: result.rippleHz, estimate: estimates.rippleHz },
    { label: 'Secondary under load', meter: 'AC V', unit: 'V', expected: result.secondaryRms, estimate: null },
    { label: 'Diode peak current', meter: '', unit: 'A', expected: result.diodePeakA, estimate: null },
    { label: 'Diode peak inverse voltage', meter: '', unit: 'V', expected: result.diodePiv, estimate: estimates.diodePiv },
  ];
}

function regulatorRows(result: SupplyResult): ReadingRow[] {
  const regulator = result.regulator;
  if (regulator === null) return [];
  return [
    { label: 'Regulated output', meter: 'DC V', unit: 'V', expected: regulator.dc, estimate: null },
    { label: 'Regulated ripple, RMS', meter: 'AC V, true RMS', unit: 'V', expected: regulator.rippleRms, estimate: null },
    { label: 'Filter valley', meter: 'scope', unit: 'V', expected: regulator.inputValleyVolts, estimate: null },
    { label: 'Regulator dissipation', meter: '', unit: 'W', expected: regulator.dissipationWatts, estimate: null },
  ];
}

function Row({ row }: { row: ReadingRow }) {
  return (
    <tr>
      <th scope="row">
        {row.label}
        {row.meter === '' ? null : <span class="meter-mode">{row.meter}</span>}
      </th>
      <td>{formatQuantity(row.expected, row.unit)}</td>
      <td>{row.estimate === null ? '—' : formatQuantity(row.estimate, row.unit)}</td>
    </tr>
  );
}

/** Expected readings from the solver beside the textbook estimates, for one solved supply. */
export function ReadingsTable({ result }: { result: SupplyResult }) {
  const regulator = result.regulator;
  return (
    <>
      {result.converged ? null : (
        <p class="warning" role="status">
          The solver did not settle (residual {formatQuantity(result.residualVolts, 'V')}); treat these figures as rough.
        </p>
      )}
      <table class="readings">
        <caption>Expected readings</caption>
        <thead>
          <tr>
            <th scope="col">Reading</th>
            <th scope="col">Expected</th>
            <th scope="col">Textbook estimate</th>
          </tr>
        </thead>
        <tbody>
          {readingRows(result).map((row) => <Row key={row.label} row={row} />)}
        </tbody>
        {regulator === null ? null : (
          <tbody>
            {regulatorRows(result).map((row) => <Row key={row.label} row={row} />)}
          </tbody>
        )}
      </table>
      {regulator === null ? null : (
        <p class={regulator.inRegulation ? 'verdict ok' : 'verdict bad'}>
          {regulator.inRegulation
            ? 'The regulator stays in regulation over the whole cycle.'
            : 'The regulator drops out of regulation in each cycle: its output will sag and pass ripple.'}
        </p>
      )}
      <p class="basis">Estimates: {result.estimates.basis}</p>
    </>
  );
}
