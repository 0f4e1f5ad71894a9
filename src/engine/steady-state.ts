/**
 * Periodic steady state of a rectifier circuit in the time domain.
 *
 * Method (standard circuit-simulation practice; see e.g. Kundert, White & Sangiovanni-Vincentelli,
 * "Steady-State Methods for Simulating Analog and Microwave Circuits", 1990, on shooting-Newton):
 * - Each time step is the trapezoidal rule for the capacitors (companion model: a conductance
 *   and a history current, with the ESR folded into the branch) and Newton's method on the
 *   nodal equations with the nonlinear element laws of elements.ts.
 * - The state at the start of a period is every capacitor's voltage and current (the
 *   trapezoidal rule carries both). One period of integration maps a start state s to Φ(s).
 *   Alongside it we carry the sensitivity matrix M = dΦ/ds by the chain rule through each
 *   step's converged Newton Jacobian (implicit function theorem), then take a Newton step on
 *   Φ(s) − s = 0. A few periods reach a steady state that plain time stepping would need
 *   hundreds of periods (many load time constants) to approach.
 *
 * No timers, no I/O, no allocation inside the step loop.
 */
import { GMIN_SIEMENS, GROUND as GROUND_NODE, ZENER_KNEE_VOLTS, type Circuit } from './circuit';
import { luFactor, luSolve } from './dense';
import { evalCurrentSink, evalJunction, evalRegulatorOutput, logistic, softplus } from './elements';

export interface SteadyStateOptions {
  /**
   * Step lengths over one period in seconds (they must add up to the period); a uniform grid
   * when every entry is equal. The same grid is used in every shooting iteration, so the
   * period map is one smooth function and Newton converges to it.
   */
  steps: Float64Array;
  /** Shooting tolerance on the capacitor voltages, volts. */
  toleranceVolts: number;
  maxIterations: number;
  /** Start state guess: capacitor voltages (volts), one per capacitor. */
  initialCapacitorVolts: number[];
  /**
   * Stop as soon as a Newton correction of the start state is within the tolerance, without
   * integrating one more period to confirm it. The returned trajectory is then the last period
   * integrated (from the state before that correction) and `startState` the corrected state:
   * good enough to locate the conduction intervals on a coarse grid, not for final figures.
   */
  acceptSmallCorrection?: boolean;
  /**
   * A trajectory of a nearby solution (an earlier solve on another grid): its node voltages,
   * interpolated, start Newton's method at each step of the first period.
   */
  predictor?: { times: Float64Array; nodeVolts: Float64Array };
}

export interface SteadyStateSolution {
  converged: boolean;
  iterations: number;
  residualVolts: number;
  stepsPerPeriod: number;
  periodSeconds: number;
  /** The N+1 grid instants from 0 to the period, seconds. */
  times: Float64Array;
  /** Node voltages at each of the N+1 grid points of the final period, row-major [(N+1) × nodes]. */
  nodeVolts: Float64Array;
  /** Capacitor branch voltages (internal, without ESR) at the N+1 points, [(N+1) × caps]. */
  capacitorVolts: Float64Array;
  /** Start state of the final period, [vC..., iC...]. */
  startState: Float64Array;
  /** False when some time step's Newton iteration failed even after step halving. */
  stepsConverged: boolean;
}

// Module-local copies: hot loops read these on every element.
const GMIN = GMIN_SIEMENS;
const GROUND = GROUND_NODE;
const ZENER_KNEE = ZENER_KNEE_VOLTS;
const NEWTON_MAX = 80;
const SUBDIVISION_DEPTH = 8;

/** Workspace for one circuit: all scratch arrays the step loop needs. */
class Stepper {
  readonly m: number;
  readonly k: number;
  readonly jac: Float64Array;
  readonly rhs: Float64Array;
  readonly piv: Int32Array;
  readonly v: Float64Array;
  readonly vTry: Float64Array;
  readonly scratch = new Float64Array(2);
  /** Warm-start junction voltages per diode. */
  readonly vj: Float64Array;
  /** Per-capacitor companion conductance and history current for the current step. */
  readonly geq: Float64Array;
  readonly hist: Float64Array;
  /** Sensitivity columns J⁻¹·(e_plus − e_minus), [k × m]. */
  readonly sens: Float64Array;
  readonly omega: number;

