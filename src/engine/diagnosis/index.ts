/**
 * Diagnosis: readings in, a verdict out. See rank.ts for the method, model.ts for the
 * simulations behind it.
 *
 * Two steps so the app can keep the expensive part while readings come in:
 *   prepareDiagnosis (tens of engine solves) → diagnoseReadings (milliseconds) per reading.
 */
import { parseSupplySpec } from '../spec';
import { diodeLabels } from '../spec';
import { resolveMeter } from './meter';
import { buildSupplyModel, type SupplyModel } from './model';
import { healthyBands, rankFaults } from './rank';
import { collectReadings } from './readings';
import type { DiagnoseInput, Diagnosis, MeterSettings, ReadingBand, ReadingsInput, ToleranceSettings } from './types';
import type { SupplySpecInput } from '../types';

export * from './types';
export { parseMeterText, type MeterUnit, type ParsedMeterText } from './meter-text';
export { readingGuide, MAINS_CAUTION, DISCHARGE_CAUTION, diodePins } from './points';
export { FAULTS, FAULT_IDS, tableEsrOhms } from './faults';
export { MAINS_REGIONS, mainsBandFor } from './regions';
export { DEFAULT_METER, resolveMeter, readWaveform, accuracyHalfWidth, SINE_FORM_FACTOR } from './meter';
export { judge, formatValue } from './rank';

/** The simulated supply, kept between readings. Not JSON data. */
export interface PreparedDiagnosis {
  readonly model: SupplyModel;
}

/**
 * Simulates the supply for diagnosis: the healthy unit across its tolerances and every fault.
 * @throws SpecError when the spec is not a valid supply
 */
export function prepareDiagnosis(input: { spec: SupplySpecInput | unknown; meter?: MeterSettings; tolerances?: ToleranceSettings }): PreparedDiagnosis {
  const spec = parseSupplySpec(input.spec);
  return { model: buildSupplyModel(spec, resolveMeter(input.meter), input.tolerances) };
}

/** The bands a healthy unit shows on this meter, to show before measuring. */
export function expectedBands(prepared: PreparedDiagnosis): ReadingBand[] {
  return healthyBands(prepared.model);
}

/** Ranks the faults for the readings taken so far (cheap: no engine solves). */
export function diagnoseReadings(prepared: PreparedDiagnosis, readings: ReadingsInput): Diagnosis {
  const m = prepared.model;
  const { readings: checked, problems } = collectReadings(readings ?? {}, diodeLabels(m.spec.topology), m.spec.capacitors.length);
  return rankFaults(m, checked, problems);
}

/**
 * One-shot diagnosis: simulate, then rank.
 * @throws SpecError when the spec is not a valid supply
 */
export function diagnose(input: DiagnoseInput): Diagnosis {
  const prepared = prepareDiagnosis(input);
  return diagnoseReadings(prepared, input.readings);
}
