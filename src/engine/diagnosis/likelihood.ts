/**
 * How probable the readings are under each simulated variant: the measurement model.
 *
 * Live readings (and a measured capacitance) are taken together as one Gaussian vector. Its
 * mean is the variant's simulated value; its spread is the healthy tolerance Monte Carlo's
 * covariance of relative deviations, scaled to the variant's values, so readings that move
 * together under a tolerance (every voltage with the line, ripple with the capacitance) stay
 * together; plus, on each reading alone, the meter's accuracy (its ± taken as two standard
 * deviations, common practice) and a model allowance of 1 % + 5 mV (our choice). A variant
 * that sets the line itself (mains low, high, absent) uses the covariance with the line's part
 * removed. A 1 % chance of a wild set of readings keeps one slip from ruling a cause out.
 *
 * Power-off readings and the ripple frequency have simple models of their own.
 */
import { diodeLabels } from '../spec';
import type { DiodeCondition } from '../types';
import { accuracyHalfWidth, type ResolvedMeter } from './meter';
import type { SimulatedVariant, SupplyModel } from './model';
import type { Reading } from './readings';
import { AC_READING_KINDS, type LiveReadingKind, type MeterValue, type ReadingKind } from './types';

export const MODEL_RELATIVE = 0.01;
export const MODEL_ABSOLUTE_VOLTS = 0.005;
export const WILD_READING_CHANCE = 0.01;
/** Capacitance meter accuracy ±(3 % + 5 counts) (common practice, from memory). */
const CAPACITANCE_ACCURACY = { percent: 3, counts: 5 };
const LOG_2PI = Math.log(2 * Math.PI);

export function logSumExp(xs: ArrayLike<number>): number {
  let max = -Infinity;
  for (let i = 0; i < xs.length; i++) if (xs[i]! > max) max = xs[i]!;
  if (max === -Infinity) return -Infinity;
  let s = 0;
  for (let i = 0; i < xs.length; i++) s += Math.exp(xs[i]! - max);
  return max + Math.log(s);
}


/** Standard deviation of a live reading's meter and model error around a value. */
export function liveSigma(kind: LiveReadingKind, mu: number, meter: ResolvedMeter): number {
  const acc = accuracyHalfWidth(mu, AC_READING_KINDS.has(kind) ? meter.ac : meter.dc, meter.displayCounts);
  const model = MODEL_RELATIVE * Math.abs(mu) + MODEL_ABSOLUTE_VOLTS;
  return Math.sqrt((acc / 2) ** 2 + model * model);
}

function capacitanceSigma(farads: number, meter: ResolvedMeter): number {
  const acc = accuracyHalfWidth(farads, CAPACITANCE_ACCURACY, meter.displayCounts);
  return Math.hypot(acc / 2, 0.02 * farads) + 1e-12;
}

// ---------------------------------------------------------------------------------------------
// The joint Gaussian of live readings and capacitances
// ---------------------------------------------------------------------------------------------

/** Dimensions of the joint Gaussian: live readings and each capacitor's capacitance. */
export type JointKey = 'mainsAc' | 'acSecondary' | 'dcOut' | 'rippleAc' | 'regulatorOut' | 'C1' | 'C2';

export interface JointSpread {
  keys: JointKey[];
  /** Mean relative deviation of the healthy samples from nominal, per key. */
  meanDev: Float64Array;
  /** Covariance of the relative deviations, K×K. */
  cov: Float64Array;
  /** The same with the part explained by the line factor removed. */
  meanDevNoLine: Float64Array;
  covNoLine: Float64Array;
}

/**
 * Relative-deviation statistics of the healthy Monte Carlo, computed once per model.
 */
