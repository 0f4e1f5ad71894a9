/**
 * Where each reading is taken, in field words, with the meter mode and the probe points.
 *
 * Probe points are named for the schematics (the app highlights them):
 *   mains-l, mains-n   mains input (before the transformer)
 *   sec-a, sec-b       secondary terminals (doubler: sec-a is the diode junction, sec-b the
 *                      capacitor midpoint); sec-ct the centre tap
 *   out+, out-         across the filter capacitor / the rectifier output
 *   reg-out            regulator or zener output
 *   D1.a, D1.k …       a diode's anode and cathode; C1+, C1-, C2+, C2- the capacitors
 */
import type { DiodeLabel, Topology } from '../types';
import type { MeterKind, NextReading, ProbePlacement, ReadingKind } from './types';

/** Shown before any mains reading (DOMAIN.md §8). */
export const MAINS_CAUTION =
  'Mains voltage. Use a meter and leads rated for the job (CAT II for plug-in appliances, CAT III at a distribution board), ' +
  'check the meter on a known source first and again after (live-dead-live), keep one hand clear and do not touch bare metal. ' +
  'Follow local codes and licensed practice.';

/** Shown before every power-off test (DOMAIN.md §8). */
export const DISCHARGE_CAUTION =
  'Power off and unplug (lock out and tag at a panel). The filter capacitor can hold a dangerous charge long after: ' +
  'discharge it through a suitable resistor and confirm below 1 V with the meter on V DC before using diode, ' +
  'resistance or capacitance modes. Follow local codes and licensed practice.';

/** Anode and cathode points of each diode by topology (see types.ts for the labels). */
export function diodePins(topology: Topology, label: DiodeLabel): { anode: string; cathode: string } {
  switch (topology) {
    case 'half-wave':
      return { anode: 'sec-a', cathode: 'out+' };
    case 'center-tap':
      return label === 'D1' ? { anode: 'sec-a', cathode: 'out+' } : { anode: 'sec-b', cathode: 'out+' };
    case 'bridge':
      return {
        D1: { anode: 'sec-a', cathode: 'out+' },
        D2: { anode: 'sec-b', cathode: 'out+' },
        D3: { anode: 'out-', cathode: 'sec-a' },
        D4: { anode: 'out-', cathode: 'sec-b' },
      }[label];
    case 'doubler':
      return label === 'D1' ? { anode: 'sec-a', cathode: 'out+' } : { anode: 'out-', cathode: 'sec-a' };
  }
}

const PIN_WORDS: Record<string, string> = {
  'sec-a': 'the first secondary lead',
  'sec-b': 'the second secondary lead',
  'sec-ct': 'the centre tap',
  'out+': 'the + end of the filter capacitor',
  'out-': 'the − end of the filter capacitor',
};

function pinWords(topology: Topology, pin: string): string {
  if (topology === 'doubler' && pin === 'sec-a') return 'the junction of the two diodes';
  if (topology === 'bridge' && pin === 'sec-a') return 'the first AC pin of the bridge (~)';
  if (topology === 'bridge' && pin === 'sec-b') return 'the second AC pin of the bridge (~)';
  return PIN_WORDS[pin] ?? pin;
}

/**
 * How to take one reading: instruction, meter mode, probes, power state and caution.
 * `gainBits` is left at 0 for the caller to fill.
 */
export function readingGuide(topology: Topology, kind: ReadingKind, target: string | undefined, meterKind: MeterKind): NextReading {
  const secB = topology === 'center-tap' ? 'sec-ct' : topology === 'half-wave' ? 'out-' : 'sec-b';
  const guide = (instruction: string, meterMode: string, probes: ProbePlacement, powerOff = false, caution?: string): NextReading => {
    const g: NextReading = { kind, instruction, meterMode, probes, powerOff, gainBits: 0 };
    if (target !== undefined) g.target = target;
    if (caution !== undefined) g.caution = caution;
    return g;
  };
  switch (kind) {
    case 'mainsAc':
      return guide(
        'Measure the mains where it enters the board, after the plug and before the fuse: V AC between live and neutral.',
        'V AC',
        { red: 'mains-l', black: 'mains-n' },
        false,
        MAINS_CAUTION,
      );
    case 'acSecondary':
      return guide(
        topology === 'center-tap'
          ? 'Measure one half of the secondary under load: V AC from one end of the winding to the centre tap.'
          : topology === 'doubler'
            ? 'Measure the secondary under load: V AC between the diode junction and the capacitor midpoint.'
            : 'Measure the transformer secondary under load: V AC across its two leads.',
        'V AC',
        { red: 'sec-a', black: secB },
        false,
        topology === 'bridge' || topology === 'doubler' ? undefined : undefined,
      );
    case 'dcOut':
      return guide('Measure the DC across the filter capacitor: red on +, black on −.', 'V DC', { red: 'out+', black: 'out-' });
    case 'rippleAc':
      return guide(
        meterKind === 'true-rms-ac-dc'
          ? 'Measure the ripple at the same points as the DC reading. Your meter reads AC+DC: use its AC-only mode if it has one.'
          : 'Measure the ripple: leave the probes across the filter capacitor and switch to V AC.',
        'V AC',
        { red: 'out+', black: 'out-' },
      );
    case 'rippleHz':
      return guide(
        'Read the ripple frequency at the same points with the Hz function. Twice the line frequency is normal for full-wave; ' +
          'the line frequency itself means one half of the rectifier is missing.',
        'Hz',
        { red: 'out+', black: 'out-' },
      );
    case 'regulatorOut':
      return guide('Measure the regulator output: V DC from its output pin to 0 V (−).', 'V DC', { red: 'reg-out', black: 'out-' });
    case 'diodeForward':
    case 'diodeReverse': {
      const label = (target ?? 'D1') as DiodeLabel;
      const pins = diodePins(topology, label);
      const forward = kind === 'diodeForward';
      const red = forward ? pins.anode : pins.cathode;
      const black = forward ? pins.cathode : pins.anode;
      return guide(
        `${forward ? 'Forward' : 'Reverse'} diode test on ${label}: red on ${pinWords(topology, red)}, black on ${pinWords(topology, black)}. ` +
          (forward ? 'A good junction reads about 0.4–0.9 V.' : 'A good junction reads OL.') +
          ' In-circuit paths can read lower: lift a leg before condemning a part.',
        'diode test',
        { red: `${label}.${forward ? 'a' : 'k'}`, black: `${label}.${forward ? 'k' : 'a'}` },
        true,
        DISCHARGE_CAUTION,
      );
    }
    case 'capacitance': {
      const cap = target ?? 'C1';
      return guide(
        `Measure the capacitance of ${cap}. Lift one leg for an accurate reading.`,
        'capacitance',
        { red: `${cap}+`, black: `${cap}-` },
        true,
        DISCHARGE_CAUTION,
      );
    }
    case 'esr': {
      const cap = target ?? 'C1';
      return guide(`Measure the ESR of ${cap} with an ESR meter (in circuit is fine).`, 'ESR', { red: `${cap}+`, black: `${cap}-` }, true, DISCHARGE_CAUTION);
    }
  }
}
