/**
 * Turns a normalised supply spec into a small nodal circuit the steady-state solver can step.
 *
 * Ground is always the output's negative terminal ("−"). Node voltages are relative to it.
 * Every element is two-terminal, so the solver needs only nodal analysis; the source's series
 * winding resistance makes each winding a Norton equivalent.
 *
 * The element definitions here are the engine's circuit semantics. The ngspice cross-check
 * (test/ngspice/netlist.ts) writes the same circuits independently from the spec, so a wrong
 * wire here shows up as a disagreement there.
 */
import { thermalVoltage } from './spec';
import type { CapacitorModel, DiodeLabel, LoadModel, SupplySpec } from './types';

/** Node index; -1 is ground (output −). */
export type NodeIndex = number;
export const GROUND: NodeIndex = -1;

/** Lowest series resistance used for a winding, diode or short (ohms): keeps slopes finite. */
export const MIN_OHMS = 1e-3;
/** Conductance from every node to ground, as SPICE's gmin (siemens; SPICE default 1e-12). */
export const GMIN_SIEMENS = 1e-12;
/**
 * Below this output voltage a constant-current load (or a regulator's quiescent draw) tapers
 * linearly to zero, as a real electronic load does, and goes on as that conductance through
 * zero; so a dead supply reads 0 V, not a voltage forced by an ideal current sink. Our own
 * modelling choice.
 */
export const CURRENT_LOAD_KNEE_VOLTS = 0.5;
/** Knee width of the piecewise-linear diode's smooth switch (volts). Our modelling choice. */
export const PWL_KNEE_VOLTS = 1e-3;
/** Knee width of the zener's smooth breakdown (volts). Our modelling choice. */
export const ZENER_KNEE_VOLTS = 0.05;
/** A shorted diode is this resistance (ohms). */
export const SHORT_OHMS = 1e-3;

/** A winding: ideal sine e(t) = sign·Vm·sin(2πft) in series with `ohms`, from `minus` to `plus`. */
export interface Winding {
  plus: NodeIndex;
  minus: NodeIndex;
  peakVolts: number;
  /** +1 or −1: the lower half of a centre-tapped winding is in antiphase. */
  sign: 1 | -1;
  ohms: number;
}

export type Junction =
  | { kind: 'shockley'; saturationAmps: number; thermalVolts: number; ohms: number }
  | { kind: 'pwl'; forwardVolts: number; ohms: number; kneeVolts: number };

export interface DiodeElement {
  label: DiodeLabel;
  anode: NodeIndex;
  cathode: NodeIndex;
  /** null: an open diode (no current ever). */
  junction: Junction | null;
  /** A shorted diode: a plain resistor of this many ohms instead of the junction. */
  shortOhms: number | null;
}

export interface CapacitorElement extends CapacitorModel {
  plus: NodeIndex;
  minus: NodeIndex;
}

/** What hangs on the filter output (node `out`), or on the zener node. */
export type SinkElement =
  | { kind: 'resistor'; a: NodeIndex; b: NodeIndex; ohms: number }
  | { kind: 'current-load'; a: NodeIndex; amps: number }
  | {
      kind: 'linear-regulator';
      input: NodeIndex;
      volts: number;
      dropoutVolts: number;
      quiescentAmps: number;
      load: LoadModel;
    }
  | { kind: 'zener'; a: NodeIndex; zenerVolts: number; ohms: number };

export interface Circuit {
  nodeCount: number;
  /** Output + (ground is output −). */
  out: NodeIndex;
  /** Secondary terminals measured for `secondaryRms` (the upper half for center-tap). */
  secondaryPlus: NodeIndex;
  secondaryMinus: NodeIndex;
  /** The zener regulator's node and parts, when one is present (its elements are also sinks). */
  zener: { node: NodeIndex; seriesOhms: number; zenerVolts: number; zenerOhms: number; load: LoadModel } | null;
  windings: Winding[];
  diodes: DiodeElement[];
  capacitors: CapacitorElement[];
  sinks: SinkElement[];
  hz: number;
}

function junctionOf(spec: SupplySpec): Junction {
  const d = spec.diode;
  if (d.kind === 'shockley') {
    // n·Vt with Vt = kT/q: 25.69 mV at 25 °C (DOMAIN.md §2's 25.85 mV is the 300 K figure).
    const thermalVolts = d.emission * thermalVoltage(spec.temperatureC);
    return {
      kind: 'shockley',
      saturationAmps: d.saturationAmps,
      thermalVolts,
      ohms: Math.max(d.ohms, MIN_OHMS),
    };
  }
  return {
    kind: 'pwl',
    forwardVolts: d.forwardVolts,
    ohms: Math.max(d.ohms, MIN_OHMS),
    kneeVolts: PWL_KNEE_VOLTS,
  };
}

/**
 * Builds the nodal circuit of a normalised spec.
 * @param spec  a spec from `parseSupplySpec` (already validated)
 * @returns the circuit; node indices are dense from 0, ground is -1
 */
