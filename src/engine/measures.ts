/**
 * What a meter and a designer read off the steady-state period: means, RMS, peaks, the ripple's
 * fundamental, diode stress, regulator figures. Pure functions of the trajectory.
 */
import { GROUND, ZENER_KNEE_VOLTS, type Circuit } from './circuit';
import { evalCurrentSink, evalJunction, evalRegulatorOutput, softplus } from './elements';
import type { SteadyStateSolution } from './steady-state';
import type { DiodeStress, RegulatorResult, Waveform } from './types';

/**
 * Trapezoidal weights of the N points of a periodic grid (point N is point 0 again): each point
 * stands for half of each step beside it. The weights add up to 1.
 */
export function periodicWeights(times: Float64Array): Float64Array {
  const N = times.length - 1;
  const T = times[N]! - times[0]!;
  const w = new Float64Array(N);
  for (let n = 0; n < N; n++) {
    const before = n === 0 ? times[N]! - times[N - 1]! : times[n]! - times[n - 1]!;
    const after = times[n + 1]! - times[n]!;
    w[n] = (before + after) / (2 * T);
  }
  return w;
}

/** Time average over one period. */
function mean(x: Float64Array, w: Float64Array): number {
  let s = 0;
  for (let n = 0; n < w.length; n++) s += w[n]! * x[n]!;
  return s;
}

/** RMS of x − centre over one period. */
function rmsAbout(x: Float64Array, w: Float64Array, centre: number): number {
  let s = 0;
  for (let n = 0; n < w.length; n++) {
    const d = x[n]! - centre;
    s += w[n]! * d * d;
  }
  return Math.sqrt(s);
}

function extent(x: Float64Array, N: number): { min: number; max: number } {
  let min = Infinity;
  let max = -Infinity;
  for (let n = 0; n < N; n++) {
    const v = x[n]!;
    if (v < min) min = v;
    if (v > max) max = v;
  }
  return { min, max };
}

/**
 * Fundamental frequency of a periodic ripple as a meter's frequency counter sees it: the number
 * of upward crossings of the mean per period, with a hysteresis of 10 % of the peak-to-peak
 * value (so a small wobble is not counted), times the line frequency. A full-wave ripple gives
 * 2f, a half-wave one f (DOMAIN.md §7). Returns 0 for a ripple below `floorVolts` peak to peak.
 */
export function rippleFundamentalHz(x: Float64Array, w: Float64Array, hz: number, floorVolts: number): number {
  const N = w.length;
  const { min, max } = extent(x, N);
  const pp = max - min;
  if (!(pp > floorVolts)) return 0;
  const centre = mean(x, w);
  const band = 0.1 * pp;
  // Start from a known side: find the sample with the lowest value (surely below the band).
  let start = 0;
  for (let n = 0; n < N; n++) if (x[n] === min) start = n;
  let below = true;
  let crossings = 0;
  for (let j = 1; j <= N; j++) {
    const v = x[(start + j) % N]!;
    if (below && v > centre + band) {
      crossings++;
      below = false;
    } else if (!below && v < centre - band) {
      below = true;
    }
  }
  return Math.max(1, crossings) * hz;
}

export interface PeriodMeasures {
  dc: number;
  ripplePp: number;
  rippleRms: number;
  rippleHz: number;
  secondaryRms: number;
  secondaryRmsAmps: number;
  loadAmps: number;
  diodes: DiodeStress[];
  diodePeakA: number;
  diodePiv: number;
  regulator: RegulatorResult | null;
  /** Output and secondary voltages, diode currents and regulated output on the grid. */
  series: { vOut: Float64Array; vSecondary: Float64Array; iDiode: Float64Array[]; vRegulated: Float64Array | null };
}

/**
 * Reads the measures off a steady-state solution.
 * @param c    the circuit that was solved
 * @param sol  its steady-state period
 */
