/**
 * The records of a job file, checked field by field.
 *
 * Each check takes an untrusted value (parsed JSON from a file, or a record from the store before
 * export) and returns it, or a fresh copy with object members inserted in sorted order when the
 * Checker asks for copies (export), or `INVALID` after reporting why. Three things follow:
 * - a key such as "__proto__" or "constructor" is refused as a field name, so no record that
 *   passes carries one, and nothing imported can reach an object's prototype;
 * - every string, array and number is checked for type and size before it is kept (LIMITS);
 * - JSON.stringify of a copied record is its RFC 8785 canonical JSON, which is what makes the
 *   writer's digest fast (canonical.ts).
 *
 * The field tables are typed against the model (src/model/job.ts): a field added to Job, Reading,
 * Asset or Technician and not here fails to compile, and so does a required/optional mismatch.
 */
import { LIVE_READING_KINDS, POWER_OFF_READING_KINDS } from '../engine/diagnosis/types';
import type { MeterAccuracy, MeterSettings } from '../engine/diagnosis/types';
import { TOPOLOGIES } from '../engine/types';
import type {
  CapacitorInput,
  DiodeInput,
  LoadInput,
  RegulatorInput,
  SourceInput,
  SupplySpecInput,
} from '../engine/types';
import type { Asset, Job, JobFinish, MergeConflict, Reading, SupplyNameplate, Technician } from '../model/job';
import { ASSET_FIELDS, JOB_FIELDS, LIMITS, type ExchangeProblem, type ExportedBy, type RecordConflict } from './format';

/** What a check returns for a value it refused (after reporting it). */
export const INVALID: unique symbol = Symbol('invalid');
export type Invalid = typeof INVALID;

/** Collects problems for one file; knows where in the file the current value is. */
export class Checker {
  readonly problems: ExchangeProblem[] = [];
  /** All problems found, listed or not. */
  problemCount = 0;
  /** The job being checked, for messages. */
  jobId: string | undefined;
  /** The record being checked, in words, for messages ("reading 5c1e…"). */
  record: string | undefined;
  /**
   * The record as a kind and an id, joined into `record` only when a problem is reported (a
   * string built per record would cost more than the checks themselves on large files).
   */
  recordKind: string | undefined;
  recordId: string | undefined;
  /** The line of a version-2 file being checked, for messages. */
  line: number | undefined;
  private readonly path: (string | number)[] = [];

  /**
   * @param file  name for messages
   * @param copy  true: checks return fresh copies with members in sorted order (for writing,
   *              where JSON.stringify of the copy is then canonical); false: checks return the
   *              checked value itself (for reading: a value that passed has only known members,
   *              so it is as safe as a copy, and half a million readings are not allocated twice)
   */
  constructor(
    readonly file: string,
    readonly copy = true,
  ) {}

  enter(key: string | number): void {
    this.path.push(key);
  }

  leave(): void {
    this.path.pop();
  }

  /** The path of the current value, e.g. "payload.readings[12].value". */
  where(): string {
    let text = '';
    for (const key of this.path) {
      if (typeof key === 'number') text += `[${key}]`;
      else text += text === '' ? key : /^[A-Za-z_$][\w$]*$/.test(key) ? `.${key}` : `[${JSON.stringify(key)}]`;
    }
    return text;
  }

  /** Reports a problem at the current path; returns INVALID for the caller to pass on. */
  fail(message: string): Invalid {
    this.problemCount += 1;
    if (this.problems.length < LIMITS.problemsListed) {
      const problem: ExchangeProblem = { file: this.file, message };
      if (this.line !== undefined) problem.line = this.line;
      if (this.jobId !== undefined) problem.jobId = this.jobId;
      const record = this.record ?? (this.recordKind !== undefined && this.recordId !== undefined ? `${this.recordKind} ${this.recordId.slice(0, 100)}` : undefined);
      if (record !== undefined) problem.record = record;
      const field = this.where();
      if (field !== '') problem.field = field;
      this.problems.push(problem);
    }
    return INVALID;
  }
}

/** Checks one value; returns the checked copy or INVALID. */
export type Check = (value: unknown, checker: Checker) => unknown;

