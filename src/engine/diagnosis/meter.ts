/**
 * The meter model: what a handheld multimeter shows for a periodic waveform in each mode, and
 * how far its accuracy lets that stray (DOMAIN.md §5).
 *
 * - DC mode reads the mean.
 * - AC mode, AC-coupled true RMS: the RMS of the waveform less its mean.
 * - AC mode, average-responding: 1.1107 × the mean absolute value of the AC part (the sine form
 *   factor π/(2√2)); right for sines only.
 * - AC+DC true RMS: √(mean² + AC RMS²).
 * - Bandwidth: harmonics outside the meter's AC band are attenuated, first-order from each edge
 *   (our simple model of a meter's response; meter specifications give only the band).
 * - Accuracy ±(% of reading + counts), with the resolution of an auto-ranging display of the
 *   given count.
 */
import type { MeterAccuracy, MeterKind, MeterSettings } from './types';

/** Sine form factor π/(2√2) (DOMAIN.md §2). */
export const SINE_FORM_FACTOR = Math.PI / (2 * Math.SQRT2);

export interface ResolvedMeter {
  kind: MeterKind;
  dc: MeterAccuracy;
  ac: MeterAccuracy;
  displayCounts: number;
  acBandwidthHz: [number, number];
  diodeTestVolts: number;
  diodeTestAmps: number;
}

/**
 * Defaults a user can change (DOMAIN.md §5, common practice): true-RMS AC-coupled,
 * DC ±(0.5 % + 2), AC ±(1 % + 3), 6000 counts, AC band 40–500 Hz; diode test 1 mA with about
 * 3 V open circuit (meter manuals give 0.5–1.5 mA and 1.2–5 V, DOMAIN.md §3).
 */
export const DEFAULT_METER: ResolvedMeter = Object.freeze({
  kind: 'true-rms-ac',
  dc: { percent: 0.5, counts: 2 },
  ac: { percent: 1, counts: 3 },
  displayCounts: 6000,
  acBandwidthHz: [40, 500] as [number, number],
  diodeTestVolts: 3,
  diodeTestAmps: 1e-3,
}) as ResolvedMeter;

/** Meter settings with defaults filled in. */
export function resolveMeter(m: MeterSettings | undefined): ResolvedMeter {
  return {
    kind: m?.kind ?? DEFAULT_METER.kind,
    dc: m?.dc ?? DEFAULT_METER.dc,
    ac: m?.ac ?? DEFAULT_METER.ac,
    displayCounts: m?.displayCounts ?? DEFAULT_METER.displayCounts,
    acBandwidthHz: m?.acBandwidthHz ?? DEFAULT_METER.acBandwidthHz,
    diodeTestVolts: m?.diodeTestVolts ?? DEFAULT_METER.diodeTestVolts,
    diodeTestAmps: m?.diodeTestAmps ?? DEFAULT_METER.diodeTestAmps,
  };
}

/**
 * Resolution of an auto-ranging display of `counts` for a reading of this size: the smallest
 * power of ten that shows it within the count (a 6000-count meter shows 12.34 V as 12.34,
 * on its 60 V range, resolution 0.01 V). Never finer than 0.1 mV (or 0.1 µ of the unit).
 */
export function displayResolution(value: number, counts: number): number {
  const size = Math.abs(value);
  if (!(size > 0)) return 1e-4;
  return Math.max(1e-4 * (size < 1e-3 ? size * 1e3 : 1), 10 ** Math.ceil(Math.log10(size / counts)));
}

/** Half-width of the accuracy window ±(p % of reading + n counts), in the reading's unit. */
export function accuracyHalfWidth(value: number, acc: MeterAccuracy, counts: number): number {
  return (Math.abs(value) * acc.percent) / 100 + acc.counts * displayResolution(value, counts);
}

