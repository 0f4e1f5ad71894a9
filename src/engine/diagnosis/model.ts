/**
 * The simulated supply behind a diagnosis: the healthy unit across its tolerances (a seeded
 * Monte Carlo over the engine), every fault variant, and what a meter would show for each.
 * This is the expensive part (tens of engine solves); it depends only on the supply, the meter
 * and the tolerances, so callers keep it while readings come in.
 */
import { solveSupply } from '../index';
import { diodeForwardVolts } from '../spec';
import type { SupplyResult, SupplySpec, WarmStart } from '../types';
import { faultVariants, tableEsrOhms, type FaultVariant } from './faults';
import { readWaveform, resamplePeriod, type ResolvedMeter } from './meter';
import { mainsBandFor, type MainsBand } from './regions';
import { latinHypercube, mulberry32 } from './sampling';
import type { LiveReadingKind, ToleranceSettings } from './types';

/** Live readings a simulation predicts; null where the reading does not apply. */
export type LivePrediction = Record<LiveReadingKind, number | null>;

export interface SimulatedVariant extends FaultVariant {
  prediction: LivePrediction;
  converged: boolean;
}

export interface ResolvedTolerances {
  capacitorFraction: number;
  capacitorAgeingFraction: number;
  loadFraction: number;
  windingFraction: number;
  /** Transformer ratio (nameplate) tolerance, ± fraction. */
  ratioFraction: number;
  samples: number;
  seed: number;
}

/**
 * Defaults (DOMAIN.md §4–6): capacitor ±20 % (IEC 60062 letter M) with 10 % more allowed below
 * for ageing (our choice), load ±20 % and winding resistance ±15 % (our choices: relays switching,
 * copper warming), transformer ratio ±5 % (common practice, from memory), 32 samples (a Latin
 * hypercube covers each tolerance's range evenly with few), seed 1.
 */
export function resolveTolerances(t: ToleranceSettings | undefined): ResolvedTolerances {
  return {
    capacitorFraction: t?.capacitorFraction ?? 0.2,
    capacitorAgeingFraction: t?.capacitorAgeingFraction ?? 0.1,
    loadFraction: t?.loadFraction ?? 0.2,
    windingFraction: t?.windingFraction ?? 0.15,
    ratioFraction: 0.05,
    samples: Math.max(8, Math.min(400, Math.round(t?.samples ?? 32))),
    seed: Math.round(t?.seed ?? 1),
  };
}

/** One healthy tolerance sample: the perturbed spec and the line factor it ran at. */
interface ToleranceSample {
  spec: SupplySpec;
  lineFactor: number;
  /** Capacitance over nominal per capacitor. */
  capacitorFactors: number[];
}

export interface SupplyModel {
  spec: SupplySpec;
  meter: ResolvedMeter;
  tolerances: ResolvedTolerances;
  mains: MainsBand;
  nominal: SupplyResult;
  nominalPrediction: LivePrediction;
  /** Healthy predictions at each tolerance sample. */
  samples: { lineFactor: number; capacitorFactors: number[]; prediction: LivePrediction }[];
  /**
   * Relative deviation of each sample's prediction from the nominal one, per reading, and its
   * part explained by the line factor alone (slope per unit of line deviation, least squares).
   */
  lineSlope: Record<LiveReadingKind, number>;
  variants: SimulatedVariant[];
  /** Diode-test forward voltage of a good diode at the meter's test current, volts. */
  goodForwardVolts: number;
  /** Worst new ESR per capacitor (DOMAIN.md §6 table), ohms. */
  esrLimitOhms: number[];
}

const WAVE_POINTS = 256;

/**
 * Meter readings a solved supply would give.
 * @param lineFactor  mains over nominal (for the mains reading)
 */
