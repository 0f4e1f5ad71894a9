/**
 * Reading a supply description: checks the loose JSON form (`SupplySpecInput`) field by field and
 * returns the normalised `SupplySpec` the solver works on. Also the diode presets and the small
 * diode helpers the estimates, the tests and the UI share.
 *
 * Input is untrusted parsed JSON (a CLI file, a worker message, an imported job): anything at all
 * may arrive. Every problem becomes a `SpecError` that names the field and says what is wrong in
 * plain words; nothing else is ever thrown.
 */

import type {
  CapacitorModel,
  DiodeCondition,
  DiodeLabel,
  DiodeModel,
  DiodePresetName,
  LoadModel,
  RegulatorModel,
  SupplySpec,
  Topology,
} from './types';
import { TOPOLOGIES } from './types';

// ---------------------------------------------------------------------------------------------
// Errors
// ---------------------------------------------------------------------------------------------

/**
 * A supply description that cannot be used. `field` is the path of the offending value
 * ("capacitor.farads", "capacitor[1].esr", "diodeCondition.D3"; "" for the whole input);
 * `problem` is the plain-words reason; `message` is "field: problem".
 */
export class SpecError extends Error {
  readonly field: string;
  readonly problem: string;

  constructor(field: string, problem: string) {
    super(`${field === '' ? 'supply' : field}: ${problem}`);
    this.name = 'SpecError';
    this.field = field;
    this.problem = problem;
  }
}

// ---------------------------------------------------------------------------------------------
// Physical constants and diode helpers
// ---------------------------------------------------------------------------------------------

/** Boltzmann constant, J/K: exact in the 2019 SI (CODATA 2018). */
export const BOLTZMANN_JOULES_PER_KELVIN = 1.380649e-23;
/** Elementary charge, C: exact in the 2019 SI (CODATA 2018). */
export const ELEMENTARY_CHARGE_COULOMBS = 1.602176634e-19;
/** 0 °C in kelvin (SI definition of the Celsius scale). */
export const ZERO_CELSIUS_KELVIN = 273.15;

/**
 * Thermal voltage k·T/q in volts at a junction temperature in °C.
 *
 * Note: at 25 °C this is 25.69 mV. The 25.85 mV often quoted as "room temperature" (DOMAIN.md §2)
 * is the 300 K (26.85 °C) value; ngspice's default circuit temperature is 27 °C (ngspice manual,
 * TEMP/TNOM default), which gives 25.86 mV.
 *
 * @throws RangeError when the temperature is not a finite number above absolute zero.
 */
export function thermalVoltage(temperatureC: number): number {
  const kelvin = temperatureC + ZERO_CELSIUS_KELVIN;
  if (!Number.isFinite(kelvin) || kelvin <= 0) {
    throw new RangeError(`temperature must be a finite number above −273.15 °C (got ${temperatureC})`);
  }
  return (BOLTZMANN_JOULES_PER_KELVIN * kelvin) / ELEMENTARY_CHARGE_COULOMBS;
}

/**
 * Forward voltage in volts of a diode model carrying a forward current `amps` (≥ 0) at a junction
 * temperature in °C (default 25).
 *
 * Shockley: n·Vt·ln(1 + I/Is) + I·Rs, the inverse of I = Is·(exp(V/(n·Vt)) − 1) plus the series
 * drop (DOMAIN.md §2); 0 V at 0 A. Only Vt follows the temperature: the saturation current's own
 * (much stronger) temperature dependence is not modelled, so this does not show the real
 * junction's fall of about 2 mV/°C (from memory).
 * Piecewise-linear: forwardVolts + I·ohms; at 0 A it returns forwardVolts, the conduction
 * threshold.
 *
 * @throws RangeError when `amps` is negative or NaN, or the temperature is invalid.
 */
