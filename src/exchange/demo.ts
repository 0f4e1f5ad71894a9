/**
 * Demo data: an invented repair shop's jobs over recent months, for trying the shop review and
 * for the benchmark. Everything here is made up: the shop, its technicians, customers, sites,
 * makes and models. The same options always give the same records (seeded, no clock).
 *
 * Readings come from the engine: each supply is solved as it is (healthy), and faulted versions
 * are solved with the fault put into the spec (a diode marked open, capacitance scaled down,
 * ESR scaled up, the line lowered, the secondary dead, the load raised). Meter noise and the
 * meter's display resolution are then applied, and the typed text is what a technician of that
 * habit would type ("12,41", "412.3mV", "982uF", "OL"). Solves are cached by spec, so a large
 * demo costs a few hundred solves at most.
 *
 * Patterns the review should find: capacitors ageing across visits to one asset (ripple
 * creeping up until the capacitor is replaced), one technician slower than the rest, repeat
 * visits after a first visit that did not fix the fault, and more capacitor faults in summer.
 */
import { expectReadings } from '../engine';
import { expectedBands, judge, prepareDiagnosis } from '../engine/diagnosis';
import type { FaultId, MeterSettings, ReadingBand, ReadingKind } from '../engine/diagnosis/types';
import type { DiodeLabel, SupplyResult, SupplySpecInput } from '../engine/types';
import type { Asset, IsoTime, Job, JobFinish, JobOutcome, Reading, SupplyNameplate, Technician } from '../model/job';
import { emptyPayload, type JobPayload } from './format';
import { sortPayload } from './order';
import { SeededRandom } from './random';
import { buildJobFile } from './write';

export interface DemoOptions {
  /** How many jobs (1 to 1 000 000). */
  jobs: number;
  seed: number;
  /** End of the period (a UTC time); default 2026-11-27T17:00:00.000Z. */
  end?: IsoTime;
  /** Length of the period in months; default 12. */
  months?: number;
  /** The engine; tests and the benchmark may pass a counting or cached one. */
  solve?: (spec: SupplySpecInput) => SupplyResult;
}

export const DEMO_SHOP_NAME = 'Tallow Lane Repairs';
export const DEMO_DEFAULT_END = '2026-11-27T17:00:00.000Z';
export const DEMO_MAX_JOBS = 1_000_000;

const DAY_MS = 86_400_000;
const MINUTE_MS = 60_000;

// ---------------------------------------------------------------------------------------------
// The invented shop
// ---------------------------------------------------------------------------------------------

interface TechnicianProfile {
  name: string;
  /** Time-on-job factor: one technician is much slower than the rest. */
  pace: number;
  decimalComma: boolean;
  /** Types small AC volts as millivolts ("412.3mV"). */
  millivolts: boolean;
  /** Types "u" for µ. */
  asciiMicro: boolean;
  /** Types the unit after volts ("12.41V"). */
  voltUnit: boolean;
  meter: MeterSettings;
}

const TECHNICIANS: readonly TechnicianProfile[] = [
  { name: 'Ada Quill', pace: 1, decimalComma: false, millivolts: true, asciiMicro: false, voltUnit: false, meter: { kind: 'true-rms-ac', displayCounts: 6000 } },
  { name: 'Tomas Brenner', pace: 1.6, decimalComma: true, millivolts: false, asciiMicro: true, voltUnit: true, meter: { kind: 'true-rms-ac', displayCounts: 4000 } },
  { name: 'Inès Marlow', pace: 0.95, decimalComma: true, millivolts: true, asciiMicro: false, voltUnit: false, meter: { kind: 'true-rms-ac', displayCounts: 6000 } },
  { name: 'Kofi Ashgrove', pace: 1.05, decimalComma: false, millivolts: false, asciiMicro: true, voltUnit: true, meter: { kind: 'true-rms-ac', displayCounts: 6000 } },
  { name: 'Ruth Ellery', pace: 0.9, decimalComma: false, millivolts: true, asciiMicro: false, voltUnit: false, meter: { kind: 'true-rms-ac', displayCounts: 6000 } },
];
const EXTRA_FIRST_NAMES = ['Mira', 'Jonah', 'Petra', 'Emeka', 'Solveig', 'Rafael', 'Hana', 'Declan', 'Yusra', 'Bram'];
const EXTRA_LAST_NAMES = ['Fenwick', 'Oduya', 'Lindqvist', 'Carrow', 'Mabry', 'Teague', 'Vossberg', 'Hallam'];

const PLACES = ['Millwray', 'Foxmere', 'Harrowend', 'Greywick', 'Aldmoor', 'Wickby Vale', 'Larkspur Row', 'Thornwick Cross', 'Ebbside', 'Kettlemere', 'Marshcote', 'Oakhollow', 'Sallowbridge', 'Penwhistle', 'Quarrymede'];
const BUSINESSES = ['Laundrette', 'Care Home', 'Bakery', 'Primary School', 'Dental Practice', 'Café', 'Leisure Centre', 'Guest House', 'Flats Management', 'Print Works', 'Veterinary Surgery', 'Community Hall'];
const SITES = ['Main building', 'Unit 4', 'Kitchen', 'Plant room', 'Laundry room', 'Flat 12', 'Back office', 'Basement', 'Annexe', 'Staff room'];