/** A plain description of a value's type, for "expected X, got Y". */
export function describeType(value: unknown): string {
  if (value === null) return 'null';
  if (Array.isArray(value)) return 'a list';
  if (typeof value === 'string') return value.length > 40 ? `text (${value.length} characters)` : `text ${JSON.stringify(value)}`;
  if (typeof value === 'object') return 'an object';
  if (typeof value === 'number') return `the number ${value}`;
  return typeof value;
}

// ---------------------------------------------------------------------------------------------
// Scalars
// ---------------------------------------------------------------------------------------------

/** Text of at most `maxChars` UTF-16 units; `nonEmpty` refuses "". */
export function text(maxChars: number, nonEmpty = false): Check {
  return (value, c) => {
    if (typeof value !== 'string') return c.fail(`expected text, got ${describeType(value)}`);
    if (value.length > maxChars) return c.fail(`text too long (${value.length} characters; at most ${maxChars})`);
    if (nonEmpty && value.trim() === '') return c.fail('must not be empty');
    return value;
  };
}

export const SHORT = text(LIMITS.shortTextChars);
const SHORT_NON_EMPTY = text(LIMITS.shortTextChars, true);
export const LONG = text(LIMITS.longTextChars);

/** Characters an id may use: UUIDs, and the "~" of a merge's reading variants (merge.ts). */
const ID_PATTERN = /^[A-Za-z0-9._:~-]+$/;

/** A quick yes for the usual id (what `id` accepts without a variant suffix); no means "ask `id`". */
export function isPlainId(value: unknown): boolean {
  return typeof value === 'string' && value.length > 0 && value.length <= LIMITS.idChars && ID_PATTERN.test(value);
}

/** A merge's name for a second reading under a taken id: the id, "~", 16 hex digits (merge.ts). */
export const VARIANT_SUFFIX = /~[0-9a-f]{16}$/;
const VARIANT_SUFFIX_CHARS = 17;

export const id: Check = (value, c) => {
  if (typeof value !== 'string') return c.fail(`expected an id (text), got ${describeType(value)}`);
  const isVariant = value.length > VARIANT_SUFFIX_CHARS && VARIANT_SUFFIX.test(value);
  const baseChars = isVariant ? value.length - VARIANT_SUFFIX_CHARS : value.length;
  if (value.length === 0 || baseChars > LIMITS.idChars) {
    return c.fail(`an id has 1 to ${LIMITS.idChars} characters, this one ${value.length}`);
  }
  if (!ID_PATTERN.test(value)) return c.fail(`an id uses only A-Z a-z 0-9 . _ : ~ -, got ${JSON.stringify(value)}`);
  return value;
};

/** Exactly Date.prototype.toISOString's form, so times compare as text and survive a round trip. */
const ISO_PATTERN = /^\d{4}-\d{2}-\d{2}T\d{2}:\d{2}:\d{2}\.\d{3}Z$/;

const digitsAt = (text: string, start: number, count: number): number => {
  let n = 0;
  for (let i = start; i < start + count; i++) n = n * 10 + (text.charCodeAt(i) - 48);
  return n;
};

/** Whether an ISO_PATTERN match names a real instant (month 1–12, day within the month, 23:59:59 at most). */
function isRealTime(text: string): boolean {
  const year = digitsAt(text, 0, 4);
  const month = digitsAt(text, 5, 2);
  const day = digitsAt(text, 8, 2);
  if (month < 1 || month > 12 || day < 1) return false;
  // Gregorian leap years (ISO 8601 uses the proleptic Gregorian calendar).
  const leap = year % 4 === 0 && (year % 100 !== 0 || year % 400 === 0);
  const days = month === 2 ? (leap ? 29 : 28) : month === 4 || month === 6 || month === 9 || month === 11 ? 30 : 31;
  return day <= days && digitsAt(text, 11, 2) <= 23 && digitsAt(text, 14, 2) <= 59 && digitsAt(text, 17, 2) <= 59;
}

