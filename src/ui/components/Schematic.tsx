/**
 * Small SVG schematics of the four rectifiers with their filter, regulator and load, drawn from
 * the same point names the diagnosis uses for probes (src/engine/diagnosis/points.ts), so a
 * reading's probe points light up on the drawing.
 */
import type { Topology } from '../../engine/types';

export type RegulatorShape = 'none' | 'linear' | 'zener';

export interface SchematicProps {
  topology: Topology;
  regulator?: RegulatorShape;
  /** False for an unfiltered supply (no capacitor drawn). */
  filtered?: boolean;
  /** Probe points to highlight. */
  probes?: { red: string; black: string } | null;
  /** A thumbnail: no part labels, no probe markers. */
  compact?: boolean;
  /** Words for screen readers; the default names the rectifier. */
  label?: string;
  /** Hidden from screen readers (a thumbnail beside its own words). */
  decorative?: boolean;
}

type Point = readonly [number, number];

interface Drawing {
  paths: string[];
  /** `away`: the label goes on the side of the diode away from this point. */
  diodes: { label: string; a: Point; k: Point; at?: number; away?: Point }[];
  capacitors: { label: string; x: number; top: number; bottom: number }[];
  points: Record<string, Point>;
  texts: { x: number; y: number; text: string; anchor?: 'start' | 'middle' | 'end' }[];
}

const TRANSFORMER_PATHS = [
  // Mains leads, primary and secondary windings (bumps), iron core.
  'M12,45 H52',
  'M12,125 H52',
  'M52,45 a10,10 0 0 1 0,20 a10,10 0 0 1 0,20 a10,10 0 0 1 0,20 a10,10 0 0 1 0,20',
  'M66,40 V130 M70,40 V130',
  'M84,45 a10,10 0 0 0 0,20 a10,10 0 0 0 0,20 a10,10 0 0 0 0,20 a10,10 0 0 0 0,20',
  'M84,45 H100 M84,125 H100',
];

const TRANSFORMER_POINTS: Record<string, Point> = {
  'mains-l': [12, 45],
  'mains-n': [12, 125],
  'sec-a': [100, 45],
  'sec-b': [100, 125],
};

/** Capacitor, regulator and load between the rails, from x = `from`. */
function addOutput(d: Drawing, from: number, top: number, bottom: number, regulator: RegulatorShape, filtered: boolean): void {
  const capX = from + 12;
  const end = 360;
  if (filtered) d.capacitors.push({ label: 'C1', x: capX, top, bottom });
  d.points['out+'] = [capX, top];
  d.points['out-'] = [capX, bottom];
  let loadX = Math.min(capX + 50, 318);
  if (regulator === 'linear') {
    const box = capX + 20;
    d.paths.push(`M${box},${top - 11} h36 v22 h-36 Z`, `M${box + 18},${top + 11} V${bottom}`);
    d.texts.push({ x: box + 18, y: top + 4, text: 'REG', anchor: 'middle' });
    d.paths.push(`M${from},${top} H${box} M${box + 36},${top} H${end - 10}`);
    d.points['reg-out'] = [box + 44, top];
    loadX = Math.min(box + 56, 318);
  } else if (regulator === 'zener') {
    const r = capX + 16;
    d.paths.push(`M${from},${top} H${r} l3,-6 l5,12 l5,-12 l5,12 l5,-12 l3,6 H${end - 10}`);
    d.texts.push({ x: r + 13, y: top - 10, text: 'R', anchor: 'middle' });
    const zx = r + 40;
    d.diodes.push({ label: 'Z', a: [zx, bottom], k: [zx, top] });
    d.points['reg-out'] = [zx, top];
    loadX = Math.min(zx + 34, 318);
  } else {
    d.paths.push(`M${from},${top} H${end - 10}`);
  }
  d.paths.push(`M${from},${bottom} H${end - 10}`);
  // Load resistor between the rails.
  const mid = (top + bottom) / 2;
  d.paths.push(`M${loadX},${top} V${mid - 18} l7,3 l-14,6 l14,6 l-14,6 l14,6 l-7,3 V${bottom}`);
  d.texts.push({ x: loadX + 11, y: mid + 4, text: 'load', anchor: 'start' });
  d.texts.push({ x: end - 4, y: top + 4, text: '+', anchor: 'end' }, { x: end - 4, y: bottom + 4, text: '−', anchor: 'end' });
}