export function measurePeriod(c: Circuit, sol: SteadyStateSolution): PeriodMeasures {
  const N = sol.stepsPerPeriod;
  const w = periodicWeights(sol.times);
  const m = c.nodeCount;
  const V = sol.nodeVolts;
  const at = (n: number, node: number): number => (node === GROUND ? 0 : V[n * m + node]!);
  const vOut = new Float64Array(N + 1);
  const vSec = new Float64Array(N + 1);
  const iWinding = new Float64Array(N + 1);
  const w0 = c.windings[0]!;
  const omega = 2 * Math.PI * c.hz;
  for (let n = 0; n <= N; n++) {
    vOut[n] = at(n, c.out);
    vSec[n] = at(n, c.secondaryPlus) - at(n, c.secondaryMinus);
    const e = w0.sign * w0.peakVolts * Math.sin(omega * sol.times[n]!);
    // Winding current flows out of its plus terminal: (e − v_terminals)/R.
    iWinding[n] = (e - (at(n, w0.plus) - at(n, w0.minus))) / w0.ohms;
  }
  const dc = mean(vOut, w);
  const { min, max } = extent(vOut, N);
  const scale = Math.max(Math.abs(dc), w0.peakVolts, 1);
  const ripplePp = max - min;
  const rippleRms = rmsAbout(vOut, w, dc);
  const rippleHz = rippleFundamentalHz(vOut, w, c.hz, 1e-6 * scale);

  const scratch = new Float64Array(2);
  const diodes: DiodeStress[] = [];
  const iDiode: Float64Array[] = [];
  let diodePeakA = 0;
  let diodePiv = 0;
  for (const d of c.diodes) {
    const cur = new Float64Array(N + 1);
    let vj = Number.NaN;
    let peak = 0;
    let piv = 0;
    for (let n = 0; n <= N; n++) {
      const vd = at(n, d.anode) - at(n, d.cathode);
      let i = 0;
      if (d.shortOhms !== null) i = vd / d.shortOhms;
      else if (d.junction !== null) {
        vj = evalJunction(d.junction, vd, vj, scratch);
        i = scratch[0]!;
      }
      cur[n] = i;
      if (i > peak) peak = i;
      if (-vd > piv) piv = -vd;
    }
    let sum = 0;
    let sq = 0;
    for (let n = 0; n < N; n++) {
      sum += w[n]! * Math.max(cur[n]!, 0);
      sq += w[n]! * cur[n]! * cur[n]!;
    }
    diodes.push({ label: d.label, peakAmps: peak, averageAmps: sum, rmsAmps: Math.sqrt(sq), pivVolts: piv });
    iDiode.push(cur);
    diodePeakA = Math.max(diodePeakA, peak);
    diodePiv = Math.max(diodePiv, piv);
  }

  // Mean current into whatever hangs on the output (load, regulator input, zener series resistor).
  const iLoad = new Float64Array(N + 1);
  for (const s of c.sinks) {
    for (let n = 0; n <= N; n++) {
      if (s.kind === 'resistor' && s.a === c.out) iLoad[n] = iLoad[n]! + (at(n, s.a) - at(n, s.b)) / s.ohms;
      else if (s.kind === 'current-load' && s.a === c.out) {
        evalCurrentSink(s.amps, at(n, s.a), scratch);
        iLoad[n] = iLoad[n]! + scratch[0]!;
      } else if (s.kind === 'linear-regulator') {
        iLoad[n] = iLoad[n]! + linearRegulatorPoint(s, at(n, s.input), scratch).inputAmps;
      }
    }
  }

  const regulator = measureRegulator(c, V, w, vOut, scratch);
  return {
    dc,
    ripplePp,
    rippleRms,
    rippleHz,
    secondaryRms: rmsAbout(vSec, w, 0),
    secondaryRmsAmps: rmsAbout(iWinding, w, 0),
    loadAmps: mean(iLoad, w),
    diodes,
    diodePeakA,
    diodePiv,
    regulator: regulator?.result ?? null,
    series: { vOut, vSecondary: vSec, iDiode, vRegulated: regulator?.vReg ?? null },
  };
}

type LinearSink = Extract<Circuit['sinks'][number], { kind: 'linear-regulator' }>;

function linearRegulatorPoint(
  s: LinearSink,
  vin: number,
  scratch: Float64Array,
): { outVolts: number; loadAmps: number; inputAmps: number } {
  evalRegulatorOutput(s.volts, s.dropoutVolts, vin, scratch);
  const outVolts = scratch[0]!;
  let loadAmps: number;
  if (s.load.kind === 'resistive') loadAmps = outVolts / s.load.ohms;
  else {
    evalCurrentSink(s.load.amps, outVolts, scratch);
    loadAmps = scratch[0]!;
  }
  evalCurrentSink(s.quiescentAmps, vin, scratch);
  return { outVolts, loadAmps, inputAmps: loadAmps + scratch[0]! };
}

