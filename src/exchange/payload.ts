/**
 * Checks of a whole payload, whatever file layout it came in: every record field by field
 * (schema.ts), then the references between records (docs/exchange-format.md, "References").
 * The version-1 reader, the version-2 reader and the writer all end here, so a file this code
 * writes always reads back and both versions refuse the same records.
 */
import { LIMITS, type JobPayload } from './format';
import { IdTable } from './id-table';
import { isPlainReading } from './lines';
import {
  Checker,
  checkAsset,
  checkConflict,
  checkJob,
  checkReading,
  checkRecordConflict,
  checkTechnician,
  describeType,
  INVALID,
  reportUnknownKeys,
  type Check,
} from './schema';

export const PAYLOAD_KEYS = ['assets', 'conflicts', 'jobs', 'readings', 'recordConflicts', 'technicians'] as const;
export type PayloadKey = (typeof PAYLOAD_KEYS)[number];
const PAYLOAD_KEY_SET: ReadonlySet<string> = new Set(PAYLOAD_KEYS);

/** What each list holds: its check, its label in messages, its limit, where a record names its job. */
export const RECORD_LISTS: Record<PayloadKey, { check: Check; label: string; maxItems: number; jobIdKey: 'id' | 'jobId' | undefined }> = {
  jobs: { check: checkJob, label: 'job', maxItems: LIMITS.jobs, jobIdKey: 'id' },
  readings: { check: checkReading, label: 'reading', maxItems: LIMITS.readings, jobIdKey: 'jobId' },
  assets: { check: checkAsset, label: 'asset', maxItems: LIMITS.assets, jobIdKey: undefined },
  technicians: { check: checkTechnician, label: 'technician', maxItems: LIMITS.technicians, jobIdKey: undefined },
  conflicts: { check: checkConflict, label: 'conflict', maxItems: LIMITS.conflicts, jobIdKey: 'jobId' },
  recordConflicts: { check: checkRecordConflict, label: 'record conflict', maxItems: LIMITS.conflicts, jobIdKey: undefined },
};

/**
 * Checks the records of one list, item by item, with the record's id and job (read from the raw
 * item, for messages only) set on the checker. `firstIndex` numbers the items in messages
 * ("payload.jobs[12]"): a version-2 file hands its lists over a line at a time. `quick`, when
 * given, passes the usual good record without the full check (which still words any problem).
 * Returns the checked items (copies when the checker copies), or undefined when any was refused.
 */
export function checkRecordList(
  list: readonly unknown[],
  key: PayloadKey,
  c: Checker,
  firstIndex = 0,
  quick?: (item: unknown) => boolean,
): unknown[] | undefined {
  const { check, label, jobIdKey } = RECORD_LISTS[key];
  const out: unknown[] | undefined = c.copy ? new Array(list.length) : undefined;
  let ok = true;
  c.recordKind = label;
  c.enter('payload');
  c.enter(key);
  for (let i = 0; i < list.length; i++) {
    const item: unknown = list[i];
    // A quick yes stands for the full check's, when no copy is wanted.
    if (out === undefined && quick?.(item) === true) continue;
    const raw = typeof item === 'object' && item !== null ? (item as Record<string, unknown>) : undefined;
    const itemId = raw !== undefined && Object.hasOwn(raw, 'id') ? raw.id : undefined;
    const jobId = raw !== undefined && jobIdKey !== undefined && Object.hasOwn(raw, jobIdKey) ? raw[jobIdKey] : undefined;
    c.recordId = typeof itemId === 'string' ? itemId : undefined;
    c.jobId = typeof jobId === 'string' ? jobId.slice(0, 100) : undefined;
    c.enter(firstIndex + i);
    const checked = check(item, c);
    c.leave();
    if (checked === INVALID) ok = false;
    if (out) out[i] = checked;
  }
  c.leave();
  c.leave();
  c.recordKind = undefined;
  c.recordId = undefined;
  c.jobId = undefined;
  return ok ? (out ?? (list as unknown[])) : undefined;
}

/**
 * Checks a payload object (parsed from a version-1 file, or records from the store before
 * export) and returns the checked copy, or undefined after reporting its problems to `c`.
 */
