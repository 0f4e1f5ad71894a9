/**
 * From readings to a verdict: bands and in/out per reading, faults ranked by posterior
 * probability (Bayes' rule over the simulated variants), plain-words reasons, and the reading
 * that best separates the leading candidates (expected information gain, Shannon entropy).
 */
import { diodeLabels } from '../spec';
import { FAULTS } from './faults';
import {
  jointIndex,
  jointSpread,
  logPredictive,
  logSumExp,
  observeGaussian,
  offlinePredictive,
  variantGaussian,
  variantLogLikelihood,
  wildRanges,
  type JointSpread,
  type PredictivePart,
  type VariantGaussian,
} from './likelihood';
import { accuracyHalfWidth } from './meter';
import type { SimulatedVariant, SupplyModel } from './model';
import { readingGuide } from './points';
import type { Reading } from './readings';
import { quantileSorted } from './sampling';
import { AC_READING_KINDS, READING_UNITS, type Diagnosis, type FaultId, type LiveReadingKind, type MeterValue, type NextReading, type RankedFault, type ReadingBand, type ReadingKind, type ReadingVerdict } from './types';

const AC_KINDS = AC_READING_KINDS;
const UNITS = READING_UNITS;

/**
 * Expected bands of a healthy unit on this meter: the 2.5–97.5 % quantiles of the tolerance
 * Monte Carlo, widened by the meter's accuracy at each end; the mains band from its standard;
 * power-off readings from the part models.
 */
export function healthyBands(model: SupplyModel): ReadingBand[] {
  const bands: ReadingBand[] = [];
  const meter = model.meter;
  const live: LiveReadingKind[] = ['mainsAc', 'acSecondary', 'dcOut', 'rippleAc', 'rippleHz', 'regulatorOut'];
  for (const kind of live) {
    const nominal = model.nominalPrediction[kind];
    if (nominal === null) continue;
    let low: number;
    let high: number;
    if (kind === 'mainsAc') {
      low = model.mains.lowVolts;
      high = model.mains.highVolts;
    } else if (kind === 'rippleHz') {
      // A frequency counter on the ripple: the fundamental, within 5 % (our allowance).
      low = 0.95 * nominal;
      high = 1.05 * nominal;
    } else {
      const values = model.samples.map((s) => s.prediction[kind] ?? 0).sort((a, b) => a - b);
      low = quantileSorted(values, 0.025);
      high = quantileSorted(values, 0.975);
    }
    if (kind !== 'rippleHz') {
      const acc = AC_KINDS.has(kind) ? meter.ac : meter.dc;
      low -= accuracyHalfWidth(low, acc, meter.displayCounts);
      high += accuracyHalfWidth(high, acc, meter.displayCounts);
    }
    bands.push({ kind, unit: UNITS[kind], nominal, low: Math.max(0, low), high });
  }
  const vf = model.goodForwardVolts;
  for (const label of diodeLabels(model.spec.topology)) {
    if (vf >= meter.diodeTestVolts) {
      bands.push({ kind: 'diodeForward', target: label, unit: 'V', nominal: 'OL', low: meter.diodeTestVolts, high: meter.diodeTestVolts, expectOverload: true });
    } else {
      // DOMAIN.md §3: a good junction reads 0.4–0.9 V forward (silicon); we centre the window on
      // the model's drop at the test current.
      bands.push({ kind: 'diodeForward', target: label, unit: 'V', nominal: vf, low: Math.max(0.05, vf - 0.15), high: vf + 0.25 });
    }
    bands.push({ kind: 'diodeReverse', target: label, unit: 'V', nominal: 'OL', low: meter.diodeTestVolts, high: meter.diodeTestVolts, expectOverload: true });
  }
  model.spec.capacitors.forEach((c, q) => {
    const t = model.tolerances;
    const target = `C${q + 1}`;
    bands.push({
      kind: 'capacitance',
      target,
      unit: 'F',
      nominal: c.farads,
      low: c.farads * (1 - t.capacitorFraction - t.capacitorAgeingFraction),
      high: c.farads * (1 + t.capacitorFraction),
    });
    bands.push({ kind: 'esr', target, unit: 'Ω', nominal: (model.esrLimitOhms[q] ?? 0) / 4, low: 0, high: model.esrLimitOhms[q] ?? 0 });
  });
  return bands;
}