/** Whether a value is a time in exactly Date.prototype.toISOString's form, naming a real instant. */
export function isIsoTimeText(value: unknown): boolean {
  return typeof value === 'string' && value.length === 24 && ISO_PATTERN.test(value) && isRealTime(value);
}

export const isoTime: Check = (value, c) => {
  if (typeof value !== 'string') return c.fail(`expected a UTC time like "2026-03-01T09:30:00.000Z", got ${describeType(value)}`);
  if (value.length !== 24 || !ISO_PATTERN.test(value) || !isRealTime(value)) {
    return c.fail(`expected a UTC time like "2026-03-01T09:30:00.000Z", got ${JSON.stringify(value.slice(0, 40))}`);
  }
  return value;
};

export const finite: Check = (value, c) => {
  if (typeof value !== 'number' || !Number.isFinite(value)) return c.fail(`expected a number, got ${describeType(value)}`);
  return value;
};

export function oneOf<T extends string>(choices: readonly T[]): Check {
  const allowed = new Set<string>(choices);
  return (value, c) => {
    if (typeof value === 'string' && allowed.has(value)) return value;
    return c.fail(`expected one of ${choices.map((choice) => JSON.stringify(choice)).join(', ')}, got ${describeType(value)}`);
  };
}

export const meterValue: Check = (value, c) => {
  if (value === 'OL') return value;
  if (typeof value !== 'number' || !Number.isFinite(value)) return c.fail(`expected a number or "OL", got ${describeType(value)}`);
  return value;
};

// ---------------------------------------------------------------------------------------------
// Lists and objects
// ---------------------------------------------------------------------------------------------

export function arrayOf(item: Check, maxItems: number, what = 'items'): Check {
  return (value, c) => {
    if (!Array.isArray(value)) return c.fail(`expected a list of ${what}, got ${describeType(value)}`);
    if (value.length > maxItems) return c.fail(`too many ${what} (${value.length}; at most ${maxItems})`);
    const out: unknown[] | undefined = c.copy ? new Array(value.length) : undefined;
    let ok = true;
    for (let i = 0; i < value.length; i++) {
      c.enter(i);
      const checked = item(value[i], c);
      c.leave();
      if (checked === INVALID) ok = false;
      if (out) out[i] = checked;
    }
    return ok ? (out ?? value) : INVALID;
  };
}

function tuple(items: readonly Check[]): Check {
  return (value, c) => {
    if (!Array.isArray(value) || value.length !== items.length) {
      return c.fail(`expected a list of ${items.length}, got ${describeType(value)}`);
    }
    const out: unknown[] = [];
    let ok = true;
    items.forEach((item, i) => {
      c.enter(i);
      const checked = item(value[i], c);
      c.leave();
      if (checked === INVALID) ok = false;
      out.push(checked);
    });
    return ok ? (c.copy ? out : value) : INVALID;
  };
}

interface Required_ {
  readonly check: Check;
  readonly optional: false;
}
interface Optional_ {
  readonly check: Check;
  readonly optional: true;
}
/** One table entry per member of T: optional members must be `opt`, required ones `req`. */
export type FieldsOf<T> = { [K in keyof T]-?: undefined extends T[K] ? Optional_ : Required_ };

export const req = (check: Check): Required_ => ({ check, optional: false });
export const opt = (check: Check): Optional_ => ({ check, optional: true });

const POLLUTING_KEYS = new Set(['__proto__', 'constructor', 'prototype']);

function isPlainRecord(value: unknown): value is Record<string, unknown> {
  return typeof value === 'object' && value !== null && !Array.isArray(value);
}

/** Why a member name is refused: prototype-polluting names get their own words. */
export function unknownFieldMessage(key: string): string {
  return POLLUTING_KEYS.has(key) ? `"${key}" is not allowed as a field name` : `unknown field "${key.slice(0, 60)}"`;
}

/** Reports every member of `value` whose name is not in `known`. */
export function reportUnknownKeys(value: Record<string, unknown>, known: ReadonlySet<string>, c: Checker): void {
  for (const key of Object.keys(value)) {
    if (known.has(key)) continue;
    c.enter(key);
    c.fail(unknownFieldMessage(key));
    c.leave();
  }
}

