/**
 * Readings as the screens handle them: their names in trade words, their units, and the
 * diagnosis input built from the readings stored for a job.
 */
import { judge } from '../engine/diagnosis';
import { READING_UNITS, type MeterValue, type ReadingBand, type ReadingKind, type ReadingsInput, type Verdict } from '../engine/diagnosis/types';
import type { DiodeLabel } from '../engine/types';
import type { Reading } from '../model/job';
import { currentReadings } from '../store/readings';
import type { UnitSettings } from '../store/settings';

const NAMES: Record<ReadingKind, string> = {
  mainsAc: 'Mains in',
  acSecondary: 'Secondary AC',
  dcOut: 'DC output',
  rippleAc: 'Ripple (V AC)',
  rippleHz: 'Ripple frequency',
  regulatorOut: 'Regulator output',
  diodeForward: 'forward',
  diodeReverse: 'reverse',
  capacitance: 'capacitance',
  esr: 'ESR',
};

/** The unit of each reading kind: the diagnosis contract's table. */
export const UNITS: Readonly<Record<ReadingKind, ReadingBand['unit']>> = READING_UNITS;

/** The reading's name: "DC output", "D3 forward", "C1 capacitance". */
export function readingName(kind: ReadingKind, target?: string): string {
  if (kind === 'diodeForward' || kind === 'diodeReverse') return `${target ?? 'D1'} ${NAMES[kind]}`;
  if (kind === 'capacitance' || kind === 'esr') return `${target ?? 'C1'} ${NAMES[kind]}`;
  return NAMES[kind];
}

/** One key per reading slot (kind and part), e.g. "dcOut", "diodeForward:D3". */
export function slotKey(kind: ReadingKind, target?: string): string {
  return target === undefined ? kind : `${kind}:${target}`;
}

/** Prefix a bare typed number is taken in: µ or n for capacitance (per settings), none otherwise. */
export function assumedPrefix(kind: ReadingKind, units: UnitSettings): string {
  if (kind === 'capacitance') return units.capacitance === 'nF' ? 'n' : 'µ';
  return '';
}

/** The unit as shown beside the input: "V", "Hz", "µF", "Ω". */
export function inputUnit(kind: ReadingKind, units: UnitSettings): string {
  return kind === 'capacitance' ? units.capacitance : UNITS[kind];
}

/** The latest standing reading of each slot in one phase (corrections applied). */
export function latestBySlot<R extends Reading>(readings: readonly R[], phase: Reading['phase']): Map<string, R> {
  const latest = new Map<string, R>();
  for (const reading of currentReadings(readings)) {
    if (reading.phase !== phase) continue;
    const key = slotKey(reading.kind, reading.target);
    const earlier = latest.get(key);
    if (earlier === undefined || earlier.takenAt <= reading.takenAt) latest.set(key, reading);
  }
  return latest;
}

/** The diagnosis input from a job's readings of one phase (the latest of each slot). */
export function toReadingsInput(readings: readonly Reading[], phase: Reading['phase'] = 'before'): ReadingsInput {
  const input: ReadingsInput = {};
  for (const reading of latestBySlot(readings, phase).values()) {
    const value = reading.value;
    switch (reading.kind) {
      case 'diodeForward':
      case 'diodeReverse': {
        const label = (reading.target ?? 'D1') as DiodeLabel;
        const tests = (input.diodeTest ??= {});
        const entry = (tests[label] ??= {});
        if (reading.kind === 'diodeForward') entry.forward = value;
        else entry.reverse = value;
        break;
      }
      case 'capacitance':
        if (reading.target === 'C2') input.capacitance2 = value;
        else input.capacitance = value;
        break;
      case 'esr':
        if (reading.target === 'C2') input.esr2 = value;
        else input.esr = value;
        break;
      default:
        input[reading.kind] = value;
    }
  }
  return input;
}

/** The band of a slot among the diagnosis bands. */
export function bandFor(bands: readonly ReadingBand[], kind: ReadingKind, target?: string): ReadingBand | undefined {
  return bands.find((band) => band.kind === kind && band.target === target);
}

/**
 * The verdict on a value against its band, the diagnosis's own rule (OL is "in" where a good
 * part reads OL), so the verdict shown at once is the one the ranking uses.
 */
export function verdictFor(value: MeterValue, band: ReadingBand): Verdict {
  return judge(value, band);
}