/** In band, low or high, for one reading against its band. */
export function judge(value: MeterValue, band: ReadingBand): ReadingVerdict['verdict'] {
  if (band.expectOverload) return value === 'OL' ? 'in' : 'low';
  if (value === 'OL') return 'high';
  if (value < band.low) return 'low';
  if (value > band.high) return 'high';
  return 'in';
}

function bandFor(bands: ReadingBand[], r: Reading): ReadingBand | undefined {
  return bands.find((b) => b.kind === r.kind && (b.target ?? undefined) === (r.target ?? undefined));
}

const KIND_WORDS: Record<ReadingKind, string> = {
  mainsAc: 'mains',
  acSecondary: 'secondary AC',
  dcOut: 'DC out',
  rippleAc: 'ripple',
  rippleHz: 'ripple frequency',
  regulatorOut: 'regulator output',
  diodeForward: 'diode forward',
  diodeReverse: 'diode reverse',
  capacitance: 'capacitance',
  esr: 'ESR',
};

export function formatValue(v: MeterValue, unit: ReadingBand['unit']): string {
  if (v === 'OL') return 'OL';
  if (unit === 'F') return `${+(v * 1e6).toPrecision(3)} µF`;
  if (unit === 'Hz') return `${Math.round(v)} Hz`;
  const a = Math.abs(v);
  const text = a >= 100 ? v.toFixed(0) : a >= 10 ? v.toFixed(1) : a >= 1 ? v.toFixed(2) : v.toFixed(3);
  return `${text} ${unit}`;
}

/** Plain-words reason for a fault, with the readings that point to it. */
function reasonFor(fault: FaultId, variant: SimulatedVariant, model: SupplyModel, verdicts: ReadingVerdict[]): string {
  const topo = model.spec.topology;
  const f = model.spec.source.hz;
  const hzReading = verdicts.find((v) => v.kind === 'rippleHz');
  const atLineHz = hzReading !== undefined && typeof hzReading.value === 'number' && Math.abs(hzReading.value - f) < 0.15 * f;
  // Each reason says what the fault looks like on the meter (DOMAIN.md §7), so it reads true
  // whichever readings have been taken; the readings that point to it follow.
  let core: string;
  switch (fault) {
    case 'healthy':
      core = verdicts.length === 0 ? 'No readings yet.' : 'The readings sit inside the bands of a unit whose parts are within tolerance.';
      break;
    case 'no-ac':
      core = 'Nothing at the secondary: mains missing, a fuse or thermal fuse open, or a winding open.';
      break;
    case 'line-low':
      core = 'Low mains brings the secondary and the DC down together, ripple about normal.';
      break;
    case 'line-high':
      core = 'High mains (or the wrong tap) lifts the secondary and the DC together.';
      break;
    case 'diode-open':
      core =
        topo === 'half-wave'
          ? 'With its diode open a half-wave supply has AC in but no DC out.'
          : atLineHz
            ? `Ripple at ${f} Hz on a full-wave supply: one diode is not conducting (${variant.part}); DC a little low, ripple about doubled.`
            : `One diode not conducting (${variant.part}) turns the supply half-wave: DC a little low, ripple about doubled and at ${f} Hz.`;
      break;
    case 'diode-short':
      core = `A shorted diode (${variant.part}) shorts the secondary on one half-cycle: the secondary collapses or the fuse blows.`;
      break;
    case 'capacitor-low':
      core = `A filter capacitor (${variant.part}) that has lost capacitance shows as ripple up and DC down with the AC normal.`;
      break;
    case 'capacitor-open':
      core = `An open filter capacitor (${variant.part}) leaves very large ripple and DC near the unfiltered average.`;
      break;
    case 'capacitor-esr':
      core = `A high ESR in ${variant.part} shows as ripple up with sharp steps and DC only slightly low.`;
      break;
    case 'overload':
      core = 'A load that draws too much (a short downstream?) sags the secondary and raises the ripple with the current.';
      break;
    case 'regulator-dropout':
      core = 'When the regulator input dips below its output plus dropout, ripple passes through to the output.';
      break;
    case 'regulator-failed':
      core = `Regulator output wrong while its input is normal: ${variant.label}.`;
      break;
  }
  const outside = verdicts.filter((v) => v.verdict !== 'in').slice(0, 3);
  if (outside.length === 0) return core;
  const evidence = outside
    .map((v) => `${KIND_WORDS[v.kind]}${v.target ? ` ${v.target}` : ''} ${formatValue(v.value, v.band.unit)} ${v.verdict === 'low' ? 'below' : 'above'} ${formatValue(v.band.low, v.band.unit)}–${formatValue(v.band.high, v.band.unit)}`)
    .join('; ');
  return `${core} Readings: ${evidence}.`;
}