export function diodeForwardVolts(model: DiodeModel, amps: number, temperatureC = 25): number {
  if (!(amps >= 0)) {
    throw new RangeError(`forward current must be 0 A or more (got ${amps})`);
  }
  // 0·∞ would be NaN: an ohmless model drops nothing however large the current.
  const ohmicVolts = model.ohms === 0 ? 0 : amps * model.ohms;
  if (model.kind === 'pwl') {
    return model.forwardVolts + ohmicVolts;
  }
  const junctionVolts =
    model.emission * thermalVoltage(temperatureC) * Math.log1p(amps / model.saturationAmps);
  return junctionVolts + ohmicVolts;
}

/**
 * Diode labels of a topology in label order (see the topology notes in types.ts):
 * half-wave [D1], center-tap [D1, D2], bridge [D1, D2, D3, D4], doubler [D1, D2].
 * Returns a fresh array.
 */
export function diodeLabels(topology: Topology): DiodeLabel[] {
  switch (topology) {
    case 'half-wave':
      return ['D1'];
    case 'center-tap':
    case 'doubler':
      return ['D1', 'D2'];
    case 'bridge':
      return ['D1', 'D2', 'D3', 'D4'];
  }
}

/**
 * Diode models behind `diode.preset`. Frozen; `parseSupplySpec` hands out copies.
 * Each preset's forward voltages are checked against DOMAIN.md §3 in test/engine/spec.test.ts.
 */
export const DIODE_PRESETS: Record<DiodePresetName, DiodeModel> = Object.freeze({
  // 1N4001, the commonly published SPICE model IS=14.11n N=1.984 RS=33.89m (public model files,
  // DOMAIN.md §3): about 0.57/0.81/0.96 V at 1 mA/100 mA/1 A.
  silicon: Object.freeze({ kind: 'shockley', saturationAmps: 14.11e-9, emission: 1.984, ohms: 33.89e-3 }),
  // A 1 A schottky rectifier. Parameters fitted here to DOMAIN.md §3's windows: about 0.50 V at
  // 1 A (datasheets: 0.45–0.6 V max at 1 A) and 0.22 V at 1 mA (from memory: 0.15–0.3 V at small
  // current). The widely circulated 1N5817–1N5819 card (IS=31.7µ N=1.373 RS=0.051) gives only
  // 0.42 V at 1 A, under that window, so it was not used.
  schottky: Object.freeze({ kind: 'shockley', saturationAmps: 1.5e-6, emission: 1.3, ohms: 0.05 }),
  // Germanium: the junction of the widely published 1N34A card (IS=200n N=1.3; from memory) gives
  // about 0.29 V at 1 mA (DOMAIN.md §3: "about 0.3 V", weak source). That card's RS=7 Ω belongs to
  // a point-contact signal diode; a rectifier-sized 0.1 Ω is assumed here (from memory).
  germanium: Object.freeze({ kind: 'shockley', saturationAmps: 200e-9, emission: 1.3, ohms: 0.1 }),
  // Ideal switch: no drop, no resistance; gives the textbook closed forms (DOMAIN.md §2).
  ideal: Object.freeze({ kind: 'pwl', forwardVolts: 0, ohms: 0 }),
});

const DIODE_PRESET_NAMES: readonly DiodePresetName[] = ['silicon', 'schottky', 'germanium', 'ideal'];
const DIODE_CONDITIONS: readonly DiodeCondition[] = ['ok', 'open', 'short'];
const ALL_DIODE_LABELS: readonly DiodeLabel[] = ['D1', 'D2', 'D3', 'D4'];

// ---------------------------------------------------------------------------------------------
// Defaults (documented in types.ts unless noted)
// ---------------------------------------------------------------------------------------------

const DEFAULT_DIODE_PRESET: DiodePresetName = 'silicon'; // the common case in mains supplies
const DEFAULT_TEMPERATURE_C = 25;
/** 78xx-type regulators drop about 2 V at 1 A (datasheets, DOMAIN.md §6). */
const DEFAULT_DROPOUT_VOLTS = 2;
/** 78xx quiescent current, about 5 mA typical (from memory). */
const DEFAULT_QUIESCENT_AMPS = 0.005;
/** Dynamic resistance of a small zener, about 5 Ω (from memory). */
const DEFAULT_ZENER_OHMS = 5;

