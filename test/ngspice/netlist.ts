/**
 * ngspice netlists written straight from the meaning of a `SupplySpec` (types.ts and the circuit
 * definitions in the ngspice helper's brief), independently of the engine's own circuit code.
 *
 * Node plan: output − is ground (node 0) in every topology, output + is node `p`.
 * Every diode has a 0 V sense source in series (forward current = its branch current), the
 * winding's ideal source gives the winding current, and the output branch (load, or regulator
 * input) has its own sense source. The measures are computed in TypeScript from the samples
 * (run.ts), not with `.meas`.
 */
import type { DiodeLabel, SupplySpec } from '../../src/engine/types';

/** Softplus width of the piecewise-linear diode, volts (the engine's definition, brief). */
export const PWL_SOFTPLUS_VOLTS = 1e-3;
/** Smallest series resistance of the piecewise-linear diode, ohms (the engine's definition, brief). */
export const PWL_MIN_OHMS = 1e-3;
/** Softplus width of the zener, volts (the engine's definition, brief). */
export const ZENER_SOFTPLUS_VOLTS = 0.05;
/** Smallest zener slope resistance we write, ohms: guards a division by zero (our choice). */
export const ZENER_MIN_OHMS = 1e-3;
/** A shorted diode is a 1 mΩ resistor (the engine's definition, brief). */
export const SHORTED_DIODE_OHMS = 1e-3;
/** Constant-current loads and the regulator's quiescent draw taper to zero below this, volts (brief). */
export const CURRENT_TAPER_VOLTS = 0.5;
/**
 * A floating winding (bridge, doubler) gets this resistance and capacitance to ground so ngspice
 * has a defined node voltage while every diode is off: with a resistance alone it stops with
 * "timestep too small" (tried). Both must stay far below the diodes' own reverse current (IS,
 * 14 nA for the silicon preset), because with a diode open the winding floats wherever the
 * leakage currents balance: 1 GΩ + 1 pF moved it enough to put 47 V instead of 34 V across D1 of
 * an open-D3 bridge (tried). 1 TΩ carries 0.3 nA at 325 V; 0.1 pF about 1.3 nA at 24 V·√2,
 * 60 Hz; a smaller capacitance makes ngspice several times slower (tried 1 fF). Our choice.
 */
export const FLOAT_LEAK_OHMS = 1e12;
export const FLOAT_LEAK_FARADS = 1e-13;

/** Where a measured quantity lives in the netlist: node names ("0" is ground) and sense sources. */
export interface CircuitProbes {
  /** Node voltages written to the data file, in column order after the time column. */
  nodes: string[];
  /** Branch currents (voltage-source names) written after the nodes, in column order. */
  currents: string[];
  /** Secondary terminals after the winding resistance (one half for center-tap). */
  secondary: { plus: string; minus: string; windingSource: string };
  /** One per diode label of the topology; `sense` is null for an open diode. */
  diodes: { label: DiodeLabel; anode: string; cathode: string; sense: string | null }[];
  /** The voltage across each capacitor proper (not its ESR), label order. */
  capacitors: { plus: string; minus: string }[];
  /** Sense source in the branch fed by the filter (load, or the regulator's input). */
  outputSense: string;
  /** Regulated output node and the sense source of the regulated load. */
  regulator: { out: string; loadSense: string } | null;
}

/** What to simulate and where to write the samples. */
export interface NetlistOptions {
  /** End time of the transient, seconds. */
  stopSeconds: number;
  /** Samples from this time on are written (ngspice's TSTART), seconds. */
  recordFromSeconds: number;
  /** Largest integrator step (TMAX), seconds. */
  maxStepSeconds: number;
  /** ngspice RELTOL. */
  relTol: number;
  /** Capacitor voltages at t = 0 (label order, volts); missing entries are 0. */
  initialCapacitorVolts?: readonly number[];
  /** File name (relative to ngspice's working directory) that `wrdata` writes. */
  dataFile: string;
}