function entropyBits(p: ArrayLike<number>): number {
  let h = 0;
  for (let i = 0; i < p.length; i++) if (p[i]! > 0) h -= p[i]! * Math.log2(p[i]!);
  return h;
}

/** Candidate readings not yet taken. */
function candidates(model: SupplyModel, taken: Reading[]): { kind: ReadingKind; target?: string }[] {
  const has = (kind: ReadingKind, target?: string) => taken.some((r) => r.kind === kind && r.target === target);
  const out: { kind: ReadingKind; target?: string }[] = [];
  const live: LiveReadingKind[] = ['acSecondary', 'dcOut', 'rippleAc', 'rippleHz', 'mainsAc'];
  if (model.spec.regulator !== null) live.push('regulatorOut');
  for (const k of live) if (!has(k)) out.push({ kind: k });
  for (const label of diodeLabels(model.spec.topology)) {
    if (!has('diodeForward', label)) out.push({ kind: 'diodeForward', target: label });
    if (!has('diodeReverse', label)) out.push({ kind: 'diodeReverse', target: label });
  }
  model.spec.capacitors.forEach((_, q) => {
    if (!has('capacitance', `C${q + 1}`)) out.push({ kind: 'capacitance', target: `C${q + 1}` });
    if (!has('esr', `C${q + 1}`)) out.push({ kind: 'esr', target: `C${q + 1}` });
  });
  return out;
}

/** Predictive mixture of a candidate reading under one variant, given what was read. */
function predictiveFor(
  model: SupplyModel,
  spread: JointSpread,
  g: VariantGaussian,
  v: SimulatedVariant,
  c: { kind: ReadingKind; target?: string },
  observed: { index: number; value: number }[],
): PredictivePart[] {
  const idx = jointIndex(spread, c);
  if (idx < 0) return offlinePredictive(model, v, c.kind, c.target);
  // Conditional Gaussian of the new reading given the ones taken (they share tolerances).
  const fit = observeGaussian(g, spread.keys.length, observed, idx);
  const parts: PredictivePart[] = [{ weight: c.kind === 'capacitance' ? 0.98 : 1, ol: false, mu: fit.condMean!, sigma: Math.sqrt(fit.condVar!) }];
  if (c.kind === 'capacitance') parts.push({ weight: 0.02, ol: true });
  return parts;
}

/** Three-point Gauss–Hermite nodes (probabilists'): offsets in σ and their weights. */
const GH3: [number, number][] = [
  [0, 2 / 3],
  [Math.sqrt(3), 1 / 6],
  [-Math.sqrt(3), 1 / 6],
];

/**
 * Ranks the faults for the readings and picks the next reading.
 * @param model     the simulated supply
 * @param readings  checked readings
 */