// ---------------------------------------------------------------------------------------------
// Parsing
// ---------------------------------------------------------------------------------------------

type JsonObject = Record<string, unknown>;

const TOP_LEVEL_KEYS = [
  'topology',
  'source',
  'diode',
  'capacitor',
  'load',
  'regulator',
  'diodeCondition',
  'temperatureC',
] as const;

/**
 * Checks a supply description and returns its normalised form.
 *
 * Takes parsed JSON of the `SupplySpecInput` shape (units: volts, hertz, ohms, farads, amps, °C;
 * numbers may also be given as plain decimal strings such as "12" or "2.2e-3"). Returns a fresh
 * `SupplySpec`: presets resolved to models, defaults filled in (source.ohms 0, diode "silicon",
 * capacitor esr 0, regulator dropout 2 V and quiescent 5 mA, zenerOhms 5 Ω, temperature 25 °C),
 * one capacitor per single-capacitor topology and two [C1, C2] for the doubler (one object given
 * applies to both), one diode condition per diode label ("ok" where not given).
 *
 * Unknown keys are refused at every level, so that a typo never silently means "left out"
 * ("capacitance" is not an unfiltered supply). `null` counts as "not given" for optional fields.
 *
 * @throws SpecError for anything that is not a usable supply description; never anything else.
 */
export function parseSupplySpec(input: unknown): SupplySpec {
  if (!isObject(input)) {
    throw new SpecError(
      '',
      `must be a JSON object with "topology", "source" and "load" (got ${describeValue(input)})`,
    );
  }
  rejectUnknownKeys(input, '', TOP_LEVEL_KEYS);

  const topology = parseTopology(own(input, 'topology'));
  const source = parseSource(own(input, 'source'));
  const diode = parseDiode(own(input, 'diode'));
  const capacitors = parseCapacitors(own(input, 'capacitor'), topology);
  const load = parseLoad(own(input, 'load'));
  const regulator = parseRegulator(own(input, 'regulator'));
  const diodeCondition = parseDiodeConditions(own(input, 'diodeCondition'), topology);
  const temperatureC = optionalNumber(input, 'temperatureC', '', DEFAULT_TEMPERATURE_C, TEMPERATURE_RULE);

  return { topology, source, diode, capacitors, load, regulator, diodeCondition, temperatureC };
}

function parseTopology(value: unknown): Topology {
  const expected = `one of ${TOPOLOGIES.join(', ')}`;
  if (value === undefined || value === null) {
    throw new SpecError('topology', `missing; give ${expected}`);
  }
  if (typeof value !== 'string') {
    throw new SpecError('topology', `must be ${expected} (got ${describeValue(value)})`);
  }
  const found = TOPOLOGIES.find((t) => t === value);
  if (found === undefined) {
    const hint = suggestion(value, TOPOLOGIES);
    throw new SpecError(
      'topology',
      `unknown topology ${quote(value)}; expected ${expected}${hint === null ? '' : ` (did you mean "${hint}"?)`}`,
    );
  }
  return found;
}

function parseSource(value: unknown): SupplySpec['source'] {
  if (value === undefined || value === null) {
    throw new SpecError('source', 'missing; give {"vrms": V, "hz": F} (secondary RMS volts, line frequency)');
  }
  if (!isObject(value)) {
    throw new SpecError('source', `must be an object like {"vrms": 12, "hz": 50} (got ${describeValue(value)})`);
  }
  rejectUnknownKeys(value, 'source', ['vrms', 'hz', 'ohms']);
  return {
    vrms: requiredNumber(value, 'vrms', 'source', "the secondary's open-circuit RMS voltage in volts", VRMS_RULE),
    hz: requiredNumber(value, 'hz', 'source', 'the line frequency in hertz (50 or 60)', HZ_RULE),
    ohms: optionalNumber(value, 'ohms', 'source', 0, WINDING_OHMS_RULE),
  };
}

