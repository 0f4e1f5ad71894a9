/**
 * The supply engine: for a named supply, what every reading should be.
 *
 * Pure TypeScript, no DOM, no I/O: the worker, the CLI and the tests call it alike.
 */
import { buildCircuit, type Circuit } from './circuit';
import { estimateSupply } from './estimates';
import { measurePeriod, sampleWaveform, type PeriodMeasures } from './measures';
import { parseSupplySpec } from './spec';
import { solveSteadyState, type SteadyStateSolution } from './steady-state';
import type { SolveOptions, SupplyEstimates, SupplyResult, SupplySpec } from './types';

export * from './types';
export { parseSupplySpec, SpecError, diodeLabels, DIODE_PRESETS } from './spec';
export { estimateSupply } from './estimates';

/**
 * Grid rules (our accuracy rules, checked against ngspice in test/engine/ngspice.test.ts):
 * - an unfiltered supply has no state to shoot for; a uniform grid of UNFILTERED_STEPS;
 * - a filtered one is first solved on a coarse uniform grid of COARSE_STEPS, then on a grid
 *   that keeps the coarse steps where every diode is off (the capacitor discharges smoothly
 *   into the load) and splits the steps where a diode conducts so that the narrowest
 *   conduction pulse gets at least POINTS_PER_PULSE points;
 * - where that solution still shows a diode current jumping by more than EDGE_FRACTION of its
 *   peak in one step, or a pulse under MIN_PULSE_STEPS steps, those steps are split again
 *   (finerSteps), at most twice;
 * - neighbouring steps never differ by more than MAX_STEP_RATIO (BDF2's zero-stability).
 */
const UNFILTERED_STEPS = 256;
const COARSE_STEPS = 64;
const POINTS_PER_PULSE = 48;
const MAX_STEPS = 4096;
/** A diode counts as conducting above this fraction of its own peak current. */
const CONDUCTING_FRACTION = 0.005;

/**
 * Initial guess for the capacitor voltages at t = 0 (a zero crossing of the source) from the
 * textbook estimate: full-wave capacitors are then halfway through their discharge (near the
 * mean), a half-wave one three quarters of the way; each doubler capacitor holds half the output.
 */
function initialGuess(spec: SupplySpec, est: SupplyEstimates): number[] {
  if (spec.topology === 'doubler') return [est.dc / 2, est.dc / 2];
  const v = spec.topology === 'half-wave' ? est.dc - est.ripplePp / 4 : est.dc;
  return spec.capacitors.map(() => Math.max(v, 0));
}

function uniformSteps(count: number, periodSeconds: number): Float64Array {
  return new Float64Array(count).fill(periodSeconds / count);
}

/**
 * Forward peak current of each diode, or 0 for a diode that does not really conduct: below
 * 1 nA, or below a thousandth of the largest diode's peak (a diode that never conducts still
 * shows leakage, whose wiggles are not pulses).
 */
function conductingPeaks(iDiode: Float64Array[]): number[] {
  const peaks = iDiode.map((cur) => {
    let peak = 0;
    for (let n = 0; n < cur.length; n++) peak = Math.max(peak, cur[n]!);
    return peak;
  });
  const largest = Math.max(0, ...peaks);
  return peaks.map((p) => (p > 1e-9 && p >= 1e-3 * largest ? p : 0));
}

/**
 * The refined grid: coarse steps where no diode conducts, split steps where one does.
 * @param iDiode  diode currents on the coarse grid (N+1 points each)
 * @param coarse  the coarse step lengths (N)
 */
