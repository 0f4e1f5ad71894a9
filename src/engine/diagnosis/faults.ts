/**
 * The fault catalogue: each fault is a change to the circuit, simulated by the engine, with a
 * prior and a range of unknown magnitudes (each a variant, weighted evenly, so the likelihood
 * integrates over the range). DOMAIN.md §7 lists the signatures these changes reproduce.
 */
import { diodeLabels } from '../spec';
import type { DiodeCondition, SupplySpec } from '../types';
import type { MainsBand } from './regions';
import type { FaultId } from './types';

export interface FaultInfo {
  id: FaultId;
  /** Plain trade words for a list. */
  name: string;
  /**
   * Prior probability before any reading (relative; normalised over the faults that apply).
   * Rough shares of the supply faults met at the bench: common practice, our estimate, not a
   * published statistic. Electrolytic capacitors lead (DOMAIN.md §6: they dry out).
   */
  prior: number;
}

export const FAULTS: Record<FaultId, FaultInfo> = {
  healthy: { id: 'healthy', name: 'Supply healthy', prior: 0.16 },
  'no-ac': { id: 'no-ac', name: 'No AC: mains, fuse, thermal fuse or winding', prior: 0.14 },
  'line-low': { id: 'line-low', name: 'Mains low', prior: 0.04 },
  'line-high': { id: 'line-high', name: 'Mains high or wrong tap', prior: 0.02 },
  'diode-open': { id: 'diode-open', name: 'Diode open', prior: 0.07 },
  'diode-short': { id: 'diode-short', name: 'Diode shorted', prior: 0.07 },
  'capacitor-low': { id: 'capacitor-low', name: 'Filter capacitor lost capacitance', prior: 0.16 },
  'capacitor-open': { id: 'capacitor-open', name: 'Filter capacitor open', prior: 0.05 },
  'capacitor-esr': { id: 'capacitor-esr', name: 'Filter capacitor ESR high', prior: 0.14 },
  overload: { id: 'overload', name: 'Overload or shorted load', prior: 0.07 },
  'regulator-dropout': { id: 'regulator-dropout', name: 'Regulator dropping out', prior: 0.04 },
  'regulator-failed': { id: 'regulator-failed', name: 'Regulator failed', prior: 0.08 },
};

export const FAULT_IDS = Object.keys(FAULTS) as FaultId[];

/** One circuit to simulate for a fault, with what the power-off tests would find. */
export interface FaultVariant {
  fault: FaultId;
  /** Share of the fault's probability (variants of one fault add up to 1). */
  weight: number;
  /** What this variant is, in words ("D3 open", "C1 at 30 % of its value"). */
  label: string;
  part?: string;
  spec: SupplySpec;
  /** Mains at the input relative to nominal (0: absent). */
  lineFactor: number;
  /** What a diode test finds, per diode in label order. */
  diodeStates: DiodeCondition[];
  /** Actual capacitance over nominal, per capacitor (0: open). */
  capacitorFactors: number[];
  /** Actual ESR per capacitor, ohms. */
  esrOhms: number[];
  /**
   * For a fault of unknown size: its size on the variant's scale (line factor, capacitance
   * factor, ESR multiple, load multiple, extra dropout volts). Consecutive sizes of one fault
   * and part are interpolated between, so the range is covered without a solve per point.
   */
  magnitude?: number;
}

/**
 * Worst ESR of a new general-purpose electrolytic at 20 °C, from the widely copied rule-of-thumb
 * table (DOMAIN.md §6, common practice): 10 µF 5.3 Ω, 100 µF 0.32 Ω, 1000 µF 0.08 Ω (25 V parts),
 * interpolated log-log and extended with the end slopes.
 */
export function tableEsrOhms(farads: number): number {
  const uf = Math.max(farads * 1e6, 1e-3);
  const pts: [number, number][] = [
    [10, 5.3],
    [100, 0.32],
    [1000, 0.08],
  ];
  const lx = Math.log10(uf);
  const i = lx < 2 ? 0 : 1;
  const [x0, y0] = pts[i]!;
  const [x1, y1] = pts[i + 1]!;
  const slope = (Math.log10(y1) - Math.log10(y0)) / (Math.log10(x1) - Math.log10(x0));
  return 10 ** (Math.log10(y0) + slope * (lx - Math.log10(x0)));
}