const DIODE_FORM_HINT = '{"preset": "silicon"}, {"is": Is, "n": N, "ohms": R} or {"vf": V, "ohms": R}';

function parseDiode(value: unknown): DiodeModel {
  if (value === undefined || value === null) {
    return { ...DIODE_PRESETS[DEFAULT_DIODE_PRESET] };
  }
  if (!isObject(value)) {
    throw new SpecError('diode', `must be ${DIODE_FORM_HINT} (got ${describeValue(value)})`);
  }
  rejectUnknownKeys(value, 'diode', ['preset', 'is', 'n', 'vf', 'ohms']);
  const has = (key: string): boolean => own(value, key) !== undefined;

  if (has('preset')) {
    rejectCompanions(value, 'diode', 'preset', ['is', 'n', 'vf', 'ohms']);
    const preset = own(value, 'preset');
    const found = DIODE_PRESET_NAMES.find((p) => p === preset);
    if (found === undefined) {
      const hint = typeof preset === 'string' ? suggestion(preset, DIODE_PRESET_NAMES) : null;
      throw new SpecError(
        'diode.preset',
        `unknown preset ${describeValue(preset)}; expected one of ${DIODE_PRESET_NAMES.join(', ')}` +
          (hint === null ? '' : ` (did you mean "${hint}"?)`),
      );
    }
    return { ...DIODE_PRESETS[found] };
  }
  if (has('is') || has('n')) {
    rejectCompanions(value, 'diode', has('is') ? 'is' : 'n', ['vf']);
    return {
      kind: 'shockley',
      saturationAmps: requiredNumber(value, 'is', 'diode', 'the saturation current in amps', SATURATION_RULE),
      emission: requiredNumber(value, 'n', 'diode', 'the emission coefficient (1 to 2 for most diodes)', EMISSION_RULE),
      ohms: optionalNumber(value, 'ohms', 'diode', 0, DIODE_OHMS_RULE),
    };
  }
  if (has('vf')) {
    return {
      kind: 'pwl',
      forwardVolts: requiredNumber(value, 'vf', 'diode', 'the forward drop in volts', VF_RULE),
      ohms: optionalNumber(value, 'ohms', 'diode', 0, DIODE_OHMS_RULE),
    };
  }
  throw new SpecError('diode', `give ${DIODE_FORM_HINT}`);
}

function parseCapacitors(value: unknown, topology: Topology): CapacitorModel[] {
  if (value === undefined || value === null) {
    if (topology === 'doubler') {
      throw new SpecError(
        'capacitor',
        'a doubler needs its capacitors; give {"farads": C} for both or a list [C1, C2]',
      );
    }
    return [];
  }
  if (Array.isArray(value)) {
    if (topology !== 'doubler') {
      throw new SpecError(
        'capacitor',
        `a list of capacitors is only for the doubler; a ${topology} supply takes one {"farads": C}`,
      );
    }
    if (value.length !== 2) {
      throw new SpecError(
        'capacitor',
        `a doubler takes a list of exactly two capacitors [C1, C2] (got ${value.length})`,
      );
    }
    return [parseCapacitor(value[0], 'capacitor[0]'), parseCapacitor(value[1], 'capacitor[1]')];
  }
  const capacitor = parseCapacitor(value, 'capacitor');
  return topology === 'doubler' ? [capacitor, { ...capacitor }] : [capacitor];
}

function parseCapacitor(value: unknown, path: string): CapacitorModel {
  if (!isObject(value)) {
    throw new SpecError(path, `must be an object like {"farads": 0.0022, "esr": 0.05} (got ${describeValue(value)})`);
  }
  rejectUnknownKeys(value, path, ['farads', 'esr']);
  return {
    farads: requiredNumber(value, 'farads', path, 'the capacitance in farads (2200 µF = 0.0022)', FARADS_RULE),
    esrOhms: optionalNumber(value, 'esr', path, 0, ESR_RULE),
  };
}