export function predictLive(r: SupplyResult, spec: SupplySpec, meter: ResolvedMeter, mains: MainsBand, lineFactor: number): LivePrediction {
  const w = r.waveform;
  const hz = spec.source.hz;
  let acSecondary = 0;
  let dcOut = 0;
  let rippleAc = 0;
  let regulatorOut: number | null = null;
  if (w) {
    const out = readWaveform(resamplePeriod(w.t, w.vOut, WAVE_POINTS), hz, meter);
    const sec = readWaveform(resamplePeriod(w.t, w.vSecondary, WAVE_POINTS), hz, meter);
    dcOut = out.dc;
    rippleAc = out.ac;
    // The secondary is pure AC (no mean), so every AC mode reads it alike but for the form factor.
    acSecondary = sec.ac;
    if (w.vRegulated) regulatorOut = readWaveform(resamplePeriod(w.t, w.vRegulated, WAVE_POINTS), hz, meter).dc;
  }
  return {
    mainsAc: lineFactor * mains.nominalVolts,
    acSecondary,
    dcOut,
    rippleAc,
    rippleHz: r.rippleHz,
    regulatorOut: spec.regulator === null ? null : regulatorOut,
  };
}

function uniform(u: number, lo: number, hi: number): number {
  return lo + u * (hi - lo);
}

function logUniform(u: number, lo: number, hi: number): number {
  return Math.exp(Math.log(lo) + u * (Math.log(hi) - Math.log(lo)));
}

/**
 * Builds the supply model: nominal solve, healthy Monte Carlo, fault variants.
 * @param spec       nominal supply (parsed)
 * @param meter      resolved meter
 * @param tolIn      tolerance settings (region, fractions, samples, seed)
 */
export function buildSupplyModel(spec: SupplySpec, meter: ResolvedMeter, tolIn: ToleranceSettings | undefined): SupplyModel {
  const tol = resolveTolerances(tolIn);
  const mains = mainsBandFor(tolIn, spec.source.hz);
  const nominal = solveSupply(spec, { waveformPoints: WAVE_POINTS, keepWarmStart: true });
  const warm: WarmStart | undefined = nominal.warmStart;
  const nominalPrediction = predictLive(nominal, spec, meter, mains, 1);

  // Healthy Monte Carlo over the tolerances, Latin hypercube, seeded.
  const caps = spec.capacitors.length;
  const dims = 6 + caps;
  const design = latinHypercube(tol.samples, dims, mulberry32(tol.seed));
  const lowLine = mains.lowVolts / mains.nominalVolts;
  const highLine = mains.highVolts / mains.nominalVolts;
  const draws: ToleranceSample[] = design.map((u) => {
    const s = structuredClone(spec);
    const lineFactor = uniform(u[0]!, lowLine, highLine);
    s.source.vrms *= lineFactor * uniform(u[1]!, 1 - tol.ratioFraction, 1 + tol.ratioFraction);
    s.source.ohms *= uniform(u[2]!, 1 - tol.windingFraction, 1 + tol.windingFraction);
    const loadFactor = uniform(u[3]!, 1 - tol.loadFraction, 1 + tol.loadFraction);
    if (s.load.kind === 'resistive') s.load.ohms /= loadFactor;
    else s.load.amps *= loadFactor;
    // Diode spread: saturation current within a factor of 3 either way (our choice; about
    // ±55 mV of forward drop for a silicon rectifier).
    if (s.diode.kind === 'shockley') s.diode.saturationAmps *= logUniform(u[4]!, 1 / 3, 3);
    else s.diode.forwardVolts *= uniform(u[4]!, 0.9, 1.1);
    const esrFactor = logUniform(u[5]!, 0.5, 2);
    const capacitorFactors = s.capacitors.map((c, q) => {
      const f = uniform(u[6 + q]!, 1 - tol.capacitorFraction - tol.capacitorAgeingFraction, 1 + tol.capacitorFraction);
      c.farads *= f;
      c.esrOhms *= esrFactor;
      return f;
    });
    return { spec: s, lineFactor, capacitorFactors };
  });
  const samples = draws.map((d) => {
    const r = solveSupply(d.spec, warm ? { waveformPoints: WAVE_POINTS, warmStart: warm } : { waveformPoints: WAVE_POINTS });
    return { lineFactor: d.lineFactor, capacitorFactors: d.capacitorFactors, prediction: predictLive(r, d.spec, meter, mains, d.lineFactor) };
  });

  const kinds: LiveReadingKind[] = ['mainsAc', 'acSecondary', 'dcOut', 'rippleAc', 'rippleHz', 'regulatorOut'];
  const lineSlope = {} as Record<LiveReadingKind, number>;
  for (const k of kinds) {
    const base = nominalPrediction[k];
    let sxy = 0;
    let sxx = 0;
    if (base !== null && Math.abs(base) > 1e-9) {
      for (const s of samples) {
        const v = s.prediction[k];
        if (v === null) continue;
        const x = s.lineFactor - 1;
        sxy += x * (v / base - 1);
        sxx += x * x;
      }
    }
    lineSlope[k] = sxx > 0 ? sxy / sxx : 0;
  }

  // Fault variants: one solve each, shared when two variants simulate the same circuit.
  const cache = new Map<string, SupplyResult>();
  const simulated: SimulatedVariant[] = faultVariants(spec, mains).map((v) => {
    const key = JSON.stringify(v.spec);
    let r = cache.get(key);
    if (!r) {
      // A fault that changes which diodes conduct gets a fresh grid; the others start warm.
      const structural = v.fault === 'diode-open' || v.fault === 'diode-short' || v.fault === 'capacitor-open' || v.fault === 'no-ac';
      r = v.fault === 'healthy' ? nominal : solveSupply(v.spec, warm && !structural ? { waveformPoints: WAVE_POINTS, warmStart: warm } : { waveformPoints: WAVE_POINTS });
      cache.set(key, r);
    }
    return { ...v, prediction: predictLive(r, v.spec, meter, mains, v.lineFactor), converged: r.converged };
  });

  return {
    spec,
    meter,
    tolerances: tol,
    mains,
    nominal,
    nominalPrediction,
    samples,
    lineSlope,
    variants: interpolateMagnitudes(simulated),
    goodForwardVolts: diodeForwardVolts(spec.diode, meter.diodeTestAmps, spec.temperatureC),
    esrLimitOhms: spec.capacitors.map((c) => 2 * Math.max(tableEsrOhms(c.farads), c.esrOhms)),
  };
}

