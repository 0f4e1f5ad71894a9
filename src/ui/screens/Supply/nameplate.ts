/**
 * From what is printed on the parts to the engine's supply spec: mains region, transformer
 * secondary rating and VA, capacitor, diodes, regulator and load. The form keeps text exactly
 * as typed; the derived figures (open-circuit volts, winding resistance) are shown with how
 * they were found, and either can be overridden with a measured or known figure.
 */
import { MAINS_REGIONS, parseMeterText } from '../../../engine/diagnosis';
import type { MainsRegion } from '../../../engine/diagnosis/types';
import type { DiodePresetName, RegulatorInput, SupplySpecInput, Topology } from '../../../engine/types';
import type { SupplyNameplate } from '../../../model/job';

export type RegionId = Exclude<MainsRegion, 'custom'>;
export type RegulatorKind = 'none' | 'linear' | 'ldo' | 'zener';

export interface NameplateForm {
  topology: Topology;
  region: RegionId;
  /** "none": the rectifier runs straight off the mains (a switch-mode supply's front end). */
  transformer: 'yes' | 'none';
  /** Rated secondary volts RMS at rated load (each half for centre-tapped). */
  secondaryVolts: string;
  transformerVa: string;
  /** Blank: derived from rating and VA. */
  openCircuitVolts: string;
  /** Blank: derived from rating and VA (with no transformer: OFFLINE_SERIES_OHMS). */
  windingOhms: string;
  /** Blank: no filter capacitor. */
  capacitorMicrofarads: string;
  capacitorVoltRating: string;
  diodeKind: DiodePresetName;
  regulatorKind: RegulatorKind;
  regulatorVolts: string;
  seriesOhms: string;
  /** "0.5 A", "500 mA", "33 Ω". */
  loadText: string;
}

export type NameplateField = Exclude<keyof NameplateForm, 'topology' | 'region' | 'transformer' | 'diodeKind' | 'regulatorKind'>;

/** An invented bench supply: 12 V 20 VA transformer into a silicon bridge, 2200 µF 25 V, 0.5 A. */
export const DEFAULT_NAMEPLATE: NameplateForm = {
  topology: 'bridge',
  region: 'en-230',
  transformer: 'yes',
  secondaryVolts: '12',
  transformerVa: '20',
  openCircuitVolts: '',
  windingOhms: '',
  capacitorMicrofarads: '2200',
  capacitorVoltRating: '25',
  diodeKind: 'silicon',
  regulatorKind: 'none',
  regulatorVolts: '12',
  seriesOhms: '100',
  loadText: '0.5 A',
};

/**
 * Series resistance of an off-line front end with no transformer: a warm inrush thermistor,
 * fusible resistor and wiring, a few ohms (from memory, to be confirmed). Enter the real figure
 * when it is known.
 */
export const OFFLINE_SERIES_OHMS = 2;

/** Dropout of a 78xx-type regulator at about 1 A: 2 V (datasheets, DOMAIN.md §6). */
export const LINEAR_DROPOUT_VOLTS = 2;
/** Dropout of a low-dropout regulator: 0.1–0.5 V (DOMAIN.md §6); we take 0.3 V. */
export const LDO_DROPOUT_VOLTS = 0.3;

/**
 * Regulation of a small mains transformer, (V off load − V rated) / V rated, by its VA rating:
 * 0.2 · (VA / 10)^−0.4, i.e. about 50 % at 1 VA, 20 % at 10 VA, 8 % at 100 VA, 5 % at 300 VA.
 * Typical of laminated-core units (from memory, to be confirmed; EN 61558-2-x caps it at 15 %
 * for 63–250 VA, DOMAIN.md §4). Toroids regulate better: override with a measured figure.
 */
export function regulationFraction(va: number): number {
  const clamped = Math.min(Math.max(va, 0.5), 5000);
  return 0.2 * (clamped / 10) ** -0.4;
}

export interface TransformerDerivation {
  regulationFraction: number;
  /** Rated current of the winding (each half for centre-tapped), amps. */
  ratedAmps: number;
  openCircuitVolts: number;
  windingOhms: number;
}