function drawing(topology: Topology, regulator: RegulatorShape, filtered: boolean): Drawing {
  const d: Drawing = { paths: [...TRANSFORMER_PATHS], diodes: [], capacitors: [], points: { ...TRANSFORMER_POINTS }, texts: [] };
  d.texts.push({ x: 4, y: 41, text: 'L', anchor: 'start' }, { x: 4, y: 121, text: 'N', anchor: 'start' });
  switch (topology) {
    case 'half-wave': {
      d.paths.push('M100,45 H125', 'M100,125 H170');
      d.diodes.push({ label: 'D1', a: [125, 45], k: [165, 45] });
      d.paths.push('M165,45 H170');
      addOutput(d, 170, 45, 125, regulator, filtered);
      break;
    }
    case 'center-tap': {
      d.paths.push('M84,85 H100');
      d.points['sec-ct'] = [100, 85];
      d.diodes.push({ label: 'D1', a: [120, 45], k: [160, 45] }, { label: 'D2', a: [120, 125], k: [160, 125] });
      d.paths.push('M100,45 H120', 'M100,125 H120', 'M160,45 H185', 'M160,125 H175 V45');
      // Centre tap down to the − rail, hopping over D2's lead.
      d.paths.push('M100,85 H110 V119 a6,6 0 0 1 0,12 V150 H185');
      addOutput(d, 185, 45, 150, regulator, filtered);
      break;
    }
    case 'bridge': {
      const centre: Point = [165, 90];
      const a: Point = [131, 90];
      const b: Point = [199, 90];
      const plus: Point = [165, 56];
      const minus: Point = [165, 124];
      d.diodes.push(
        { label: 'D1', a, k: plus, away: centre },
        { label: 'D2', a: b, k: plus, away: centre },
        { label: 'D3', a: minus, k: a, away: centre },
        { label: 'D4', a: minus, k: b, away: centre },
      );
      d.paths.push('M100,45 H116 V90 H131', 'M100,135 H159 a6,6 0 0 1 12,0 H216 V90 H199', 'M165,56 V30 H232', 'M165,124 V150 H232', 'M84,125 H100 V135');
      d.texts.push({ x: 126, y: 108, text: '~', anchor: 'middle' }, { x: 205, y: 108, text: '~', anchor: 'middle' });
      addOutput(d, 232, 30, 150, regulator, filtered);
      d.points['sec-b'] = [100, 135];
      break;
    }
    case 'doubler': {
      const j: Point = [160, 80];
      d.diodes.push({ label: 'D1', a: j, k: [160, 30] }, { label: 'D2', a: [160, 145], k: j, at: 0.7 });
      d.paths.push('M100,45 H130 V80 H160', 'M100,125 H154 a6,6 0 0 1 12,0 H200 V87 H235', 'M160,30 H215', 'M160,145 H215');
      d.points['sec-a'] = [130, 80];
      d.points['sec-b'] = [235, 87];
      d.texts.push({ x: 152, y: 76, text: 'J', anchor: 'end' }, { x: 243, y: 91, text: 'M', anchor: 'start' });
      if (filtered) {
        d.capacitors.push({ label: 'C1', x: 235, top: 30, bottom: 87 }, { label: 'C2', x: 235, top: 87, bottom: 145 });
      }
      d.paths.push('M215,30 H235 M215,145 H235');
      addOutput(d, 235, 30, 145, regulator, false);
      d.points['out+'] = [235, 30];
      d.points['out-'] = [235, 145];
      break;
    }
  }
  for (const diode of d.diodes) {
    d.points[`${diode.label}.a`] = diode.a;
    d.points[`${diode.label}.k`] = diode.k;
  }
  for (const cap of d.capacitors) {
    d.points[`${cap.label}+`] = [cap.x, cap.top];
    d.points[`${cap.label}-`] = [cap.x, cap.bottom];
  }
  if (d.capacitors.length === 0 && topology !== 'doubler') {
    d.points['C1+'] = d.points['out+']!;
    d.points['C1-'] = d.points['out-']!;
  }
  return d;
}

