/**
 * The engine's public contract: the supply a technician names, and what the engine computes for it.
 *
 * Two layers:
 * - `SupplySpecInput` is the JSON a caller sends (CLI file, worker message). Loose: presets,
 *   optional fields, one capacitor object that applies to both capacitors of a doubler.
 * - `SupplySpec` is what `parseSupplySpec` returns: every field checked, presets resolved,
 *   defaults filled in, SI units throughout. The solver only ever sees this form.
 *
 * Units: volts, amps, ohms, farads, hertz, seconds, watts. RMS values are named `vrms`.
 */

export type Topology = 'half-wave' | 'center-tap' | 'bridge' | 'doubler';
export const TOPOLOGIES: readonly Topology[] = ['half-wave', 'center-tap', 'bridge', 'doubler'];

/** Names of the diode presets accepted in `diode.preset`. */
export type DiodePresetName = 'silicon' | 'schottky' | 'germanium' | 'ideal';

/**
 * Diode labels by topology (also used by the schematics and the fault catalogue):
 * - half-wave:  D1 secondary top → output +.
 * - center-tap: D1 top end → output +, D2 bottom end → output +; centre tap = output −.
 * - bridge:     AC pins "a" and "b". D1 a → +, D2 b → +, D3 − → a, D4 − → b (anode → cathode).
 * - doubler:    secondary between the diode junction J and the capacitor midpoint M.
 *               D1 J → +, D2 − → J. C1 from + to M, C2 from M to −.
 */
export type DiodeLabel = 'D1' | 'D2' | 'D3' | 'D4';
export type DiodeCondition = 'ok' | 'open' | 'short';

// ---------------------------------------------------------------------------------------------
// Input form (JSON)
// ---------------------------------------------------------------------------------------------

export interface SourceInput {
  /** Open-circuit secondary RMS voltage (per half for center-tap). */
  vrms: number;
  /** Line frequency. */
  hz: number;
  /** Series winding resistance referred to the secondary (per half for center-tap). Default 0. */
  ohms?: number;
}

export type DiodeInput =
  | { preset: DiodePresetName }
  /** Shockley diode I = is·(exp(V/(n·Vt)) − 1) with series resistance `ohms`. */
  | { is: number; n: number; ohms?: number }
  /** Piecewise-linear: ideal switch, fixed drop `vf`, series resistance `ohms`. */
  | { vf: number; ohms?: number };

export interface CapacitorInput {
  farads: number;
  /** Equivalent series resistance. Default 0. */
  esr?: number;
}

export type LoadInput = { ohms: number } | { amps: number };

export type RegulatorInput =
  /** Three-terminal linear regulator after the filter. */
  | { volts: number; dropout?: number; quiescentAmps?: number }
  /** Zener shunt: series resistor from the filter to the zener; load across the zener. */
  | { zenerVolts: number; seriesOhms: number; zenerOhms?: number };

export interface SupplySpecInput {
  topology: Topology;
  source: SourceInput;
  diode?: DiodeInput;
  /** Absent: unfiltered. For "doubler": both capacitors, or an array [C1, C2]. */
  capacitor?: CapacitorInput | [CapacitorInput, CapacitorInput];
  load: LoadInput;
  regulator?: RegulatorInput;
  /** Per-diode condition for fault simulation; missing labels are "ok". */
  diodeCondition?: Partial<Record<DiodeLabel, DiodeCondition>>;
  /** Diode junction temperature in °C for the thermal voltage. Default 25. */
  temperatureC?: number;
}

// ---------------------------------------------------------------------------------------------
// Normalised form (what the solver sees)
// ---------------------------------------------------------------------------------------------

export type DiodeModel =
  | { kind: 'shockley'; saturationAmps: number; emission: number; ohms: number }
  | { kind: 'pwl'; forwardVolts: number; ohms: number };

export interface CapacitorModel {
  farads: number;
  esrOhms: number;
}

export type LoadModel = { kind: 'resistive'; ohms: number } | { kind: 'current'; amps: number };

export type RegulatorModel =
  | { kind: 'linear'; volts: number; dropoutVolts: number; quiescentAmps: number }
  | { kind: 'zener'; zenerVolts: number; seriesOhms: number; zenerOhms: number };

export interface SupplySpec {
  topology: Topology;
  source: { vrms: number; hz: number; ohms: number };
  diode: DiodeModel;
  /** Empty: unfiltered. One entry for single-capacitor topologies, two for the doubler [C1, C2]. */
  capacitors: CapacitorModel[];
  load: LoadModel;
  regulator: RegulatorModel | null;
  /** One entry per diode of the topology, in label order. */
  diodeCondition: DiodeCondition[];
  temperatureC: number;
}