const DIODE_LABELS: readonly DiodeLabel[] = ['D1', 'D2', 'D3', 'D4'];

/** Diodes per topology: anode and cathode node of each, label order (types.ts comment). */
function diodeNodes(spec: SupplySpec): { anode: string; cathode: string }[] {
  switch (spec.topology) {
    case 'half-wave':
      return [{ anode: 's1', cathode: 'p' }];
    case 'center-tap':
      return [
        { anode: 's1', cathode: 'p' },
        { anode: 's2', cathode: 'p' },
      ];
    case 'bridge':
      return [
        { anode: 'a', cathode: 'p' },
        { anode: 'b', cathode: 'p' },
        { anode: '0', cathode: 'a' },
        { anode: '0', cathode: 'b' },
      ];
    case 'doubler':
      return [
        { anode: 'j', cathode: 'p' },
        { anode: '0', cathode: 'j' },
      ];
  }
}

/** A number in a form ngspice reads; refuses NaN and infinities. */
function num(value: number): string {
  if (!Number.isFinite(value)) throw new Error(`netlist: non-finite value ${value}`);
  return String(value);
}

/** Numerically safe softplus ln(1 + e^x) as an ngspice expression of `x` (an expression). */
function softplus(x: string): string {
  return `(max(${x},0)+ln(1+exp(-abs(${x}))))`;
}

/**
 * Builds the netlist text and the probe map for one supply.
 * @param spec a normalised supply (as `parseSupplySpec` returns).
 * @param opts transient window, step, tolerance, initial capacitor volts, data file name.
 * @returns the netlist (with a `.control` block that runs `tran` and `wrdata`) and the probes.
 * @throws Error on a non-finite number or a diode-condition list of the wrong length.
 */