function parseLoad(value: unknown): LoadModel {
  const forms = '{"ohms": R} or {"amps": I}';
  if (value === undefined || value === null) {
    throw new SpecError('load', `missing; give ${forms}`);
  }
  if (!isObject(value)) {
    throw new SpecError('load', `must be ${forms} (got ${describeValue(value)})`);
  }
  rejectUnknownKeys(value, 'load', ['ohms', 'amps']);
  const hasOhms = own(value, 'ohms') !== undefined;
  const hasAmps = own(value, 'amps') !== undefined;
  if (hasOhms && hasAmps) {
    throw new SpecError('load', 'give either "ohms" or "amps", not both');
  }
  if (hasOhms) {
    const ohms = requiredNumber(value, 'ohms', 'load', 'the load resistance in ohms', LOAD_OHMS_RULE);
    return { kind: 'resistive', ohms };
  }
  if (hasAmps) {
    const amps = requiredNumber(value, 'amps', 'load', 'the load current in amps', LOAD_AMPS_RULE);
    return { kind: 'current', amps };
  }
  throw new SpecError('load', `give ${forms}`);
}

const LINEAR_KEYS = ['volts', 'dropout', 'quiescentAmps'] as const;
const ZENER_KEYS = ['zenerVolts', 'seriesOhms', 'zenerOhms'] as const;

function parseRegulator(value: unknown): RegulatorModel | null {
  const forms = '{"volts": V} for a linear regulator or {"zenerVolts": Vz, "seriesOhms": R} for a zener shunt';
  if (value === undefined || value === null) {
    return null;
  }
  if (!isObject(value)) {
    throw new SpecError('regulator', `must be ${forms} (got ${describeValue(value)})`);
  }
  rejectUnknownKeys(value, 'regulator', [...LINEAR_KEYS, ...ZENER_KEYS]);
  const linear = LINEAR_KEYS.some((k) => own(value, k) !== undefined);
  const zener = ZENER_KEYS.some((k) => own(value, k) !== undefined);
  if (linear && zener) {
    throw new SpecError('regulator', `give ${forms}, not a mix of both`);
  }
  if (linear) {
    return {
      kind: 'linear',
      volts: requiredNumber(value, 'volts', 'regulator', 'the regulated output voltage in volts', REGULATOR_VOLTS_RULE),
      dropoutVolts: optionalNumber(value, 'dropout', 'regulator', DEFAULT_DROPOUT_VOLTS, DROPOUT_RULE),
      quiescentAmps: optionalNumber(value, 'quiescentAmps', 'regulator', DEFAULT_QUIESCENT_AMPS, QUIESCENT_RULE),
    };
  }
  if (zener) {
    return {
      kind: 'zener',
      zenerVolts: requiredNumber(value, 'zenerVolts', 'regulator', 'the zener voltage in volts', ZENER_VOLTS_RULE),
      seriesOhms: requiredNumber(value, 'seriesOhms', 'regulator', 'the series resistor in ohms', SERIES_OHMS_RULE),
      zenerOhms: optionalNumber(value, 'zenerOhms', 'regulator', DEFAULT_ZENER_OHMS, ZENER_OHMS_RULE),
    };
  }
  throw new SpecError('regulator', `give ${forms}`);
}

