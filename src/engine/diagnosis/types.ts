/**
 * The diagnosis contract: readings a technician takes, the meter that took them, the expected
 * bands, the verdicts, the ranked faults and the next reading to take.
 *
 * Units are SI throughout (volts, hertz, farads, ohms); a diode-test reading is volts or "OL".
 */
import type { DiodeLabel, SupplySpecInput } from '../types';

/** Readings taken with the supply powered, at the points named in `READING_POINTS`. */
export type LiveReadingKind = 'mainsAc' | 'acSecondary' | 'dcOut' | 'rippleAc' | 'rippleHz' | 'regulatorOut';
/** Readings taken with the supply off and discharged. */
export type PowerOffReadingKind = 'diodeForward' | 'diodeReverse' | 'capacitance' | 'esr';
export type ReadingKind = LiveReadingKind | PowerOffReadingKind;

export const LIVE_READING_KINDS: readonly LiveReadingKind[] = [
  'mainsAc',
  'acSecondary',
  'dcOut',
  'rippleAc',
  'rippleHz',
  'regulatorOut',
];
export const POWER_OFF_READING_KINDS: readonly PowerOffReadingKind[] = ['diodeForward', 'diodeReverse', 'capacitance', 'esr'];

/** The SI unit each reading kind is given and stored in. */
export const READING_UNITS: Readonly<Record<ReadingKind, 'V' | 'Hz' | 'F' | 'Ω'>> = {
  mainsAc: 'V',
  acSecondary: 'V',
  dcOut: 'V',
  rippleAc: 'V',
  rippleHz: 'Hz',
  regulatorOut: 'V',
  diodeForward: 'V',
  diodeReverse: 'V',
  capacitance: 'F',
  esr: 'Ω',
};

/** Readings taken in the meter's AC mode (its AC accuracy applies). */
export const AC_READING_KINDS: ReadonlySet<ReadingKind> = new Set<ReadingKind>(['mainsAc', 'acSecondary', 'rippleAc']);

/** A meter value: a number in SI units, or the meter's overload "OL". */
export type MeterValue = number | 'OL';

/**
 * What the technician entered. Values may be numbers (SI units) or text as typed ("4,25",
 * "425mV", "1.2k", "OL"); text is parsed with `parseMeterText` and a value that cannot be read
 * is reported, not guessed.
 */
export interface ReadingsInput {
  mainsAc?: number | string;
  acSecondary?: number | string;
  dcOut?: number | string;
  rippleAc?: number | string;
  rippleHz?: number | string;
  regulatorOut?: number | string;
  /** Diode test per diode, power off: forward (red on anode) and reverse, volts or "OL". */
  diodeTest?: Partial<Record<DiodeLabel, { forward?: number | string; reverse?: number | string }>>;
  /** Capacitance of the filter capacitor (C1 for a doubler; `capacitance2` for C2), farads. */
  capacitance?: number | string;
  capacitance2?: number | string;
  /** ESR of the filter capacitor, ohms. */
  esr?: number | string;
  esr2?: number | string;
}

export type MeterKind = 'true-rms-ac' | 'average-responding' | 'true-rms-ac-dc';

/** ±(percent of reading + counts of the last digit). */
export interface MeterAccuracy {
  percent: number;
  counts: number;
}

export interface MeterSettings {
  /** How the AC mode responds (DOMAIN.md §5). Default "true-rms-ac" (AC-coupled true RMS). */
  kind?: MeterKind;
  dc?: MeterAccuracy;
  ac?: MeterAccuracy;
  /** Display counts (e.g. 6000 for a "6000-count" meter); sets range and resolution. */
  displayCounts?: number;
  /** AC bandwidth, hertz. */
  acBandwidthHz?: [number, number];
  /** Diode-test open-circuit voltage, volts (above it the meter shows OL). */
  diodeTestVolts?: number;
  /** Diode-test current, amps. */
  diodeTestAmps?: number;
}

/** Where the mains comes from: sets nominal voltage, frequency and the tolerance band. */
export type MainsRegion = 'ansi-120-a' | 'ansi-120-b' | 'en-230' | 'jp-100-50' | 'jp-100-60' | 'custom';

export interface ToleranceSettings {
  /** Mains band; default from the spec's frequency ("en-230" at 50 Hz, "ansi-120-a" at 60 Hz). */
  region?: MainsRegion;
  /** For region "custom": nominal mains volts RMS and ± fraction of nominal, e.g. 0.1. */
  mainsVolts?: number;
  lineFraction?: number;
  /** Capacitor tolerance, ± fraction (IEC 60062 letter M: 0.2). */
  capacitorFraction?: number;
  /** Extra capacitance loss allowed for ageing, fraction (0.1 = up to 10 % below the low limit). */
  capacitorAgeingFraction?: number;
  /** Load range, ± fraction of the nominal load. */
  loadFraction?: number;
  /** Transformer winding resistance spread, ± fraction. */
  windingFraction?: number;
  /** Monte Carlo samples for the bands. */
  samples?: number;
  /** Seed for the band sampling (results are reproducible for a seed). */
  seed?: number;
}

export interface DiagnoseInput {
  spec: SupplySpecInput;
  readings: ReadingsInput;
  meter?: MeterSettings;
  tolerances?: ToleranceSettings;
}

export type Verdict = 'in' | 'low' | 'high';

/** An expected band for one reading: what a healthy unit shows on this meter (about 95 %). */
export interface ReadingBand {
  kind: ReadingKind;
  /** Diode label or capacitor ("C1", "C2") for per-part readings. */
  target?: string;
  unit: 'V' | 'Hz' | 'F' | 'Ω';
  nominal: MeterValue;
  low: number;
  high: number;
  /** For diode-test reverse: the meter shows OL on a good part. */
  expectOverload?: boolean;
}

export interface ReadingVerdict {
  kind: ReadingKind;
  target?: string;
  value: MeterValue;
  band: ReadingBand;
  verdict: Verdict;
}

export type FaultId =
  | 'healthy'
  | 'no-ac'
  | 'line-low'
  | 'line-high'
  | 'diode-open'
  | 'diode-short'
  | 'capacitor-low'
  | 'capacitor-open'
  | 'capacitor-esr'
  | 'overload'
  | 'regulator-dropout'
  | 'regulator-failed';

export interface RankedFault {
  fault: FaultId;
  /** Posterior probability given the readings (the entries add up to 1). */
  probability: number;
  /** Plain words: why the readings point here. */
  why: string;
  /** The part most likely at fault (e.g. "D3", "C1", "fuse or winding"). */
  part?: string;
}

/** Where to put the probes, by schematic point (see `READING_POINTS`). */
export interface ProbePlacement {
  red: string;
  black: string;
}

export interface NextReading {
  kind: ReadingKind;
  target?: string;
  /** Field words: what to measure and how. */
  instruction: string;
  /** Meter mode to select, e.g. "V DC", "V AC", "Hz", "diode test", "capacitance", "ESR". */
  meterMode: string;
  probes: ProbePlacement;
  /** Power off, discharged and verified before this reading. */
  powerOff: boolean;
  /** The caution to show first, when there is one. */
  caution?: string;
  /** Expected information gain in bits over the leading candidates. */
  gainBits: number;
}

export interface Diagnosis {
  ranked: RankedFault[];
  /** True when no fault explains the readings well: shown as "readings fit nothing known". */
  unexplained: boolean;
  bands: ReadingBand[];
  verdicts: ReadingVerdict[];
  next: NextReading | null;
  /** Readings that could not be understood, with the reason. */
  problems: { field: string; message: string }[];
}