interface Archetype {
  assetKind: string;
  makes: readonly string[];
  modelPrefix: string;
  spec: SupplySpecInput;
  nameplate: SupplyNameplate;
  baseMinutes: number;
  capacitorPart: string;
  diodePart: string;
  fusePart: string;
}

/** The supplies in the shop's work: values typical of each kind of board (common practice). */
const ARCHETYPES: readonly Archetype[] = [
  {
    assetKind: 'washing machine',
    makes: ['Ostrel', 'Quarrow'],
    modelPrefix: 'WM',
    spec: { topology: 'bridge', source: { vrms: 12, hz: 50, ohms: 0.8 }, diode: { preset: 'silicon' }, capacitor: { farads: 1000e-6, esr: 0.08 }, load: { amps: 0.25 }, regulator: { volts: 5, dropout: 2 } },
    nameplate: { region: 'en-230', secondaryVolts: 12, transformerVa: 6, capacitorMicrofarads: 1000, capacitorVoltRating: 25, diodeKind: 'silicon bridge', regulator: '5 V linear', loadText: '0.25 A' },
    baseMinutes: 55,
    capacitorPart: '1000 µF 25 V electrolytic, 105 °C',
    diodePart: 'bridge rectifier 2 A 600 V',
    fusePart: 'T315mA fuse 5×20',
  },
  {
    assetKind: 'boiler',
    makes: ['Hestwick', 'Brindlecote'],
    modelPrefix: 'BX',
    spec: { topology: 'center-tap', source: { vrms: 9, hz: 50, ohms: 0.6 }, diode: { preset: 'silicon' }, capacitor: { farads: 2200e-6, esr: 0.05 }, load: { amps: 0.4 }, regulator: { volts: 5, dropout: 2 } },
    nameplate: { region: 'en-230', secondaryVolts: 9, transformerVa: 10, capacitorMicrofarads: 2200, capacitorVoltRating: 16, diodeKind: 'silicon, 2 diodes', regulator: '5 V linear', loadText: '0.4 A' },
    baseMinutes: 70,
    capacitorPart: '2200 µF 16 V electrolytic',
    diodePart: 'silicon diode 1 A 1000 V ×2',
    fusePart: 'T500mA fuse 5×20',
  },
  {
    assetKind: 'fridge-freezer',
    makes: ['Polvane'],
    modelPrefix: 'FZ',
    spec: { topology: 'half-wave', source: { vrms: 12, hz: 50, ohms: 2 }, diode: { preset: 'silicon' }, capacitor: { farads: 470e-6, esr: 0.3 }, load: { amps: 0.06 }, regulator: { zenerVolts: 5.1, seriesOhms: 68 } },
    nameplate: { region: 'en-230', secondaryVolts: 12, transformerVa: 2, capacitorMicrofarads: 470, capacitorVoltRating: 25, diodeKind: 'silicon', regulator: '5.1 V zener', loadText: '60 mA' },
    baseMinutes: 40,
    capacitorPart: '470 µF 25 V electrolytic',
    diodePart: 'silicon diode 1 A 1000 V',
    fusePart: 'thermal fuse 130 °C',
  },
  {
    assetKind: 'air handler',
    makes: ['Tamberlin'],
    modelPrefix: 'AH',
    spec: { topology: 'bridge', source: { vrms: 24, hz: 50, ohms: 1.5 }, diode: { preset: 'silicon' }, capacitor: { farads: 470e-6, esr: 0.15 }, load: { amps: 0.2 } },
    nameplate: { region: 'en-230', secondaryVolts: 24, transformerVa: 40, capacitorMicrofarads: 470, capacitorVoltRating: 50, diodeKind: 'silicon bridge', loadText: 'relays, about 0.2 A' },
    baseMinutes: 60,
    capacitorPart: '470 µF 50 V electrolytic',
    diodePart: 'bridge rectifier 1 A 400 V',
    fusePart: 'T2A fuse 5×20',
  },
  {
    assetKind: 'tumble dryer',
    makes: ['Vessmark'],
    modelPrefix: 'TD',
    spec: { topology: 'bridge', source: { vrms: 230, hz: 50, ohms: 6 }, diode: { preset: 'silicon' }, capacitor: { farads: 47e-6, esr: 1.5 }, load: { amps: 0.12 } },
    nameplate: { region: 'en-230', capacitorMicrofarads: 47, capacitorVoltRating: 400, diodeKind: 'silicon bridge, off-line', loadText: 'switch-mode converter, about 0.12 A' },
    baseMinutes: 55,
    capacitorPart: '47 µF 400 V electrolytic, 105 °C',
    diodePart: 'bridge rectifier 1 A 800 V',
    fusePart: 'T1.6A fuse 5×20',
  },
  {
    assetKind: 'gas oven',
    makes: ['Hestwick'],
    modelPrefix: 'GO',
    spec: { topology: 'doubler', source: { vrms: 12, hz: 50, ohms: 1 }, diode: { preset: 'silicon' }, capacitor: { farads: 220e-6, esr: 0.2 }, load: { amps: 0.03 } },
    nameplate: { region: 'en-230', secondaryVolts: 12, transformerVa: 3, capacitorMicrofarads: 220, capacitorVoltRating: 35, diodeKind: 'silicon, doubler', loadText: 'ignition board, 30 mA' },
    baseMinutes: 45,
    capacitorPart: '220 µF 35 V electrolytic ×2',
    diodePart: 'silicon diode 1 A 1000 V',
    fusePart: 'T250mA fuse 5×20',
  },
];