  constructor(readonly c: Circuit) {
    this.m = c.nodeCount;
    this.k = c.capacitors.length;
    this.jac = new Float64Array(this.m * this.m);
    this.rhs = new Float64Array(this.m);
    this.piv = new Int32Array(this.m);
    this.v = new Float64Array(this.m);
    this.vTry = new Float64Array(this.m);
    this.vj = new Float64Array(c.diodes.length).fill(Number.NaN);
    this.geq = new Float64Array(this.k);
    this.hist = new Float64Array(this.k);
    this.sens = new Float64Array(this.k * this.m);
    this.omega = 2 * Math.PI * c.hz;
  }

  /** Adds conductance g between nodes a and b to the Jacobian. */
  private stampG(a: number, b: number, g: number): void {
    const m = this.m;
    const J = this.jac;
    if (a >= 0) J[a * m + a] = J[a * m + a]! + g;
    if (b >= 0) J[b * m + b] = J[b * m + b]! + g;
    if (a >= 0 && b >= 0) {
      J[a * m + b] = J[a * m + b]! - g;
      J[b * m + a] = J[b * m + a]! - g;
    }
  }

  /** Adds current i leaving node a toward node b to the residual (KCL: sum leaving = 0). */
  private stampI(a: number, b: number, i: number): void {
    if (a >= 0) this.rhs[a] = this.rhs[a]! + i;
    if (b >= 0) this.rhs[b] = this.rhs[b]! - i;
  }

  private volt(v: Float64Array, n: number): number {
    return n === GROUND ? 0 : v[n]!;
  }

  /**
   * Residual (currents leaving each node) and Jacobian at node voltages v and time t, with the
   * capacitor companions already set in geq/hist.
   */
  assemble(v: Float64Array, t: number): void {
    const c = this.c;
    this.jac.fill(0);
    this.rhs.fill(0);
    const out = this.scratch;
    for (let n = 0; n < this.m; n++) {
      this.jac[n * this.m + n] = this.jac[n * this.m + n]! + GMIN;
      this.rhs[n] = this.rhs[n]! + GMIN * v[n]!;
    }
    const sinWt = Math.sin(this.omega * t);
    for (const w of c.windings) {
      const e = w.sign * w.peakVolts * sinWt;
      const g = 1 / w.ohms;
      const i = (this.volt(v, w.plus) - this.volt(v, w.minus) - e) * g;
      this.stampI(w.plus, w.minus, i);
      this.stampG(w.plus, w.minus, g);
    }
    for (let d = 0; d < c.diodes.length; d++) {
      const el = c.diodes[d]!;
      const vd = this.volt(v, el.anode) - this.volt(v, el.cathode);
      if (el.shortOhms !== null) {
        const g = 1 / el.shortOhms;
        this.stampI(el.anode, el.cathode, vd * g);
        this.stampG(el.anode, el.cathode, g);
      } else if (el.junction !== null) {
        this.vj[d] = evalJunction(el.junction, vd, this.vj[d]!, out);
        this.stampI(el.anode, el.cathode, out[0]!);
        this.stampG(el.anode, el.cathode, out[1]!);
      }
    }
    for (let q = 0; q < this.k; q++) {
      const cap = c.capacitors[q]!;
      const vb = this.volt(v, cap.plus) - this.volt(v, cap.minus);
      this.stampI(cap.plus, cap.minus, this.geq[q]! * vb - this.hist[q]!);
      this.stampG(cap.plus, cap.minus, this.geq[q]!);
    }
    for (const s of c.sinks) {
      switch (s.kind) {
        case 'resistor': {
          const g = 1 / s.ohms;
          this.stampI(s.a, s.b, (this.volt(v, s.a) - this.volt(v, s.b)) * g);
          this.stampG(s.a, s.b, g);
          break;
        }
        case 'current-load': {
          evalCurrentSink(s.amps, this.volt(v, s.a), out);
          this.stampI(s.a, GROUND, out[0]!);
          this.stampG(s.a, GROUND, out[1]!);
          break;
        }
        case 'zener': {
          const x = (this.volt(v, s.a) - s.zenerVolts) / ZENER_KNEE;
          this.stampI(s.a, GROUND, (ZENER_KNEE / s.ohms) * softplus(x));
          this.stampG(s.a, GROUND, logistic(x) / s.ohms);
          break;
        }
        case 'linear-regulator': {
          const vin = this.volt(v, s.input);
          const [i, g] = regulatorInputCurrent(s, vin, out);
          this.stampI(s.input, GROUND, i);
          this.stampG(s.input, GROUND, g);
          break;
        }
      }
    }
  }

