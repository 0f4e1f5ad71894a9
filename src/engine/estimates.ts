/**
 * Textbook quick estimates of a supply (DOMAIN.md §2), shown beside the solver's exact figures so
 * a technician can see the familiar rule-of-thumb numbers and how far the real circuit departs.
 */

import type { SupplyEstimates, SupplySpec } from './types';
import { diodeForwardVolts } from './spec';

const SQRT2 = Math.SQRT2;
const SQRT3 = Math.sqrt(3);

/**
 * Quick estimates for a normalised supply.
 *
 * Takes a `SupplySpec` (volts, hertz, ohms, farads, amps). Returns `SupplyEstimates`, in volts
 * and hertz:
 * - vmVolts = √2·Vrms, the open-circuit secondary peak.
 * - Drops: one diode per conduction path (two for the bridge), each taken with
 *   `diodeForwardVolts` at the load current at the output's crest: with a capacitor the output
 *   peaks when the capacitor current is zero, that is when the diode carries just the load
 *   current, so the mean filter load current stands for it; unfiltered, the load current at the
 *   crest. The winding's I·R drop uses the same current (unfiltered resistive: the winding and
 *   the load form a divider). The real charging pulses are larger and late, so the real peak is
 *   somewhat lower (Schade 1943, DOMAIN.md §2).
 * - Unfiltered: the clipped-sine forms for a fixed drop (DOMAIN.md §2, piecewise-linear diode),
 *   which reduce to Vm/π, 2Vm/π and ripple factors 1.211/0.483 for ideal diodes.
 * - Capacitor input: Vr = I/(f·C) half-wave, I/(2f·C) full-wave, dc = vpeak − Vr/2,
 *   rippleRms = Vr/(2√3) (textbook small-ripple estimate, DOMAIN.md §2; it overstates ripple).
 * - Doubler: see `doublerFigures` for the derivation; vpeakVolts is twice the peak each
 *   capacitor charges to.
 * - diodePiv: the textbook rating rules on the open-circuit peak Vm (half-wave Vm, 2Vm with a
 *   capacitor; center-tap 2Vm; bridge Vm; doubler 2Vm), so a little above what the solver finds.
 * - A resistive load's current depends on dc: the consistent current is found by bisection.
 * - A regulator's filter load is its output current plus its quiescent current (linear, output
 *   taken as min(set volts, dc − dropout)) or the zener feed (dc − Vz)/Rseries, at least the
 *   load's own current when the zener is starved (zener dynamic resistance ignored).
 *
 * Not in the estimates: capacitor ESR and diode conditions other than "ok" (faults are the
 * solver's job). Where the small-ripple picture breaks down (ripple as large as the peak) the
 * figures are clamped: ripple to at most the peak, dc to at least 0; nothing is ever NaN.
 *
 * @throws nothing for a spec from `parseSupplySpec`.
 */
export function estimateSupply(spec: SupplySpec): SupplyEstimates {
  const vm = SQRT2 * spec.source.vrms;
  const hz = spec.source.hz;
  const fullWave = spec.topology !== 'half-wave';
  const diodePiv = pivRule(spec, vm);

  let figures: Figures;
  if (spec.topology === 'doubler') {
    figures = doublerFigures(spec, vm);
  } else if (spec.capacitors.length === 0) {
    figures = unfilteredFigures(spec, vm, fullWave);
  } else {
    figures = capacitorFigures(spec, vm, fullWave);
  }

  const ripplePp = finiteOrZero(figures.ripplePp);
  return {
    vmVolts: finiteOrZero(vm),
    vpeakVolts: finiteOrZero(figures.vpeak),
    dc: finiteOrZero(figures.dc),
    ripplePp,
    rippleRms: finiteOrZero(figures.rippleRms),
    // Ripple fundamental f half-wave, 2f full-wave (DOMAIN.md §2); 0 with no ripple, as in
    // SupplyResult.
    rippleHz: ripplePp > 0 ? (fullWave ? 2 * hz : hz) : 0,
    diodePiv: finiteOrZero(diodePiv),
    basis: `${figures.basis}${regulatorBasis(spec)}.`,
  };
}

interface Figures {
  vpeak: number;
  dc: number;
  ripplePp: number;
  rippleRms: number;
  basis: string;
}

const TOPOLOGY_WORDS: Record<SupplySpec['topology'], string> = {
  'half-wave': 'half-wave',
  'center-tap': 'center-tapped full-wave',
  bridge: 'bridge',
  doubler: 'full-wave doubler',
};

/** Diodes in series in each conduction path: two in a bridge, one elsewhere. */
function diodesInPath(spec: SupplySpec): number {
  return spec.topology === 'bridge' ? 2 : 1;
}