function conductionSteps(iDiode: Float64Array[], coarse: Float64Array): Float64Array {
  const N = coarse.length;
  const active = new Uint8Array(N);
  const peaks = conductingPeaks(iDiode);
  for (let d = 0; d < iDiode.length; d++) {
    const cur = iDiode[d]!;
    const peak = peaks[d]!;
    if (peak === 0) continue;
    const thr = CONDUCTING_FRACTION * peak;
    for (let n = 0; n < N; n++) if (cur[n]! > thr || cur[n + 1]! > thr) active[n] = 1;
  }
  // Widen each conducting run by one step on each side: turn-on and turn-off fall inside.
  const widened = new Uint8Array(N);
  for (let n = 0; n < N; n++) {
    if (active[n] || active[(n + 1) % N] || active[(n + N - 1) % N]) widened[n] = 1;
  }
  let activeCount = 0;
  for (let n = 0; n < N; n++) activeCount += widened[n]!;
  if (activeCount === 0 || activeCount === N) {
    // Nothing conducts (a dead supply) or something always does: a uniform grid.
    const count = activeCount === 0 ? N : Math.min(MAX_STEPS, Math.max(UNFILTERED_STEPS, N));
    return uniformSteps(count, coarse.reduce((a, b) => a + b, 0));
  }
  // Narrowest run of widened steps, circularly.
  let first = 0;
  while (widened[first]) first++;
  let narrowest = N;
  let run = 0;
  for (let j = 1; j <= N; j++) {
    const on = widened[(first + j) % N] === 1;
    if (on) run++;
    else if (run > 0) {
      narrowest = Math.min(narrowest, run);
      run = 0;
    }
  }
  let split = Math.ceil(POINTS_PER_PULSE / narrowest);
  const inactive = N - activeCount;
  split = Math.max(1, Math.min(split, Math.floor((MAX_STEPS - inactive) / activeCount)));
  const steps: number[] = [];
  for (let n = 0; n < N; n++) {
    const h = coarse[n]!;
    if (widened[n]) for (let q = 0; q < split; q++) steps.push(h / split);
    else steps.push(h);
  }
  return gradeSteps(steps, MAX_STEP_RATIO);
}

/**
 * Variable-step BDF2 is zero-stable only while each step is less than 1 + √2 times the one
 * before (Grigorieff's bound; Hairer & Wanner, Solving ODEs II, §III.5): we keep every ratio
 * between neighbours (circularly) at most 2 by halving the larger step until it fits.
 */
const MAX_STEP_RATIO = 2;

function gradeSteps(input: number[], maxRatio: number): Float64Array {
  let steps = input;
  for (let pass = 0; pass < 64; pass++) {
    const n = steps.length;
    let changed = false;
    const next: number[] = [];
    for (let i = 0; i < n; i++) {
      const h = steps[i]!;
      const before = steps[(i + n - 1) % n]!;
      const after = steps[(i + 1) % n]!;
      if (h > maxRatio * before || h > maxRatio * after) {
        next.push(h / 2, h / 2);
        changed = true;
      } else next.push(h);
    }
    steps = next;
    if (!changed) break;
  }
  return Float64Array.from(steps);
}

function finiteOrZero(x: number): number {
  return Number.isFinite(x) ? x : 0;
}

/**
 * Solves a normalised supply for its periodic steady state and reads off every figure.
 * @param spec     from `parseSupplySpec`
 * @param options  waveform samples, step count, tolerance
 * @returns finite figures; `converged` false when the solver could not settle (figures are then
 *          those of the last period computed, and any non-finite figure is reported as 0)
 */