export function jointSpread(model: SupplyModel): JointSpread {
  const keys: JointKey[] = ['mainsAc', 'acSecondary', 'dcOut', 'rippleAc'];
  if (model.spec.regulator !== null) keys.push('regulatorOut');
  model.spec.capacitors.forEach((_, q) => keys.push(q === 0 ? 'C1' : 'C2'));
  const K = keys.length;
  const S = model.samples.length;
  const dev = new Float64Array(S * K);
  const devNoLine = new Float64Array(S * K);
  for (let s = 0; s < S; s++) {
    const sample = model.samples[s]!;
    const x = sample.lineFactor - 1;
    keys.forEach((key, k) => {
      let d = 0;
      let slope = 0;
      if (key === 'C1' || key === 'C2') d = (sample.capacitorFactors[key === 'C1' ? 0 : 1] ?? 1) - 1;
      else if (key === 'mainsAc') {
        d = x;
        slope = 1;
      } else {
        const base = model.nominalPrediction[key];
        const v = sample.prediction[key];
        if (base !== null && v !== null && Math.abs(base) > 1e-9) d = v / base - 1;
        slope = model.lineSlope[key];
      }
      dev[s * K + k] = d;
      devNoLine[s * K + k] = d - slope * x;
    });
  }
  const stats = (d: Float64Array): { mean: Float64Array; cov: Float64Array } => {
    const mean = new Float64Array(K);
    const cov = new Float64Array(K * K);
    for (let s = 0; s < S; s++) for (let k = 0; k < K; k++) mean[k] = mean[k]! + d[s * K + k]! / S;
    for (let s = 0; s < S; s++) {
      for (let a = 0; a < K; a++) {
        for (let b = 0; b < K; b++) {
          cov[a * K + b] = cov[a * K + b]! + ((d[s * K + a]! - mean[a]!) * (d[s * K + b]! - mean[b]!)) / Math.max(1, S - 1);
        }
      }
    }
    return { mean, cov };
  };
  const all = stats(dev);
  const noLine = stats(devNoLine);
  return { keys, meanDev: all.mean, cov: all.cov, meanDevNoLine: noLine.mean, covNoLine: noLine.cov };
}

/** The joint Gaussian of one variant: mean and covariance over the spread's keys. */
export interface VariantGaussian {
  mean: Float64Array;
  cov: Float64Array;
}

export function variantGaussian(model: SupplyModel, spread: JointSpread, v: SimulatedVariant): VariantGaussian {
  const K = spread.keys.length;
  const fixesLine = v.lineFactor !== 1;
  const meanDev = fixesLine ? spread.meanDevNoLine : spread.meanDev;
  const rel = fixesLine ? spread.covNoLine : spread.cov;
  const base = new Float64Array(K);
  const noise = new Float64Array(K);
  spread.keys.forEach((key, k) => {
    if (key === 'C1' || key === 'C2') {
      const q = key === 'C1' ? 0 : 1;
      base[k] = (model.spec.capacitors[q]?.farads ?? 0) * (v.capacitorFactors[q] ?? 1);
      noise[k] = capacitanceSigma(base[k]!, model.meter);
    } else {
      const b = key === 'mainsAc' ? v.lineFactor * model.mains.nominalVolts : (v.prediction[key] ?? 0);
      base[k] = b;
      noise[k] = liveSigma(key, b, model.meter);
    }
  });
  const mean = new Float64Array(K);
  const cov = new Float64Array(K * K);
  for (let a = 0; a < K; a++) {
    mean[a] = base[a]! * (1 + meanDev[a]!);
    for (let b = 0; b < K; b++) cov[a * K + b] = base[a]! * base[b]! * rel[a * K + b]!;
    cov[a * K + a] = cov[a * K + a]! + noise[a]! * noise[a]!;
  }
  return { mean, cov };
}

/** Cholesky factor (lower) of an n×n SPD matrix, in place; false if not positive definite. */
function cholesky(a: Float64Array, n: number): boolean {
  for (let j = 0; j < n; j++) {
    let d = a[j * n + j]!;
    for (let k = 0; k < j; k++) d -= a[j * n + k]! * a[j * n + k]!;
    if (!(d > 0)) return false;
    const l = Math.sqrt(d);
    a[j * n + j] = l;
    for (let i = j + 1; i < n; i++) {
      let s = a[i * n + j]!;
      for (let k = 0; k < j; k++) s -= a[i * n + k]! * a[j * n + k]!;
      a[i * n + j] = s / l;
    }
  }
  return true;
}

export interface GaussianFit {
  /** Log density of the observed values. */
  logPdf: number;
  /** Squared Mahalanobis distance of the observed values. */
  distance2: number;
}

/**
 * Log density of the observed subset of a Gaussian, and optionally the conditional mean and
 * variance of another key given them (standard Gaussian conditioning).
 * @param obs  indices into the keys, with their values
 */