// Free text, with the cases an export must survive: leading = + - @ tab CR, quotes, commas,
// line breaks, non-ASCII. The first jobs of every demo use these in turn, so even a small demo
// has them all.
const HARD_TEXTS: readonly string[] = [
  '=E4= flashing on the display',
  '+5 V rail reads low, customer says "it just clicks"',
  '-12 V rail missing, fan runs, pump doesn\'t',
  '@front desk: key is with the caretaker, ring first',
  'Kondensator gewölbt, Kunde sagt: läuft nur manchmal',
  'Condensateur gonflé sur la carte, « ça s\'arrête tout seul »',
  'No 24 V at the terminals;\nfan runs, compressor doesn\'t',
  'Customer note:\r\nplease ring before arriving',
  '\tcopied from the customer\'s email: "stops mid-cycle, again"',
  'Tripped, reset, tripped again, then fine for a week',
  '\rstray carriage return from the office system',
  'Ripple 0,41 V on 1000 µF, ESR 2,3 Ω: capacitor dried out',
  'Hums, then nothing 😕',
  "'quoted by the office' as urgent",
];

const COMPLAINTS: Record<string, readonly string[]> = {
  capacitor: ['Resets mid-cycle', 'Display flickers, worse when warm', 'Intermittent lock-out, worse in the afternoon', 'Control board restarts when the motor starts'],
  diode: ['Relays chatter', 'Display dim and flickering', 'Board hums, runs erratically'],
  line: ['Keeps dropping out in the evenings', 'Slow to start, display dim'],
  dead: ['Completely dead, no lights', 'No display, fuse holder looks scorched', 'Dead after a thunderstorm'],
  overload: ['Board runs hot, smells warm', 'Regulator too hot to touch', 'Trips out after ten minutes'],
  healthy: ['Stopped once last week, fine since', 'Customer reports odd noises from the board', 'Annual check requested'],
};

const READING_NOTES: readonly string[] = [
  'probe on C1 +, black on chassis',
  'capacitor warm to the touch',
  'meter on auto-range',
  '=reading as the customer saw it',
  'taken with the door switch bridged, "temporary"',
  'after 10 min warm-up, reading drifted up',
  'Messung bei offenem Deckel',
];

// ---------------------------------------------------------------------------------------------
// Faults put into the spec
// ---------------------------------------------------------------------------------------------

type SimFault =
  | { kind: 'healthy' }
  | { kind: 'capacitor'; faradsFactor: number; esrFactor: number }
  | { kind: 'diode-open'; label: DiodeLabel }
  | { kind: 'line-low'; factor: number }
  | { kind: 'no-ac' }
  | { kind: 'overload'; factor: number };

function scaleCapacitors(spec: SupplySpecInput, faradsFactor: number, esrFactor: number): SupplySpecInput['capacitor'] {
  const scale = (c: { farads: number; esr?: number }) => ({ farads: c.farads * faradsFactor, esr: (c.esr ?? 0) * esrFactor });
  const capacitor = spec.capacitor;
  if (capacitor === undefined) return undefined;
  return Array.isArray(capacitor) ? [scale(capacitor[0]), scale(capacitor[1])] : scale(capacitor);
}

function faultedSpec(base: SupplySpecInput, fault: SimFault): SupplySpecInput {
  switch (fault.kind) {
    case 'healthy':
      return base;
    case 'capacitor':
      return { ...base, capacitor: scaleCapacitors(base, fault.faradsFactor, fault.esrFactor) };
    case 'diode-open':
      return { ...base, diodeCondition: { [fault.label]: 'open' } };
    case 'line-low':
      return { ...base, source: { ...base.source, vrms: base.source.vrms * fault.factor } };
    case 'no-ac':
      return { ...base, source: { ...base.source, vrms: 0 } };
    case 'overload': {
      const load = 'amps' in base.load ? { amps: base.load.amps * fault.factor } : { ohms: base.load.ohms / fault.factor };
      return { ...base, load };
    }
  }
}

function faultIdOf(fault: SimFault): FaultId {
  switch (fault.kind) {
    case 'healthy':
      return 'healthy';
    case 'capacitor':
      if (fault.faradsFactor <= 0.05) return 'capacitor-open';
      return fault.esrFactor >= 8 && fault.faradsFactor >= 0.8 ? 'capacitor-esr' : 'capacitor-low';
    case 'diode-open':
      return 'diode-open';
    case 'line-low':
      return 'line-low';
    case 'no-ac':
      return 'no-ac';
    case 'overload':
      return 'overload';
  }
}

