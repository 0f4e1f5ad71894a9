/**
 * Periodic steady state of a rectifier circuit in the time domain.
 *
 * Method (standard circuit-simulation practice; see e.g. Kundert, White & Sangiovanni-Vincentelli,
 * "Steady-State Methods for Simulating Analog and Microwave Circuits", 1990, on shooting-Newton):
 * - Each time step is the second-order backward differentiation formula (BDF2, "Gear-2", with
 *   variable steps) for the capacitors — a companion conductance and a history current, the
 *   ESR folded into the branch — and Newton's method on the nodal equations with the nonlinear
 *   element laws of elements.ts. BDF2 rather than the trapezoidal rule because it is L-stable:
 *   a capacitor charged through milliohms from a stiff source would make the trapezoidal rule
 *   ring from step to step (the classic trapezoidal ringing), inflating the diode currents.
 * - The state at the start of a period is every capacitor's voltage at the last two grid points
 *   (BDF2 looks two points back). One period of integration maps a start state s to Φ(s).
 *   Alongside it we carry the sensitivity matrix M = dΦ/ds by the chain rule through each
 *   step's converged Newton Jacobian (implicit function theorem), then take a Newton step on
 *   Φ(s) − s = 0, damped by a backtracking line search on the residual. A few periods reach a
 *   steady state that plain time stepping would need hundreds of periods (many load time
 *   constants) to approach.
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
  /** A full start state [vC at t = 0 ..., vC one step before ...] that overrides the guess. */
  initialState?: Float64Array;
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
  /** Start state of the final period: [vC at t = 0 ..., vC one step before t = 0 ...]. */
  startState: Float64Array;
  /** False when some time step's Newton iteration failed even after step halving. */
  stepsConverged: boolean;
}

// Module-local copies: hot loops read these on every element.
const GMIN = GMIN_SIEMENS;
const GROUND = GROUND_NODE;
const ZENER_KNEE = ZENER_KNEE_VOLTS;
const NEWTON_MAX = 80;
/** Newton tolerances per step: node voltage change, volts (absolute and relative), and KCL residual, amps. */
const VOLT_ABS = 1e-6;
const VOLT_REL = 1e-8;
const RESIDUAL_AMPS = 1e-10;
const SUBDIVISION_DEPTH = 8;

/** Workspace for one circuit: all scratch arrays the step loop needs. */
class Stepper {
  readonly m: number;
  readonly k: number;
  readonly jac: Float64Array;
  readonly rhs: Float64Array;
  /** The step's voltage-independent Jacobian and residual offset (prepareLinear). */
  readonly jlin: Float64Array;
  readonly blin: Float64Array;
  readonly piv: Int32Array;
  readonly v: Float64Array;
  readonly vTry: Float64Array;
  readonly scratch = new Float64Array(2);
  /** Warm-start junction voltages per diode, with the terminal voltage and slope they were for. */
  readonly vj: Float64Array;
  readonly vdLast: Float64Array;
  readonly gLast: Float64Array;
  /** Per-capacitor companion conductance and history current for the current step. */
  readonly geq: Float64Array;
  readonly hist: Float64Array;
  readonly gc: Float64Array;
  readonly hc: Float64Array;
  /** d(Hc)/d(v_n) and −d(Hc)/d(v_{n−1}) of the current step: α1·C/h and α2·C/h. */
  readonly a1ch: Float64Array;
  readonly a2ch: Float64Array;
  /** Sensitivity columns J⁻¹·(e_plus − e_minus), [k × m]. */
  readonly sens: Float64Array;
  readonly omega: number;
  /** 1/(2·w) for the circuit's sharpest law: the error left after a Newton update Δ is ~Δ²·this. */
  readonly quadraticGain: number;