// ---------------------------------------------------------------------------------------------
// Results
// ---------------------------------------------------------------------------------------------

export interface DiodeStress {
  label: DiodeLabel;
  /** Largest forward current over the period. */
  peakAmps: number;
  /** Mean forward current. */
  averageAmps: number;
  rmsAmps: number;
  /** Largest reverse voltage (cathode above anode). */
  pivVolts: number;
}

export interface RegulatorResult {
  kind: 'linear' | 'zener';
  /** Mean regulated output voltage. */
  dc: number;
  ripplePp: number;
  rippleRms: number;
  /** Lowest filter voltage over the period (the "valley"). */
  inputValleyVolts: number;
  /**
   * Linear: valley minus (set voltage + dropout); negative means the regulator drops out.
   * Zener: lowest zener current over the period in amps (negative never; 0 means it came out of
   * regulation).
   */
  headroom: number;
  /** True when the output holds its set voltage over the whole period. */
  inRegulation: boolean;
  /** Mean power in the regulator (linear) or in zener plus series resistor. */
  dissipationWatts: number;
  /** Mean load current at the regulated output. */
  loadAmps: number;
}

/** Textbook quick estimates (DOMAIN.md §2), shown beside the exact figures. */
export interface SupplyEstimates {
  /** Open-circuit secondary peak, √2·Vrms. */
  vmVolts: number;
  /** Peak at the output: Vm minus diode drops minus the winding's I·R drop. */
  vpeakVolts: number;
  dc: number;
  ripplePp: number;
  rippleRms: number;
  rippleHz: number;
  diodePiv: number;
  /** Which formulas were used, in words, for display. */
  basis: string;
}

export interface Waveform {
  /** Time from the start of the period, seconds. */
  t: number[];
  /** Output (across capacitor branch and load). */
  vOut: number[];
  /** Secondary terminal voltage under load (one half for center-tap). */
  vSecondary: number[];
  /** Forward current of each diode, label order. */
  iDiode: number[][];
  /** Regulated output, when a regulator is present. */
  vRegulated?: number[];
}

export interface SupplyResult {
  converged: boolean;
  /** Shooting-Newton iterations used. */
  iterations: number;
  /** Largest change of a capacitor voltage over the last period, volts. */
  residualVolts: number;
  /** Time steps per period used by the integrator. */
  stepsPerPeriod: number;
  /** Mean output voltage over one period (across the capacitor/load). */
  dc: number;
  /** Output max − min over one period. */
  ripplePp: number;
  /** RMS of the output minus its mean. */
  rippleRms: number;
  /** Fundamental frequency of the ripple; 0 when there is no ripple. */
  rippleHz: number;
  /** Largest forward current in any diode. */
  diodePeakA: number;
  /** Largest reverse voltage across any diode. */
  diodePiv: number;
  /** True RMS at the secondary terminals under load (one half for center-tap). */
  secondaryRms: number;
  /** RMS current in the secondary winding (one half for center-tap). */
  secondaryRmsAmps: number;
  /** Mean load current at the output (the filter's load, including a regulator's input). */
  loadAmps: number;
  diodes: DiodeStress[];
  regulator: RegulatorResult | null;
  estimates: SupplyEstimates;
  waveform?: Waveform;
  /** Present when `keepWarmStart` was asked for. Not JSON data. */
  warmStart?: WarmStart;
}

export interface SolveOptions {
  /** Include waveform samples (about this many points) in the result. */
  waveformPoints?: number;
  /** Integrator steps per period. Default chosen by the solver. */
  stepsPerPeriod?: number;
  /** Shooting tolerance on the capacitor state (how far it may move over one period), volts. Default 1e-4 × the secondary peak (at least 0.1 mV). */
  toleranceVolts?: number;
  /** Most shooting iterations. Default 40. */
  maxIterations?: number;
  /**
   * Start from an earlier solution of a similar supply (same topology and parts, other values):
   * its grid and state. Used by tolerance and fault sweeps; ignored when it does not fit.
   */
  warmStart?: WarmStart;
  /** Return `warmStart` in the result for later solves. */
  keepWarmStart?: boolean;
}

/** An earlier solution's grid, start state and trajectory (opaque to callers). */
export interface WarmStart {
  readonly topology: Topology;
  readonly nodeCount: number;
  /** Secondary RMS of the solved supply: a new supply's state is predicted in proportion. */
  readonly vrms: number;
  readonly steps: Float64Array;
  readonly startState: Float64Array;
  readonly times: Float64Array;
  readonly nodeVolts: Float64Array;
}