function pathDropVolts(spec: SupplySpec, amps: number): number {
  const amp = Number.isFinite(amps) && amps > 0 ? amps : 0;
  return diodesInPath(spec) * diodeForwardVolts(spec.diode, amp, spec.temperatureC);
}

function windingDropVolts(spec: SupplySpec, amps: number): number {
  return spec.source.ohms === 0 ? 0 : amps * spec.source.ohms;
}

function dropWords(spec: SupplySpec): string {
  return diodesInPath(spec) === 2 ? 'two diode drops' : 'one diode drop';
}

/**
 * PIV rules of DOMAIN.md §2 (textbook): half-wave Vm unfiltered, 2Vm with a capacitor (the
 * capacitor holds the cathode near +Vm while the anode swings to −Vm); center-tap 2Vm; bridge
 * Vm; doubler 2Vm.
 */
function pivRule(spec: SupplySpec, vm: number): number {
  switch (spec.topology) {
    case 'half-wave':
      return spec.capacitors.length > 0 ? 2 * vm : vm;
    case 'center-tap':
      return 2 * vm;
    case 'bridge':
      return vm;
    case 'doubler':
      return 2 * vm;
  }
}

/**
 * Current drawn from the filter (or the bare rectifier) when its mean output is `dcVolts`:
 * the load itself, or the regulator's input. Non-decreasing in dcVolts, which the bisection needs.
 */
function filterLoadAmps(spec: SupplySpec, dcVolts: number): number {
  const dc = Math.max(0, dcVolts);
  const { load, regulator } = spec;
  if (regulator === null) {
    return load.kind === 'resistive' ? dc / load.ohms : load.amps;
  }
  if (regulator.kind === 'linear') {
    // A three-terminal regulator passes its output current through and adds its quiescent
    // current (DOMAIN.md §6); below set volts + dropout its output follows the input down.
    const outVolts = Math.min(regulator.volts, Math.max(0, dc - regulator.dropoutVolts));
    const outAmps = load.kind === 'resistive' ? outVolts / load.ohms : load.amps;
    return outAmps + regulator.quiescentAmps;
  }
  // Zener shunt: while the zener conducts the feed resistor carries (Vin − Vz)/Rs; when it is
  // starved the resistor and the load are simply in series, which draws more than that.
  const feedAmps = Math.max(0, dc - regulator.zenerVolts) / regulator.seriesOhms;
  const starvedAmps = load.kind === 'resistive' ? dc / (regulator.seriesOhms + load.ohms) : load.amps;
  return Math.max(feedAmps, starvedAmps);
}

/**
 * Finds the x in [lo, hi] where the non-decreasing g crosses 0, by bisection (robust where a
 * plain fixed-point iteration oscillates under heavy loads). Needs g(lo) ≤ 0; returns the last x
 * found with g(x) ≤ 0, so exactly lo when g is positive everywhere above it.
 */
function solveIncreasing(g: (x: number) => number, lo: number, hi: number): number {
  let a = lo;
  let b = hi;
  for (let i = 0; i < 200; i++) {
    const mid = 0.5 * (a + b);
    if (!(mid > a && mid < b)) {
      break;
    }
    if (g(mid) > 0) {
      b = mid;
    } else {
      a = mid;
    }
  }
  return a;
}

/**
 * The load current I that is consistent with the output it produces: I = filterLoadAmps(dc(I)),
 * where dcAtAmps is the (non-increasing) estimate of dc for a given current.
 *
 * Solved for the current rather than for dc on purpose: dc = f(I) is then evaluated forward, so
 * its rounding error stays a rounding of the ripple term, whereas I(dc) can be very steep (a
 * zener feed into a small capacitor) and would turn rounding in dc into visible wobble in I and
 * the ripple. The root lies in [0, filterLoadAmps(dc(0))] because dc(I) ≤ dc(0).
 */
function consistentLoadAmps(spec: SupplySpec, dcAtAmps: (amps: number) => number): number {
  const most = filterLoadAmps(spec, dcAtAmps(0));
  return solveIncreasing((amps) => amps - filterLoadAmps(spec, dcAtAmps(amps)), 0, most);
}

/**
 * Mean and mean square of max(0, vm·sin θ − vd) over a period: 2π for half-wave, π for
 * full-wave. Derivation (DOMAIN.md §2, piecewise-linear diode): conduction from θ1 = asin(vd/vm)
 * to π − θ1;
 *   ∫(vm sin θ − vd) dθ = 2·vm·cos θ1 − vd·(π − 2θ1),
 *   ∫(vm sin θ − vd)² dθ = vm²·((π − 2θ1)/2 + sin 2θ1 / 2) − 4·vm·vd·cos θ1 + vd²·(π − 2θ1).
 * With vd = 0: mean vm/π (half-wave) or 2vm/π, RMS vm/2 or vm/√2 (textbook, DOMAIN.md §2).
 */