function measureRegulator(
  c: Circuit,
  V: Float64Array,
  w: Float64Array,
  vOut: Float64Array,
  scratch: Float64Array,
): { result: RegulatorResult; vReg: Float64Array } | null {
  const N = w.length;
  const m = c.nodeCount;
  const vReg = new Float64Array(N + 1);
  const { min: valley } = extent(vOut, N);
  const lin = c.sinks.find((s): s is LinearSink => s.kind === 'linear-regulator');
  if (lin) {
    let pw = 0;
    let iout = 0;
    for (let n = 0; n <= N; n++) {
      const vin = vOut[n]!;
      const p = linearRegulatorPoint(lin, vin, scratch);
      vReg[n] = p.outVolts;
      if (n < N) {
        // Dissipation (Vin − Vout)·I + Vin·Iq (DOMAIN.md §6).
        pw += w[n]! * ((vin - p.outVolts) * p.loadAmps + vin * (p.inputAmps - p.loadAmps));
        iout += w[n]! * p.loadAmps;
      }
    }
    const dc = mean(vReg, w);
    const ex = extent(vReg, N);
    const headroom = valley - (lin.volts + lin.dropoutVolts);
    return {
      vReg,
      result: {
        kind: 'linear',
        dc,
        ripplePp: ex.max - ex.min,
        rippleRms: rmsAbout(vReg, w, dc),
        inputValleyVolts: valley,
        headroom,
        inRegulation: headroom >= 0,
        dissipationWatts: pw,
        loadAmps: iout,
      },
    };
  }
  const zr = c.zener;
  if (zr === null) return null;
  const z = zr.node;
  let pw = 0;
  let iout = 0;
  let minZenerAmps = Infinity;
  for (let n = 0; n <= N; n++) {
    const vz = V[n * m + z]!;
    vReg[n] = vz;
    if (n === N) break;
    const iSeries = (vOut[n]! - vz) / zr.seriesOhms;
    const iz = (ZENER_KNEE_VOLTS / zr.zenerOhms) * softplus((vz - zr.zenerVolts) / ZENER_KNEE_VOLTS);
    let il: number;
    if (zr.load.kind === 'resistive') il = vz / zr.load.ohms;
    else {
      evalCurrentSink(zr.load.amps, vz, scratch);
      il = scratch[0]!;
    }
    pw += w[n]! * (iSeries * iSeries * zr.seriesOhms + vz * iz);
    iout += w[n]! * il;
    if (iz < minZenerAmps) minZenerAmps = iz;
  }
  const dc = mean(vReg, w);
  const ex = extent(vReg, N);
  // A zener regulates while it carries current; we call it out of regulation when its current
  // falls below 1 % of the mean load current at any instant (our criterion).
  const loadAmps = iout;
  return {
    vReg,
    result: {
      kind: 'zener',
      dc,
      ripplePp: ex.max - ex.min,
      rippleRms: rmsAbout(vReg, w, dc),
      inputValleyVolts: valley,
      headroom: minZenerAmps,
      inRegulation: minZenerAmps > 0.01 * Math.max(loadAmps, 1e-4),
      dissipationWatts: pw,
      loadAmps,
    },
  };
}

/**
 * Resamples the period at `points` + 1 evenly spaced instants (linear interpolation) for plotting.
 */
export function sampleWaveform(series: PeriodMeasures['series'], times: Float64Array, points: number): Waveform {
  const N = times.length - 1;
  const T = times[N]!;
  const count = Math.max(2, Math.floor(points));
  const t: number[] = [];
  const lo: number[] = [];
  const frac: number[] = [];
  let j = 0;
  for (let p = 0; p <= count; p++) {
    const tp = (p / count) * T;
    while (j < N - 1 && times[j + 1]! < tp) j++;
    const span = times[j + 1]! - times[j]!;
    t.push(tp);
    lo.push(j);
    frac.push(span > 0 ? Math.min(1, Math.max(0, (tp - times[j]!) / span)) : 0);
  }
  const pick = (x: Float64Array): number[] => lo.map((i, p) => x[i]! + frac[p]! * (x[i + 1]! - x[i]!));
  const w: Waveform = {
    t,
    vOut: pick(series.vOut),
    vSecondary: pick(series.vSecondary),
    iDiode: series.iDiode.map(pick),
  };
  if (series.vRegulated) w.vRegulated = pick(series.vRegulated);
  return w;
}