export function checkPayload(value: unknown, c: Checker): JobPayload | undefined {
  const failAt = (message: string, key?: PayloadKey) => {
    c.enter('payload');
    if (key !== undefined) c.enter(key);
    c.fail(message);
    if (key !== undefined) c.leave();
    c.leave();
  };
  if (typeof value !== 'object' || value === null || Array.isArray(value)) {
    failAt(`expected the payload object, got ${describeType(value)}`);
    return undefined;
  }
  const raw = value as Record<string, unknown>;
  c.enter('payload');
  reportUnknownKeys(raw, PAYLOAD_KEY_SET, c);
  c.leave();
  const lists: Partial<Record<PayloadKey, unknown[]>> = {};
  let ok = true;
  for (const key of ['jobs', 'readings', 'assets', 'technicians', 'conflicts', 'recordConflicts'] as const) {
    const list = Object.hasOwn(raw, key) ? raw[key] : undefined;
    const { label, maxItems } = RECORD_LISTS[key];
    if (!Array.isArray(list) || list.length > maxItems) {
      failAt(
        list === undefined
          ? 'missing (write an empty list when there are none)'
          : !Array.isArray(list)
            ? `expected a list of ${label}s, got ${describeType(list)}`
            : `too many ${label}s (${list.length}; at most ${maxItems})`,
        key,
      );
      ok = false;
      continue;
    }
    const checked = checkRecordList(list, key, c, 0, key === 'readings' ? isPlainReading : undefined);
    if (checked === undefined) ok = false;
    else lists[key] = checked;
  }
  if (!ok || c.problemCount > 0) return undefined;
  // Members in sorted order: JSON.stringify of this object is canonical (see canonical.ts).
  const { assets, conflicts, jobs, readings, recordConflicts, technicians } = lists;
  return { assets, conflicts, jobs, readings, recordConflicts, technicians } as unknown as JobPayload;
}

/**
 * References between records: unique ids, and every id a record names is in the payload.
 * Reports to `c`, with the line each record is on when `lineOf` knows it (a version-2 file). The
 * readings' ids go in an IdTable (id-table.ts): there may be millions.
 */
export function checkReferences(payload: JobPayload, c: Checker, lineOf?: (kind: PayloadKey, index: number) => number): void {
  const fail = (path: PayloadKey, index: number, message: string, jobId?: string, record?: string) => {
    c.enter('payload');
    c.enter(path);
    c.enter(index);
    c.jobId = jobId;
    c.record = record;
    c.line = lineOf?.(path, index);
    c.fail(message);
    c.line = undefined;
    c.jobId = undefined;
    c.record = undefined;
    c.leave();
    c.leave();
    c.leave();
  };
  const uniqueIds = <T extends { id: string }>(list: readonly T[], path: PayloadKey, label: string, jobIdOf: (item: T) => string | undefined): Set<string> => {
    const ids = new Set<string>();
    for (let i = 0; i < list.length; i++) {
      const item = list[i]!;
      const before = ids.size;
      ids.add(item.id);
      if (ids.size === before) fail(path, i, `the id ${item.id} appears twice in this file`, jobIdOf(item), `${label} ${item.id}`);
    }
    return ids;
  };
  const jobs = uniqueIds(payload.jobs, 'jobs', 'job', (job) => job.id);
  const assets = uniqueIds(payload.assets, 'assets', 'asset', () => undefined);
  const technicians = uniqueIds(payload.technicians, 'technicians', 'technician', () => undefined);
  payload.jobs.forEach((job, i) => {
    if (!technicians.has(job.technicianId)) {
      fail('jobs', i, `names technician ${job.technicianId}, who is not in the file's technicians`, job.id, `job ${job.id}`);
    }
    if (job.assetId !== undefined && !assets.has(job.assetId)) {
      fail('jobs', i, `names asset ${job.assetId}, which is not in the file's assets`, job.id, `job ${job.id}`);
    }
  });
  const { readings } = payload;
  const readingIds = new IdTable(readings.length, (i) => readings[i]!.id);
  let corrections = false;
  for (let i = 0; i < readings.length; i++) {
    const reading = readings[i]!;
    if (readingIds.add(i) !== -1) fail('readings', i, `the id ${reading.id} appears twice in this file`, reading.jobId, `reading ${reading.id}`);
    if (!jobs.has(reading.jobId)) fail('readings', i, `belongs to job ${reading.jobId}, which is not in the file`, reading.jobId, `reading ${reading.id}`);
    if (reading.supersedes !== undefined) corrections = true;
  }
  if (corrections) {
    for (let i = 0; i < readings.length; i++) {
      const reading = readings[i]!;
      if (reading.supersedes === undefined) continue;
      const old = readingIds.indexOf(reading.supersedes);
      if (old === -1) fail('readings', i, `corrects reading ${reading.supersedes}, which is not in the file`, reading.jobId, `reading ${reading.id}`);
      else if (readings[old]!.jobId !== reading.jobId) fail('readings', i, `corrects reading ${reading.supersedes} of another job`, reading.jobId, `reading ${reading.id}`);
    }
  }
  payload.conflicts.forEach((conflict, i) => {
    if (!jobs.has(conflict.jobId)) fail('conflicts', i, `is about job ${conflict.jobId}, which is not in the file`, conflict.jobId);
  });
  payload.recordConflicts.forEach((conflict, i) => {
    const known = conflict.record === 'asset' ? assets : technicians;
    if (!known.has(conflict.id)) fail('recordConflicts', i, `is about ${conflict.record} ${conflict.id}, which is not in the file`);
  });
}
