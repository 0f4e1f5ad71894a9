/**
 * The layout of a version-2 job file (docs/exchange-format.md): JSON Lines, a head line, lines
 * of records ("blocks"), and a seal line with the digest. Readings travel as a table of columns,
 * one column per field, and name their job by its place in the file rather than by its id.
 *
 * This module holds what the writer (write.ts) and the reader (read-v2.ts) must agree on: the
 * members of the head and the seal, the kinds of block, and the reading table both ways.
 */
import type { Job, Reading } from '../model/job';
import { LIMITS } from './format';
import type { PayloadKey } from './payload';
import {
  Checker,
  describeType,
  isIsoTimeText,
  isPlainId,
  READING_FIELDS,
  READING_KINDS,
  READING_PHASES,
  reportUnknownKeys,
  TARGET_CHARS,
  VERDICTS,
  type Check,
} from './schema';

/** The kinds of block, in the order a writer writes them (readers take any order). */
export const BLOCK_KINDS: readonly PayloadKey[] = ['technicians', 'assets', 'jobs', 'readings', 'conflicts', 'recordConflicts'];
export const BLOCK_KIND_SET: ReadonlySet<string> = new Set(BLOCK_KINDS);

/** How many records of each kind a file holds, as its head says. */
export type RecordCounts = Record<PayloadKey, number>;

export const HEAD_KEYS: ReadonlySet<string> = new Set(['format', 'schemaVersion', 'exportedAt', 'exportedBy', 'counts']);

/** Writers end a block once its line reaches about this many characters (64 KiB). */
export const TARGET_LINE_CHARS = 65_536;

// ---------------------------------------------------------------------------------------------
// The reading table
// ---------------------------------------------------------------------------------------------

/** A reading field as a column: its check, and a quick test that passes the usual good value. */
interface Column {
  readonly name: Exclude<keyof Reading, 'jobId'>;
  readonly optional: boolean;
  readonly check: Check;
  /** True: certainly valid. False: ask `check`, which decides and words the problem. */
  readonly quick: (value: unknown) => boolean;
}

const KIND_SET: ReadonlySet<unknown> = new Set(READING_KINDS);
const isFiniteNumber = (value: unknown): boolean => typeof value === 'number' && Number.isFinite(value);
const isTextUpTo = (max: number) => (value: unknown) => typeof value === 'string' && value.length <= max;

const column = (name: Column['name'], quick: Column['quick']): Column => ({
  name,
  optional: READING_FIELDS[name].optional,
  check: READING_FIELDS[name].check,
  quick,
});

/**
 * The columns after `id` and `job`, in the order written. Optional columns may be left out of a
 * block when none of its readings has the field; present, they hold null for "absent".
 */
export const READING_COLUMNS: readonly Column[] = [
  column('id', isPlainId),
  column('kind', (v) => KIND_SET.has(v)),
  column('target', (v) => typeof v === 'string' && v.length >= 1 && v.length <= TARGET_CHARS && v.trim() !== ''),
  column('value', (v) => isFiniteNumber(v) || v === 'OL'),
  column('text', isTextUpTo(LIMITS.shortTextChars)),
  column('takenAt', isIsoTimeText),
  column('phase', (v) => v === READING_PHASES[0] || v === READING_PHASES[1]),
  column('expectedLow', isFiniteNumber),
  column('expectedHigh', isFiniteNumber),
  column('verdict', (v) => v === VERDICTS[0] || v === VERDICTS[1] || v === VERDICTS[2]),
  column('supersedes', isPlainId),
  column('note', isTextUpTo(LIMITS.longTextChars)),
];

const REQUIRED_COLUMNS = READING_COLUMNS.filter((column) => !column.optional);
const OPTIONAL_COLUMNS = READING_COLUMNS.filter((column) => column.optional);

/**
 * A quick yes for a reading record as the app stores them (every member known and of its type,
 * the usual ids): the writer checks a hundred thousand of them before an export. No means "ask
 * the full check" (schema.ts), which decides and words the problem.
 */
export function isPlainReading(value: unknown): boolean {
  if (typeof value !== 'object' || value === null || Array.isArray(value)) return false;
  const reading = value as Record<string, unknown>;
  if (!isPlainId(reading.jobId) || !Object.hasOwn(reading, 'jobId')) return false;
  let present = 1;
  for (const { name, quick } of REQUIRED_COLUMNS) {
    if (!Object.hasOwn(reading, name) || !quick(reading[name])) return false;
    present += 1;
  }
  for (const { name, quick } of OPTIONAL_COLUMNS) {
    if (!Object.hasOwn(reading, name)) continue;
    if (!quick(reading[name])) return false;
    present += 1;
  }
  // No member beyond the known ones.
  let members = 0;
  for (const key in reading) if (Object.hasOwn(reading, key)) members += 1;
  return members === present;
}

/** Every member a reading table may have: the columns and `job`. */
const TABLE_KEYS: ReadonlySet<string> = new Set(['job', ...READING_COLUMNS.map((c) => c.name)]);

/** A block of readings as written: `job` holds each reading's job as its place among the file's jobs. */
export type ReadingTable = { job: number[] } & { [K in Column['name']]?: unknown[] };

/**
 * The readings[start, end) as a table. `jobOf[k]` is reading k's job as its place in the file
 * (0 for the first job written). Optional columns no reading here uses are left out.
 */