function parseDiodeConditions(value: unknown, topology: Topology): DiodeCondition[] {
  const labels = diodeLabels(topology);
  if (value === undefined || value === null) {
    return labels.map(() => 'ok');
  }
  if (!isObject(value)) {
    throw new SpecError('diodeCondition', `must be an object like {"D1": "open"} (got ${describeValue(value)})`);
  }
  for (const key of Object.keys(value)) {
    if (!labels.some((label) => label === key)) {
      const field = joinPath('diodeCondition', key);
      const known = ALL_DIODE_LABELS.some((label) => label === key);
      throw new SpecError(
        field,
        known
          ? `a ${topology} supply has no ${key}; its diodes are ${labels.join(', ')}`
          : `unknown diode ${quote(key)}; a ${topology} supply's diodes are ${labels.join(', ')}`,
      );
    }
  }
  return labels.map((label) => {
    const condition = own(value, label);
    if (condition === undefined) {
      return 'ok';
    }
    const found = DIODE_CONDITIONS.find((c) => c === condition);
    if (found === undefined) {
      throw new SpecError(
        `diodeCondition.${label}`,
        `unknown condition ${describeValue(condition)}; expected ok, open or short`,
      );
    }
    return found;
  });
}

// ---------------------------------------------------------------------------------------------
// Numbers and their limits
// ---------------------------------------------------------------------------------------------

/** A failed check: `fails(v)` true means refuse with `problem` (the value is appended). */
interface NumberCheck {
  fails: (value: number) => boolean;
  problem: string;
}

interface NumberRule {
  /** Unit word used in messages: "volts", "farads". */
  unit: string;
  checks: readonly NumberCheck[];
}

const positive = (unit: string): NumberCheck => ({
  fails: (v) => !(v > 0),
  problem: `must be a positive number of ${unit}`,
});
const nonNegative = (unit: string): NumberCheck => ({ fails: (v) => v < 0, problem: `must be 0 ${unit} or more` });
const atMost = (limit: number, problem: string): NumberCheck => ({ fails: (v) => v > limit, problem });
const atLeast = (limit: number, problem: string): NumberCheck => ({ fails: (v) => v < limit, problem });