function clippedSine(vm: number, vd: number, fullWave: boolean): { mean: number; meanSquare: number } {
  if (!(vm > 0) || vd >= vm) {
    return { mean: 0, meanSquare: 0 };
  }
  const drop = Math.max(0, vd);
  const theta1 = Math.asin(drop / vm);
  const width = Math.PI - 2 * theta1;
  const cos1 = Math.cos(theta1);
  const area = 2 * vm * cos1 - drop * width;
  const squareArea = vm * vm * (width / 2 + Math.sin(2 * theta1) / 2) - 4 * vm * drop * cos1 + drop * drop * width;
  const period = fullWave ? Math.PI : 2 * Math.PI;
  return { mean: Math.max(0, area / period), meanSquare: Math.max(0, squareArea / period) };
}

function unfilteredFigures(spec: SupplySpec, vm: number, fullWave: boolean): Figures {
  const shape = TOPOLOGY_WORDS[spec.topology];
  const closedForm = fullWave ? 'average 2Vm/π, ripple factor 0.483' : 'average Vm/π, ripple factor 1.211';
  const basis =
    `Unfiltered ${shape}, textbook closed forms (${closedForm} with ideal diodes) with ${dropWords(spec)} ` +
    'taken at the crest load current';

  let vpeak: number;
  let stats: { mean: number; meanSquare: number };
  const { load } = spec;
  if (spec.regulator === null && load.kind === 'resistive') {
    // Ideal-switch rectifier into R: the winding resistance and the load form a divider, so the
    // output is k·(vm·sin θ − drop) with k = RL/(RL + Rw). The drop is taken at the crest current,
    // which itself depends on the drop: solve i = k·(vm − drop(i))/RL.
    const k = load.ohms / (load.ohms + spec.source.ohms);
    const crestAmps = solveIncreasing(
      (i) => i - (k * Math.max(0, vm - pathDropVolts(spec, i))) / load.ohms,
      0,
      vm / (load.ohms + spec.source.ohms),
    );
    const drop = pathDropVolts(spec, crestAmps);
    const s = clippedSine(vm, drop, fullWave);
    stats = { mean: k * s.mean, meanSquare: k * k * s.meanSquare };
    vpeak = k * Math.max(0, vm - drop);
    return figuresFromStats(vpeak, stats, `${basis} and the winding resistance as a divider with the load`);
  }
  // A current-drawing load (constant current, or a regulator's input): the drop is fixed by the
  // current, which may itself depend on the mean output.
  const dropAtAmps = (amps: number): number => pathDropVolts(spec, amps) + windingDropVolts(spec, amps);
  const amps = consistentLoadAmps(spec, (i) => clippedSine(vm, dropAtAmps(i), fullWave).mean);
  stats = clippedSine(vm, dropAtAmps(amps), fullWave);
  vpeak = Math.max(0, vm - dropAtAmps(amps));
  return figuresFromStats(vpeak, stats, `${basis} minus the winding's I·R drop`);
}

function figuresFromStats(vpeak: number, stats: { mean: number; meanSquare: number }, basis: string): Figures {
  return {
    vpeak,
    dc: stats.mean,
    // The unfiltered output falls to 0 between pulses, so its swing is the whole peak.
    ripplePp: stats.mean > 0 ? vpeak : 0,
    rippleRms: Math.sqrt(Math.max(0, stats.meanSquare - stats.mean * stats.mean)),
    basis,
  };
}

function capacitorFigures(spec: SupplySpec, vm: number, fullWave: boolean): Figures {
  const capacitor = spec.capacitors[0];
  const farads = capacitor === undefined ? 0 : capacitor.farads;
  const hz = spec.source.hz;
  // The capacitor recharges once per ripple period: 1/f half-wave, 1/(2f) full-wave.
  const rechargesPerSecond = fullWave ? 2 * hz : hz;
  const peakAt = (amps: number): number =>
    Math.max(0, vm - pathDropVolts(spec, amps) - windingDropVolts(spec, amps));
  // Vr = I/(f·C) half-wave, I/(2f·C) full-wave (textbook, DOMAIN.md §2).
  const rippleAt = (amps: number): number => amps / (rechargesPerSecond * farads);

  const dcAt = (amps: number): number => Math.max(0, peakAt(amps) - rippleAt(amps) / 2);
  const amps = consistentLoadAmps(spec, dcAt);
  const vpeak = peakAt(amps);
  const ripplePp = Math.min(rippleAt(amps), vpeak);
  return {
    vpeak,
    dc: dcAt(amps),
    ripplePp,
    // A sawtooth of p-p Vr has RMS Vr/(2√3) (DOMAIN.md §2).
    rippleRms: ripplePp / (2 * SQRT3),
    basis:
      `Capacitor-input ${TOPOLOGY_WORDS[spec.topology]}, textbook small-ripple estimate: ` +
      `peak = √2·Vrms − ${dropWords(spec)} − I·R at the mean load current I, ` +
      `ripple ≈ I/(${fullWave ? '2f' : 'f'}·C), DC ≈ peak − ripple/2 (overstates ripple, ignores ESR)`,
  };
}