/**
 * Open-circuit volts and winding resistance from the rating: the voltage off load is the rating
 * raised by the regulation, and the whole drop at rated current is taken as the winding's
 * resistance (R = regulation · V² / VA), ignoring leakage reactance (small transformers are
 * mostly resistive, common practice). A centre-tapped winding's VA is shared by its two halves.
 * @param ratedVolts  rated secondary RMS volts (each half for centre-tapped)
 */
export function deriveTransformer(topology: Topology, ratedVolts: number, va: number): TransformerDerivation {
  const r = regulationFraction(va);
  const ratedAmps = topology === 'center-tap' ? va / (2 * ratedVolts) : va / ratedVolts;
  return { regulationFraction: r, ratedAmps, openCircuitVolts: ratedVolts * (1 + r), windingOhms: (r * ratedVolts) / ratedAmps };
}

/** What the derivation did, in words, for the screen. */
export function explainDerivation(topology: Topology, ratedVolts: number, va: number, d: TransformerDerivation): string {
  const half = topology === 'center-tap' ? ' per half' : '';
  return (
    `A ${fmt(va)} VA transformer rated ${fmt(ratedVolts)} V${half} reads about ${Math.round(d.regulationFraction * 100)} % high off load ` +
    `(typical for its size), so about ${fmt(d.openCircuitVolts)} V open-circuit. Its rated current is ${fmt(d.ratedAmps)} A${half}; ` +
    `dropping the extra ${fmt(d.openCircuitVolts - ratedVolts)} V at that current takes ${fmt(d.windingOhms)} Ω of winding resistance. ` +
    'If you know better figures (the voltage measured off load, or the winding resistance), enter them below.'
  );
}

function fmt(value: number): string {
  return Number(value.toPrecision(3)).toString();
}

/**
 * Reads the expected load: "0.5 A", "500 mA", "0,5" (amps), "33 Ω", "33 ohm", "33R", "1k2" is
 * not accepted (write "1.2k"). A number alone is amps.
 */
export function parseLoadText(text: string): { amps: number } | { ohms: number } | { problem: string } {
  const raw = text.trim().replace(/\s+/g, ' ');
  if (raw === '') return { problem: 'enter the load current (e.g. 0.5 A) or resistance (e.g. 33 Ω)' };
  const amps = /^([+]?\d+(?:[.,]\d*)?|[.,]\d+)\s*(m?a|amps?)?$/i.exec(raw);
  if (amps) {
    const value = Number(amps[1]!.replace(',', '.')) * (/^m/i.test(amps[2] ?? '') ? 1e-3 : 1);
    return value > 0 ? { amps: value } : { problem: 'the load current must be above 0' };
  }
  const ohms = parseMeterText(raw, 'Ω');
  if (ohms.ok && ohms.value !== 'OL' && /[ΩωrRkKohm]/.test(raw)) {
    return ohms.value > 0 ? { ohms: ohms.value } : { problem: 'the load resistance must be above 0' };
  }
  return { problem: `“${raw}” is not a current or a resistance (try 0.5 A, 500 mA or 33 Ω)` };
}

/** A positive decimal number as typed (point or comma), undefined for blank, NaN for not a number. */
export function parseNumberText(text: string): number | undefined {
  const trimmed = text.trim();
  if (trimmed === '') return undefined;
  const normalised = trimmed.replace(',', '.');
  return /^[+]?(\d+\.?\d*|\.\d+)(e[+-]?\d+)?$/i.test(normalised) ? Number(normalised) : NaN;
}

export interface BuiltSupply {
  spec: SupplySpecInput;
  nameplate: SupplyNameplate;
  /** Null with no transformer. */
  derivation: TransformerDerivation | null;
  /** The figures used for the source: derived or overridden. */
  openCircuitVolts: number;
  windingOhms: number;
}

/**
 * The supply spec and nameplate record from the form.
 * @returns the spec, or the problems by field (every field checked, so all are shown at once)
 */