/** Capacitor ageing across visits to one asset: capacitance down, ESR up (DOMAIN.md §6, dry-out). */
const AGEING_STEPS: readonly { faradsFactor: number; esrFactor: number }[] = [
  { faradsFactor: 0.97, esrFactor: 1.2 },
  { faradsFactor: 0.85, esrFactor: 1.6 },
  { faradsFactor: 0.72, esrFactor: 2.3 },
  { faradsFactor: 0.58, esrFactor: 3.4 },
  { faradsFactor: 0.45, esrFactor: 5 },
];

// ---------------------------------------------------------------------------------------------
// Expected bands: the diagnosis's own, as the app would have stored them with each reading
// ---------------------------------------------------------------------------------------------

type LiveMeasure = 'acSecondary' | 'dcOut' | 'rippleAc' | 'rippleHz' | 'regulatorOut';

function liveFigures(result: SupplyResult): Partial<Record<LiveMeasure, number>> {
  const figures: Partial<Record<LiveMeasure, number>> = {
    acSecondary: result.secondaryRms,
    dcOut: result.dc,
    // An AC-coupled true-RMS meter on a DC rail reads the ripple's RMS (DOMAIN.md §5).
    rippleAc: result.rippleRms,
    rippleHz: result.rippleHz,
  };
  if (result.regulator) figures.regulatorOut = result.regulator.dc;
  return figures;
}

/** Bands by spec and meter; the diagnosis is deterministic, so one solve set serves every demo. */
const bandCache = new Map<string, ReadingBand[]>();

function bandsFor(spec: SupplySpecInput, meter: MeterSettings): ReadingBand[] {
  const key = JSON.stringify([spec, meter]);
  let bands = bandCache.get(key);
  if (bands === undefined) {
    bands = expectedBands(prepareDiagnosis({ spec, meter }));
    bandCache.set(key, bands);
  }
  return bands;
}

function roundSignificant(value: number, digits: number): number {
  return value === 0 ? 0 : Number(value.toPrecision(digits));
}

// ---------------------------------------------------------------------------------------------
// What the meter shows and what the technician types
// ---------------------------------------------------------------------------------------------

interface Display {
  value: number | 'OL';
  text: string;
}

function typed(number: number, decimals: number, style: TechnicianProfile): string {
  const text = number.toFixed(decimals);
  return style.decimalComma ? text.replace('.', ',') : text;
}

/** SI value of a displayed number in a prefixed unit, without binary-fraction noise. */
const fromDisplay = (number: number, scale: number): number => Number((number * scale).toPrecision(12));

function showVolts(volts: number, kind: ReadingKind, style: TechnicianProfile): Display {
  const magnitude = Math.abs(volts);
  if (style.millivolts && kind === 'rippleAc' && magnitude < 1) {
    const mv = Number((volts * 1000).toFixed(1));
    return { value: fromDisplay(mv, 1e-3), text: `${typed(mv, 1, style)}mV` };
  }
  // An N-count display (6000: three decimals below 6 V, two below 60 V, one below 600 V).
  const full = (style.meter.displayCounts ?? 6000) / 1000;
  const decimals = magnitude < full ? 3 : magnitude < full * 10 ? 2 : magnitude < full * 100 ? 1 : 0;
  const shown = Number(volts.toFixed(decimals));
  return { value: shown, text: `${typed(shown, decimals, style)}${style.voltUnit ? 'V' : ''}` };
}

function showHertz(hertz: number, style: TechnicianProfile): Display {
  const shown = Number(hertz.toFixed(1));
  return { value: shown, text: typed(shown, 1, style) };
}

function showFarads(farads: number, style: TechnicianProfile): Display {
  const microfarads = farads * 1e6;
  const decimals = microfarads < 10 ? 2 : microfarads < 100 ? 1 : 0;
  const shown = Number(microfarads.toFixed(decimals));
  return { value: fromDisplay(shown, 1e-6), text: `${typed(shown, decimals, style)}${style.asciiMicro ? 'uF' : 'µF'}` };
}

function showOhms(ohms: number, style: TechnicianProfile): Display {
  if (ohms < 1 && style.millivolts) {
    const milliohms = Math.round(ohms * 1000);
    return { value: fromDisplay(milliohms, 1e-3), text: `${milliohms}mΩ` };
  }
  const decimals = ohms < 1 ? 3 : 2;
  const shown = Number(ohms.toFixed(decimals));
  return { value: shown, text: `${typed(shown, decimals, style)}Ω` };
}

// ---------------------------------------------------------------------------------------------
// The generator
// ---------------------------------------------------------------------------------------------

interface DemoAsset extends Asset {
  archetype: Archetype;
  homeTechnician: number;
}

interface Visit {
  asset: DemoAsset;
  startMs: number;
  fault: SimFault;
  outcome: JobOutcome;
  /** Index of the technician, or undefined for the asset's usual one. */
  technician?: number;
}

