import type { DiodePresetName, SupplySpecInput, Topology } from '../engine/types';

/** What the page's form holds: text exactly as typed, so a half-typed "4," is not lost. */
export interface SupplyFormValues {
  topology: Topology;
  vrms: string;
  hz: string;
  windingOhms: string;
  diodePreset: DiodePresetName;
  /** Blank means no capacitor (unfiltered). */
  capacitorMicrofarads: string;
  esrOhms: string;
  loadKind: 'ohms' | 'amps';
  loadValue: string;
  regulatorKind: 'none' | 'linear' | 'zener';
  regulatorVolts: string;
  dropoutVolts: string;
  zenerVolts: string;
  seriesOhms: string;
}

export type SupplyFieldName = Exclude<keyof SupplyFormValues, 'loadKind' | 'regulatorKind'>;

/** An invented bench supply: 12 V 50 Hz transformer into a bridge, 2200 µF, about 0.5 A. */
export const DEFAULT_FORM: SupplyFormValues = {
  topology: 'bridge',
  vrms: '12',
  hz: '50',
  windingOhms: '0.5',
  diodePreset: 'silicon',
  capacitorMicrofarads: '2200',
  esrOhms: '0.05',
  loadKind: 'ohms',
  loadValue: '33',
  regulatorKind: 'none',
  regulatorVolts: '12',
  dropoutVolts: '',
  zenerVolts: '9.1',
  seriesOhms: '100',
};

/** Labels the page shows, also used to name the field an error is about. */
export const FIELD_LABELS: Record<SupplyFieldName, string> = {
  topology: 'Rectifier',
  vrms: 'Secondary voltage (V RMS)',
  hz: 'Line frequency (Hz)',
  windingOhms: 'Winding resistance (Ω)',
  diodePreset: 'Diodes',
  capacitorMicrofarads: 'Filter capacitor (µF)',
  esrOhms: 'Capacitor ESR (Ω)',
  loadValue: 'Load',
  regulatorVolts: 'Regulator output (V)',
  dropoutVolts: 'Regulator dropout (V)',
  zenerVolts: 'Zener voltage (V)',
  seriesOhms: 'Series resistor (Ω)',
};

/** A problem with one form field, in words a user can act on. */
export interface FieldProblem {
  field: SupplyFieldName | null;
  message: string;
}

/**
 * Reads a number as a technician types it: decimal point or decimal comma ("4,25"), spaces
 * around it ignored (DOMAIN.md §9). Returns undefined for blank text and NaN for text that is
 * not a plain decimal number.
 */
export function parseDecimalText(text: string): number | undefined {
  const trimmed = text.trim();
  if (trimmed === '') return undefined;
  const normalised = trimmed.replace(',', '.');
  return /^[+-]?(\d+\.?\d*|\.\d+)(e[+-]?\d+)?$/i.test(normalised) ? Number(normalised) : NaN;
}

// Dividing (not multiplying by 1e-6) gives the double nearest the farads figure: 2200 µF → 0.0022, as if typed in farads.
const MICROFARADS_PER_FARAD = 1e6;

/**
 * Turns the form into the engine's JSON input. Blank optional fields are left out, so the engine's
 * defaults apply; blank required fields are left out too, so parseSupplySpec names what is
 * missing. Returns the input, or a FieldProblem for text that is not a number (range checks are
 * the engine's job, through SpecError).
 */
export function buildSpecInput(values: SupplyFormValues): { input: SupplySpecInput } | { problem: FieldProblem } {
  const numbers: Partial<Record<SupplyFieldName, number>> = {};
  const numericFields: SupplyFieldName[] = [
    'vrms', 'hz', 'windingOhms', 'capacitorMicrofarads', 'esrOhms', 'loadValue',
    'regulatorVolts', 'dropoutVolts', 'zenerVolts', 'seriesOhms',
  ];
  for (const field of numericFields) {
    const value = parseDecimalText(values[field]);
    if (Number.isNaN(value)) {
      return { problem: { field, message: `“${values[field].trim()}” is not a number.` } };
    }
    if (value !== undefined) numbers[field] = value;
  }
  // The engine validates types and ranges; a missing required number arrives as undefined.
  const input = {
    topology: values.topology,
    source: { vrms: numbers.vrms, hz: numbers.hz, ...optional('ohms', numbers.windingOhms) },
    diode: { preset: values.diodePreset },
    ...(numbers.capacitorMicrofarads === undefined
      ? {}
      : { capacitor: { farads: numbers.capacitorMicrofarads / MICROFARADS_PER_FARAD, ...optional('esr', numbers.esrOhms) } }),
    load: values.loadKind === 'ohms' ? { ohms: numbers.loadValue } : { amps: numbers.loadValue },
    ...regulatorInput(values, numbers),
  } as SupplySpecInput; // required numbers may be undefined here on purpose: parseSupplySpec reports them
  return { input };
}

function optional<K extends string>(key: K, value: number | undefined): Partial<Record<K, number>> {
  return value === undefined ? {} : ({ [key]: value } as Record<K, number>);
}

function regulatorInput(
  values: SupplyFormValues,
  numbers: Partial<Record<SupplyFieldName, number>>,
): Pick<SupplySpecInput, 'regulator'> {
  if (values.regulatorKind === 'linear') {
    return { regulator: { volts: numbers.regulatorVolts as number, ...optional('dropout', numbers.dropoutVolts) } };
  }
  if (values.regulatorKind === 'zener') {
    return { regulator: { zenerVolts: numbers.zenerVolts as number, seriesOhms: numbers.seriesOhms as number } };
  }
  return {};
}

// Spec paths (SpecError.field) to the form field that sets them; longest prefix wins.
const SPEC_PATH_FIELDS: ReadonlyArray<[string, SupplyFieldName]> = [
  ['topology', 'topology'],
  ['source.vrms', 'vrms'],
  ['source.hz', 'hz'],
  ['source.ohms', 'windingOhms'],
  ['diode', 'diodePreset'],
  ['capacitor.esr', 'esrOhms'],
  ['capacitor', 'capacitorMicrofarads'],
  ['load', 'loadValue'],
  ['regulator.dropout', 'dropoutVolts'],
  ['regulator.zenerVolts', 'zenerVolts'],
  ['regulator.seriesOhms', 'seriesOhms'],
  ['regulator', 'regulatorVolts'],
];

/**
 * The form field behind a spec path such as "capacitor.farads" or "source.vrms", or null when
 * the path is about no single field (an empty path, or one the form does not set).
 */
export function fieldForSpecPath(path: string, regulatorKind: SupplyFormValues['regulatorKind']): SupplyFieldName | null {
  let best: [string, SupplyFieldName] | undefined;
  for (const entry of SPEC_PATH_FIELDS) {
    const [prefix] = entry;
    const matches = path === prefix || path.startsWith(`${prefix}.`) || path.startsWith(`${prefix}[`);
    if (matches && (best === undefined || prefix.length > best[0].length)) best = entry;
  }
  if (best === undefined) return null;
  // A bare "regulator" path points at the first field of whichever regulator is chosen.
  if (best[1] === 'regulatorVolts' && regulatorKind === 'zener') return 'zenerVolts';
  return best[1];
}