export function rankFaults(model: SupplyModel, readings: Reading[], problems: { field: string; message: string }[]): Diagnosis {
  const bands = healthyBands(model);
  const verdicts: ReadingVerdict[] = [];
  for (const r of readings) {
    const band = bandFor(bands, r);
    if (!band) continue;
    const v: ReadingVerdict = { kind: r.kind, value: r.value, band, verdict: judge(r.value, band) };
    if (r.target !== undefined) v.target = r.target;
    verdicts.push(v);
  }

  const wild = wildRanges(model);
  const variants = model.variants;
  const spread = jointSpread(model);
  const gaussians = variants.map((v) => variantGaussian(model, spread, v));
  const present = [...new Set(variants.map((v) => v.fault))];
  const priorTotal = present.reduce((s, f) => s + FAULTS[f].prior, 0);
  const logPost = new Float64Array(variants.length);
  const fits = variants.map((v, i) => {
    const fit = variantLogLikelihood(model, spread, gaussians[i]!, v, readings, wild);
    logPost[i] = Math.log(FAULTS[v.fault].prior / priorTotal) + Math.log(v.weight) + fit.logL;
    return fit;
  });
  const norm = logSumExp(logPost);
  const post = logPost.map((x) => Math.exp(x - norm));

  const byFault = new Map<FaultId, { p: number; best: number; bestP: number }>();
  variants.forEach((v, i) => {
    const e = byFault.get(v.fault) ?? { p: 0, best: i, bestP: -1 };
    e.p += post[i]!;
    if (post[i]! > e.bestP) {
      e.bestP = post[i]!;
      e.best = i;
    }
    byFault.set(v.fault, e);
  });
  const ranked: RankedFault[] = [...byFault.entries()]
    .sort((a, b) => b[1].p - a[1].p)
    .map(([fault, e]) => {
      const v = variants[e.best]!;
      const rf: RankedFault = { fault, probability: e.p, why: reasonFor(fault, v, model, verdicts) };
      if (v.part !== undefined && fault !== 'healthy') rf.part = v.part;
      return rf;
    });

  // Fits nothing: even the best-fitting variant leaves the jointly modelled readings further
  // than a Mahalanobis distance of √(16 + 4k) for k readings (about 4.5σ for one; our
  // threshold, well past the 99.99 % point of a χ² with k degrees of freedom for small k).
  let unexplained = false;
  let bestFit = -Infinity;
  let bestI = -1;
  fits.forEach((f, i) => {
    if (f.logL > bestFit) {
      bestFit = f.logL;
      bestI = i;
    }
  });
  if (bestI >= 0) {
    const f = fits[bestI]!;
    if (f.jointCount > 0 && f.distance2 > 16 + 4 * f.jointCount) unexplained = true;
  }

  const observed: { index: number; value: number }[] = [];
  for (const r of readings) {
    const idx = jointIndex(spread, r);
    if (idx >= 0 && typeof r.value === 'number') observed.push({ index: idx, value: r.value });
  }
  const next = nextReading(model, readings, variants, post, spread, gaussians, observed, wild);
  return { ranked, unexplained, bands, verdicts, next, problems };
}

