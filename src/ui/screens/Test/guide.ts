/**
 * Which step the guided test is on: the safety check first, then the reading the diagnosis
 * suggests (or the one the technician chose instead), with a discharge-and-verify step before
 * the first power-off test.
 */
import type { NextReading } from '../../../engine/diagnosis/types';

export type Step =
  | { kind: 'safety' }
  | { kind: 'no-supply' }
  | { kind: 'waiting' }
  | { kind: 'discharge'; next: NextReading }
  | { kind: 'reading'; guide: NextReading; chosen: boolean; powerBackOn: boolean }
  | { kind: 'done' };

export interface StepInputs {
  safetyDone: boolean;
  hasSupply: boolean;
  /** A diagnosis answer has arrived for the current supply. */
  ready: boolean;
  /** The capacitor was discharged and measured safe, and power has stayed off since. */
  discharged: boolean;
  /** The reading the technician picked instead of the suggestion. */
  chosen: NextReading | null;
  /** The diagnosis's next reading (null: nothing more to learn). */
  suggested: NextReading | null;
}

export function currentStep(inputs: StepInputs): Step {
  if (!inputs.safetyDone) return { kind: 'safety' };
  if (!inputs.hasSupply) return { kind: 'no-supply' };
  const target = inputs.chosen ?? inputs.suggested;
  if (target === null) return inputs.ready ? { kind: 'done' } : { kind: 'waiting' };
  if (target.powerOff && !inputs.discharged) return { kind: 'discharge', next: target };
  return { kind: 'reading', guide: target, chosen: inputs.chosen !== null, powerBackOn: !target.powerOff && inputs.discharged };
}

/**
 * The most a filter capacitor may hold before diode, resistance or capacitance modes are used:
 * 1 V, as the diagnosis's discharge caution says (common practice; DOMAIN.md §8).
 */
export const SAFE_RESIDUAL_VOLTS = 1;

/** Text for a slot chosen from the list, e.g. "diodeForward|D3". */
export function choiceKey(guide: Pick<NextReading, 'kind' | 'target'>): string {
  return `${guide.kind}|${guide.target ?? ''}`;
}