// The upper and lower limits below are sanity bounds: far outside anything this tool is for
// (line-frequency supplies for appliances and controls), so a value past one is a typo or a unit
// mix-up (µF typed as F, kHz as Hz). Our own limits, not from a standard.
const VRMS_RULE: NumberRule = {
  unit: 'volts',
  checks: [
    // 0 V is allowed: "what should I read with no AC?" is a real question (the no-AC fault).
    { fails: (v) => !(v >= 0), problem: 'must be 0 V or more' },
    atMost(100e3, 'is above 100 kV, far beyond the supplies this tool covers'),
  ],
};
const HZ_RULE: NumberRule = {
  unit: 'hertz',
  checks: [
    { fails: (v) => !(v > 0), problem: 'frequency must be above 0' },
    atLeast(1, 'is below 1 Hz, not a line or generator frequency'),
    atMost(10e3, 'is above 10 kHz, not a line-frequency supply'),
  ],
};
const WINDING_OHMS_RULE: NumberRule = {
  unit: 'ohms',
  checks: [nonNegative('Ω'), atMost(1e6, 'is above 1 MΩ, not a winding resistance')],
};
const SATURATION_RULE: NumberRule = {
  unit: 'amps',
  checks: [positive('amps'), atMost(1, 'is above 1 A, not a diode saturation current (nA to µA is usual)')],
};
const EMISSION_RULE: NumberRule = {
  unit: 'the emission coefficient',
  checks: [
    atLeast(0.5, 'is below 0.5, not a physical emission coefficient (1 to 2 is usual)'),
    atMost(100, 'is above 100, not a physical emission coefficient (1 to 2 is usual)'),
  ],
};
const DIODE_OHMS_RULE: NumberRule = {
  unit: 'ohms',
  checks: [nonNegative('Ω'), atMost(10e3, 'is above 10 kΩ, not a rectifier series resistance')],
};
const VF_RULE: NumberRule = {
  unit: 'volts',
  checks: [nonNegative('V'), atMost(100, 'is above 100 V, not one diode drop')],
};
const FARADS_RULE: NumberRule = {
  unit: 'farads',
  checks: [
    positive('farads'),
    atLeast(1e-12, 'is below 1 pF, too small for a filter capacitor; leave "capacitor" out for an unfiltered supply'),
    atMost(10, 'is above 10 F, beyond any filter capacitor (2200 µF is 0.0022)'),
  ],
};
const ESR_RULE: NumberRule = {
  unit: 'ohms',
  checks: [nonNegative('Ω'), atMost(10e3, 'is above 10 kΩ, not a capacitor ESR')],
};
const LOAD_OHMS_RULE: NumberRule = {
  unit: 'ohms',
  checks: [
    { fails: (v) => !(v > 0), problem: 'must be above 0 Ω (for a shorted load give a small resistance)' },
    atLeast(1e-6, 'is below 1 µΩ; for a shorted load give a small resistance such as 0.1'),
    atMost(1e12, 'is above 1 TΩ; for no load give {"amps": 0}'),
  ],
};
const LOAD_AMPS_RULE: NumberRule = {
  unit: 'amps',
  checks: [nonNegative('A'), atMost(1e3, 'is above 1 kA, far beyond the supplies this tool covers')],
};
const REGULATOR_VOLTS_RULE: NumberRule = {
  unit: 'volts',
  checks: [positive('volts'), atMost(1e3, 'is above 1 kV, not a regulator output')],
};
const DROPOUT_RULE: NumberRule = {
  unit: 'volts',
  checks: [nonNegative('V'), atMost(100, 'is above 100 V, not a regulator dropout')],
};
const QUIESCENT_RULE: NumberRule = {
  unit: 'amps',
  checks: [nonNegative('A'), atMost(1, 'is above 1 A, not a regulator quiescent current')],
};
const ZENER_VOLTS_RULE: NumberRule = {
  unit: 'volts',
  checks: [
    { fails: (v) => !(v > 0), problem: 'must be above 0 V (a zener shunt clamps at a positive voltage)' },
    atMost(1e3, 'is above 1 kV, not a zener voltage'),
  ],
};
const SERIES_OHMS_RULE: NumberRule = {
  unit: 'ohms',
  checks: [
    { fails: (v) => !(v > 0), problem: 'must be above 0 Ω (the series resistor limits the zener current)' },
    atMost(1e9, 'is above 1 GΩ, not a zener feed resistor'),
  ],
};
const ZENER_OHMS_RULE: NumberRule = {
  unit: 'ohms',
  checks: [nonNegative('Ω'), atMost(1e6, 'is above 1 MΩ, not a zener dynamic resistance')],
};
const TEMPERATURE_RULE: NumberRule = {
  unit: 'degrees Celsius',
  // Rectifier junctions are rated about −55…175 °C on datasheets (common practice); the bounds
  // leave room around that.
  checks: [
    atLeast(-60, 'is below −60 °C, outside any rectifier junction rating'),
    atMost(200, 'is above 200 °C, outside any rectifier junction rating'),
  ],
};

/** Plain decimal number text: "12", "-0.5", "2.2e-3". No units, no decimal comma. */
const NUMBER_TEXT = /^[+-]?(\d+\.?\d*|\.\d+)([eE][+-]?\d+)?$/;

function toNumber(value: unknown, field: string, rule: NumberRule): number {
  let n: number;
  if (typeof value === 'number') {
    n = value;
  } else if (typeof value === 'string' && NUMBER_TEXT.test(value.trim())) {
    n = Number(value.trim());
  } else {
    const unitHint =
      typeof value === 'string' && /^\s*[+-]?[\d.]/.test(value) ? `; write the number alone, in ${rule.unit}` : '';
    throw new SpecError(field, `must be a number of ${rule.unit} (got ${describeValue(value)})${unitHint}`);
  }
  if (!Number.isFinite(n)) {
    throw new SpecError(field, `must be a finite number of ${rule.unit} (got ${describeValue(value)})`);
  }
  for (const check of rule.checks) {
    if (check.fails(n)) {
      throw new SpecError(field, `${check.problem} (got ${describeValue(value)})`);
    }
  }
  return n === 0 ? 0 : n; // folds −0 into 0
}