  /**
   * Newton's method for the node voltages at time t, starting from this.v (updated in place).
   * @returns true when converged; the LU factors of the last Jacobian stay in this.jac
   */
  newton(t: number): boolean {
    const m = this.m;
    const v = this.v;
    for (let it = 0; it < NEWTON_MAX; it++) {
      this.assemble(v, t);
      if (!luFactor(this.jac, m, this.piv)) return false;
      luSolve(this.jac, m, this.piv, this.rhs);
      let worst = 0;
      for (let n = 0; n < m; n++) {
        const dv = -this.rhs[n]!;
        if (!Number.isFinite(dv)) return false;
        v[n] = v[n]! + dv;
        const tol = 1e-5 + 1e-6 * Math.abs(v[n]!);
        const ratio = Math.abs(dv) / tol;
        if (ratio > worst) worst = ratio;
      }
      if (worst <= 1) return true;
    }
    return false;
  }

  /** Sets the capacitor companions for a step of h seconds from state s = [vC..., iC...]. */
  setCompanions(h: number, s: Float64Array): void {
    for (let q = 0; q < this.k; q++) {
      const cap = this.c.capacitors[q]!;
      const hc = h / (2 * cap.farads);
      const geq = 1 / (cap.esrOhms + hc);
      this.geq[q] = geq;
      this.hist[q] = geq * (s[q]! + hc * s[this.k + q]!);
    }
  }

  /** Capacitor branch currents after a converged step, written into s (vC and iC updated). */
  advanceState(h: number, s: Float64Array): void {
    for (let q = 0; q < this.k; q++) {
      const cap = this.c.capacitors[q]!;
      const hc = h / (2 * cap.farads);
      const vb = this.volt(this.v, cap.plus) - this.volt(this.v, cap.minus);
      const iNew = this.geq[q]! * vb - this.hist[q]!;
      s[q] = s[q]! + hc * (s[this.k + q]! + iNew);
      s[this.k + q] = iNew;
    }
  }
}

/** Regulator input current and its derivative at input voltage vin. */
function regulatorInputCurrent(
  s: Extract<Circuit['sinks'][number], { kind: 'linear-regulator' }>,
  vin: number,
  out: Float64Array,
): [number, number] {
  evalRegulatorOutput(s.volts, s.dropoutVolts, vin, out);
  const vout = out[0]!;
  const dvout = out[1]!;
  let iLoad: number;
  let gLoad: number;
  if (s.load.kind === 'resistive') {
    iLoad = vout / s.load.ohms;
    gLoad = dvout / s.load.ohms;
  } else {
    evalCurrentSink(s.load.amps, vout, out);
    iLoad = out[0]!;
    gLoad = out[1]! * dvout;
  }
  evalCurrentSink(s.quiescentAmps, vin, out);
  return [iLoad + out[0]!, gLoad + out[1]!];
}

/**
 * One step of h seconds from time t with start state s (updated in place), splitting the step
 * in halves when Newton fails. The sensitivity matrix `stepJac` (2k × 2k, row-major) receives
 * d(state after)/d(state before) when non-null.
 */
function step(st: Stepper, t: number, h: number, s: Float64Array, depth: number, stepJac: Float64Array | null): boolean {
  const m = st.m;
  const k = st.k;
  const saved = st.vTry;
  saved.set(st.v);
  st.setCompanions(h, s);
  if (st.newton(t + h)) {
    if (stepJac !== null) stepSensitivity(st, h, stepJac);
    st.advanceState(h, s);
    return true;
  }
  if (depth >= SUBDIVISION_DEPTH) return false;
  // Retry as two half steps from the saved node voltages.
  st.v.set(saved);
  const half = h / 2;
  const s0 = s.slice();
  const j1 = stepJac === null ? null : new Float64Array(4 * k * k);
  const j2 = stepJac === null ? null : new Float64Array(4 * k * k);
  if (!step(st, t, half, s, depth + 1, j1)) {
    s.set(s0);
    return false;
  }
  if (!step(st, t + half, half, s, depth + 1, j2)) {
    s.set(s0);
    return false;
  }
  if (stepJac !== null && j1 !== null && j2 !== null) matMul(j2, j1, stepJac, 2 * k);
  void m;
  return true;
}

/**
 * d(state after the step)/d(state before) from the converged step's Jacobian factors.
 * State order [vC_0..vC_{k−1}, iC_0..iC_{k−1}]. See the module comment for the chain rule.
 */