function DiodeSymbol({ a, k, at = 0.5, label, compact, away }: { a: Point; k: Point; at?: number; label: string; compact: boolean; away?: Point }) {
  const dx = k[0] - a[0];
  const dy = k[1] - a[1];
  const angle = (Math.atan2(dy, dx) * 180) / Math.PI;
  const cx = a[0] + dx * at;
  const cy = a[1] + dy * at;
  // Label beside the body, perpendicular to the diode.
  const length = Math.hypot(dx, dy) || 1;
  let nx = -dy / length;
  let ny = dx / length;
  if (away !== undefined && nx * (cx - away[0]) + ny * (cy - away[1]) < 0) {
    nx = -nx;
    ny = -ny;
  }
  const lx = cx + nx * 15;
  const ly = cy + ny * 15 + 4;
  return (
    <g>
      <path d={`M${a[0]},${a[1]} L${k[0]},${k[1]}`} />
      <g transform={`translate(${cx},${cy}) rotate(${angle})`}>
        <path class="part" d="M-6,-7 L-6,7 L6,0 Z M6,-7 V7" />
      </g>
      {compact ? null : (
        <text x={lx} y={ly} text-anchor="middle" class="part-label">
          {label}
        </text>
      )}
    </g>
  );
}

function CapacitorSymbol({ x, top, bottom, label, compact }: { x: number; top: number; bottom: number; label: string; compact: boolean }) {
  const mid = (top + bottom) / 2;
  return (
    <g>
      <path d={`M${x},${top} V${mid - 4} M${x - 11},${mid - 4} H${x + 11} M${x - 11},${mid + 6} q11,-6 22,0 M${x},${mid + 3} V${bottom}`} />
      {compact ? null : (
        <>
          <text x={x - 14} y={mid - 6} text-anchor="end" class="part-label">+</text>
          <text x={x + 14} y={mid + 4} text-anchor="start" class="part-label">{label}</text>
        </>
      )}
    </g>
  );
}

const TOPOLOGY_WORDS: Record<Topology, string> = {
  'half-wave': 'half-wave rectifier',
  'center-tap': 'full-wave centre-tapped rectifier',
  bridge: 'full-wave bridge rectifier',
  doubler: 'full-wave voltage doubler',
};

/** The supply drawn as a schematic, with the probe points of a reading marked. */
export function Schematic({ topology, regulator = 'none', filtered = true, probes = null, compact = false, label, decorative = false }: SchematicProps) {
  const d = drawing(topology, regulator, filtered);
  const red = probes === null ? undefined : d.points[probes.red];
  const black = probes === null ? undefined : d.points[probes.black];
  const words = label ?? `Schematic of a ${TOPOLOGY_WORDS[topology]}${probes ? `, red probe on ${probes.red}, black probe on ${probes.black}` : ''}`;
  return (
    <svg
      class={compact ? 'schematic compact' : 'schematic'}
      viewBox="0 0 360 170"
      role={decorative ? undefined : 'img'}
      aria-label={decorative ? undefined : words}
      aria-hidden={decorative ? 'true' : undefined}
      focusable="false"
    >
      <g class="wires" fill="none">
        {d.paths.map((path) => <path key={path} d={path} />)}
        {d.diodes.map((diode) => <DiodeSymbol key={diode.label} {...diode} compact={compact} />)}
        {d.capacitors.map((cap) => <CapacitorSymbol key={cap.label} {...cap} compact={compact} />)}
      </g>
      {compact ? null : (
        <g class="labels">
          {d.texts.map((t) => (
            <text key={`${t.x},${t.y},${t.text}`} x={t.x} y={t.y} text-anchor={t.anchor ?? 'middle'}>
              {t.text}
            </text>
          ))}
        </g>
      )}
      {red === undefined || compact ? null : <ProbeMarker at={red} colour="red" />}
      {black === undefined || compact ? null : <ProbeMarker at={black} colour="black" />}
    </svg>
  );
}

/** A probe tip: a ring with a letter, so it reads without colour too. */
function ProbeMarker({ at, colour }: { at: Point; colour: 'red' | 'black' }) {
  return (
    <g class={`probe probe-${colour}`} data-probe={colour}>
      <circle cx={at[0]} cy={at[1]} r="9" />
      <text x={at[0]} y={at[1] + 4} text-anchor="middle">
        {colour === 'red' ? 'R' : 'B'}
      </text>
    </g>
  );
}

/** The probe point names a topology's schematic can show (for tests and the probe legend). */
export function schematicPoints(topology: Topology, regulator: RegulatorShape = 'none', filtered = true): string[] {
  return Object.keys(drawing(topology, regulator, filtered).points);
}