function weekdayWorkingTime(ms: number, random: SeededRandom): number {
  const date = new Date(ms);
  const weekday = date.getUTCDay();
  const shift = weekday === 6 ? 2 : weekday === 0 ? 1 : 0;
  const day = Math.floor(ms / DAY_MS) + shift;
  return day * DAY_MS + (8 * 60 + random.int(0, 8 * 60)) * MINUTE_MS;
}

class DemoBuilder {
  readonly random: SeededRandom;
  readonly solve: (spec: SupplySpecInput) => SupplyResult;
  private readonly results = new Map<string, SupplyResult>();
  readonly payload: JobPayload = emptyPayload();
  readonly technicians: { record: Technician; profile: TechnicianProfile }[] = [];
  readonly assets: DemoAsset[] = [];
  private hardTextIndex = 0;
  readonly endMs: number;
  readonly startMs: number;

  constructor(readonly options: DemoOptions) {
    this.random = new SeededRandom(options.seed);
    const rawSolve = options.solve ?? ((spec: SupplySpecInput) => expectReadings(spec));
    this.solve = (spec) => {
      const key = JSON.stringify(spec);
      let result = this.results.get(key);
      if (result === undefined) {
        result = rawSolve(spec);
        this.results.set(key, result);
      }
      return result;
    };
    this.endMs = Date.parse(options.end ?? DEMO_DEFAULT_END);
    this.startMs = this.endMs - Math.round((options.months ?? 12) * 30.44 * DAY_MS);
  }

  /** The next hard-case text while any are left unused, otherwise `fallback`. */
  hardOr(fallback: string, chance: number): string {
    if (this.hardTextIndex < HARD_TEXTS.length) return HARD_TEXTS[this.hardTextIndex++]!;
    return this.random.chance(chance) ? this.random.pick(HARD_TEXTS) : fallback;
  }

  makeTechnicians(count: number): void {
    for (let i = 0; i < count; i++) {
      const base = TECHNICIANS[i % TECHNICIANS.length]!;
      const profile: TechnicianProfile =
        i < TECHNICIANS.length
          ? base
          : {
              ...base,
              pace: i % TECHNICIANS.length === 1 ? 1 : base.pace,
              name: `${EXTRA_FIRST_NAMES[i % EXTRA_FIRST_NAMES.length]} ${EXTRA_LAST_NAMES[Math.floor(i / EXTRA_FIRST_NAMES.length) % EXTRA_LAST_NAMES.length]}${i >= EXTRA_FIRST_NAMES.length * EXTRA_LAST_NAMES.length ? ` ${i}` : ''}`,
            };
      const record: Technician = { id: this.random.uuid(), name: profile.name };
      this.technicians.push({ record, profile });
      this.payload.technicians.push(record);
    }
  }

  makeAssets(customerCount: number, assetCount: number): void {
    const customers: { name: string; sites: string[]; technician: number }[] = [];
    for (let i = 0; i < customerCount; i++) {
      const place = PLACES[i % PLACES.length]!;
      const business = BUSINESSES[Math.floor(i / PLACES.length) % BUSINESSES.length]!;
      const round = Math.floor(i / (PLACES.length * BUSINESSES.length));
      const sites = Array.from({ length: this.random.int(1, 3) }, () => this.random.pick(SITES));
      customers.push({
        name: `${place} ${business}${round > 0 ? ` ${round + 1}` : ''}`,
        sites: [...new Set(sites)],
        technician: i % this.technicians.length,
      });
    }
    for (let i = 0; i < assetCount; i++) {
      const customer = customers[i % customers.length]!;
      const archetype = this.random.pick(ARCHETYPES);
      const asset: DemoAsset = {
        id: this.random.uuid(),
        kind: archetype.assetKind,
        make: this.random.pick(archetype.makes),
        model: `${archetype.modelPrefix}-${this.random.int(1, 9)}${this.random.pick(['00', '20', '50', '80'])}`,
        serial: `${this.random.uuid().slice(0, 8).toUpperCase()}`,
        customer: customer.name,
        site: this.random.pick(customer.sites),
        archetype,
        homeTechnician: customer.technician,
      };
      if (this.random.chance(0.6)) asset.tag = `TAG-${String(this.random.int(1, 9999)).padStart(4, '0')}`;
      this.assets.push(asset);
      const { archetype: _a, homeTechnician: _h, ...record } = asset;
      this.payload.assets.push(record);
    }
  }