  constructor(readonly c: Circuit) {
    this.m = c.nodeCount;
    this.k = c.capacitors.length;
    this.jac = new Float64Array(this.m * this.m);
    this.rhs = new Float64Array(this.m);
    this.jlin = new Float64Array(this.m * this.m);
    this.blin = new Float64Array(this.m);
    this.piv = new Int32Array(this.m);
    this.v = new Float64Array(this.m);
    this.vTry = new Float64Array(this.m);
    this.vj = new Float64Array(c.diodes.length).fill(Number.NaN);
    this.vdLast = new Float64Array(c.diodes.length);
    this.gLast = new Float64Array(c.diodes.length);
    this.geq = new Float64Array(this.k);
    this.hist = new Float64Array(this.k);
    this.gc = new Float64Array(this.k);
    this.hc = new Float64Array(this.k);
    this.a1ch = new Float64Array(this.k);
    this.a2ch = new Float64Array(this.k);
    this.sens = new Float64Array(this.k * this.m);
    this.omega = 2 * Math.PI * c.hz;
    let sharpest = ZENER_KNEE;
    for (const d of c.diodes) {
      if (d.junction === null) continue;
      sharpest = Math.min(sharpest, d.junction.kind === 'shockley' ? d.junction.thermalVolts : d.junction.kneeVolts);
    }
    this.quadraticGain = 1 / (2 * sharpest);
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
   * Stamps the parts of the step that do not depend on the node voltages — gmin, the windings'
   * conductance and source current at time t, the capacitor companions, resistors and shorted
   * diodes — once per step into jlin/blin, so each Newton iteration only adds the nonlinear ones.
   * Call after setCompanions.
   */
  prepareLinear(t: number): void {
    const c = this.c;
    const m = this.m;
    const J = this.jlin;
    const b = this.blin;
    J.fill(0);
    b.fill(0);
    const g2 = (a: number, bb: number, g: number): void => {
      if (a >= 0) J[a * m + a] = J[a * m + a]! + g;
      if (bb >= 0) J[bb * m + bb] = J[bb * m + bb]! + g;
      if (a >= 0 && bb >= 0) {
        J[a * m + bb] = J[a * m + bb]! - g;
        J[bb * m + a] = J[bb * m + a]! - g;
      }
    };
    const i2 = (a: number, bb: number, i: number): void => {
      if (a >= 0) b[a] = b[a]! + i;
      if (bb >= 0) b[bb] = b[bb]! - i;
    };
    for (let n = 0; n < m; n++) J[n * m + n] = J[n * m + n]! + GMIN;
    const sinWt = Math.sin(this.omega * t);
    for (const w of c.windings) {
      const g = 1 / w.ohms;
      g2(w.plus, w.minus, g);
      i2(w.plus, w.minus, -w.sign * w.peakVolts * sinWt * g);
    }
    for (const el of c.diodes) if (el.shortOhms !== null) g2(el.anode, el.cathode, 1 / el.shortOhms);
    for (let q = 0; q < this.k; q++) {
      const cap = c.capacitors[q]!;
      g2(cap.plus, cap.minus, this.geq[q]!);
      i2(cap.plus, cap.minus, -this.hist[q]!);
    }
    for (const sk of c.sinks) if (sk.kind === 'resistor') g2(sk.a, sk.b, 1 / sk.ohms);
  }

  /**
   * Residual (currents leaving each node) and Jacobian at node voltages v, from the step's
   * linear part (prepareLinear) plus the nonlinear elements.
   */
  assemble(v: Float64Array): void {
    const c = this.c;
    const m = this.m;
    this.jac.set(this.jlin);
    for (let i = 0; i < m; i++) {
      let r = this.blin[i]!;
      for (let j = 0; j < m; j++) r += this.jlin[i * m + j]! * v[j]!;
      this.rhs[i] = r;
    }
    const out = this.scratch;
    for (let d = 0; d < c.diodes.length; d++) {
      const el = c.diodes[d]!;
      if (el.junction === null) continue;
      const vd = this.volt(v, el.anode) - this.volt(v, el.cathode);
      // Warm start: the last junction voltage moved to first order with the terminal voltage,
      // dVj/dV = 1 − R·g (the series resistance takes the rest).
      const r = el.junction.ohms;
      const guess = this.vj[d]! + (vd - this.vdLast[d]!) * (1 - r * this.gLast[d]!);
      this.vj[d] = evalJunction(el.junction, vd, guess, out);
      this.vdLast[d] = vd;
      this.gLast[d] = out[1]!;
      this.stampI(el.anode, el.cathode, out[0]!);
      this.stampG(el.anode, el.cathode, out[1]!);
    }
    for (const s of c.sinks) {
      switch (s.kind) {
        case 'resistor':
          break;
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
          regulatorInputCurrent(s, this.volt(v, s.input), out);
          this.stampI(s.input, GROUND, out[0]!);
          this.stampG(s.input, GROUND, out[1]!);
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
    this.prepareLinear(t);
    for (let it = 0; it < NEWTON_MAX; it++) {
      this.assemble(v);
      // Converged on the currents (as SPICE also tests): every node's KCL residual below
      // RESIDUAL_AMPS. This settles directions the voltages cannot, such as the common mode of
      // a floating winding while every diode is off, held only by leakage and gmin.
      let residual = 0;
      for (let n = 0; n < m; n++) residual = Math.max(residual, Math.abs(this.rhs[n]!));
      if (residual <= RESIDUAL_AMPS) {
        // Leave the Jacobian at this point factored, for the step's sensitivities.
        return luFactor(this.jac, m, this.piv);
      }
      if (!luFactor(this.jac, m, this.piv)) return false;
      luSolve(this.jac, m, this.piv, this.rhs);
      let worst = 0;
      let biggest = 0;
      for (let n = 0; n < m; n++) {
        const dv = -this.rhs[n]!;
        if (!Number.isFinite(dv)) return false;
        v[n] = v[n]! + dv;
        const tol = VOLT_ABS + VOLT_REL * Math.abs(v[n]!);
        const ratio = Math.abs(dv) / tol;
        if (ratio > worst) worst = ratio;
        if (Math.abs(dv) > biggest) biggest = Math.abs(dv);
      }
      // Quadratic convergence: after an update of Δ the error is about Δ²/(2·w) for the
      // sharpest exponential law in the circuit (w = nVt of a diode, or a smoothed knee's
      // width), so a small enough first update already meets the tolerance.
      if (biggest * biggest * this.quadraticGain <= VOLT_ABS) return true;
      // Converged on the voltages: quadratic convergence leaves an error far below the step,
      // and the factored Jacobian, taken one update of at most a microvolt or so earlier, is
      // that of the converged point for the sensitivities (a diode's slope moves by Δ/nVt).
      if (worst <= 1) return true;
    }
    return false;
  }

  /**
   * Sets the capacitor companions for a step of h seconds that follows a step of hPrev seconds,
   * from state s = [vC_n..., vC_{n−1}...]. Variable-step BDF2 (Gear-2) for i = C·dv/dt:
   *   i_{n+1} = (C/h)·(α0·v_{n+1} − α1·v_n + α2·v_{n−1}), ω = h/hPrev,
   *   α0 = (1 + 2ω)/(1 + ω), α1 = 1 + ω, α2 = ω²/(1 + ω)
   * (standard variable-coefficient form; e.g. Hairer & Wanner, Solving ODEs II, §III.5).
   * With the ESR r in series: i = Geq·v_branch − hist, Geq = 1/(r + 1/Gc), Gc = α0·C/h,
   * hist = Geq·Hc/Gc, Hc = (C/h)·(α1·v_n − α2·v_{n−1}).
   */
  setCompanions(h: number, hPrev: number, s: Float64Array): void {
    const w = h / hPrev;
    const a0 = (1 + 2 * w) / (1 + w);
    const a1 = 1 + w;
    const a2 = (w * w) / (1 + w);
    for (let q = 0; q < this.k; q++) {
      const cap = this.c.capacitors[q]!;
      const ch = cap.farads / h;
      const gc = a0 * ch;
      const geq = 1 / (cap.esrOhms + 1 / gc);
      const hc = ch * (a1 * s[q]! - a2 * s[this.k + q]!);
      this.gc[q] = gc;
      this.hc[q] = hc;
      this.geq[q] = geq;
      this.hist[q] = (geq * hc) / gc;
      this.a1ch[q] = a1 * ch;
      this.a2ch[q] = a2 * ch;
    }
  }

  /** After a converged step: the new capacitor voltages, shifting the state one point on. */
  advanceState(s: Float64Array): void {
    for (let q = 0; q < this.k; q++) {
      const cap = this.c.capacitors[q]!;
      const vb = this.volt(this.v, cap.plus) - this.volt(this.v, cap.minus);
      const i = this.geq[q]! * vb - this.hist[q]!;
      s[this.k + q] = s[q]!;
      s[q] = (i + this.hc[q]!) / this.gc[q]!;
    }
  }
}

/** Regulator input current and its derivative at input voltage vin, into out[0], out[1]. */
function regulatorInputCurrent(
  s: Extract<Circuit['sinks'][number], { kind: 'linear-regulator' }>,
  vin: number,
  out: Float64Array,
): void {
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
  out[0] = iLoad + out[0]!;
  out[1] = gLoad + out[1]!;
}

/**
 * One step of h seconds from time t (the step before it was hPrev seconds) with state s
 * (updated in place), splitting the step in halves when Newton fails. The sensitivity matrix
 * `stepJac` (2k × 2k, row-major) receives d(state after)/d(state before) when non-null.
 */
function step(
  st: Stepper,
  t: number,
  h: number,
  hPrev: number,
  s: Float64Array,
  depth: number,
  stepJac: Float64Array | null,
): boolean {
  const k = st.k;
  const saved = st.vTry;
  saved.set(st.v);
  st.setCompanions(h, hPrev, s);
  if (st.newton(t + h)) {
    // The sensitivities use the Jacobian at the converged point, which newton() leaves factored:
    // a Jacobian from far off the point (a looser tolerance) makes the shooting crawl through
    // stiff diodes.
    if (stepJac !== null) stepSensitivity(st, stepJac);
    st.advanceState(s);
    return true;
  }
  if (depth >= SUBDIVISION_DEPTH) return false;
  // Retry as two half steps from the saved node voltages. (The state's older point then sits
  // hPrev back from the first half and h/2 back from the second; BDF2 takes any spacing.)
  st.v.set(saved);
  const half = h / 2;
  const s0 = s.slice();
  const j1 = stepJac === null ? null : new Float64Array(4 * k * k);
  const j2 = stepJac === null ? null : new Float64Array(4 * k * k);
  if (!step(st, t, half, hPrev, s, depth + 1, j1) || !step(st, t + half, half, half, s, depth + 1, j2)) {
    s.set(s0);
    return false;
  }
  if (stepJac !== null && j1 !== null && j2 !== null) matMul(j2, j1, stepJac, 2 * k);
  return true;
}

/**
 * d(state after the step)/d(state before) from the converged step's Jacobian factors.
 * State order [vC_n (k), vC_{n−1} (k)] before, [vC_{n+1}, vC_n] after. The history currents
 * depend on the state; the node voltages on the history currents through J⁻¹.
 */
function stepSensitivity(st: Stepper, out: Float64Array): void {
  const { m, k, c } = st;
  const n2 = 2 * k;
  // Columns X_j = J⁻¹·(e_plus_j − e_minus_j) = d(node volts)/d(hist_j).
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
    const invGc = 1 / st.gc[q]!;
    for (let j = 0; j < k; j++) {
      const off = j * m;
      const dvb = (cq.plus >= 0 ? st.sens[off + cq.plus]! : 0) - (cq.minus >= 0 ? st.sens[off + cq.minus]! : 0);
      // d i_q / d hist_j
      const dI = st.geq[q]! * dvb - (q === j ? 1 : 0);
      // hist_j = (Geq_j/Gc_j)·Hc_j, Hc_j = a1ch_j·v_n,j − a2ch_j·v_{n−1},j
      const r = st.geq[j]! / st.gc[j]!;
      const dIdvn = dI * r * st.a1ch[j]!;
      const dIdvp = -dI * r * st.a2ch[j]!;
      // v_{n+1},q = (i_q + Hc_q)/Gc_q
      out[q * n2 + j] = out[q * n2 + j]! + dIdvn * invGc;
      out[q * n2 + k + j] = out[q * n2 + k + j]! + dIdvp * invGc;
    }
    out[q * n2 + q] = out[q * n2 + q]! + st.a1ch[q]! * invGc;
    out[q * n2 + k + q] = out[q * n2 + k + q]! - st.a2ch[q]! * invGc;
    // The older point of the new state is the current point of the old one.
    out[(k + q) * n2 + q] = 1;
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

/** One period integrated from a start state: its end state, sensitivity and trajectory. */
interface PeriodRun {
  ok: boolean;
  start: Float64Array;
  end: Float64Array;
  monodromy: Float64Array;
  nodeVolts: Float64Array;
  capVolts: Float64Array;
  /** Largest |Φ(s) − s| over the state, volts. */
  residual: number;
}

/**
 * Finds the periodic steady state of a circuit driven at c.hz.
 * @param c     circuit from buildCircuit
 * @param opts  step grid, tolerance, iteration cap, and a start guess for the capacitors
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
  const stepJac = new Float64Array(n2 * n2);
  const tmp = new Float64Array(n2 * n2);
  const scale = Math.max(1, ...c.windings.map((w) => w.peakVolts));

  // Node voltages to start Newton from in the first period: the predictor trajectory when one
  // is given, else zero (Newton then needs a few more iterations on the first steps).
  let predicted: Float64Array | null = null;
  if (opts.predictor) predicted = interpolateTrajectory(opts.predictor.times, opts.predictor.nodeVolts, m, times);

  /** Integrates one period from `start`, predicting each step from `guide` when given. */
  const runPeriod = (start: Float64Array, guide: Float64Array | null): PeriodRun => {
    const state = start.slice();
    const monodromy = new Float64Array(n2 * n2);
    for (let i = 0; i < n2; i++) monodromy[i * n2 + i] = 1;
    const nodeVolts = new Float64Array((N + 1) * m);
    const capVolts = new Float64Array((N + 1) * Math.max(k, 1));
    if (guide !== null) st.v.set(guide.subarray(0, m));
    else st.v.fill(0);
    for (let q = 0; q < k; q++) capVolts[q] = state[q]!;
    let ok = true;
    for (let n = 0; n < N; n++) {
      if (guide !== null) for (let i = 0; i < m; i++) st.v[i] = guide[(n + 1) * m + i]!;
      const hPrev = n === 0 ? opts.steps[N - 1]! : opts.steps[n - 1]!;
      if (!step(st, times[n]!, opts.steps[n]!, hPrev, state, 0, k > 0 ? stepJac : null)) {
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
    // Point 0 of the period is the same instant as point N of the periodic solution.
    for (let i = 0; i < m; i++) nodeVolts[i] = nodeVolts[N * m + i]!;
    let residual = 0;
    for (let i = 0; i < n2; i++) residual = Math.max(residual, Math.abs(state[i]! - start[i]!));
    if (!ok || !Number.isFinite(residual)) residual = Infinity;
    return { ok, start, end: state, monodromy, nodeVolts, capVolts, residual };
  };

  const first = new Float64Array(n2);
  for (let q = 0; q < k; q++) {
    first[q] = opts.initialCapacitorVolts[q] ?? 0;
    first[k + q] = first[q]!;
  }
  if (opts.initialState !== undefined && opts.initialState.length === n2) first.set(opts.initialState);
  let run = runPeriod(first, predicted);
  let iterations = 1;
  let converged = k === 0 ? run.ok : run.residual <= opts.toleranceVolts;
  const maxIterations = k === 0 ? 1 : opts.maxIterations;
  // A Newton step never moves a capacitor by more than this (volts): keeps a nearly neutral
  // period map (a capacitor no diode recharges) from flinging the state far away.
  const maxMove = 0.5 * scale;
  const sys = new Float64Array(n2 * n2);
  const piv = new Int32Array(n2);
  const delta = new Float64Array(n2);

  while (!converged && iterations < maxIterations && run.ok) {
    // Newton on Φ(s) − s = 0: (M − I)·Δ = −(Φ(s) − s).
    for (let i = 0; i < n2; i++) {
      for (let j = 0; j < n2; j++) sys[i * n2 + j] = run.monodromy[i * n2 + j]! - (i === j ? 1 : 0);
      delta[i] = -(run.end[i]! - run.start[i]!);
    }
    let newtonOk = luFactor(sys, n2, piv);
    if (newtonOk) {
      luSolve(sys, n2, piv, delta);
      for (let i = 0; i < n2; i++) if (!Number.isFinite(delta[i]!)) newtonOk = false;
    }
    if (!newtonOk) {
      // Singular sensitivity: one period of plain time stepping instead.
      for (let i = 0; i < n2; i++) delta[i] = run.end[i]! - run.start[i]!;
    }
    let biggest = 0;
    for (let i = 0; i < n2; i++) biggest = Math.max(biggest, Math.abs(delta[i]!));
    if (biggest > maxMove) for (let i = 0; i < n2; i++) delta[i] = (delta[i]! * maxMove) / biggest;

    const correction = Math.min(biggest, maxMove);
    if (opts.acceptSmallCorrection === true && correction <= opts.toleranceVolts) {
      // Coarse use: the corrected state is good enough; keep the last trajectory.
      const next = run.start.slice();
      for (let i = 0; i < n2; i++) next[i] = next[i]! + delta[i]!;
      run = { ...run, start: next };
      converged = true;
      break;
    }

    // Backtracking line search on the residual: halve the step until it improves.
    let accepted: PeriodRun | null = null;
    let lambda = 1;
    for (let tries = 0; tries < 10 && iterations < maxIterations; tries++) {
      const trial = run.start.slice();
      for (let i = 0; i < n2; i++) trial[i] = trial[i]! + lambda * delta[i]!;
      const r = runPeriod(trial, run.nodeVolts);
      iterations++;
      if (r.ok && r.residual < run.residual) {
        accepted = r;
        break;
      }
      lambda /= 2;
    }
    if (accepted === null) {
      // No improvement along the Newton direction: fall back to the end state of the last
      // period (plain time stepping always moves toward the stable periodic solution).
      if (iterations >= maxIterations) break;
      accepted = runPeriod(run.end.slice(), run.nodeVolts);
      iterations++;
    }
    run = accepted;
    converged = run.ok && run.residual <= opts.toleranceVolts;
  }

  return {
    converged: converged && run.ok,
    iterations,
    residualVolts: Number.isFinite(run.residual) ? run.residual : Number.MAX_VALUE,
    stepsPerPeriod: N,
    periodSeconds: T,
    times,
    nodeVolts: run.nodeVolts,
    capacitorVolts: run.capVolts,
    startState: run.start,
    stepsConverged: run.ok,
  };
}
