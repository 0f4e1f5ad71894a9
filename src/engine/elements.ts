/**
 * Current laws of the nonlinear two-terminal elements, each returning the current and its
 * derivative (the small-signal conductance) for Newton's method.
 *
 * Results are written into a two-slot scratch array to keep the solver's inner loop free of
 * allocation: out[0] = current (amps), out[1] = dI/dV (siemens).
 */
import type { Junction } from './circuit';
import { CURRENT_LOAD_KNEE_VOLTS } from './circuit';

/** ln(1 + e^x) without overflow. */
export function softplus(x: number): number {
  return x > 0 ? x + Math.log1p(Math.exp(-x)) : Math.log1p(Math.exp(x));
}

/** Logistic function 1/(1 + e^−x), the derivative of softplus. */
export function logistic(x: number): number {
  if (x >= 0) return 1 / (1 + Math.exp(-x));
  const e = Math.exp(x);
  return e / (1 + e);
}

/**
 * Diode with series resistance as one two-terminal element.
 *
 * Shockley junction I = Is·(exp(Vj/(n·Vt)) − 1) (Shockley's diode equation, DOMAIN.md §2) in
 * series with R: V = Vj + R·I. The junction voltage is found by Newton's method on
 * g(Vj) = Vj + R·Is·(exp(Vj/nVt) − 1) − V, which is convex and increasing, so Newton started at
 * or above the root converges monotonically from above. Two upper bounds on the root:
 * Vj ≤ V (the current is not negative when V > 0) and Vj ≤ nVt·ln(1 + V/(R·Is)) (the current
 * is at most V/R). The composite I(V) has slope at most 1/R, which keeps the outer Newton tame.
 *
 * Piecewise-linear: an ideal switch with drop Vf and resistance R, smoothed over a knee of width
 * w: I = (w/R)·softplus((V − Vf)/w). Within a few w of the knee it is the ideal law.
 *
 * @param j        junction parameters (volts, amps, ohms)
 * @param volts    anode minus cathode
 * @param guessVj  previous junction voltage of this diode (a warm start), or NaN
 * @param out      receives [amps, siemens]
 * @returns the junction voltage found (the next warm start)
 */
export function evalJunction(j: Junction, volts: number, guessVj: number, out: Float64Array): number {
  if (j.kind === 'pwl') {
    const x = (volts - j.forwardVolts) / j.kneeVolts;
    out[0] = (j.kneeVolts / j.ohms) * softplus(x);
    out[1] = logistic(x) / j.ohms;
    return volts;
  }
  const is = j.saturationAmps;
  const a = j.thermalVolts;
  const r = j.ohms;
  if (volts <= 0) {
    // Reverse or zero bias: the current is at most Is in size, so the drop R·I (below a
    // nanovolt for any rectifier) is neglected and the junction takes the whole voltage.
    if (volts < -40 * a) {
      // exp(−40) ≈ 4e-18: the current is −Is to double precision, its slope nil.
      out[0] = -is;
      out[1] = 0;
      return volts;
    }
    const e = Math.exp(volts / a);
    const gj = (is * e) / a;
    out[0] = is * (e - 1);
    out[1] = gj / (1 + r * gj);
    return volts;
  }
  // Newton from the warm start when there is one (0 < guess < V), else from the bound
  // nVt·ln(1 + V/(R·Is)). From below the root the first step lands above it (convexity); a
  // long step up is clamped to the bound, so the iterates never run up the exponential.
  const rIs = r * is;
  let vj = guessVj > 0 && guessVj < volts ? guessVj : Math.min(volts, a * Math.log1p(volts / rIs));
  let e = 0;
  for (let k = 0; k < 60; k++) {
    e = Math.exp(vj / a);
    const step = (vj + rIs * (e - 1) - volts) / (1 + (rIs * e) / a);
    vj -= step;
    // Newton converges quadratically (g'' / 2g' ≤ 1 / (2·nVt) here): after a step of 1e-8 V the
    // junction voltage is right to about 1e-15 V, which the outer Newton and the shooting above
    // it need (a noisy law stalls the shooting). Carry the exponential to the new point to
    // first order, exact at that step size.
    if (Math.abs(step) <= 1e-8) {
      e *= 1 - step / a;
      break;
    }
    if (step < -4 * a) vj = Math.min(vj, volts, a * Math.log1p(volts / rIs));
  }
  // The current from the resistor's drop: exact to rounding at any current.
  const gj = (is * e) / a;
  out[0] = (volts - vj) / r;
  out[1] = gj / (1 + r * gj);
  return vj;
}

/**
 * Constant-current sink that tapers linearly to zero below the knee voltage and carries on as
 * the same conductance through zero and below (see CURRENT_LOAD_KNEE_VOLTS): a floating output
 * (no diode feeding it) then settles at 0 V rather than at any negative voltage.
 */
export function evalCurrentSink(amps: number, volts: number, out: Float64Array): void {
  if (volts >= CURRENT_LOAD_KNEE_VOLTS) {
    out[0] = amps;
    out[1] = 0;
  } else {
    out[0] = (amps * volts) / CURRENT_LOAD_KNEE_VOLTS;
    out[1] = amps / CURRENT_LOAD_KNEE_VOLTS;
  }
}

/**
 * Output voltage of an ideal three-terminal regulator: its set voltage, or the input less the
 * dropout when the input is too low (DOMAIN.md §6), never below 0.
 * out[0] = output volts, out[1] = d(output)/d(input).
 */
export function evalRegulatorOutput(volts: number, dropoutVolts: number, inputVolts: number, out: Float64Array): void {
  const v = inputVolts - dropoutVolts;
  if (v >= volts) {
    out[0] = volts;
    out[1] = 0;
  } else if (v > 0) {
    out[0] = v;
    out[1] = 1;
  } else {
    out[0] = 0;
    out[1] = 0;
  }
}