export function buildNetlist(
  spec: SupplySpec,
  opts: NetlistOptions,
): { text: string; probes: CircuitProbes } {
  const lines: string[] = [];
  const nodes = new Set<string>();
  const currents: string[] = [];
  const vm = Math.SQRT2 * spec.source.vrms;
  const hz = spec.source.hz;
  const node = (name: string): string => {
    if (name !== '0') nodes.add(name);
    return name;
  };

  lines.push(`* ripplewright reference: ${spec.topology}, ${spec.source.vrms} Vrms ${hz} Hz`);
  // TNOM = TEMP so IS is taken at the spec's temperature unscaled, and Vt = k·T/q there.
  lines.push(
    `.options TEMP=${num(spec.temperatureC)} TNOM=${num(spec.temperatureC)} RELTOL=${num(opts.relTol)}`,
  );

  // Winding(s): ideal sine (zero crossing at t = 0, rising) in series with the winding resistance.
  const winding = (idx: number, plus: string, minus: string, amplitude: number): string => {
    const src = `vs${idx}`;
    const e = `e${idx}`;
    lines.push(`${src} ${node(e)} ${node(minus)} SIN(0 ${num(amplitude)} ${num(hz)})`);
    if (spec.source.ohms > 0) lines.push(`rw${idx} ${e} ${node(plus)} ${num(spec.source.ohms)}`);
    else lines.push(`vw${idx} ${e} ${node(plus)} 0`);
    currents.push(src);
    return src;
  };
  const floatLeak = (name: string): void => {
    lines.push(`rleak_${name} ${node(name)} 0 ${num(FLOAT_LEAK_OHMS)}`);
    lines.push(`cleak_${name} ${name} 0 ${num(FLOAT_LEAK_FARADS)}`);
  };

  let secondary: CircuitProbes['secondary'];
  switch (spec.topology) {
    case 'half-wave':
      secondary = { plus: 's1', minus: '0', windingSource: winding(1, 's1', '0', vm) };
      break;
    case 'center-tap':
      // Two halves in antiphase; the centre tap is output −.
      secondary = { plus: 's1', minus: '0', windingSource: winding(1, 's1', '0', vm) };
      winding(2, 's2', '0', -vm);
      break;
    case 'bridge':
      secondary = { plus: 'a', minus: 'b', windingSource: winding(1, 'a', 'b', vm) };
      floatLeak('b');
      break;
    case 'doubler':
      secondary = { plus: 'j', minus: 'm', windingSource: winding(1, 'j', 'm', vm) };
      floatLeak('m');
      break;
  }

  // Diodes.
  const conn = diodeNodes(spec);
  if (spec.diodeCondition.length !== conn.length) {
    throw new Error(
      `netlist: ${spec.topology} has ${conn.length} diodes, diodeCondition has ${spec.diodeCondition.length}`,
    );
  }
  const diodes: CircuitProbes['diodes'] = [];
  let needModel = false;
  conn.forEach(({ anode, cathode }, i) => {
    const label = DIODE_LABELS[i]!;
    const k = i + 1;
    const condition = spec.diodeCondition[i]!;
    node(anode);
    node(cathode);
    if (condition === 'open') {
      diodes.push({ label, anode, cathode, sense: null });
      return;
    }
    const inner = `d${k}x`;
    const sense = `vd${k}`;
    lines.push(`${sense} ${anode} ${node(inner)} 0`);
    currents.push(sense);
    if (condition === 'short') {
      lines.push(`rdshort${k} ${inner} ${cathode} ${num(SHORTED_DIODE_OHMS)}`);
    } else if (spec.diode.kind === 'shockley') {
      lines.push(`d${k} ${inner} ${cathode} dref`);
      needModel = true;
    } else {
      // Engine's piecewise-linear diode: i = (w/r)·ln(1 + exp((v − vf)/w)), w = 1 mV,
      // r = max(ohms, 1 mΩ) (brief). v is across the whole diode.
      const w = PWL_SOFTPLUS_VOLTS;
      const r = Math.max(spec.diode.ohms, PWL_MIN_OHMS);
      const x = `((v(${inner})-v(${cathode})-${num(spec.diode.forwardVolts)})/${num(w)})`;
      lines.push(`bd${k} ${inner} ${cathode} I=${num(w / r)}*${softplus(x)}`);
    }
    diodes.push({ label, anode, cathode, sense });
  });
  if (needModel && spec.diode.kind === 'shockley') {
    // No junction capacitance, no breakdown: CJO and BV left at their defaults (0, none).
    lines.push(
      `.model dref D(IS=${num(spec.diode.saturationAmps)} N=${num(spec.diode.emission)} RS=${num(spec.diode.ohms)})`,
    );
  }

  // Capacitors: C in series with its ESR, across the output (single) or C1 p–m, C2 m–0 (doubler).
  const capPlaces =
    spec.topology === 'doubler'
      ? [
          { plus: 'p', minus: 'm' },
          { plus: 'm', minus: '0' },
        ]
      : [{ plus: 'p', minus: '0' }];
  const capacitors: CircuitProbes['capacitors'] = [];
  spec.capacitors.forEach((cap, i) => {
    const place = capPlaces[i];
    if (!place) throw new Error(`netlist: ${spec.topology} takes ${capPlaces.length} capacitor(s)`);
    const k = i + 1;
    const ic = num(opts.initialCapacitorVolts?.[i] ?? 0);
    if (cap.esrOhms > 0) {
      const inner = `c${k}x`;
      lines.push(`c${k} ${node(place.plus)} ${node(inner)} ${num(cap.farads)} IC=${ic}`);
      lines.push(`resr${k} ${inner} ${node(place.minus)} ${num(cap.esrOhms)}`);
      capacitors.push({ plus: place.plus, minus: inner });
    } else {
      lines.push(`c${k} ${node(place.plus)} ${node(place.minus)} ${num(cap.farads)} IC=${ic}`);
      capacitors.push({ plus: place.plus, minus: place.minus });
    }
  });

  // Load law: resistive, or constant current that behaves as a resistor below 0.5 V, through
  // zero (so a floating output settles at 0 V instead of anywhere below it).
  const taper = (v: string): string => `min(1,${v}/${num(CURRENT_TAPER_VOLTS)})`;
  const loadCurrent = (v: string): string =>
    spec.load.kind === 'resistive'
      ? `(${v})/${num(spec.load.ohms)}`
      : `${num(spec.load.amps)}*${taper(v)}`;
  const writeLoad = (name: string, at: string): void => {
    if (spec.load.kind === 'resistive') lines.push(`r${name} ${at} 0 ${num(spec.load.ohms)}`);
    else lines.push(`b${name} ${at} 0 I=${loadCurrent(`v(${at})`)}`);
  };

  const outputSense = 'vout';
  lines.push(`${outputSense} ${node('p')} ${node('pl')} 0`);
  currents.push(outputSense);
  let regulator: CircuitProbes['regulator'] = null;
  const reg = spec.regulator;
  if (!reg) {
    writeLoad('load', 'pl');
  } else if (reg.kind === 'linear') {
    // Output = min(set, max(vin − dropout, 0)); the input draws the load current plus the
    // quiescent current (tapered like a current load) from the filter (brief).
    const vin = 'v(pl)';
    lines.push(
      `breg r 0 V=min(${num(reg.volts)},max(${vin}-${num(reg.dropoutVolts)},0))`,
    );
    lines.push(`vrl ${node('r')} ${node('rl')} 0`);
    writeLoad('load', 'rl');
    lines.push(
      `bregin pl 0 I=${loadCurrent('v(r)')}+${num(reg.quiescentAmps)}*${taper(vin)}`,
    );
    currents.push('vrl');
    regulator = { out: 'r', loadSense: 'vrl' };
  } else {
    // Series resistor to Z; zener i = (w/rz)·ln(1 + exp((v(Z) − Vz)/w)), w = 50 mV (brief).
    const w = ZENER_SOFTPLUS_VOLTS;
    const rz = Math.max(reg.zenerOhms, ZENER_MIN_OHMS);
    lines.push(`rser pl ${node('z')} ${num(reg.seriesOhms)}`);
    const x = `((v(z)-${num(reg.zenerVolts)})/${num(w)})`;
    lines.push(`bzener z 0 I=${num(w / rz)}*${softplus(x)}`);
    lines.push(`vrl z ${node('zl')} 0`);
    writeLoad('load', 'zl');
    currents.push('vrl');
    regulator = { out: 'z', loadSense: 'vrl' };
  }

  const nodeList = [...nodes].sort();
  const saved = [...nodeList.map((n) => `v(${n})`), ...currents.map((c) => `i(${c})`)];
  lines.push('.control');
  lines.push('set wr_singlescale');
  lines.push('set wr_vecnames');
  lines.push('option numdgt=15');
  // UIC: start from the capacitor voltages given (0 by default), no operating point.
  lines.push(
    `tran ${num(opts.maxStepSeconds)} ${num(opts.stopSeconds)} ${num(opts.recordFromSeconds)} ${num(opts.maxStepSeconds)} uic`,
  );
  lines.push(`wrdata ${opts.dataFile} ${saved.join(' ')}`);
  lines.push('quit');
  lines.push('.endc');
  lines.push('.end');

  return {
    text: lines.join('\n') + '\n',
    probes: {
      nodes: nodeList,
      currents,
      secondary,
      diodes,
      capacitors,
      outputSense,
      regulator,
    },
  };
}

/**
 * The ngspice netlist of one supply (see `buildNetlist`).
 * @param spec normalised supply.
 * @param opts transient window and data file.
 * @returns netlist text, ending in a newline.
 */
export function writeNetlist(spec: SupplySpec, opts: NetlistOptions): string {
  return buildNetlist(spec, opts).text;
}