export function solveSupply(spec: SupplySpec, options: SolveOptions = {}): SupplyResult {
  const circuit = buildCircuit(spec);
  const periodSeconds = 1 / spec.source.hz;
  const vm = Math.SQRT2 * spec.source.vrms;
  // Periodicity tolerance: the state may differ by this much after one period. The figures then
  // carry an error of the same order: 1e-4 of the peak by default, far below the grid's own
  // discretisation error (a few 1e-3 at most) and the meters' accuracy; and once the coarse
  // pass has shown the ripple, at most 1e-3 of it, since a light load's small ripple (and the
  // charge each period carries) would otherwise be lost in that error.
  let toleranceVolts = options.toleranceVolts ?? 1e-4 * Math.max(vm, 1);
  const maxIterations = options.maxIterations ?? 40;
  const filtered = circuit.capacitors.length > 0;
  const estimates = estimateSupply(spec);
  const warm = options.warmStart;
  if (warm !== undefined && filtered && options.stepsPerPeriod === undefined && warm.topology === spec.topology && warm.nodeCount === circuit.nodeCount && warm.startState.length === 2 * circuit.capacitors.length) {
    // Voltages scale with the secondary to first order: predict the new state that way.
    const ratio = warm.vrms > 0 ? spec.source.vrms / warm.vrms : 1;
    const quick = solveSteadyState(circuit, {
      steps: warm.steps,
      toleranceVolts,
      maxIterations,
      initialCapacitorVolts: [],
      initialState: warm.startState.map((v) => v * ratio),
      predictor: { times: warm.times, nodeVolts: ratio === 1 ? warm.nodeVolts : warm.nodeVolts.map((v) => v * ratio) },
    });
    if (quick.converged && quick.stepsConverged) {
      const quickMeas = measurePeriod(circuit, quick);
      if (gridResolvesConduction(quickMeas.series.iDiode, warm.steps)) {
        return assemble(spec, circuit, quick, quickMeas, quick.iterations, true, estimates, options);
      }
    }
  }
  let steps = uniformSteps(options.stepsPerPeriod ?? (filtered ? COARSE_STEPS : UNFILTERED_STEPS), periodSeconds);
  let sol = solveSteadyState(circuit, {
    steps,
    // The coarse pass only has to find where the diodes conduct.
    toleranceVolts: options.stepsPerPeriod === undefined && filtered ? Math.max(toleranceVolts, 1e-3 * Math.max(vm, 1)) : toleranceVolts,
    maxIterations,
    initialCapacitorVolts: initialGuess(spec, estimates),
    acceptSmallCorrection: options.stepsPerPeriod === undefined,
  });
  let meas = measurePeriod(circuit, sol);
  let iterations = sol.iterations;
  let coarseOk = sol.converged && sol.stepsConverged;
  if (options.stepsPerPeriod === undefined && filtered) {
    if (options.toleranceVolts === undefined) toleranceVolts = Math.min(toleranceVolts, Math.max(1e-3 * meas.ripplePp, 1e-9 * Math.max(vm, 1)));
    steps = conductionSteps(meas.series.iDiode, steps);
    const k = circuit.capacitors.length;
    // A few iterations first: if the diode currents turn out under-resolved (below), the map
    // is rough on this grid and further iterations are better spent on the finer one.
    const refined = solveSteadyState(circuit, {
      steps,
      toleranceVolts,
      maxIterations: Math.min(6, maxIterations),
      initialCapacitorVolts: Array.from(sol.startState.subarray(0, k)),
      predictor: { times: sol.times, nodeVolts: sol.nodeVolts },
    });
    iterations += refined.iterations;
    coarseOk = true;
    sol = refined;
    meas = measurePeriod(circuit, sol);
    for (let round = 0; round < 3; round++) {
      const finer = round < 2 ? finerSteps(meas.series.iDiode, steps) : null;
      if (finer === null && sol.converged) break;
      if (finer !== null) steps = finer;
      const again = solveSteadyState(circuit, {
        steps,
        toleranceVolts,
        maxIterations,
        initialCapacitorVolts: [],
        initialState: sol.startState,
        predictor: { times: sol.times, nodeVolts: sol.nodeVolts },
      });
      iterations += again.iterations;
      sol = again;
      meas = measurePeriod(circuit, sol);
      if (finer === null) break;
    }
  }
  return assemble(spec, circuit, sol, meas, iterations, coarseOk, estimates, options);
}

/** Largest change of a diode's current over one step, as a fraction of its peak (our rule). */
const EDGE_FRACTION = 0.25;
/** Fewest steps wanted inside a conduction pulse on the refined grid (our rule). */
const MIN_PULSE_STEPS = 24;
const MAX_SPLIT = 8;

/**
 * A finer grid where the refined solution shows the diode currents under-resolved: steps in
 * which some diode's current changes by more than EDGE_FRACTION of its peak (a stiff turn-on,
 * milliohms into a small capacitor), and conduction pulses covering fewer than MIN_PULSE_STEPS
 * steps (a light load's short pulse). Marked steps and their neighbours are split, then graded
 * again. Null when nothing needs it or the grid would grow past MAX_STEPS.
 */
