/**
 * Runs ngspice on the reference netlists (netlist.ts) and turns its samples into the measures the
 * engine reports: the independent reference for the cross-check tests and the benchmark.
 *
 * Steady state is reached by brute force: a transient from rest, continued in longer and longer
 * runs until the last two periods agree and the capacitor drift has died out. At a period boundary
 * the circuit's state is its capacitor voltages (the 0.1 pF leak capacitors of a floating winding
 * aside, which restart at 0 and settle within microseconds), so a run restarted with UIC from
 * those voltages continues the previous one.
 */
import { spawnSync } from 'node:child_process';
import { mkdtempSync, readFileSync, rmSync, writeFileSync, existsSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import type { DiodeLabel, SupplySpec } from '../../src/engine/types';
import { buildNetlist, type CircuitProbes, type NetlistOptions } from './netlist';

/** The ngspice binary: `$RIPPLEWRIGHT_NGSPICE`, else `ngspice` on the PATH. */
export const NGSPICE_BIN = process.env['RIPPLEWRIGHT_NGSPICE'] ?? 'ngspice';

/** What ngspice failed on, with the tail of its log. */
export class NgspiceError extends Error {
  constructor(
    message: string,
    readonly log: string,
  ) {
    super(`${message}\n--- ngspice log (tail) ---\n${log.split('\n').slice(-25).join('\n')}`);
    this.name = 'NgspiceError';
  }
}

let availability: { ok: boolean; version: string } | undefined;

/** True when the ngspice binary runs (`ngspice -v`); the answer is remembered for the process. */
export function ngspiceAvailable(): boolean {
  return probeNgspice().ok;
}

/** The version line ngspice prints (e.g. "ngspice-39"), or "" when it is absent. */
export function ngspiceVersion(): string {
  return probeNgspice().version;
}

function probeNgspice(): { ok: boolean; version: string } {
  if (!availability) {
    const r = spawnSync(NGSPICE_BIN, ['-v'], { encoding: 'utf8', timeout: 10_000 });
    const match = /ngspice-(\S+)/.exec(`${r.stdout ?? ''}${r.stderr ?? ''}`);
    availability = { ok: r.status === 0 && match !== null, version: match ? `ngspice-${match[1]}` : '' };
  }
  return availability;
}

/** Samples written by `wrdata`: time and one column per saved vector, by vector name. */
export interface NgspiceSamples {
  time: Float64Array;
  columns: Map<string, Float64Array>;
}

/** Result of one ngspice process. */
export interface NgspiceRun {
  samples: NgspiceSamples;
  /** stdout + stderr. */
  log: string;
  /** Wall-clock time of the ngspice process, seconds. */
  wallSeconds: number;
}

// Lines of ngspice output that mean the run is not to be trusted.
const ERROR_PATTERNS = [
  /^\s*error\b/im,
  /\berror:/i,
  /timestep too small/i,
  /simulation\(s\) aborted/i,
  /singular matrix/i,
  /unknown (model|device|subcircuit)/i,
  /could not find/i,
];

/**
 * Runs `ngspice -b` on a netlist in a fresh temporary directory (removed afterwards) and reads the
 * `wrdata` file it writes.
 * @param netlist netlist text whose `.control` block writes `dataFile` (relative path).
 * @param dataFile the data file's name.
 * @returns samples, the log and the process wall time.
 * @throws NgspiceError when ngspice fails, reports an error, or writes no readable data.
 */
export function runNgspice(netlist: string, dataFile: string): NgspiceRun {
  const dir = mkdtempSync(join(tmpdir(), 'ripplewright-ngspice-'));
  try {
    const cir = join(dir, 'supply.cir');
    writeFileSync(cir, netlist);
    const start = process.hrtime.bigint();
    const r = spawnSync(NGSPICE_BIN, ['-b', cir], {
      cwd: dir,
      encoding: 'utf8',
      timeout: 600_000,
      maxBuffer: 64 * 1024 * 1024,
    });
    const wallSeconds = Number(process.hrtime.bigint() - start) / 1e9;
    const log = `${r.stdout ?? ''}${r.stderr ?? ''}`;
    if (r.error) throw new NgspiceError(`could not run ${NGSPICE_BIN}: ${r.error.message}`, log);
    if (r.status !== 0) throw new NgspiceError(`ngspice exited with status ${r.status}`, log);
    const bad = ERROR_PATTERNS.find((p) => p.test(log));
    if (bad) throw new NgspiceError(`ngspice reported a problem (${bad.source})`, log);
    const path = join(dir, dataFile);
    if (!existsSync(path)) throw new NgspiceError('ngspice wrote no data file', log);
    return { samples: parseWrdata(readFileSync(path, 'utf8'), log), log, wallSeconds };
  } finally {
    rmSync(dir, { recursive: true, force: true });
  }
}

/** Parses `wrdata` output written with wr_singlescale and wr_vecnames. */
function parseWrdata(text: string, log: string): NgspiceSamples {
  const lines = text.split('\n').filter((l) => l.trim() !== '');
  const header = lines[0]?.trim().split(/\s+/) ?? [];
  if (header[0] !== 'time' || header.length < 2) {
    throw new NgspiceError(`unexpected data header "${lines[0] ?? ''}"`, log);
  }
  const n = lines.length - 1;
  const cols = header.map(() => new Float64Array(n));
  for (let i = 0; i < n; i++) {
    const fields = lines[i + 1]!.trim().split(/\s+/);
    if (fields.length !== header.length) {
      throw new NgspiceError(`data row ${i + 1} has ${fields.length} fields, expected ${header.length}`, log);
    }
    for (let j = 0; j < fields.length; j++) {
      const v = Number(fields[j]);
      if (!Number.isFinite(v)) throw new NgspiceError(`data row ${i + 1}: bad number "${fields[j]}"`, log);
      cols[j]![i] = v;
    }
  }
  const columns = new Map<string, Float64Array>();
  header.forEach((name, j) => {
    if (j > 0) columns.set(name.toLowerCase(), cols[j]!);
  });
  return { time: cols[0]!, columns };
}

// ---------------------------------------------------------------------------------------------
// Measures over one period
// ---------------------------------------------------------------------------------------------

interface WindowStats {
  mean: number;
  rms: number;
  /** RMS of the signal minus its mean. */
  acRms: number;
  max: number;
  min: number;
}

/**
 * Mean, RMS, AC RMS, max and min of the piecewise-linear signal through the samples over
 * [t0, t1]; values at t0 and t1 are interpolated. Integrals are exact for the linear pieces.
 */
function windowStats(t: Float64Array, y: Float64Array, t0: number, t1: number): WindowStats {
  const at = (tt: number): number => {
    let lo = 0;
    let hi = t.length - 1;
    if (tt <= t[0]!) return y[0]!;
    if (tt >= t[hi]!) return y[hi]!;
    while (hi - lo > 1) {
      const mid = (lo + hi) >> 1;
      if (t[mid]! <= tt) lo = mid;
      else hi = mid;
    }
    const f = (tt - t[lo]!) / (t[hi]! - t[lo]!);
    return y[lo]! + f * (y[hi]! - y[lo]!);
  };
  const pts: [number, number][] = [[t0, at(t0)]];
  for (let i = 0; i < t.length; i++) {
    if (t[i]! > t0 && t[i]! < t1) pts.push([t[i]!, y[i]!]);
  }
  pts.push([t1, at(t1)]);
  const span = t1 - t0;
  let s1 = 0;
  let max = -Infinity;
  let min = Infinity;
  for (const [, v] of pts) {
    max = Math.max(max, v);
    min = Math.min(min, v);
  }
  for (let i = 1; i < pts.length; i++) {
    const [ta, ya] = pts[i - 1]!;
    const [tb, yb] = pts[i]!;
    s1 += ((ya + yb) / 2) * (tb - ta);
  }
  const mean = s1 / span;
  // Second pass about the mean, so small ripple on a large DC is not lost to cancellation.
  let s2 = 0;
  let sAc = 0;
  for (let i = 1; i < pts.length; i++) {
    const [ta, ya] = pts[i - 1]!;
    const [tb, yb] = pts[i]!;
    const dt = tb - ta;
    s2 += (dt * (ya * ya + ya * yb + yb * yb)) / 3;
    const da = ya - mean;
    const db = yb - mean;
    sAc += (dt * (da * da + da * db + db * db)) / 3;
  }
  return { mean, rms: Math.sqrt(s2 / span), acRms: Math.sqrt(sAc / span), max, min };
}

/** Per-diode figures over one period (DiodeStress in types.ts). */
export interface ReferenceDiode {
  label: DiodeLabel;
  /** False for an open diode (no element; its current is 0, its terminal voltage still counts). */
  present: boolean;
  peakAmps: number;
  averageAmps: number;
  rmsAmps: number;
  pivVolts: number;
}

/** Regulated-output figures over one period. */
export interface ReferenceRegulated {
  dc: number;
  ripplePp: number;
  rippleRms: number;
  /** Lowest filter (regulator input) voltage. */
  inputValleyVolts: number;
  /** Mean current into the regulated load. */
  loadAmps: number;
  /** Mean power into the regulator block minus mean power into its load. */
  dissipationWatts: number;
}

/** The reference measures of one supply in periodic steady state. */
export interface ReferenceMeasures {
  dc: number;
  ripplePp: number;
  rippleRms: number;
  /** Largest forward current over all diodes. */
  diodePeakA: number;
  /** Largest reverse voltage (cathode − anode) over all diodes, open ones included. */
  diodePiv: number;
  /** True RMS of the secondary terminal voltage (one half for center-tap). */
  secondaryRms: number;
  secondaryRmsAmps: number;
  /** Mean current into the filter's load branch (load or regulator input). */
  loadAmps: number;
  diodes: ReferenceDiode[];
  regulated?: ReferenceRegulated;
  /**
   * The last period resampled at WAVEFORM_POINTS evenly spaced instants (end excluded), for the
   * meter model: output, secondary terminals, regulated output when there is one.
   */
  waveform: { vOut: Float64Array; vSecondary: Float64Array; vRegulated?: Float64Array };
  /** How the steady state was reached. */
  run: {
    periods: number;
    ngspiceRuns: number;
    wallSeconds: number;
    /** Largest relative change of a measure between the last two periods. */
    lastPeriodChange: number;
    /** Largest change of a capacitor voltage over the last period, volts. */
    lastCapacitorChangeVolts: number;
  };
}

/** Options of `referenceMeasures`. */
export interface ReferenceOptions {
  /** Largest step is period / this. Default 4000. */
  stepsPerPeriod?: number;
  /** ngspice RELTOL. Default 1e-6. */
  relTol?: number;
  /** Periods in the first run. Default 20. */
  firstPeriods?: number;
  /** Give up after this many simulated periods. Default 4000. */
  maxPeriods?: number;
  /** Means and RMS values of the last two periods must agree to this relative difference. Default 1e-4. */
  tolerance?: number;
  /** Extremes (p-p, peak current, PIV) of the last two periods must agree to this. Default 2e-3. */
  extremeTolerance?: number;
  /**
   * Capacitor voltages to start the first run from (default 0: from rest). A start near the
   * steady state shortens the settling of slow modes; the settling checks are the same.
   */
  initialCapacitorVolts?: number[];
}

type Column = Float64Array;

function measureWindow(
  probes: CircuitProbes,
  samples: NgspiceSamples,
  t0: number,
  t1: number,
): Omit<ReferenceMeasures, "run" | "waveform"> {
  const { time, columns } = samples;
  const zero = new Float64Array(time.length);
  const v = (nodeName: string): Column => {
    if (nodeName === '0') return zero;
    const c = columns.get(`v(${nodeName})`);
    if (!c) throw new Error(`reference: no column v(${nodeName})`);
    return c;
  };
  const i = (source: string): Column => {
    const c = columns.get(`i(${source})`);
    if (!c) throw new Error(`reference: no column i(${source})`);
    return c;
  };
  const diff = (a: Column, b: Column): Column => a.map((x, k) => x - b[k]!);
  const stats = (c: Column): WindowStats => windowStats(time, c, t0, t1);

  const out = stats(v('p'));
  const sec = stats(diff(v(probes.secondary.plus), v(probes.secondary.minus)));
  const winding = stats(i(probes.secondary.windingSource));
  const diodes: ReferenceDiode[] = probes.diodes.map((d) => {
    const piv = stats(diff(v(d.cathode), v(d.anode))).max;
    if (d.sense === null) {
      return { label: d.label, present: false, peakAmps: 0, averageAmps: 0, rmsAmps: 0, pivVolts: piv };
    }
    const cur = stats(i(d.sense));
    return {
      label: d.label,
      present: true,
      peakAmps: cur.max,
      averageAmps: cur.mean,
      rmsAmps: cur.rms,
      pivVolts: piv,
    };
  });
  const outputCurrent = i(probes.outputSense);
  const result: Omit<ReferenceMeasures, "run" | "waveform"> = {
    dc: out.mean,
    ripplePp: out.max - out.min,
    rippleRms: out.acRms,
    diodePeakA: Math.max(0, ...diodes.map((d) => d.peakAmps)),
    diodePiv: Math.max(...diodes.map((d) => d.pivVolts)),
    secondaryRms: sec.rms,
    secondaryRmsAmps: winding.rms,
    loadAmps: stats(outputCurrent).mean,
    diodes,
  };
  if (probes.regulator) {
    const vr = v(probes.regulator.out);
    const ir = i(probes.regulator.loadSense);
    const reg = stats(vr);
    const pin = stats(v('p').map((x, k) => x * outputCurrent[k]!)).mean;
    const pout = stats(vr.map((x, k) => x * ir[k]!)).mean;
    result.regulated = {
      dc: reg.mean,
      ripplePp: reg.max - reg.min,
      rippleRms: reg.acRms,
      inputValleyVolts: out.min,
      loadAmps: stats(ir).mean,
      dissipationWatts: pin - pout,
    };
  }
  return result;
}

/** Relative difference with a floor on the scale, so near-zero figures compare absolutely. */
function relChange(a: number, b: number, floor: number): number {
  return Math.abs(a - b) / Math.max(Math.abs(a), Math.abs(b), floor);
}

/**
 * The reference measures of a supply in periodic steady state, from ngspice transients.
 * @param spec normalised supply.
 * @param options step, tolerance and period limits (defaults: period/4000, RELTOL 1e-6, 1e-4).
 * @returns the measures of the last simulated period and how they were reached.
 * @throws NgspiceError when ngspice fails; Error when steady state is not reached by maxPeriods.
 */
export function referenceMeasures(spec: SupplySpec, options: ReferenceOptions = {}): ReferenceMeasures {
  const stepsPerPeriod = options.stepsPerPeriod ?? 4000;
  const relTol = options.relTol ?? 1e-6;
  const tolerance = options.tolerance ?? 1e-4;
  const extremeTolerance = options.extremeTolerance ?? 2e-3;
  const maxPeriods = options.maxPeriods ?? 4000;
  const period = 1 / spec.source.hz;
  const vm = Math.SQRT2 * spec.source.vrms;
  const voltFloor = 1e-4 * vm;

  let capVolts: number[] = spec.capacitors.map((_, q) => options.initialCapacitorVolts?.[q] ?? 0);
  let chunk = Math.max(4, options.firstPeriods ?? 20);
  let periods = 0;
  let runs = 0;
  let wallSeconds = 0;
  for (;;) {
    const stop = chunk * period;
    const opts: NetlistOptions = {
      stopSeconds: stop,
      recordFromSeconds: (chunk - 3) * period,
      maxStepSeconds: period / stepsPerPeriod,
      relTol,
      initialCapacitorVolts: capVolts,
      dataFile: 'samples.txt',
    };
    const { text, probes } = buildNetlist(spec, opts);
    const run = runNgspice(text, opts.dataFile);
    runs++;
    periods += chunk;
    wallSeconds += run.wallSeconds;

    const last = measureWindow(probes, run.samples, stop - period, stop);
    const prev = measureWindow(probes, run.samples, stop - 2 * period, stop - period);
    const ampFloor = Math.max(1e-3, last.diodePeakA) * 1e-2;
    // Integral measures must settle to `tolerance`; sampled extremes of narrow pulses wobble from
    // period to period with where the steps fall, so they get `extremeTolerance`.
    const integralChange = Math.max(
      relChange(last.dc, prev.dc, voltFloor),
      relChange(last.rippleRms, prev.rippleRms, voltFloor),
      relChange(last.secondaryRms, prev.secondaryRms, voltFloor),
      relChange(last.regulated?.dc ?? 0, prev.regulated?.dc ?? 0, voltFloor),
    );
    const extremeChange = Math.max(
      relChange(last.ripplePp, prev.ripplePp, voltFloor),
      relChange(last.diodePiv, prev.diodePiv, voltFloor),
      relChange(last.diodePeakA, prev.diodePeakA, ampFloor),
      relChange(last.regulated?.ripplePp ?? 0, prev.regulated?.ripplePp ?? 0, voltFloor),
    );
    const change = Math.max(integralChange, extremeChange);

    // Capacitor voltages at the last three period boundaries: their drift and its decay.
    const capAt = probes.capacitors.map((c) => {
      const vc = run.samples.columns;
      const plus = c.plus === '0' ? null : vc.get(`v(${c.plus})`)!;
      const minus = c.minus === '0' ? null : vc.get(`v(${c.minus})`)!;
      const col = run.samples.time.map((_, k) => (plus ? plus[k]! : 0) - (minus ? minus[k]! : 0));
      return [3, 2, 1, 0].map((back) => interpolate(run.samples.time, col, stop - back * period));
    });
    let d1 = 0;
    let d2 = 0;
    for (const c of capAt) {
      d1 = Math.max(d1, Math.abs(c[2]! - c[1]!));
      d2 = Math.max(d2, Math.abs(c[3]! - c[2]!));
    }
    // Geometric tail d2·ρ/(1 − ρ) estimates what the drift still has to go.
    const rho = d1 > 0 ? d2 / d1 : 0;
    // Below ngspice's own resolution (its RELTOL of the peak) a drift is noise, not settling.
    const noiseVolts = Math.max(1e-8, relTol) * vm;
    const remaining = d2 <= noiseVolts ? 0 : rho < 1 ? (d2 * rho) / (1 - rho) : Infinity;

    if (integralChange <= tolerance && extremeChange <= extremeTolerance && remaining <= tolerance * vm * 0.1) {
      return {
        ...last,
        waveform: lastPeriodWaveform(probes, run.samples, stop - period, period),
        run: {
          periods,
          ngspiceRuns: runs,
          wallSeconds,
          lastPeriodChange: change,
          lastCapacitorChangeVolts: d2,
        },
      };
    }
    if (periods >= maxPeriods) {
      throw new Error(
        `reference: no steady state after ${periods} periods (change ${change.toExponential(2)}, ` +
          `capacitor drift ${d2.toExponential(2)} V, ratio ${rho.toFixed(4)})`,
      );
    }
    capVolts = capAt.map((c) => c[3]!);
    chunk = Math.min(chunk * 2, maxPeriods - periods, 400);
    chunk = Math.max(chunk, 4);
  }
}

/** Points per period in `ReferenceMeasures.waveform`. */
export const WAVEFORM_POINTS = 256;

function lastPeriodWaveform(probes: CircuitProbes, samples: NgspiceSamples, t0: number, period: number): ReferenceMeasures['waveform'] {
  const col = (node: string): Float64Array => (node === '0' ? new Float64Array(samples.time.length) : samples.columns.get(`v(${node})`)!);
  const at = (y: Float64Array): Float64Array => {
    const out = new Float64Array(WAVEFORM_POINTS);
    for (let p = 0; p < WAVEFORM_POINTS; p++) out[p] = interpolate(samples.time, y, t0 + (p / WAVEFORM_POINTS) * period);
    return out;
  };
  const plus = col(probes.secondary.plus);
  const minus = col(probes.secondary.minus);
  const w: ReferenceMeasures['waveform'] = { vOut: at(col('p')), vSecondary: at(plus.map((x, k) => x - minus[k]!)) };
  if (probes.regulator) w.vRegulated = at(col(probes.regulator.out));
  return w;
}

function interpolate(t: Float64Array, y: Float64Array, tt: number): number {
  let k = 1;
  while (k < t.length - 1 && t[k]! < tt) k++;
  const f = (tt - t[k - 1]!) / (t[k]! - t[k - 1]!);
  return y[k - 1]! + Math.min(1, Math.max(0, f)) * (y[k]! - y[k - 1]!);
}

// ---------------------------------------------------------------------------------------------
// Benchmark helper
// ---------------------------------------------------------------------------------------------

/** Options of `timeNgspiceTransient`: the usual way a user would simulate a supply. */
export interface TransientTimingOptions {
  /** Simulated time, seconds. Default 1. */
  stopSeconds?: number;
  /** Largest step, seconds. Default 20 µs. */
  maxStepSeconds?: number;
  /** ngspice RELTOL. Default 1e-3 (ngspice's default). */
  relTol?: number;
}

/**
 * Wall-clock time of one ngspice process simulating the supply from rest (only the last period
 * is written out, so file output does not dominate).
 * @returns seconds of the ngspice process, including its start-up.
 * @throws NgspiceError when ngspice fails.
 */
export function timeNgspiceTransient(spec: SupplySpec, options: TransientTimingOptions = {}): number {
  const stop = options.stopSeconds ?? 1;
  const period = 1 / spec.source.hz;
  const { text } = buildNetlist(spec, {
    stopSeconds: stop,
    recordFromSeconds: Math.max(0, stop - period),
    maxStepSeconds: options.maxStepSeconds ?? 20e-6,
    relTol: options.relTol ?? 1e-3,
    dataFile: 'samples.txt',
  });
  return runNgspice(text, 'samples.txt').wallSeconds;
}

// ---------------------------------------------------------------------------------------------
// Test gate
// ---------------------------------------------------------------------------------------------

/** Whether ngspice tests run here, and if not whether that is a failure (CI) or a skip. */
export interface NgspiceGate {
  /** ngspice runs: the tests run. */
  run: boolean;
  /** ngspice is absent but RIPPLEWRIGHT_REQUIRE_NGSPICE=1: the tests must fail. */
  mustFail: boolean;
  /** Why they do not run (empty when they do). */
  reason: string;
}

/**
 * Decides whether the ngspice-dependent tests run: they skip with a message when ngspice is absent,
 * and fail instead when `RIPPLEWRIGHT_REQUIRE_NGSPICE=1` (CI sets it).
 */
export function ngspiceGate(): NgspiceGate {
  if (ngspiceAvailable()) return { run: true, mustFail: false, reason: '' };
  const mustFail = process.env['RIPPLEWRIGHT_REQUIRE_NGSPICE'] === '1';
  return {
    run: false,
    mustFail,
    reason:
      `ngspice (${NGSPICE_BIN}) not found: reference checks ` +
      (mustFail ? 'required by RIPPLEWRIGHT_REQUIRE_NGSPICE=1' : 'skipped (install the Debian package "ngspice")'),
  };
}