export function buildReadingTable(readings: readonly Reading[], start: number, end: number, jobOf: ArrayLike<number>): ReadingTable {
  const job: number[] = new Array(end - start);
  for (let k = start; k < end; k++) job[k - start] = jobOf[k]!;
  // Member order: id, job, then the other columns (JSON.stringify keeps insertion order).
  const ordered: Record<string, unknown[]> = {};
  for (const { name, optional } of READING_COLUMNS) {
    const values: unknown[] = new Array(end - start);
    let any = false;
    for (let k = start; k < end; k++) {
      const value = readings[k]![name];
      if (value === undefined) values[k - start] = null;
      else {
        values[k - start] = value;
        any = true;
      }
    }
    if (!optional || any) ordered[name] = values;
    if (name === 'id') ordered.job = job;
  }
  return ordered as ReadingTable;
}

/**
 * Checks a reading table from line `c.line` and builds its readings. `firstIndex` is the file's
 * count of readings before this table (for paths such as "payload.readings[1234].value"), `jobs`
 * the jobs read so far (a reading's job must come before it). Problems go to `c`; returns the
 * readings, or undefined when any value was refused (then nothing is built).
 */
export function readReadingTable(value: unknown, c: Checker, firstIndex: number, jobs: readonly Job[]): Reading[] | undefined {
  const structural = (path: string[], message: string) => {
    for (const key of path) c.enter(key);
    c.fail(message);
    for (let i = 0; i < path.length; i++) c.leave();
  };
  if (typeof value !== 'object' || value === null || Array.isArray(value)) {
    structural(['readings'], `expected a table of readings (an object of columns), got ${describeType(value)}`);
    return undefined;
  }
  const table = value as Record<string, unknown>;
  const before = c.problemCount;
  c.enter('readings');
  reportUnknownKeys(table, TABLE_KEYS, c);
  c.leave();
  const ids = Object.hasOwn(table, 'id') ? table.id : undefined;
  if (!Array.isArray(ids) || ids.length === 0) {
    structural(['readings', 'id'], `expected a list of reading ids, one per reading, got ${describeType(ids)}`);
    return undefined;
  }
  const n = ids.length;
  const columns = new Map<string, unknown[]>();
  for (const name of TABLE_KEYS) {
    const list = Object.hasOwn(table, name) ? table[name] : undefined;
    const optional = name !== 'job' && READING_FIELDS[name as Column['name']].optional;
    if (list === undefined && optional) continue;
    if (!Array.isArray(list) || list.length !== n) {
      const what = list === undefined ? 'missing' : `expected a list of ${n} values, one per reading, got ${Array.isArray(list) ? `a list of ${list.length}` : describeType(list)}`;
      structural(['readings', name], what);
      continue;
    }
    columns.set(name, list);
  }
  if (c.problemCount > before) return undefined;

  const jobColumn = columns.get('job')!;
  // A refused value is reported with its record: the reading's id and its job, where known.
  const describeRecord = (k: number) => {
    const id = ids[k];
    const job = jobColumn[k];
    c.recordKind = 'reading';
    c.recordId = typeof id === 'string' ? id : undefined;
    c.jobId = typeof job === 'number' && Number.isInteger(job) && job >= 0 && job < jobs.length ? jobs[job]!.id : undefined;
  };
  const refuseValue = (k: number, name: string, check: () => unknown) => {
    describeRecord(k);
    c.enter('payload');
    c.enter('readings');
    c.enter(firstIndex + k);
    c.enter(name);
    check();
    c.leave();
    c.leave();
    c.leave();
    c.leave();
    c.recordKind = undefined;
    c.recordId = undefined;
    c.jobId = undefined;
  };
  for (let k = 0; k < n; k++) {
    const job = jobColumn[k];
    if (typeof job === 'number' && Number.isInteger(job) && job >= 0 && job < jobs.length) continue;
    refuseValue(k, 'job', () =>
      c.fail(
        jobs.length === 0
          ? `expected the place of a job in an earlier line, but no job comes before this line (got ${describeType(job)})`
          : `expected the place of a job in an earlier line, 0 to ${jobs.length - 1}, got ${describeType(job)}`,
      ),
    );
  }
  for (const { name, optional, check, quick } of READING_COLUMNS) {
    const list = columns.get(name);
    if (list === undefined) continue;
    for (let k = 0; k < n; k++) {
      const v = list[k];
      if (quick(v) || (optional && v === null)) continue;
      // The quick test is stricter than the check (a merge's "~" ids pass only the check).
      refuseValue(k, name, () => check(v, c));
    }
  }
  if (c.problemCount > before) return undefined;

  const out: Reading[] = new Array(n);
  const kind = columns.get('kind')!;
  const target = columns.get('target');
  const values = columns.get('value')!;
  const text = columns.get('text')!;
  const takenAt = columns.get('takenAt')!;
  const phase = columns.get('phase')!;
  const expectedLow = columns.get('expectedLow');
  const expectedHigh = columns.get('expectedHigh');
  const verdict = columns.get('verdict');
  const supersedes = columns.get('supersedes');
  const note = columns.get('note');
  for (let k = 0; k < n; k++) {
    const reading = {
      id: ids[k],
      jobId: jobs[jobColumn[k] as number]!.id,
      kind: kind[k],
      value: values[k],
      text: text[k],
      takenAt: takenAt[k],
      phase: phase[k],
    } as Reading;
    if (target !== undefined && target[k] !== null) reading.target = target[k] as string;
    if (expectedLow !== undefined && expectedLow[k] !== null) reading.expectedLow = expectedLow[k] as number;
    if (expectedHigh !== undefined && expectedHigh[k] !== null) reading.expectedHigh = expectedHigh[k] as number;
    if (verdict !== undefined && verdict[k] !== null) reading.verdict = verdict[k] as Reading['verdict'];
    if (supersedes !== undefined && supersedes[k] !== null) reading.supersedes = supersedes[k] as string;
    if (note !== undefined && note[k] !== null) reading.note = note[k] as string;
    out[k] = reading;
  }
  return out;
}