export function buildSupply(form: NameplateForm): BuiltSupply | { problems: Partial<Record<NameplateField, string>> } {
  const problems: Partial<Record<NameplateField, string>> = {};
  const number = (field: NameplateField, opts: { required?: boolean; positive?: boolean } = {}): number | undefined => {
    const value = parseNumberText(form[field]);
    if (value === undefined) {
      if (opts.required) problems[field] = 'needed';
      return undefined;
    }
    if (Number.isNaN(value)) {
      problems[field] = `“${form[field].trim()}” is not a number`;
      return undefined;
    }
    if (opts.positive !== false && !(value > 0)) {
      problems[field] = 'must be above 0';
      return undefined;
    }
    return value;
  };
  const withTransformer = form.transformer === 'yes';
  const ratedVolts = withTransformer ? number('secondaryVolts', { required: true }) : undefined;
  const va = withTransformer ? number('transformerVa', { required: true }) : undefined;
  const ocOverride = number('openCircuitVolts');
  const ohmsOverride = number('windingOhms', { positive: false });
  if (ohmsOverride !== undefined && ohmsOverride < 0) problems.windingOhms = 'must be 0 or more';
  const microfarads = number('capacitorMicrofarads');
  const capRating = number('capacitorVoltRating');
  const regulatorVolts = form.regulatorKind === 'none' ? undefined : number('regulatorVolts', { required: true });
  const seriesOhms = form.regulatorKind === 'zener' ? number('seriesOhms', { required: true }) : undefined;
  const load = parseLoadText(form.loadText);
  if ('problem' in load) problems.loadText = load.problem;
  if (Object.keys(problems).length > 0 || 'problem' in load) return { problems };
  const region = MAINS_REGIONS[form.region];
  let derivation: TransformerDerivation | null = null;
  let openCircuitVolts: number;
  let windingOhms: number;
  if (ratedVolts !== undefined && va !== undefined) {
    derivation = deriveTransformer(form.topology, ratedVolts, va);
    openCircuitVolts = ocOverride ?? derivation.openCircuitVolts;
    windingOhms = ohmsOverride ?? derivation.windingOhms;
  } else {
    openCircuitVolts = ocOverride ?? region.nominalVolts;
    windingOhms = ohmsOverride ?? OFFLINE_SERIES_OHMS;
  }
  let regulator: RegulatorInput | undefined;
  if (form.regulatorKind === 'linear') regulator = { volts: regulatorVolts!, dropout: LINEAR_DROPOUT_VOLTS };
  if (form.regulatorKind === 'ldo') regulator = { volts: regulatorVolts!, dropout: LDO_DROPOUT_VOLTS };
  if (form.regulatorKind === 'zener') regulator = { zenerVolts: regulatorVolts!, seriesOhms: seriesOhms! };
  const spec: SupplySpecInput = {
    topology: form.topology,
    source: { vrms: openCircuitVolts, hz: region.hz, ohms: windingOhms },
    diode: { preset: form.diodeKind },
    // Dividing keeps the double nearest the figure as typed (2200 µF → 0.0022).
    ...(microfarads === undefined ? {} : { capacitor: { farads: microfarads / 1e6 } }),
    load,
    ...(regulator === undefined ? {} : { regulator }),
  };
  const nameplate: SupplyNameplate = {
    region: form.region,
    ...(ratedVolts === undefined ? {} : { secondaryVolts: ratedVolts }),
    ...(va === undefined ? {} : { transformerVa: va }),
    ...(microfarads === undefined ? {} : { capacitorMicrofarads: microfarads }),
    ...(capRating === undefined ? {} : { capacitorVoltRating: capRating }),
    diodeKind: form.diodeKind,
    regulator: regulatorWords(form.regulatorKind, regulatorVolts, seriesOhms),
    loadText: form.loadText.trim(),
  };
  return { spec, nameplate, derivation, openCircuitVolts, windingOhms };
}