function stepSensitivity(st: Stepper, h: number, out: Float64Array): void {
  const { m, k, c } = st;
  const n2 = 2 * k;
  // Columns X_j = J⁻¹·(e_plus_j − e_minus_j).
  for (let j = 0; j < k; j++) {
    const cap = c.capacitors[j]!;
    const off = j * m;
    for (let n = 0; n < m; n++) st.sens[off + n] = 0;
    if (cap.plus >= 0) st.sens[off + cap.plus] = 1;
    if (cap.minus >= 0) st.sens[off + cap.minus] = -1;
    luSolve(st.jac, m, st.piv, st.sens, off);
  }
  out.fill(0);
  for (let q = 0; q < k; q++) {
    const cq = c.capacitors[q]!;
    const hcq = h / (2 * cq.farads);
    for (let j = 0; j < k; j++) {
      const off = j * m;
      const dvb = (cq.plus >= 0 ? st.sens[off + cq.plus]! : 0) - (cq.minus >= 0 ? st.sens[off + cq.minus]! : 0);
      // d iC'_q / d hist_j
      const dI = st.geq[q]! * dvb - (q === j ? 1 : 0);
      const cj = c.capacitors[j]!;
      const hcj = h / (2 * cj.farads);
      // hist_j = geq_j·(vC_j + hc_j·iC_j)
      const dIdv = dI * st.geq[j]!;
      const dIdi = dI * st.geq[j]! * hcj;
      out[(k + q) * n2 + j] = out[(k + q) * n2 + j]! + dIdv;
      out[(k + q) * n2 + k + j] = out[(k + q) * n2 + k + j]! + dIdi;
      out[q * n2 + j] = out[q * n2 + j]! + hcq * dIdv;
      out[q * n2 + k + j] = out[q * n2 + k + j]! + hcq * dIdi;
    }
    out[q * n2 + q] = out[q * n2 + q]! + 1;
    out[q * n2 + k + q] = out[q * n2 + k + q]! + hcq;
  }
}

/**
 * Node voltages of a trajectory on grid `from` linearly interpolated onto grid `to`
 * (both from 0 to the same period). Row-major [(points) × m].
 */
function interpolateTrajectory(from: Float64Array, volts: Float64Array, m: number, to: Float64Array): Float64Array {
  const out = new Float64Array(to.length * m);
  const last = from.length - 1;
  let j = 0;
  for (let p = 0; p < to.length; p++) {
    const t = to[p]!;
    while (j < last - 1 && from[j + 1]! < t) j++;
    const span = from[j + 1]! - from[j]!;
    const f = span > 0 ? Math.min(1, Math.max(0, (t - from[j]!) / span)) : 0;
    for (let i = 0; i < m; i++) {
      const a = volts[j * m + i]!;
      const b = volts[(j + 1) * m + i]!;
      out[p * m + i] = a + f * (b - a);
    }
  }
  return out;
}

/** c = a·b for n×n row-major matrices (c distinct from a and b). */
function matMul(a: Float64Array, b: Float64Array, c: Float64Array, n: number): void {
  for (let i = 0; i < n; i++) {
    for (let j = 0; j < n; j++) {
      let s = 0;
      for (let l = 0; l < n; l++) s += a[i * n + l]! * b[l * n + j]!;
      c[i * n + j] = s;
    }
  }
}

/**
 * Finds the periodic steady state of a circuit driven at c.hz.
 * @param c     circuit from buildCircuit
 * @param opts  steps per period, tolerance, iteration cap, and a start guess for the capacitors
 * @returns the final period's trajectory and convergence facts; never throws for a valid circuit
 */