function clone(spec: SupplySpec): SupplySpec {
  return {
    ...spec,
    source: { ...spec.source },
    diode: { ...spec.diode },
    capacitors: spec.capacitors.map((c) => ({ ...c })),
    load: { ...spec.load },
    regulator: spec.regulator ? { ...spec.regulator } : null,
    diodeCondition: [...spec.diodeCondition],
  };
}

/** Scales the load current by `factor` (a resistive load's ohms divided by it). */
function scaleLoad(spec: SupplySpec, factor: number): void {
  if (spec.load.kind === 'resistive') spec.load = { kind: 'resistive', ohms: spec.load.ohms / factor };
  else spec.load = { kind: 'current', amps: spec.load.amps * factor };
}

/**
 * Every fault variant that applies to a supply.
 * @param spec   the nominal (healthy) supply
 * @param mains  the mains band in force (sets how low "low" is)
 */
export function faultVariants(spec: SupplySpec, mains: MainsBand): FaultVariant[] {
  const labels = diodeLabels(spec.topology);
  const okDiodes = labels.map((): DiodeCondition => 'ok');
  const caps = spec.capacitors;
  const okCaps = caps.map(() => 1);
  const esr = caps.map((c) => Math.max(c.esrOhms, 0));
  const out: FaultVariant[] = [];
  const add = (fault: FaultId, items: Omit<FaultVariant, 'fault' | 'weight'>[]): void => {
    for (const it of items) out.push({ fault, weight: 1 / items.length, ...it });
  };
  const base = (over: Partial<Omit<FaultVariant, 'fault' | 'weight' | 'spec' | 'label'>> = {}) => ({
    lineFactor: 1,
    diodeStates: okDiodes,
    capacitorFactors: okCaps,
    esrOhms: esr,
    ...over,
  });

  add('healthy', [{ label: 'all parts within tolerance', spec: clone(spec), ...base() }]);

  const dead = clone(spec);
  dead.source.vrms = 0;
  add('no-ac', [
    { label: 'mains absent at the input', part: 'mains supply', spec: dead, ...base({ lineFactor: 0 }) },
    { label: 'fuse, thermal fuse or winding open', part: 'fuse or winding', spec: clone(dead), ...base() },
  ]);

  // Line faults: beyond the band's edges (DOMAIN.md §4), a few magnitudes.
  const lowEdge = mains.lowVolts / mains.nominalVolts;
  const highEdge = mains.highVolts / mains.nominalVolts;
  add(
    'line-low',
    [0.04, 0.1, 0.18].map((d) => {
      const f = lowEdge - d;
      const s = clone(spec);
      s.source.vrms *= f;
      return { label: `mains at ${Math.round(f * 100)} % of nominal`, part: 'mains supply', spec: s, magnitude: f, ...base({ lineFactor: f }) };
    }),
  );
  add(
    'line-high',
    [0.03, 0.08].map((d) => {
      const f = highEdge + d;
      const s = clone(spec);
      s.source.vrms *= f;
      return { label: `mains at ${Math.round(f * 100)} % of nominal`, part: 'mains supply or tap', spec: s, magnitude: f, ...base({ lineFactor: f }) };
    }),
  );

  add(
    'diode-open',
    labels.map((label, i) => {
      const s = clone(spec);
      s.diodeCondition[i] = 'open';
      const states = okDiodes.map((c, j): DiodeCondition => (j === i ? 'open' : c));
      return { label: `${label} open`, part: label, spec: s, ...base({ diodeStates: states }) };
    }),
  );

  // A shorted diode: either the fuse has already blown (no AC) or the secondary is collapsed.
  add(
    'diode-short',
    labels.flatMap((label, i) => {
      const states = okDiodes.map((c, j): DiodeCondition => (j === i ? 'short' : c));
      const live = clone(spec);
      live.diodeCondition[i] = 'short';
      const blown = clone(spec);
      blown.source.vrms = 0;
      blown.diodeCondition[i] = 'short';
      return [
        { label: `${label} shorted, secondary collapsed`, part: label, spec: live, ...base({ diodeStates: states }) },
        { label: `${label} shorted, fuse blown`, part: label, spec: blown, ...base({ diodeStates: states }) },
      ];
    }),
  );

  if (caps.length > 0) {
    const capName = (q: number): string => (caps.length > 1 ? `C${q + 1}` : 'C1');
    // Which capacitors a capacitor fault can hit: each alone, and for the doubler both together
    // (they age side by side).
    const groups: number[][] = caps.map((_, q) => [q]);
    if (caps.length > 1) groups.push(caps.map((_, q) => q));
    const groupName = (g: number[]): string => g.map(capName).join(' and ');
    add(
      'capacitor-low',
      groups.flatMap((g) =>
        [0.5, 0.22, 0.05].map((f) => {
          const s = clone(spec);
          const factors = [...okCaps];
          const esrs = [...esr];
          for (const q of g) {
            s.capacitors[q]!.farads *= f;
            // Dry-out lowers capacitance and raises ESR (DOMAIN.md §6): about double here.
            s.capacitors[q]!.esrOhms = Math.max(2 * esr[q]!, tableEsrOhms(s.capacitors[q]!.farads));
            factors[q] = f;
            esrs[q] = s.capacitors[q]!.esrOhms;
          }
          return { label: `${groupName(g)} at ${Math.round(f * 100)} % of value`, part: groupName(g), spec: s, magnitude: f, ...base({ capacitorFactors: factors, esrOhms: esrs }) };
        }),
      ),
    );
    add(
      'capacitor-open',
      caps.map((_, q) => {
        const s = clone(spec);
        if (caps.length === 1) s.capacitors = [];
        else s.capacitors[q]!.farads *= 1e-3;
        const factors = okCaps.map((v, j) => (j === q ? 0 : v));
        const esrs = esr.map((v, j) => (j === q ? Infinity : v));
        return { label: `${capName(q)} open`, part: capName(q), spec: s, ...base({ capacitorFactors: factors, esrOhms: esrs }) };
      }),
    );
    add(
      'capacitor-esr',
      groups.flatMap((g) =>
        // From where the ESR starts to show in the live readings to a nearly open part; a mildly
        // raised ESR looks healthy from outside and is left to the ESR meter.
        [12, 40, 120].map((m) => {
          const s = clone(spec);
          const esrs = [...esr];
          for (const q of g) {
            esrs[q] = m * tableEsrOhms(caps[q]!.farads);
            s.capacitors[q]!.esrOhms = esrs[q]!;
          }
          return { label: `${groupName(g)} ESR ${g.map((q) => formatOhms(esrs[q]!)).join(', ')}`, part: groupName(g), spec: s, magnitude: m, ...base({ esrOhms: esrs }) };
        }),
      ),
    );
  }

  add(
    'overload',
    [1.6, 2.5, 4].map((f) => {
      const s = clone(spec);
      scaleLoad(s, f);
      return { label: `load drawing ${f}× its normal current`, part: 'load', spec: s, magnitude: f, ...base() };
    }),
  );

  const reg = spec.regulator;
  if (reg !== null && reg.kind === 'linear') {
    add(
      'regulator-dropout',
      [1.5, 3, 5].map((d) => {
        const s = clone(spec);
        if (s.regulator?.kind === 'linear') s.regulator.dropoutVolts = reg.dropoutVolts + d;
        return { label: `regulator needing ${(reg.dropoutVolts + d).toFixed(1)} V headroom`, part: 'regulator', spec: s, magnitude: d, ...base() };
      }),
    );
    const open = clone(spec);
    if (open.regulator?.kind === 'linear') open.regulator.volts = 0;
    const shorted = clone(spec);
    if (shorted.regulator?.kind === 'linear') {
      shorted.regulator.volts = 1e4;
      shorted.regulator.dropoutVolts = 0;
    }
    add('regulator-failed', [
      { label: 'regulator output dead', part: 'regulator', spec: open, ...base() },
      { label: 'regulator passing its input straight through', part: 'regulator', spec: shorted, ...base() },
    ]);
  } else if (reg !== null && reg.kind === 'zener') {
    const open = clone(spec);
    if (open.regulator?.kind === 'zener') open.regulator.zenerVolts = 1e4;
    const shorted = clone(spec);
    if (shorted.regulator?.kind === 'zener') {
      shorted.regulator.zenerVolts = 0.01;
      shorted.regulator.zenerOhms = 0.05;
    }
    add('regulator-failed', [
      { label: 'zener open (output rises)', part: 'zener', spec: open, ...base() },
      { label: 'zener shorted (output near 0 V)', part: 'zener', spec: shorted, ...base() },
    ]);
  }
  return out;
}

function formatOhms(r: number): string {
  return r >= 1 ? `${r.toFixed(1)} Ω` : `${Math.round(r * 1000)} mΩ`;
}