/** Points inserted between two simulated sizes of a fault (our choice: fine enough that the
 * true size is never far from a point, cheap since no solve is needed). */
const BETWEEN = 3;

function lerp(a: number, b: number, t: number): number {
  return a + t * (b - a);
}

/**
 * Adds variants between consecutive simulated sizes of each fault and part, their predictions
 * and part values interpolated linearly; then re-weights every fault's variants evenly.
 */
export function interpolateMagnitudes(vs: SimulatedVariant[]): SimulatedVariant[] {
  const out: SimulatedVariant[] = [];
  for (let i = 0; i < vs.length; i++) {
    const a = vs[i]!;
    out.push(a);
    const b = vs[i + 1];
    if (!b || a.magnitude === undefined || b.magnitude === undefined || a.fault !== b.fault || a.part !== b.part) continue;
    for (let j = 1; j <= BETWEEN; j++) {
      const t = j / (BETWEEN + 1);
      const prediction = { ...a.prediction };
      for (const k of Object.keys(prediction) as (keyof LivePrediction)[]) {
        const pa = a.prediction[k];
        const pb = b.prediction[k];
        prediction[k] = pa === null || pb === null ? pa : k === 'rippleHz' ? (t < 0.5 ? pa : pb) : lerp(pa, pb, t);
      }
      out.push({
        ...a,
        label: a.label,
        magnitude: lerp(a.magnitude, b.magnitude, t),
        lineFactor: lerp(a.lineFactor, b.lineFactor, t),
        capacitorFactors: a.capacitorFactors.map((x, q) => lerp(x, b.capacitorFactors[q] ?? x, t)),
        esrOhms: a.esrOhms.map((x, q) => lerp(x, b.esrOhms[q] ?? x, t)),
        prediction,
        converged: a.converged && b.converged,
      });
    }
  }
  const counts = new Map<string, number>();
  for (const v of out) counts.set(v.fault, (counts.get(v.fault) ?? 0) + 1);
  return out.map((v) => ({ ...v, weight: 1 / counts.get(v.fault)! }));
}