export function observeGaussian(
  g: VariantGaussian,
  K: number,
  obs: { index: number; value: number }[],
  target?: number,
): GaussianFit & { condMean?: number; condVar?: number } {
  const n = obs.length;
  if (n === 0) {
    const out: GaussianFit & { condMean?: number; condVar?: number } = { logPdf: 0, distance2: 0 };
    if (target !== undefined) {
      out.condMean = g.mean[target]!;
      out.condVar = g.cov[target * K + target]!;
    }
    return out;
  }
  const L = new Float64Array(n * n);
  const r = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    r[i] = obs[i]!.value - g.mean[obs[i]!.index]!;
    for (let j = 0; j < n; j++) L[i * n + j] = g.cov[obs[i]!.index * K + obs[j]!.index]!;
  }
  if (!cholesky(L, n)) {
    // Degenerate covariance (should not happen: every key has meter noise): treat as far.
    return { logPdf: -1e6, distance2: 1e6 };
  }
  // Solve L·z = r.
  const z = new Float64Array(n);
  let logDet = 0;
  for (let i = 0; i < n; i++) {
    let s = r[i]!;
    for (let k = 0; k < i; k++) s -= L[i * n + k]! * z[k]!;
    z[i] = s / L[i * n + i]!;
    logDet += 2 * Math.log(L[i * n + i]!);
  }
  let distance2 = 0;
  for (let i = 0; i < n; i++) distance2 += z[i]! * z[i]!;
  const out: GaussianFit & { condMean?: number; condVar?: number } = {
    logPdf: -0.5 * (distance2 + logDet + n * LOG_2PI),
    distance2,
  };
  if (target !== undefined) {
    // c = Σ_Ot; solve L·w = c; condMean = m_t + wᵀz; condVar = Σ_tt − wᵀw.
    const w = new Float64Array(n);
    for (let i = 0; i < n; i++) {
      let s = g.cov[obs[i]!.index * K + target]!;
      for (let k = 0; k < i; k++) s -= L[i * n + k]! * w[k]!;
      w[i] = s / L[i * n + i]!;
    }
    let dm = 0;
    let dv = 0;
    for (let i = 0; i < n; i++) {
      dm += w[i]! * z[i]!;
      dv += w[i]! * w[i]!;
    }
    out.condMean = g.mean[target]! + dm;
    out.condVar = Math.max(g.cov[target * K + target]! - dv, 1e-18);
  }
  return out;
}

// ---------------------------------------------------------------------------------------------
// Readings outside the joint Gaussian
// ---------------------------------------------------------------------------------------------

/** One part of a predictive distribution of a reading: "OL" with a mass, or a Gaussian. */
export type PredictivePart = { weight: number; ol: true } | { weight: number; ol: false; mu: number; sigma: number };

/** Log probability (mass for OL, density otherwise) of a value under a predictive mixture. */
export function logPredictive(parts: PredictivePart[], y: MeterValue, wildRange: number): number {
  let p = 0;
  for (const part of parts) {
    if (part.ol) {
      if (y === 'OL') p += part.weight;
    } else if (y !== 'OL') {
      const z = (y - part.mu) / part.sigma;
      p += (part.weight * Math.exp(-0.5 * z * z)) / (part.sigma * Math.sqrt(2 * Math.PI));
    }
  }
  const wild = y === 'OL' ? WILD_READING_CHANCE : WILD_READING_CHANCE / wildRange;
  return Math.log((1 - WILD_READING_CHANCE) * p + wild);
}

/** Range over which a wild reading may fall, per kind (for the wild-reading density). */
export function wildRanges(model: SupplyModel): Record<ReadingKind, number> {
  const r = {} as Record<ReadingKind, number>;
  const kinds: LiveReadingKind[] = ['mainsAc', 'acSecondary', 'dcOut', 'rippleAc', 'rippleHz', 'regulatorOut'];
  for (const k of kinds) {
    let m = 0;
    for (const v of model.variants) m = Math.max(m, Math.abs(v.prediction[k] ?? 0));
    r[k] = Math.max(2 * m, 1);
  }
  r.diodeForward = model.meter.diodeTestVolts;
  r.diodeReverse = model.meter.diodeTestVolts;
  r.capacitance = Math.max(2 * Math.max(0, ...model.spec.capacitors.map((c) => c.farads)), 1e-6);
  r.esr = 100;
  return r;
}

/** Whether a ripple frequency reading matches a predicted one (within 15 % of line frequency). */
export function hzMatches(y: number, predicted: number, lineHz: number): boolean {
  if (predicted <= 0) return y < 0.5 * lineHz;
  return Math.abs(y - predicted) <= 0.15 * lineHz;
}