/**
 * An object with exactly the members in `fields` (missing optional ones allowed, unknown ones
 * refused). The copy has its members in sorted order; absent optional members stay absent.
 */
export function object<T>(fields: FieldsOf<T>, what = 'an object'): Check {
  const table = Object.entries(fields as Record<string, Required_ | Optional_>).sort(([a], [b]) => (a < b ? -1 : a > b ? 1 : 0));
  const names = table.map(([name]) => name);
  const checks = table.map(([, spec]) => spec.check);
  const optional = table.map(([, spec]) => spec.optional);
  const known = new Set(names);
  return (value, c) => {
    if (!isPlainRecord(value)) return c.fail(`expected ${what}, got ${describeType(value)}`);
    // A copy only when the checker asks for one: a read checks half a million records in place.
    const out: Record<string, unknown> | undefined = c.copy ? {} : undefined;
    let ok = true;
    let present = 0;
    for (let i = 0; i < names.length; i++) {
      const name = names[i]!;
      if (!Object.hasOwn(value, name)) {
        if (!optional[i]) {
          c.enter(name);
          c.fail('missing');
          c.leave();
          ok = false;
        }
        continue;
      }
      present += 1;
      c.enter(name);
      const checked = checks[i]!(value[name], c);
      c.leave();
      if (checked === INVALID) ok = false;
      else if (out) out[name] = checked;
    }
    if (countOwnKeys(value) !== present) {
      reportUnknownKeys(value, known, c);
      ok = false;
    }
    return ok ? (out ?? value) : INVALID;
  };
}

/** Own enumerable members of a parsed object, counted without building the list of names. */
function countOwnKeys(value: Record<string, unknown>): number {
  let count = 0;
  for (const key in value) if (Object.hasOwn(value, key)) count += 1;
  return count;
}

/** An object whose member names come from `keys` and whose values all pass `item`; copy sorted. */
function recordOf(keys: readonly string[], item: Check, what: string): Check {
  const sortedKeys = [...keys].sort();
  const known = new Set(keys);
  return (value, c) => {
    if (!isPlainRecord(value)) return c.fail(`expected ${what}, got ${describeType(value)}`);
    const out: Record<string, unknown> | undefined = c.copy ? {} : undefined;
    let ok = true;
    let present = 0;
    for (const key of sortedKeys) {
      if (!Object.hasOwn(value, key)) continue;
      present += 1;
      c.enter(key);
      const checked = item(value[key], c);
      c.leave();
      if (checked === INVALID) ok = false;
      else if (out) out[key] = checked;
    }
    if (countOwnKeys(value) !== present) {
      reportUnknownKeys(value, known, c);
      ok = false;
    }
    return ok ? (out ?? value) : INVALID;
  };
}

/** A union of object shapes told apart by which members are present. */
function variant(pick: (value: Record<string, unknown>) => Check | string, what: string): Check {
  return (value, c) => {
    if (!isPlainRecord(value)) return c.fail(`expected ${what}, got ${describeType(value)}`);
    const chosen = pick(value);
    return typeof chosen === 'string' ? c.fail(chosen) : chosen(value, c);
  };
}

// ---------------------------------------------------------------------------------------------
// The supply spec as the technician entered it (engine's SupplySpecInput): shape only. Whether
// the values make a workable supply is the engine's question, asked when the job is opened, so a
// file is never refused because a later engine got stricter.
// ---------------------------------------------------------------------------------------------

const sourceInput = object<SourceInput>({ vrms: req(finite), hz: req(finite), ohms: opt(finite) }, 'a source');

type ShockleyInput = Extract<DiodeInput, { is: number }>;
type FixedDropInput = Extract<DiodeInput, { vf: number }>;
type PresetInput = Extract<DiodeInput, { preset: string }>;
const presetDiode = object<PresetInput>({ preset: req(oneOf(['silicon', 'schottky', 'germanium', 'ideal'])) });
const shockleyDiode = object<ShockleyInput>({ is: req(finite), n: req(finite), ohms: opt(finite) });
const fixedDropDiode = object<FixedDropInput>({ vf: req(finite), ohms: opt(finite) });
const diodeInput = variant(
  (value) =>
    'preset' in value ? presetDiode : 'is' in value ? shockleyDiode : 'vf' in value ? fixedDropDiode : 'a diode needs "preset", "is" and "n", or "vf"',
  'a diode',
);

