/**
 * Turns what the technician entered into checked readings in SI units.
 */
import type { DiodeLabel } from '../types';
import { parseMeterText, type MeterUnit } from './meter-text';
import { LIVE_READING_KINDS, READING_UNITS, type MeterValue, type ReadingKind, type ReadingsInput } from './types';

export interface Reading {
  kind: ReadingKind;
  target?: string;
  value: MeterValue;
  /** Where it came from in the input, for messages ("dcOut", "diodeTest.D2.forward"). */
  field: string;
}


function read(
  raw: number | string | undefined,
  unit: MeterUnit,
  field: string,
  problems: { field: string; message: string }[],
  assumedPrefix = '',
): MeterValue | null {
  if (raw === undefined || raw === null || raw === '') return null;
  if (typeof raw === 'number') {
    if (!Number.isFinite(raw)) {
      problems.push({ field, message: 'not a finite number' });
      return null;
    }
    return raw;
  }
  if (typeof raw !== 'string') {
    problems.push({ field, message: 'must be a number or the text shown on the meter' });
    return null;
  }
  const p = parseMeterText(raw, unit, assumedPrefix);
  if (!p.ok) {
    problems.push({ field, message: p.message });
    return null;
  }
  return p.value;
}

/**
 * Checks and converts the readings. Text is parsed as typed (numbers as SI units: volts, hertz,
 * farads, ohms); what cannot be read is listed in `problems` and left out.
 * @param diodes  the topology's diode labels (a diode test on another label is a problem)
 */
export function collectReadings(input: ReadingsInput, diodes: readonly DiodeLabel[], capacitorCount: number): { readings: Reading[]; problems: { field: string; message: string }[] } {
  const problems: { field: string; message: string }[] = [];
  const readings: Reading[] = [];
  if (input === null || typeof input !== 'object' || Array.isArray(input)) {
    return { readings, problems: [{ field: 'readings', message: 'must be an object of readings' }] };
  }
  const known = new Set(['mainsAc', 'acSecondary', 'dcOut', 'rippleAc', 'rippleHz', 'regulatorOut', 'diodeTest', 'capacitance', 'capacitance2', 'esr', 'esr2']);
  for (const key of Object.keys(input)) {
    if (!known.has(key)) problems.push({ field: key, message: 'not a reading this tool knows' });
  }
  for (const kind of LIVE_READING_KINDS) {
    const v = read(input[kind], READING_UNITS[kind], kind, problems);
    if (v === null) continue;
    if (v === 'OL') {
      problems.push({ field: kind, message: 'OL (overload) here means the meter is on too low a range: pick a higher range or auto' });
      continue;
    }
    readings.push({ kind, value: v, field: kind });
  }
  const dt = input.diodeTest;
  if (dt !== undefined && dt !== null) {
    if (typeof dt !== 'object' || Array.isArray(dt)) problems.push({ field: 'diodeTest', message: 'must map diode labels to {forward, reverse}' });
    else {
      for (const [label, pair] of Object.entries(dt)) {
        if (!(diodes as readonly string[]).includes(label)) {
          problems.push({ field: `diodeTest.${label}`, message: `this supply has no diode ${label} (it has ${diodes.join(', ')})` });
          continue;
        }
        if (pair === null || typeof pair !== 'object') {
          problems.push({ field: `diodeTest.${label}`, message: 'must be {forward, reverse}' });
          continue;
        }
        const f = read(pair.forward, 'V', `diodeTest.${label}.forward`, problems);
        if (f !== null) readings.push({ kind: 'diodeForward', target: label, value: f, field: `diodeTest.${label}.forward` });
        const r = read(pair.reverse, 'V', `diodeTest.${label}.reverse`, problems);
        if (r !== null) readings.push({ kind: 'diodeReverse', target: label, value: r, field: `diodeTest.${label}.reverse` });
      }
    }
  }
  const capFields: [keyof ReadingsInput, 'capacitance' | 'esr', string, MeterUnit][] = [
    ['capacitance', 'capacitance', 'C1', 'F'],
    ['capacitance2', 'capacitance', 'C2', 'F'],
    ['esr', 'esr', 'C1', 'Ω'],
    ['esr2', 'esr', 'C2', 'Ω'],
  ];
  for (const [field, kind, target, unit] of capFields) {
    const raw = input[field] as number | string | undefined;
    if (raw === undefined) continue;
    const index = target === 'C1' ? 0 : 1;
    if (index >= capacitorCount) {
      problems.push({ field, message: capacitorCount === 0 ? 'this supply has no filter capacitor' : 'this supply has only one filter capacitor' });
      continue;
    }
    const v = read(raw, unit, field, problems);
    if (v === null) continue;
    if (kind === 'capacitance' && typeof v === 'number' && v > 1) {
      problems.push({ field, message: `${v} F is far more than any filter capacitor: give the unit, e.g. "${v} µF"` });
      continue;
    }
    readings.push({ kind, target, value: v, field });
  }
  return { readings, problems };
}