function finerSteps(iDiode: Float64Array[], steps: Float64Array): Float64Array | null {
  const N = steps.length;
  const split = new Uint8Array(N);
  const want = (n: number, k: number): void => {
    for (const j of [n - 1, n, n + 1]) {
      const i = (j + N) % N;
      split[i] = Math.max(split[i]!, Math.min(MAX_SPLIT, k));
    }
  };
  const peaks = conductingPeaks(iDiode);
  for (let d = 0; d < iDiode.length; d++) {
    const cur = iDiode[d]!;
    const peak = peaks[d]!;
    if (peak === 0) continue;
    for (let n = 0; n < N; n++) {
      const jump = Math.abs(cur[n + 1]! - cur[n]!) / peak;
      if (jump > EDGE_FRACTION) want(n, Math.ceil(jump / EDGE_FRACTION) * 2);
    }
    // Conduction runs above 2 % of the peak, circularly, from a step where it is off.
    const on = (n: number): boolean => cur[n % N]! > 0.02 * peak;
    let start = 0;
    while (start < N && on(start)) start++;
    if (start === N) continue;
    let run: number[] = [];
    for (let j = 1; j <= N; j++) {
      const n = (start + j) % N;
      if (on(n)) run.push(n);
      else if (run.length > 0) {
        if (run.length < MIN_PULSE_STEPS) for (const r of run) want(r, Math.ceil(MIN_PULSE_STEPS / run.length));
        run = [];
      }
    }
  }
  let extra = 0;
  for (let n = 0; n < N; n++) if (split[n]! > 1) extra += split[n]! - 1;
  if (extra === 0 || N + extra > MAX_STEPS) return null;
  const out: number[] = [];
  for (let n = 0; n < N; n++) {
    const k = Math.max(1, split[n]!);
    for (let q = 0; q < k; q++) out.push(steps[n]! / k);
  }
  return gradeSteps(out, MAX_STEP_RATIO);
}

/** The result object from a solved period. */
function assemble(
  spec: SupplySpec,
  circuit: Circuit,
  sol: SteadyStateSolution,
  meas: PeriodMeasures,
  iterations: number,
  earlierOk: boolean,
  estimates: SupplyEstimates,
  options: SolveOptions,
): SupplyResult {
  const figures = [meas.dc, meas.ripplePp, meas.rippleRms, meas.diodePeakA, meas.diodePiv, meas.secondaryRms];
  const allFinite = figures.every(Number.isFinite);
  const result: SupplyResult = {
    converged: earlierOk && sol.converged && sol.stepsConverged && allFinite,
    iterations,
    residualVolts: finiteOrZero(sol.residualVolts),
    stepsPerPeriod: sol.stepsPerPeriod,
    dc: finiteOrZero(meas.dc),
    ripplePp: finiteOrZero(meas.ripplePp),
    rippleRms: finiteOrZero(meas.rippleRms),
    rippleHz: finiteOrZero(meas.rippleHz),
    diodePeakA: finiteOrZero(meas.diodePeakA),
    diodePiv: finiteOrZero(meas.diodePiv),
    secondaryRms: finiteOrZero(meas.secondaryRms),
    secondaryRmsAmps: finiteOrZero(meas.secondaryRmsAmps),
    loadAmps: finiteOrZero(meas.loadAmps),
    diodes: meas.diodes,
    regulator: meas.regulator,
    estimates,
  };
  if (options.waveformPoints !== undefined && options.waveformPoints > 0) {
    result.waveform = sampleWaveform(meas.series, sol.times, options.waveformPoints);
  }
  if (options.keepWarmStart === true) {
    const steps = new Float64Array(sol.stepsPerPeriod);
    for (let n = 0; n < steps.length; n++) steps[n] = sol.times[n + 1]! - sol.times[n]!;
    result.warmStart = {
      topology: spec.topology,
      nodeCount: circuit.nodeCount,
      vrms: spec.source.vrms,
      steps,
      startState: sol.startState.slice(),
      times: sol.times,
      nodeVolts: sol.nodeVolts,
    };
  }
  return result;
}

/**
 * True when every step in which a diode conducts is one of the grid's fine steps (at most twice
 * the shortest, allowing for the grading), so a warm-started grid still resolves the pulses.
 */
function gridResolvesConduction(iDiode: Float64Array[], steps: Float64Array): boolean {
  let shortest = Infinity;
  for (const h of steps) shortest = Math.min(shortest, h);
  const peaks = conductingPeaks(iDiode);
  for (let d = 0; d < iDiode.length; d++) {
    const cur = iDiode[d]!;
    const peak = peaks[d]!;
    if (peak === 0) continue;
    const thr = CONDUCTING_FRACTION * peak;
    for (let n = 0; n < steps.length; n++) {
      if ((cur[n]! > thr || cur[n + 1]! > thr) && steps[n]! > 2.01 * shortest) return false;
    }
  }
  return true;
}

/**
 * Parses a spec as sent by a caller (JSON) and solves it.
 * @throws SpecError naming the field when the input is not a valid supply
 */
export function expectReadings(input: unknown, options: SolveOptions = {}): SupplyResult {
  return solveSupply(parseSupplySpec(input), options);
}