const capacitorOne = object<CapacitorInput>({ farads: req(finite), esr: opt(finite) }, 'a capacitor');
const capacitorPair = tuple([capacitorOne, capacitorOne]);
const capacitorInput: Check = (value, c) => (Array.isArray(value) ? capacitorPair(value, c) : capacitorOne(value, c));

const ohmsLoad = object<Extract<LoadInput, { ohms: number }>>({ ohms: req(finite) });
const ampsLoad = object<Extract<LoadInput, { amps: number }>>({ amps: req(finite) });
const loadInput = variant((value) => ('ohms' in value ? ohmsLoad : 'amps' in value ? ampsLoad : 'a load needs "ohms" or "amps"'), 'a load');

type LinearInput = Extract<RegulatorInput, { volts: number }>;
type ZenerInput = Extract<RegulatorInput, { zenerVolts: number }>;
const linearRegulator = object<LinearInput>({ volts: req(finite), dropout: opt(finite), quiescentAmps: opt(finite) });
const zenerRegulator = object<ZenerInput>({ zenerVolts: req(finite), seriesOhms: req(finite), zenerOhms: opt(finite) });
const regulatorInput = variant(
  (value) => ('volts' in value ? linearRegulator : 'zenerVolts' in value ? zenerRegulator : 'a regulator needs "volts" or "zenerVolts"'),
  'a regulator',
);

const supplyInput = object<SupplySpecInput>(
  {
    topology: req(oneOf(TOPOLOGIES)),
    source: req(sourceInput),
    diode: opt(diodeInput),
    capacitor: opt(capacitorInput),
    load: req(loadInput),
    regulator: opt(regulatorInput),
    diodeCondition: opt(recordOf(['D1', 'D2', 'D3', 'D4'], oneOf(['ok', 'open', 'short']), 'diode conditions')),
    temperatureC: opt(finite),
  },
  'a supply',
);

const accuracy = object<MeterAccuracy>({ percent: req(finite), counts: req(finite) }, 'an accuracy');
const meterSettings = object<MeterSettings>(
  {
    kind: opt(oneOf(['true-rms-ac', 'average-responding', 'true-rms-ac-dc'])),
    dc: opt(accuracy),
    ac: opt(accuracy),
    displayCounts: opt(finite),
    acBandwidthHz: opt(tuple([finite, finite])),
    diodeTestVolts: opt(finite),
    diodeTestAmps: opt(finite),
  },
  'meter settings',
);

const nameplate = object<SupplyNameplate>(
  {
    region: req(SHORT),
    secondaryVolts: opt(finite),
    transformerVa: opt(finite),
    capacitorMicrofarads: opt(finite),
    capacitorVoltRating: opt(finite),
    diodeKind: opt(SHORT),
    regulator: opt(SHORT),
    loadText: opt(SHORT),
  },
  'a nameplate',
);

const finish = object<JobFinish>(
  {
    suspectedPart: opt(SHORT),
    faultFound: opt(SHORT),
    actionTaken: opt(LONG),
    partsUsed: req(arrayOf(SHORT, LIMITS.partsPerJob, 'parts')),
    outcome: opt(oneOf(['fixed', 'not-fixed', 'referred', 'no-fault-found'])),
    notes: opt(LONG),
  },
  'a finish',
);

// ---------------------------------------------------------------------------------------------
// Records
// ---------------------------------------------------------------------------------------------

/** The check of each job field's value, used for jobs and for the values inside conflicts. */
export const JOB_FIELD_CHECKS = {
  customer: SHORT,
  site: SHORT,
  assetId: id,
  technicianId: id,
  complaint: LONG,
  supply: supplyInput,
  nameplate,
  status: oneOf(['open', 'finished']),
  finish,
  meter: meterSettings,
} as const satisfies Record<(typeof JOB_FIELDS)[number], Check>;