  /** A fault for an ordinary call-out; capacitor faults are more common in summer. */
  pickFault(asset: DemoAsset, ms: number): SimFault {
    const month = new Date(ms).getUTCMonth();
    const summer = month >= 5 && month <= 7 ? 1.7 : 1;
    const topology = asset.archetype.spec.topology;
    const choices: [() => SimFault, number][] = [
      [() => ({ kind: 'capacitor', faradsFactor: this.random.pick([0.5, 0.35, 0.2]), esrFactor: this.random.pick([3, 5]) }), 30 * summer],
      [() => ({ kind: 'capacitor', faradsFactor: 0.9, esrFactor: this.random.pick([10, 20]) }), 10 * summer],
      [() => ({ kind: 'capacitor', faradsFactor: 0.01, esrFactor: 1 }), 3],
      [() => ({ kind: 'no-ac' }), 14],
      [() => ({ kind: 'line-low', factor: this.random.pick([0.8, 0.85]) }), 5],
      [() => ({ kind: 'overload', factor: this.random.pick([1.6, 2]) }), 7],
      [() => ({ kind: 'healthy' }), 10],
    ];
    if (topology !== 'half-wave') {
      const labels: DiodeLabel[] = topology === 'bridge' ? ['D1', 'D2', 'D3', 'D4'] : ['D1', 'D2'];
      choices.push([() => ({ kind: 'diode-open', label: this.random.pick(labels) }), 12]);
    }
    return this.random.weighted(choices)();
  }

  /** One call-out, or a series of visits: the visits in time order. */
  story(): Visit[] {
    const asset = this.random.pick(this.assets);
    const span = this.endMs - this.startMs;
    if (this.random.chance(0.05)) {
      // A capacitor ageing over several visits, replaced at the last one.
      const visits = this.random.int(3, AGEING_STEPS.length);
      let ms = this.startMs + this.random.next() * span * 0.4;
      const out: Visit[] = [];
      for (let v = 0; v < visits; v++) {
        const step = AGEING_STEPS[AGEING_STEPS.length - visits + v]!;
        const last = v === visits - 1;
        out.push({ asset, startMs: weekdayWorkingTime(ms, this.random), fault: { kind: 'capacitor', ...step }, outcome: last ? 'fixed' : 'no-fault-found' });
        ms += (40 + this.random.next() * 40) * DAY_MS;
      }
      return out;
    }
    const startMs = weekdayWorkingTime(this.startMs + this.random.next() * span, this.random);
    const fault = this.pickFault(asset, startMs);
    if (fault.kind === 'healthy') return [{ asset, startMs, fault, outcome: 'no-fault-found' }];
    if (fault.kind === 'line-low') return [{ asset, startMs, fault, outcome: 'referred' }];
    if (this.random.chance(0.12)) {
      // First visit did not fix it; a colleague goes back within three weeks.
      const again = weekdayWorkingTime(startMs + this.random.int(3, 20) * DAY_MS, this.random);
      return [
        { asset, startMs, fault, outcome: 'not-fixed' },
        { asset, startMs: again, fault, outcome: 'fixed', technician: this.random.int(0, this.technicians.length - 1) },
      ];
    }
    return [{ asset, startMs, fault, outcome: 'fixed' }];
  }

  /** Adds a reading with the band and verdict the diagnosis gives for it. */
  addReading(job: Job, readings: Reading[], kind: ReadingKind, shown: Display, ms: number, phase: Reading['phase'], bands: ReadingBand[], target?: string): Reading {
    const reading: Reading = { id: this.random.uuid(), jobId: job.id, kind, value: shown.value, text: shown.text, takenAt: new Date(ms).toISOString(), phase };
    if (target !== undefined) reading.target = target;
    const band = bands.find((b) => b.kind === kind && b.target === target);
    if (band !== undefined) {
      // An OL-expected band's limits mean nothing; its verdict says it all.
      if (!band.expectOverload) {
        // Six significant digits: the bands are good to about a percent.
        reading.expectedLow = roundSignificant(band.low, 6);
        reading.expectedHigh = roundSignificant(band.high, 6);
      }
      reading.verdict = judge(shown.value, band);
    }
    if (this.random.chance(0.05)) reading.note = this.random.pick(READING_NOTES);
    readings.push(reading);
    return reading;
  }

  /** Live readings of a supply as solved, with meter noise (about ±0.3 %, 1σ). */
  liveReadings(job: Job, readings: Reading[], result: SupplyResult, mainsVolts: number, msAt: () => number, phase: Reading['phase'], style: TechnicianProfile, bands: ReadingBand[], kinds: readonly LiveMeasure[] | 'all'): void {
    const noisy = (value: number) => value * (1 + 0.003 * this.random.normal());
    const figures = liveFigures(result);
    if (kinds === 'all') this.addReading(job, readings, 'mainsAc', showVolts(noisy(mainsVolts), 'mainsAc', style), msAt(), phase, bands);
    for (const measure of ['acSecondary', 'dcOut', 'rippleAc', 'rippleHz', 'regulatorOut'] as const) {
      const value = figures[measure];
      if (value === undefined || (kinds !== 'all' && !kinds.includes(measure))) continue;
      const shown = measure === 'rippleHz' ? showHertz(value, style) : showVolts(noisy(value), measure, style);
      if (measure === 'dcOut' && phase === 'before' && this.random.chance(0.03) && typeof shown.value === 'number') {
        // A slip of the decimal point, corrected at once by a new reading that supersedes it.
        const slipped = roundSignificant(shown.value / 10, 6);
        const wrong = this.addReading(job, readings, measure, { value: slipped, text: typed(slipped, 3, style) }, msAt(), phase, bands);
        this.addReading(job, readings, measure, shown, msAt(), phase, bands).supersedes = wrong.id;
      } else this.addReading(job, readings, measure, shown, msAt(), phase, bands);
    }
  }