/** Predictive mixture of a power-off reading (or the ripple frequency) under a variant. */
export function offlinePredictive(model: SupplyModel, v: SimulatedVariant, kind: ReadingKind, target: string | undefined): PredictivePart[] {
  if (kind === 'rippleHz') {
    return [{ weight: 1, ol: false, mu: v.prediction.rippleHz ?? 0, sigma: 0.05 * model.spec.source.hz }];
  }
  const labels = diodeLabels(model.spec.topology);
  if (kind === 'diodeForward' || kind === 'diodeReverse') {
    const i = (labels as string[]).indexOf(target ?? 'D1');
    const state: DiodeCondition = i >= 0 ? (v.diodeStates[i] ?? 'ok') : 'ok';
    const vf = model.goodForwardVolts;
    if (state === 'open') return [{ weight: 0.97, ol: true }, { weight: 0.03, ol: false, mu: 1, sigma: 1 }];
    if (state === 'short') return [{ weight: 0.01, ol: true }, { weight: 0.99, ol: false, mu: 0.01, sigma: 0.03 }];
    if (kind === 'diodeForward') {
      // A good junction: its drop at the test current; above the meter's open-circuit voltage
      // it reads OL (DOMAIN.md §3). In-circuit parallel paths can read lower.
      if (vf >= model.meter.diodeTestVolts) return [{ weight: 0.98, ol: true }, { weight: 0.02, ol: false, mu: vf, sigma: 0.2 }];
      return [
        { weight: 0.02, ol: true },
        { weight: 0.83, ol: false, mu: vf, sigma: 0.08 },
        { weight: 0.15, ol: false, mu: 0.6 * vf, sigma: 0.25 * vf + 0.05 },
      ];
    }
    // Reverse on a good junction: OL, or a slowly rising value through a capacitor in circuit.
    return [{ weight: 0.85, ol: true }, { weight: 0.15, ol: false, mu: 1.5, sigma: 1 }];
  }
  const q = target === 'C2' ? 1 : 0;
  const cap = model.spec.capacitors[q];
  if (!cap) return [{ weight: 1, ol: true }];
  const factor = v.capacitorFactors[q] ?? 1;
  if (kind === 'capacitance') {
    if (factor === 0) return [{ weight: 0.3, ol: true }, { weight: 0.7, ol: false, mu: 0, sigma: 0.02 * cap.farads + 1e-9 }];
    const mu = cap.farads * factor;
    return [{ weight: 0.02, ol: true }, { weight: 0.98, ol: false, mu, sigma: Math.hypot(capacitanceSigma(mu, model.meter), 0.1 * mu) }];
  }
  // ESR: about the variant's ESR; a healthy part sits below the table's worst-new value
  // (DOMAIN.md §6), here about a quarter of the limit (twice the worst-new value).
  const esr = v.esrOhms[q] ?? 0;
  if (!Number.isFinite(esr)) return [{ weight: 0.8, ol: true }, { weight: 0.2, ol: false, mu: 100, sigma: 100 }];
  const limit = model.esrLimitOhms[q] ?? 1;
  const median = v.fault === 'healthy' || esr <= limit / 2 ? limit / 4 : esr;
  return [{ weight: 0.01, ol: true }, { weight: 0.99, ol: false, mu: median, sigma: median * 0.6 }];
}

/** Index of a reading in the joint Gaussian, or -1 when it is not part of it. */
export function jointIndex(spread: JointSpread, r: { kind: ReadingKind; target?: string; value?: MeterValue }): number {
  if (r.value === 'OL') return -1;
  if (r.kind === 'capacitance') return spread.keys.indexOf((r.target ?? 'C1') as JointKey);
  return spread.keys.indexOf(r.kind as JointKey);
}

/**
 * Log-likelihood of all readings under one variant, and the squared Mahalanobis distance of
 * the jointly modelled ones (for "fits nothing").
 */
export function variantLogLikelihood(
  model: SupplyModel,
  spread: JointSpread,
  g: VariantGaussian,
  v: SimulatedVariant,
  readings: Reading[],
  wild: Record<ReadingKind, number>,
): { logL: number; distance2: number; jointCount: number } {
  const K = spread.keys.length;
  const obs: { index: number; value: number }[] = [];
  let logL = 0;
  let wildLog = Math.log(WILD_READING_CHANCE);
  for (const r of readings) {
    const idx = jointIndex(spread, r);
    if (idx >= 0 && typeof r.value === 'number') {
      obs.push({ index: idx, value: r.value });
      wildLog -= Math.log(wild[r.kind]);
    } else if (r.kind === 'rippleHz') {
      const predicted = v.prediction.rippleHz ?? 0;
      logL += Math.log(typeof r.value === 'number' && hzMatches(r.value, predicted, model.spec.source.hz) ? 0.9 : 0.05);
    } else if (r.kind === 'diodeForward' || r.kind === 'diodeReverse' || r.kind === 'esr' || r.kind === 'capacitance') {
      logL += logPredictive(offlinePredictive(model, v, r.kind, r.target), r.value, wild[r.kind]);
    }
  }
  const fit = observeGaussian(g, K, obs);
  if (obs.length > 0) {
    const a = Math.log(1 - WILD_READING_CHANCE) + fit.logPdf;
    logL += Math.max(a, wildLog) + Math.log1p(Math.exp(Math.min(a, wildLog) - Math.max(a, wildLog)));
  }
  return { logL, distance2: fit.distance2, jointCount: obs.length };
}
