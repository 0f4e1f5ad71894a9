import type { Topology } from '../engine/types';

/**
 * A schematic point (src/engine/diagnosis/points.ts names them) in words for the probe legend:
 * "out+" → "+ of the filter capacitor". The drawing shows the same point marked.
 */
export function pointWords(topology: Topology, point: string): string {
  const diode = /^(D\d)\.(a|k)$/.exec(point);
  if (diode) return `${diode[1]} ${diode[2] === 'a' ? 'anode' : 'cathode (band end)'}`;
  const cap = /^(C\d)([+-])$/.exec(point);
  if (cap) return `${cap[1]} ${cap[2] === '+' ? '+' : '−'} lead`;
  switch (point) {
    case 'mains-l':
      return 'mains live (L)';
    case 'mains-n':
      return 'mains neutral (N)';
    case 'sec-a':
      if (topology === 'bridge') return 'first AC pin of the bridge (~)';
      if (topology === 'doubler') return 'junction of the two diodes (J)';
      return 'first secondary lead';
    case 'sec-b':
      if (topology === 'bridge') return 'second AC pin of the bridge (~)';
      if (topology === 'doubler') return 'midpoint of the two capacitors (M)';
      return 'second secondary lead';
    case 'sec-ct':
      return 'centre tap';
    case 'out+':
      return '+ of the filter capacitor';
    case 'out-':
      return '− of the filter capacitor (0 V)';
    case 'reg-out':
      return 'regulator output';
    default:
      return point;
  }
}