export function buildCircuit(spec: SupplySpec): Circuit {
  const peakVolts = Math.SQRT2 * spec.source.vrms;
  const windingOhms = Math.max(spec.source.ohms, MIN_OHMS);
  const junction = junctionOf(spec);
  const diode = (label: DiodeLabel, index: number, anode: NodeIndex, cathode: NodeIndex): DiodeElement => {
    const condition = spec.diodeCondition[index] ?? 'ok';
    return {
      label,
      anode,
      cathode,
      junction: condition === 'ok' ? junction : null,
      shortOhms: condition === 'short' ? SHORT_OHMS : null,
    };
  };

  let nodeCount: number;
  let out: NodeIndex;
  let secondaryPlus: NodeIndex;
  let secondaryMinus: NodeIndex;
  const windings: Winding[] = [];
  const diodes: DiodeElement[] = [];
  const capacitors: CapacitorElement[] = [];
  const cap = (i: number): CapacitorModel => {
    const c = spec.capacitors[i];
    if (!c) throw new Error(`internal: capacitor ${i} missing`);
    return c;
  };

  switch (spec.topology) {
    case 'half-wave': {
      // 0: secondary top A, 1: output +.
      nodeCount = 2;
      out = 1;
      secondaryPlus = 0;
      secondaryMinus = GROUND;
      windings.push({ plus: 0, minus: GROUND, peakVolts, sign: 1, ohms: windingOhms });
      diodes.push(diode('D1', 0, 0, out));
      if (spec.capacitors.length > 0) capacitors.push({ ...cap(0), plus: out, minus: GROUND });
      break;
    }
    case 'center-tap': {
      // 0: top end, 1: bottom end, 2: output +; centre tap is ground.
      nodeCount = 3;
      out = 2;
      secondaryPlus = 0;
      secondaryMinus = GROUND;
      windings.push({ plus: 0, minus: GROUND, peakVolts, sign: 1, ohms: windingOhms });
      windings.push({ plus: 1, minus: GROUND, peakVolts, sign: -1, ohms: windingOhms });
      diodes.push(diode('D1', 0, 0, out), diode('D2', 1, 1, out));
      if (spec.capacitors.length > 0) capacitors.push({ ...cap(0), plus: out, minus: GROUND });
      break;
    }
    case 'bridge': {
      // 0: AC pin a, 1: AC pin b, 2: output +; output − is ground.
      nodeCount = 3;
      out = 2;
      secondaryPlus = 0;
      secondaryMinus = 1;
      windings.push({ plus: 0, minus: 1, peakVolts, sign: 1, ohms: windingOhms });
      diodes.push(
        diode('D1', 0, 0, out),
        diode('D2', 1, 1, out),
        diode('D3', 2, GROUND, 0),
        diode('D4', 3, GROUND, 1),
      );
      if (spec.capacitors.length > 0) capacitors.push({ ...cap(0), plus: out, minus: GROUND });
      break;
    }
    case 'doubler': {
      // 0: diode junction J, 1: capacitor midpoint M, 2: output +.
      nodeCount = 3;
      out = 2;
      secondaryPlus = 0;
      secondaryMinus = 1;
      windings.push({ plus: 0, minus: 1, peakVolts, sign: 1, ohms: windingOhms });
      diodes.push(diode('D1', 0, 0, out), diode('D2', 1, GROUND, 0));
      capacitors.push({ ...cap(0), plus: out, minus: 1 }, { ...cap(1), plus: 1, minus: GROUND });
      break;
    }
  }

  const sinks: SinkElement[] = [];
  let zener: Circuit['zener'] = null;
  const reg = spec.regulator;
  const loadOn = (node: NodeIndex, load: LoadModel): SinkElement =>
    load.kind === 'resistive'
      ? { kind: 'resistor', a: node, b: GROUND, ohms: load.ohms }
      : { kind: 'current-load', a: node, amps: load.amps };
  if (reg === null) {
    sinks.push(loadOn(out, spec.load));
  } else if (reg.kind === 'linear') {
    sinks.push({
      kind: 'linear-regulator',
      input: out,
      volts: reg.volts,
      dropoutVolts: reg.dropoutVolts,
      quiescentAmps: reg.quiescentAmps,
      load: spec.load,
    });
  } else {
    const node = nodeCount++;
    zener = {
      node,
      seriesOhms: Math.max(reg.seriesOhms, MIN_OHMS),
      zenerVolts: reg.zenerVolts,
      zenerOhms: Math.max(reg.zenerOhms, MIN_OHMS),
      load: spec.load,
    };
    sinks.push({ kind: 'resistor', a: out, b: node, ohms: zener.seriesOhms });
    sinks.push({ kind: 'zener', a: node, zenerVolts: zener.zenerVolts, ohms: zener.zenerOhms });
    sinks.push(loadOn(node, spec.load));
  }

  return {
    nodeCount,
    out,
    secondaryPlus,
    secondaryMinus,
    zener,
    windings,
    diodes,
    capacitors,
    sinks,
    hz: spec.source.hz,
  };
}
