import { FAULTS } from '../../../engine/diagnosis';
import type { FaultId } from '../../../engine/diagnosis/types';
import type { Topology } from '../../../engine/types';

export const TOPOLOGY_WORDS: Record<Topology, string> = {
  'half-wave': 'Half-wave',
  'center-tap': 'Centre-tapped full-wave',
  bridge: 'Bridge',
  doubler: 'Voltage doubler',
};

export const OUTCOME_WORDS: Record<string, string> = { fixed: 'Fixed', 'not-fixed': 'Not fixed', referred: 'Referred', 'no-fault-found': 'No fault found' };

/** A fault id in words (the catalogue's trade name; unknown ids as they are). */
export function faultWords(fault: string): string {
  return FAULTS[fault as FaultId]?.name ?? fault;
}