/** In-place radix-2 FFT of (re, im), length a power of two. */
function fft(re: Float64Array, im: Float64Array, inverse: boolean): void {
  const n = re.length;
  for (let i = 1, j = 0; i < n; i++) {
    let bit = n >> 1;
    for (; j & bit; bit >>= 1) j ^= bit;
    j ^= bit;
    if (i < j) {
      let t = re[i]!;
      re[i] = re[j]!;
      re[j] = t;
      t = im[i]!;
      im[i] = im[j]!;
      im[j] = t;
    }
  }
  for (let len = 2; len <= n; len <<= 1) {
    const ang = ((inverse ? 2 : -2) * Math.PI) / len;
    const wr = Math.cos(ang);
    const wi = Math.sin(ang);
    for (let i = 0; i < n; i += len) {
      let cr = 1;
      let ci = 0;
      for (let k = 0; k < len / 2; k++) {
        const ar = re[i + k]!;
        const ai = im[i + k]!;
        const br = re[i + k + len / 2]! * cr - im[i + k + len / 2]! * ci;
        const bi = re[i + k + len / 2]! * ci + im[i + k + len / 2]! * cr;
        re[i + k] = ar + br;
        im[i + k] = ai + bi;
        re[i + k + len / 2] = ar - br;
        im[i + k + len / 2] = ai - bi;
        const nr = cr * wr - ci * wi;
        ci = cr * wi + ci * wr;
        cr = nr;
      }
    }
  }
  if (inverse) {
    for (let i = 0; i < n; i++) {
      re[i] = re[i]! / n;
      im[i] = im[i]! / n;
    }
  }
}

/** Gain of the AC band at frequency f: flat inside, first-order roll-off outside. */
export function bandGain(f: number, band: [number, number]): number {
  const [lo, hi] = band;
  if (f > hi) return hi / Math.hypot(f, hi) * Math.SQRT2;
  if (f < lo) return f / Math.hypot(f, lo) * Math.SQRT2;
  return 1;
}

export interface MeterReadings {
  /** DC mode. */
  dc: number;
  /** AC mode as the meter kind responds. */
  ac: number;
}

/**
 * What a meter shows in DC and AC mode for one period of a waveform.
 * @param samples  N evenly spaced samples over one period (N a power of two; the end point
 *                 excluded), volts
 * @param hz       line frequency (the period's fundamental)
 * @param meter    resolved meter settings
 */
export function readWaveform(samples: ArrayLike<number>, hz: number, meter: ResolvedMeter): MeterReadings {
  const n = samples.length;
  const re = new Float64Array(n);
  const im = new Float64Array(n);
  for (let i = 0; i < n; i++) re[i] = samples[i]!;
  fft(re, im, false);
  const mean = re[0]! / n;
  // Apply the band to every harmonic (and its mirror), drop the mean for the AC part.
  re[0] = 0;
  im[0] = 0;
  let acSquare = 0;
  for (let k = 1; k < n; k++) {
    const harmonic = k <= n / 2 ? k : n - k;
    const g = bandGain(harmonic * hz, meter.acBandwidthHz);
    re[k] = re[k]! * g;
    im[k] = im[k]! * g;
    acSquare += (re[k]! * re[k]! + im[k]! * im[k]!) / (n * n);
  }
  const acRms = Math.sqrt(acSquare);
  let ac: number;
  if (meter.kind === 'true-rms-ac') ac = acRms;
  else if (meter.kind === 'true-rms-ac-dc') ac = Math.hypot(mean, acRms);
  else {
    fft(re, im, true);
    let s = 0;
    for (let i = 0; i < n; i++) s += Math.abs(re[i]!);
    ac = SINE_FORM_FACTOR * (s / n);
  }
  return { dc: mean, ac };
}

/**
 * Resamples a waveform given at times t (one period, first and last point the same instant)
 * to `count` evenly spaced points (end excluded), linearly.
 */
export function resamplePeriod(t: ArrayLike<number>, v: ArrayLike<number>, count: number): Float64Array {
  const out = new Float64Array(count);
  const last = t.length - 1;
  const T = t[last]! - t[0]!;
  let j = 0;
  for (let p = 0; p < count; p++) {
    const tp = t[0]! + (p / count) * T;
    while (j < last - 1 && t[j + 1]! < tp) j++;
    const span = t[j + 1]! - t[j]!;
    const f = span > 0 ? Math.min(1, Math.max(0, (tp - t[j]!) / span)) : 0;
    out[p] = v[j]! + f * (v[j + 1]! - v[j]!);
  }
  return out;
}