function nextReading(
  model: SupplyModel,
  readings: Reading[],
  variants: SimulatedVariant[],
  post: Float64Array,
  spread: JointSpread,
  gaussians: VariantGaussian[],
  observed: { index: number; value: number }[],
  wild: Record<ReadingKind, number>,
): NextReading | null {
  const faults = [...new Set(variants.map((v) => v.fault))];
  const faultIndex = variants.map((v) => faults.indexOf(v.fault));
  const prior = new Float64Array(faults.length);
  variants.forEach((_, i) => (prior[faultIndex[i]!] = prior[faultIndex[i]!]! + post[i]!));
  const h0 = entropyBits(prior);
  // Only variants that still matter take part (speed): the 40 most probable above 1e-4.
  const live = variants
    .map((_, i) => i)
    .filter((i) => post[i]! > 1e-4)
    .sort((a, b) => post[b]! - post[a]!)
    .slice(0, 40);
  let best: { c: { kind: ReadingKind; target?: string }; gain: number; score: number } | null = null;
  const gains: { c: { kind: ReadingKind; target?: string }; gain: number }[] = [];
  const poweredOffBefore = readings.some((r) => r.kind === 'diodeForward' || r.kind === 'diodeReverse' || r.kind === 'capacitance' || r.kind === 'esr');
  for (const c of candidates(model, readings)) {
    const preds = live.map((i) => predictiveFor(model, spread, gaussians[i]!, variants[i]!, c, observed));
    let expectedH = 0;
    let total = 0;
    live.forEach((i, a) => {
      for (const part of preds[a]!) {
        const outcomes: [MeterValue, number][] = part.ol ? [['OL', 1]] : GH3.map(([z, w]) => [part.mu + z * part.sigma, w]);
        for (const [y, w] of outcomes) {
          const mass = post[i]! * part.weight * w;
          if (mass < 1e-6) continue;
          const pf = new Float64Array(faults.length);
          const logs = live.map((j, b) => Math.log(post[j]!) + logPredictive(preds[b]!, y, wild[c.kind]));
          const n = logSumExp(logs);
          live.forEach((j, b) => (pf[faultIndex[j]!] = pf[faultIndex[j]!]! + Math.exp(logs[b]! - n)));
          expectedH += mass * entropyBits(pf);
          total += mass;
        }
      }
    });
    const gain = Math.max(0, h0 - (total > 0 ? expectedH / total : h0));
    const guide = readingGuide(model.spec.topology, c.kind, c.target, model.meter.kind);
    // Prefer live readings: the first power-off test means switching off, discharging and
    // verifying (the field order, DOMAIN.md §7–8), after which the others cost little; and a
    // mains reading exposes the technician (our weighting).
    const score = gain * (guide.powerOff ? (poweredOffBefore ? 0.9 : 0.35) : c.kind === 'mainsAc' ? 0.9 : 1);
    gains.push({ c, gain });
    if (!best || score > best.score) best = { c, gain, score };
  }
  // A leading cause at 90 % or more: its confirming test next (DOMAIN.md §7, "confirm with
  // power off"), then nothing more to ask; otherwise the best reading, if it still tells
  // anything (at least 0.01 bit).
  let top = 0;
  for (let f = 1; f < faults.length; f++) if (prior[f]! > prior[top]!) top = f;
  if (prior[top]! >= 0.9) {
    const topVariant = variants.reduce((b, v, i) => (v.fault === faults[top] && post[i]! > post[b]! ? i : b), variants.findIndex((v) => v.fault === faults[top]));
    const confirm = confirmingReading(faults[top]!, variants[topVariant]?.part, model, readings);
    if (confirm === null) return null;
    const guide = readingGuide(model.spec.topology, confirm.kind, confirm.target, model.meter.kind);
    const scored = gains.find((g) => g.c.kind === confirm.kind && g.c.target === confirm.target);
    guide.gainBits = scored?.gain ?? 0;
    return guide;
  }
  // Live readings first while one still tells something (0.1 bit or more): the first power-off
  // test means switching off, discharging and verifying, then powering up again for any live
  // reading after it (the field order, DOMAIN.md §7–8; our rule).
  if (!poweredOffBefore) {
    const live = gains.filter((g) => !readingGuide(model.spec.topology, g.c.kind, g.c.target, model.meter.kind).powerOff);
    const bestLive = live.reduce<(typeof gains)[number] | null>((b, g) => (b === null || g.gain * (g.c.kind === 'mainsAc' ? 0.9 : 1) > b.gain * (b.c.kind === 'mainsAc' ? 0.9 : 1) ? g : b), null);
    if (bestLive !== null && bestLive.gain >= 0.1) best = { ...bestLive, score: bestLive.gain };
  }
  if (!best || best.gain < 0.01) return null;
  const guide = readingGuide(model.spec.topology, best.c.kind, best.c.target, model.meter.kind);
  guide.gainBits = best.gain;
  return guide;
}

/**
 * The reading that confirms a fault (DOMAIN.md §7's last column), when not yet taken; null
 * when it has been, or when the fault has none in this tool's readings (an overload is
 * confirmed by disconnecting the load, a healthy unit needs nothing).
 */
function confirmingReading(fault: FaultId, part: string | undefined, model: SupplyModel, taken: Reading[]): { kind: ReadingKind; target?: string } | null {
  const has = (kind: ReadingKind, target?: string) => taken.some((r) => r.kind === kind && (target === undefined || r.target === target));
  const firstCap = (part ?? 'C1').split(' ')[0]!;
  const wanted: { kind: ReadingKind; target?: string }[] = [];
  switch (fault) {
    case 'no-ac':
    case 'line-low':
    case 'line-high':
      wanted.push({ kind: 'mainsAc' });
      break;
    case 'diode-open':
    case 'diode-short':
      if (part && /^D[1-4]$/.test(part)) wanted.push({ kind: 'diodeForward', target: part }, { kind: 'diodeReverse', target: part });
      break;
    case 'capacitor-low':
    case 'capacitor-open':
      if (model.spec.capacitors.length > 0) wanted.push({ kind: 'capacitance', target: firstCap });
      break;
    case 'capacitor-esr':
      if (model.spec.capacitors.length > 0) wanted.push({ kind: 'esr', target: firstCap });
      break;
    case 'regulator-dropout':
    case 'regulator-failed':
      wanted.push({ kind: 'dcOut' }, { kind: 'regulatorOut' });
      break;
    case 'healthy':
    case 'overload':
      break;
  }
  return wanted.find((w) => !has(w.kind, w.target)) ?? null;
}