function requiredNumber(obj: JsonObject, key: string, path: string, what: string, rule: NumberRule): number {
  const field = joinPath(path, key);
  const value = own(obj, key);
  if (value === undefined || value === null) {
    throw new SpecError(field, `missing; give ${what}`);
  }
  return toNumber(value, field, rule);
}

function optionalNumber(obj: JsonObject, key: string, path: string, fallback: number, rule: NumberRule): number {
  const value = own(obj, key);
  if (value === undefined || value === null) {
    return fallback;
  }
  return toNumber(value, joinPath(path, key), rule);
}

// ---------------------------------------------------------------------------------------------
// Small helpers
// ---------------------------------------------------------------------------------------------

function isObject(value: unknown): value is JsonObject {
  return typeof value === 'object' && value !== null && !Array.isArray(value);
}

/** Own property only: inherited names ("toString", "__proto__" accessors) never count as given. */
function own(obj: JsonObject, key: string): unknown {
  return Object.prototype.hasOwnProperty.call(obj, key) ? obj[key] : undefined;
}

function joinPath(path: string, key: string): string {
  return path === '' ? key : `${path}.${key}`;
}

function rejectUnknownKeys(obj: JsonObject, path: string, allowed: readonly string[]): void {
  for (const key of Object.keys(obj)) {
    if (!allowed.includes(key)) {
      const hint = suggestion(key, allowed);
      throw new SpecError(
        joinPath(path, truncate(key)),
        `unknown setting${hint === null ? '' : `; did you mean "${hint}"?`} (known here: ${allowed.join(', ')})`,
      );
    }
  }
}

/** Refuses keys of another diode form given beside `chosen`. */
function rejectCompanions(obj: JsonObject, path: string, chosen: string, others: readonly string[]): void {
  for (const key of others) {
    if (own(obj, key) !== undefined) {
      throw new SpecError(joinPath(path, key), `cannot be combined with "${chosen}"; give ${DIODE_FORM_HINT}`);
    }
  }
}

/** The closest allowed word when it is close enough to be a likely typo, else null. */
function suggestion(word: string, allowed: readonly string[]): string | null {
  const w = word.toLowerCase();
  if (w.length > 64) {
    return null;
  }
  let best: string | null = null;
  let bestDistance = Infinity;
  for (const candidate of allowed) {
    const d = editDistance(w, candidate.toLowerCase());
    const limit = Math.max(1, Math.floor(Math.max(w.length, candidate.length) * 0.4));
    if (d <= limit && d < bestDistance) {
      best = candidate;
      bestDistance = d;
    }
  }
  return best;
}

/** Levenshtein distance (insert, delete, substitute). */
function editDistance(a: string, b: string): number {
  let previous = Array.from({ length: b.length + 1 }, (_, j) => j);
  for (let i = 1; i <= a.length; i++) {
    const current = [i];
    for (let j = 1; j <= b.length; j++) {
      const substitute = (previous[j - 1] ?? 0) + (a[i - 1] === b[j - 1] ? 0 : 1);
      current.push(Math.min((previous[j] ?? 0) + 1, (current[j - 1] ?? 0) + 1, substitute));
    }
    previous = current;
  }
  return previous[b.length] ?? 0;
}

function truncate(text: string): string {
  return text.length > 40 ? `${text.slice(0, 39)}…` : text;
}

function quote(text: string): string {
  return JSON.stringify(truncate(text));
}

/** A short plain-words picture of any value, for "(got …)". */
function describeValue(value: unknown): string {
  if (value === undefined) return 'nothing';
  if (value === null) return 'null';
  if (typeof value === 'number' || typeof value === 'boolean' || typeof value === 'bigint') return String(value);
  if (typeof value === 'string') return quote(value);
  if (Array.isArray(value)) return 'a list';
  if (typeof value === 'object') return 'an object';
  return `a ${typeof value}`;
}