function regulatorWords(kind: RegulatorKind, volts: number | undefined, seriesOhms: number | undefined): string {
  switch (kind) {
    case 'none':
      return 'none';
    case 'linear':
      return `linear ${volts} V`;
    case 'ldo':
      return `low-dropout ${volts} V`;
    case 'zener':
      return `zener ${volts} V, ${seriesOhms} Ω`;
  }
}

/**
 * The form for a job that has a supply but no saved form text (an imported or demo job): the
 * nameplate's figures, and the spec's own source figures as overrides where they differ from
 * what the rating would give.
 */
export function formFromJob(nameplate: SupplyNameplate | undefined, spec: SupplySpecInput | undefined, fallbackRegion: RegionId): NameplateForm {
  const form: NameplateForm = { ...DEFAULT_NAMEPLATE, region: fallbackRegion };
  if (nameplate !== undefined && nameplate.region in MAINS_REGIONS) form.region = nameplate.region as RegionId;
  const text = (value: number | undefined) => (value === undefined ? '' : String(value));
  if (nameplate?.secondaryVolts !== undefined) form.secondaryVolts = text(nameplate.secondaryVolts);
  if (nameplate?.transformerVa !== undefined) form.transformerVa = text(nameplate.transformerVa);
  form.capacitorVoltRating = text(nameplate?.capacitorVoltRating);
  if (nameplate?.loadText !== undefined) form.loadText = nameplate.loadText;
  // The nameplate's diode words may be free text ("silicon bridge"): take the kind they start with.
  const diodeWords = nameplate?.diodeKind?.toLowerCase() ?? '';
  for (const kind of ['silicon', 'schottky', 'germanium', 'ideal'] as const) if (diodeWords.startsWith(kind)) form.diodeKind = kind;
  if (spec === undefined) return form;
  form.topology = spec.topology;
  if (spec.diode !== undefined && 'preset' in spec.diode) form.diodeKind = spec.diode.preset;
  const cap = Array.isArray(spec.capacitor) ? spec.capacitor[0] : spec.capacitor;
  form.capacitorMicrofarads = cap === undefined ? '' : String(Number((cap.farads * 1e6).toPrecision(6)));
  const reg = spec.regulator;
  if (reg === undefined) form.regulatorKind = 'none';
  else if ('zenerVolts' in reg) {
    form.regulatorKind = 'zener';
    form.regulatorVolts = String(reg.zenerVolts);
    form.seriesOhms = String(reg.seriesOhms);
  } else {
    form.regulatorKind = reg.dropout !== undefined && reg.dropout < 1 ? 'ldo' : 'linear';
    form.regulatorVolts = String(reg.volts);
  }
  if (nameplate?.secondaryVolts !== undefined && nameplate.transformerVa !== undefined) {
    const d = deriveTransformer(spec.topology, nameplate.secondaryVolts, nameplate.transformerVa);
    const differs = (a: number, b: number) => Math.abs(a - b) > 1e-9 * Math.max(1, Math.abs(b));
    if (differs(spec.source.vrms, d.openCircuitVolts)) form.openCircuitVolts = String(Number(spec.source.vrms.toPrecision(6)));
    if (differs(spec.source.ohms ?? 0, d.windingOhms)) form.windingOhms = String(Number((spec.source.ohms ?? 0).toPrecision(6)));
  } else {
    // No rating on file: the source figures stand as given; with no transformer at all when the
    // source is the mains itself.
    const mains = MAINS_REGIONS[form.region];
    if (nameplate?.secondaryVolts === undefined && Math.abs(spec.source.vrms - mains.nominalVolts) < 1e-9) {
      form.transformer = 'none';
      form.secondaryVolts = '';
      form.transformerVa = '';
    } else {
      form.openCircuitVolts = String(spec.source.vrms);
    }
    form.windingOhms = String(spec.source.ohms ?? 0);
  }
  if ('amps' in spec.load) form.loadText = nameplate?.loadText ?? `${spec.load.amps} A`;
  else form.loadText = nameplate?.loadText ?? `${spec.load.ohms} Ω`;
  return form;
}