export const checkJob = object<Job>(
  {
    id: req(id),
    createdAt: req(isoTime),
    updatedAt: req(isoTime),
    startedAt: opt(isoTime),
    finishedAt: opt(isoTime),
    customer: req(JOB_FIELD_CHECKS.customer),
    site: req(JOB_FIELD_CHECKS.site),
    assetId: opt(JOB_FIELD_CHECKS.assetId),
    technicianId: req(JOB_FIELD_CHECKS.technicianId),
    complaint: req(JOB_FIELD_CHECKS.complaint),
    supply: opt(JOB_FIELD_CHECKS.supply),
    nameplate: opt(JOB_FIELD_CHECKS.nameplate),
    meter: opt(JOB_FIELD_CHECKS.meter),
    status: req(JOB_FIELD_CHECKS.status),
    finish: opt(JOB_FIELD_CHECKS.finish),
    edits: req(recordOf(JOB_FIELDS, isoTime, 'edit times by field')),
  },
  'a job',
);

export const READING_KINDS = [...LIVE_READING_KINDS, ...POWER_OFF_READING_KINDS] as const;

/** A reading's target: a part label of 1 to this many characters. */
export const TARGET_CHARS = 20;
export const READING_PHASES = ['before', 'after'] as const;
export const VERDICTS = ['in', 'low', 'high'] as const;

/** The check of each reading field, for reading records and for version 2's reading columns. */
export const READING_FIELDS: FieldsOf<Reading> = {
  id: req(id),
  jobId: req(id),
  kind: req(oneOf(READING_KINDS)),
  target: opt(text(TARGET_CHARS, true)),
  value: req(meterValue),
  text: req(SHORT),
  takenAt: req(isoTime),
  phase: req(oneOf(READING_PHASES)),
  expectedLow: opt(finite),
  expectedHigh: opt(finite),
  verdict: opt(oneOf(VERDICTS)),
  supersedes: opt(id),
  note: opt(LONG),
};

export const checkReading = object<Reading>(READING_FIELDS, 'a reading');

export const checkAsset = object<Asset>(
  {
    id: req(id),
    kind: req(SHORT_NON_EMPTY),
    make: opt(SHORT),
    model: opt(SHORT),
    serial: opt(SHORT),
    tag: opt(SHORT),
    customer: req(SHORT),
    site: req(SHORT),
  },
  'an asset',
);

export const checkTechnician = object<Technician>({ id: req(id), name: req(SHORT_NON_EMPTY) }, 'a technician');

/** A conflict's kept and dropped values are checked as values of the field it names. */
const conflictShape = object<MergeConflict>(
  {
    jobId: req(id),
    field: req(oneOf(JOB_FIELDS)),
    kept: opt((value) => value),
    keptEditedAt: req(isoTime),
    dropped: opt((value) => value),
    droppedEditedAt: req(isoTime),
    droppedFrom: opt(SHORT),
  },
  'a conflict',
);

export const checkConflict: Check = (value, c) => {
  const shaped = conflictShape(value, c);
  if (shaped === INVALID) return INVALID;
  const conflict = shaped as MergeConflict & Record<string, unknown>;
  const valueCheck = JOB_FIELD_CHECKS[conflict.field];
  let ok = true;
  for (const member of ['kept', 'dropped'] as const) {
    if (!Object.hasOwn(conflict, member)) continue;
    c.enter(member);
    const checked = valueCheck(conflict[member], c);
    c.leave();
    if (checked === INVALID) ok = false;
    else conflict[member] = checked;
  }
  return ok ? conflict : INVALID;
};

export const checkRecordConflict = object<RecordConflict>(
  {
    record: req(oneOf(['asset', 'technician'])),
    id: req(id),
    field: req(oneOf([...ASSET_FIELDS, 'name'])),
    kept: opt(SHORT),
    keptAt: req(isoTime),
    dropped: opt(SHORT),
    droppedAt: req(isoTime),
    droppedFrom: opt(SHORT),
  },
  'an asset or technician conflict',
);

export const checkExportedBy = object<ExportedBy>(
  { technicianId: opt(id), name: opt(SHORT), device: opt(SHORT) },
  'who exported the file',
);