/**
 * Full-wave doubler (C1 from + to M, C2 from M to −, secondary between the diode junction and M).
 *
 * Derivation (small ripple, same assumptions as the I/(f·C) rule): the load current I flows
 * through C1 and C2 in series all the time. C1 is topped up through D1 at the positive crest,
 * C2 through D2 at the negative crest half a period later, each to vpk = Vm − one diode drop −
 * I·R. Between top-ups each capacitor loses I·T/Ck, so each carries a sawtooth of p-p
 * rk = I/(f·Ck) at f, averaging vpk − rk/2. The output is their sum:
 *   dc ≈ 2·vpk − (r1 + r2)/2, which is 2·vpk − I/(f·C) for equal capacitors.
 * The sum falls at I·(1/C1 + 1/C2) and steps up by r2, then r1, on alternate half periods: a
 * sawtooth at 2f of p-p I/(f·min(C1, C2)), which is I/(f·C) for equal capacitors (the full-wave
 * I/(2f·C) rule with the series pair C/2). Its RMS follows from the two sawtooths being half a
 * period apart: over one period the mean of the product of two unit zero-mean sawtooths shifted
 * by T/2 is −1/24 against 1/12 for each alone, so
 *   rippleRms = √(r1² − r1·r2 + r2²)/(2√3), which is r/(2√3) for equal capacitors.
 */
function doublerFigures(spec: SupplySpec, vm: number): Figures {
  const basis =
    'Full-wave doubler, small-ripple estimate: each capacitor charges once a cycle to √2·Vrms − ' +
    'one diode drop − I·R at the mean load current I, output ripple ≈ I/(f·C) at 2f, ' +
    'DC ≈ 2·peak − I/(f·C) (overstates ripple, ignores ESR)';
  const c1 = spec.capacitors[0];
  const c2 = spec.capacitors[1] ?? c1;
  if (c1 === undefined || c2 === undefined) {
    // Without its capacitors the midpoint M is open: no current path, no output.
    return { vpeak: 0, dc: 0, ripplePp: 0, rippleRms: 0, basis: 'A doubler without capacitors has no DC output' };
  }
  const hz = spec.source.hz;
  const chargePeakAt = (amps: number): number =>
    Math.max(0, vm - pathDropVolts(spec, amps) - windingDropVolts(spec, amps));
  const droopSum = (amps: number): number => amps / (hz * c1.farads) + amps / (hz * c2.farads);

  const dcAt = (amps: number): number => Math.max(0, 2 * chargePeakAt(amps) - droopSum(amps) / 2);
  const amps = consistentLoadAmps(spec, dcAt);
  const vpeak = 2 * chargePeakAt(amps);
  // Clamp each capacitor's droop to the peak before combining, so huge droops cannot make ∞ − ∞.
  const r1 = Math.min(amps / (hz * c1.farads), vpeak);
  const r2 = Math.min(amps / (hz * c2.farads), vpeak);
  return {
    vpeak,
    dc: dcAt(amps),
    ripplePp: Math.max(r1, r2),
    rippleRms: Math.sqrt(Math.max(0, r1 * r1 - r1 * r2 + r2 * r2)) / (2 * SQRT3),
    basis,
  };
}

function regulatorBasis(spec: SupplySpec): string {
  const regulator = spec.regulator;
  if (regulator === null) {
    return '';
  }
  if (regulator.kind === 'linear') {
    const quiescent = formatMilliamps(regulator.quiescentAmps);
    return `; the filter's load is the regulator's output current plus ${quiescent} quiescent`;
  }
  return "; the filter's load is the zener feed (Vfilter − Vz)/Rseries";
}

function formatMilliamps(amps: number): string {
  return `${Number((amps * 1000).toPrecision(3))} mA`;
}

function finiteOrZero(x: number): number {
  return Number.isFinite(x) && x > 0 ? x : 0;
}