  job(visit: Visit, index: number): { job: Job; readings: Reading[] } {
    const { asset, fault } = visit;
    const archetype = asset.archetype;
    const technicianIndex = visit.technician ?? (this.random.chance(0.7) ? asset.homeTechnician : this.random.int(0, this.technicians.length - 1));
    const technician = this.technicians[technicianIndex]!;
    const style = technician.profile;
    const faultFactor = { healthy: 1.2, capacitor: 1, 'diode-open': 1.3, 'line-low': 0.7, 'no-ac': 0.8, overload: 1.1 }[fault.kind];
    const minutes = Math.max(15, archetype.baseMinutes * faultFactor * style.pace * Math.exp(0.25 * this.random.normal()));
    const startMs = visit.startMs;
    const finishMs = startMs + Math.round(minutes) * MINUTE_MS;
    const createdMs = startMs - this.random.int(60, 3 * 24 * 60) * MINUTE_MS;
    const finished = finishMs <= this.endMs;
    const iso = (ms: number) => new Date(ms).toISOString();
    const category =
      fault.kind === 'capacitor' ? 'capacitor' : fault.kind === 'diode-open' ? 'diode' : fault.kind === 'line-low' ? 'line' : fault.kind === 'no-ac' ? 'dead' : fault.kind === 'overload' ? 'overload' : 'healthy';
    const complaint = this.hardOr(this.random.pick(COMPLAINTS[category]!), 0.05);
    const job: Job = {
      id: this.random.uuid(),
      createdAt: iso(createdMs),
      updatedAt: iso(createdMs),
      startedAt: iso(startMs),
      customer: asset.customer,
      site: asset.site,
      assetId: asset.id,
      technicianId: technician.record.id,
      complaint,
      supply: archetype.spec,
      nameplate: archetype.nameplate,
      meter: style.meter,
      status: finished ? 'finished' : 'open',
      edits: {
        customer: iso(createdMs),
        site: iso(createdMs),
        assetId: iso(createdMs),
        technicianId: iso(createdMs),
        complaint: iso(createdMs),
        supply: iso(startMs),
        nameplate: iso(startMs),
        meter: iso(startMs),
        status: iso(finished ? finishMs : createdMs),
      },
    };

    const readings: Reading[] = [];
    const bands = bandsFor(archetype.spec, style.meter);
    const actual = this.solve(faultedSpec(archetype.spec, fault));
    const mainsVolts = 230 * (fault.kind === 'line-low' ? fault.factor : 1 + 0.015 * this.random.normal());
    let clock = startMs + this.random.int(3, 10) * MINUTE_MS;
    const lastBefore = finished ? startMs + (finishMs - startMs) * 0.7 : this.endMs;
    const msAt = () => {
      clock = Math.min(clock + this.random.int(20, 120) * 1000, lastBefore);
      return clock;
    };
    this.liveReadings(job, readings, actual, mainsVolts, msAt, 'before', style, bands, 'all');

    // Power off, discharged: the parts the technician suspects.
    const spec = faultedSpec(archetype.spec, fault);
    const oneOrBoth = (c: { farads: number; esr?: number }) => (spec.topology === 'doubler' ? [c, c] : [c]);
    const capacitors = spec.capacitor === undefined ? [] : Array.isArray(spec.capacitor) ? spec.capacitor : oneOrBoth(spec.capacitor);
    if (fault.kind !== 'no-ac') {
      capacitors.forEach((capacitor, i) => {
        const target = `C${i + 1}`;
        this.addReading(job, readings, 'capacitance', showFarads(capacitor.farads * (1 + 0.02 * this.random.normal()), style), msAt(), 'before', bands, target);
        this.addReading(job, readings, 'esr', showOhms((capacitor.esr ?? 0) * (1 + 0.05 * this.random.normal()), style), msAt(), 'before', bands, target);
      });
    }
    const labels: DiodeLabel[] = { 'half-wave': ['D1'], 'center-tap': ['D1', 'D2'], bridge: ['D1', 'D2', 'D3', 'D4'], doubler: ['D1', 'D2'] }[archetype.spec.topology] as DiodeLabel[];
    const testedDiodes = fault.kind === 'diode-open' ? labels : this.random.chance(0.3) ? [this.random.pick(labels)] : [];
    for (const label of testedDiodes) {
      const open = fault.kind === 'diode-open' && fault.label === label;
      const forward: Display = open ? { value: 'OL', text: 'OL' } : showVolts(0.55 + 0.03 * this.random.normal(), 'diodeForward', style);
      this.addReading(job, readings, 'diodeForward', forward, msAt(), 'before', bands, label);
      if (open || this.random.chance(0.5)) this.addReading(job, readings, 'diodeReverse', { value: 'OL', text: 'OL' }, msAt(), 'before', bands, label);
    }

    const faultId = faultIdOf(fault);
    if (finished) {
      const fixed = visit.outcome === 'fixed';
      if (fixed) {
        clock = Math.max(clock, startMs + (finishMs - startMs) * 0.85);
        const retest = () => {
          clock = Math.min(clock + this.random.int(20, 90) * 1000, finishMs);
          return clock;
        };
        this.liveReadings(job, readings, this.solve(archetype.spec), 230 * (1 + 0.015 * this.random.normal()), retest, 'after', style, bands, ['dcOut', 'rippleAc', 'regulatorOut']);
      }
      job.finishedAt = iso(finishMs);
      job.finish = this.finish(visit, faultId, archetype, index);
      job.edits.finish = iso(finishMs);
    }
    if (this.random.chance(0.05)) {
      // The technician rewrote the complaint on site.
      job.complaint = `${job.complaint} (on site: ${this.random.pick(COMPLAINTS[category]!).toLowerCase()})`;
      job.edits.complaint = iso(startMs + 5 * MINUTE_MS);
    }
    job.updatedAt = Object.values(job.edits).reduce((latest, at) => (at > latest ? at : latest), job.createdAt);
    return { job, readings };
  }