export function solveSteadyState(c: Circuit, opts: SteadyStateOptions): SteadyStateSolution {
  const st = new Stepper(c);
  const { m, k } = st;
  const N = opts.steps.length;
  const T = 1 / c.hz;
  const times = new Float64Array(N + 1);
  for (let n = 0; n < N; n++) times[n + 1] = times[n]! + opts.steps[n]!;
  const n2 = 2 * k;
  const state = new Float64Array(n2);
  for (let q = 0; q < k; q++) state[q] = opts.initialCapacitorVolts[q] ?? 0;

  const nodeVolts = new Float64Array((N + 1) * m);
  const capVolts = new Float64Array((N + 1) * Math.max(k, 1));
  const monodromy = new Float64Array(n2 * n2);
  const stepJac = new Float64Array(n2 * n2);
  const tmp = new Float64Array(n2 * n2);
  const start = new Float64Array(n2);
  const sys = new Float64Array(n2 * n2);
  const sysPiv = new Int32Array(n2);
  const delta = new Float64Array(n2);
  let havePrevious = false;

  // Node voltages to start Newton from in the first period: the predictor trajectory when one
  // is given, else zero (Newton then needs a few more iterations on the first steps).
  let predicted: Float64Array | null = null;
  if (opts.predictor) {
    predicted = interpolateTrajectory(opts.predictor.times, opts.predictor.nodeVolts, m, times);
    st.v.set(predicted.subarray(0, m));
  } else {
    st.v.fill(0);
  }

  let iterations = 0;
  let residual = Infinity;
  let converged = false;
  let stepsConverged = true;
  const maxIterations = k === 0 ? 1 : opts.maxIterations;

  for (let iter = 0; iter < maxIterations; iter++) {
    iterations = iter + 1;
    start.set(state);
    monodromy.fill(0);
    for (let i = 0; i < n2; i++) monodromy[i * n2 + i] = 1;
    if (havePrevious) {
      st.v.set(nodeVolts.subarray(0, m));
    }
    // Record the start point: node voltages consistent with the start state come from the
    // previous period's end (or, on the first pass, from the first step's Newton).
    for (let q = 0; q < k; q++) capVolts[q] = state[q]!;
    let ok = true;
    for (let n = 0; n < N; n++) {
      const t = times[n]!;
      const h = opts.steps[n]!;
      if (havePrevious) {
        // Predictor: the previous period's trajectory at the same instant.
        for (let i = 0; i < m; i++) st.v[i] = nodeVolts[(n + 1) * m + i]!;
      } else if (predicted !== null) {
        for (let i = 0; i < m; i++) st.v[i] = predicted[(n + 1) * m + i]!;
      }
      if (!step(st, t, h, state, 0, k > 0 ? stepJac : null)) {
        ok = false;
        break;
      }
      if (k > 0) {
        matMul(stepJac, monodromy, tmp, n2);
        monodromy.set(tmp);
      }
      for (let i = 0; i < m; i++) nodeVolts[(n + 1) * m + i] = st.v[i]!;
      for (let q = 0; q < k; q++) capVolts[(n + 1) * k + q] = state[q]!;
    }
    if (!ok) {
      stepsConverged = false;
      break;
    }
    // Point 0 of the period is the same instant as point N of the periodic solution.
    for (let i = 0; i < m; i++) nodeVolts[i] = nodeVolts[N * m + i]!;
    havePrevious = true;
    if (k === 0) {
      residual = 0;
      converged = true;
      break;
    }
    residual = 0;
    for (let q = 0; q < k; q++) residual = Math.max(residual, Math.abs(state[q]! - start[q]!));
    if (residual <= opts.toleranceVolts) {
      converged = true;
      // The recorded period ran from `start`; keep it as the steady-state period.
      state.set(start);
      break;
    }
    // Newton on Φ(s) − s = 0: (M − I)·Δ = −(Φ(s) − s).
    for (let i = 0; i < n2; i++) {
      for (let j = 0; j < n2; j++) sys[i * n2 + j] = monodromy[i * n2 + j]! - (i === j ? 1 : 0);
      delta[i] = -(state[i]! - start[i]!);
    }
    let next: Float64Array;
    if (luFactor(sys, n2, sysPiv)) {
      luSolve(sys, n2, sysPiv, delta);
      next = new Float64Array(n2);
      for (let i = 0; i < n2; i++) next[i] = start[i]! + delta[i]!;
    } else {
      // Singular sensitivity: fall back to plain time stepping (the end state).
      next = state.slice();
    }
    let finite = true;
    let correction = 0;
    for (let i = 0; i < n2; i++) if (!Number.isFinite(next[i]!)) finite = false;
    for (let q = 0; q < k; q++) correction = Math.max(correction, Math.abs(next[q]! - start[q]!));
    state.set(finite ? next : state);
    if (finite && opts.acceptSmallCorrection === true && correction <= opts.toleranceVolts) {
      converged = true;
      break;
    }
  }
  void tmp;
  return {
    converged,
    iterations,
    residualVolts: Number.isFinite(residual) ? residual : Number.MAX_VALUE,
    stepsPerPeriod: N,
    periodSeconds: T,
    times,
    nodeVolts,
    capacitorVolts: capVolts,
    startState: state,
    stepsConverged,
  };
}