  finish(visit: Visit, faultId: FaultId, archetype: Archetype, index: number): JobFinish {
    const parts: Partial<Record<FaultId, { part: string; action: string; used: string[] }>> = {
      'capacitor-low': { part: 'C1', action: 'Replaced the filter capacitor', used: [archetype.capacitorPart] },
      'capacitor-esr': { part: 'C1', action: 'Replaced the filter capacitor (high ESR)', used: [archetype.capacitorPart] },
      'capacitor-open': { part: 'C1', action: 'Replaced the open filter capacitor', used: [archetype.capacitorPart] },
      'diode-open': { part: 'rectifier', action: 'Replaced the rectifier', used: [archetype.diodePart] },
      'no-ac': { part: 'fuse or winding', action: 'Replaced the fuse, checked the winding', used: [archetype.fusePart] },
      overload: { part: 'load', action: 'Found a shorted relay coil, replaced the relay', used: ['relay 12 V coil'] },
    };
    const known = parts[faultId];
    const result: JobFinish = { partsUsed: [], outcome: visit.outcome };
    if (visit.outcome === 'no-fault-found') {
      result.actionTaken = 'Checked the supply, readings in band; advised the customer';
    } else if (visit.outcome === 'referred') {
      result.faultFound = faultId;
      result.suspectedPart = 'mains supply';
      result.actionTaken = 'Mains low at the socket: referred to the site electrician';
    } else if (known) {
      result.suspectedPart = known.part;
      result.faultFound = faultId;
      if (visit.outcome === 'not-fixed') {
        result.actionTaken = 'Replaced the regulator; fault came back before leaving';
        result.partsUsed = ['5 V regulator'];
      } else {
        result.actionTaken = known.action;
        result.partsUsed = known.used;
      }
    }
    if (index < HARD_TEXTS.length || this.random.chance(0.35)) result.notes = this.hardOr('Tested after repair, all readings in band.', 0.1);
    return result;
  }
}

/**
 * The demo shop's records: `jobs` jobs over `months` months up to `end`, with their readings,
 * assets and technicians. Deterministic for given options. Throws RangeError for a job count
 * outside 1..1 000 000 or an unreadable end time.
 */
export function generateDemo(options: DemoOptions): JobPayload {
  if (!Number.isInteger(options.jobs) || options.jobs < 1 || options.jobs > DEMO_MAX_JOBS) {
    throw new RangeError(`the job count must be a whole number from 1 to ${DEMO_MAX_JOBS}, got ${options.jobs}`);
  }
  const builder = new DemoBuilder(options);
  if (!Number.isFinite(builder.endMs)) throw new RangeError(`the end time must be a UTC time, got ${options.end}`);
  const jobCount = options.jobs;
  builder.makeTechnicians(Math.min(40, Math.max(TECHNICIANS.length, Math.ceil(jobCount / 1500))));
  builder.makeAssets(Math.max(6, Math.ceil(jobCount / 40)), Math.max(12, Math.ceil(jobCount / 3)));
  const visits: Visit[] = [];
  while (visits.length < jobCount) {
    for (const visit of builder.story()) if (visit.startMs < builder.endMs && visits.length < jobCount) visits.push(visit);
  }
  visits.sort((a, b) => a.startMs - b.startMs);
  visits.forEach((visit, index) => {
    const { job, readings } = builder.job(visit, index);
    builder.payload.jobs.push(job);
    for (const reading of readings) builder.payload.readings.push(reading);
  });
  return sortPayload(builder.payload);
}

/** The demo as a job file's bytes, a line per part, exported at the period's end by the shop (see generateDemo). */
export async function demoJobFile(options: DemoOptions): Promise<Uint8Array[]> {
  const built = await buildJobFile(generateDemo(options), {
    exportedAt: options.end ?? DEMO_DEFAULT_END,
    exportedBy: { name: `${DEMO_SHOP_NAME} (demo)`, device: 'ripplewright demo' },
  });
  return built.parts;
}
