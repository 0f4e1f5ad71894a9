/**
 * Merging job files (and a store's records) by id, losing nothing.
 *
 * Rules (docs/exchange-format.md, "Merging", says the same):
 * - Jobs merge field by field (the JobField list). Each version's value of a field is dated by
 *   its `edits[field]` (or the job's `createdAt` when the field has no edit time). The newest
 *   wins; equal times go to the value whose canonical JSON sorts last, so the result never
 *   depends on the order of the inputs. Every other value seen is kept as a MergeConflict.
 *   createdAt is the earliest seen, startedAt the earliest seen, updatedAt the latest of all
 *   times, finishedAt the latest among versions whose status is the winning status. A merged
 *   job dates every field it has a value for, so merging it again compares the same times.
 * - Readings are never edited, so they merge as a union by id; an identical copy is dropped.
 *   Two different readings under one id (a bug or a damaged store, never a normal edit) are
 *   both kept: the one already in the store keeps the id (with no store, the one whose content
 *   sorts first), and each other one is renamed "<id>~<16 hex digits of FNV-1a over its
 *   content>". The name depends only on the content, so merging again finds it and adds nothing.
 * - Assets and technicians carry no edit times: field by field, a value beats no value, and
 *   between two values the one from the source exported later wins (then the larger text).
 *   The other value is kept as a RecordConflict.
 * - Conflicts already recorded are kept; one is "the same" when it is about the same record,
 *   field, dropped value and dropped time. A merge adds only conflicts not yet recorded.
 * So merging a file into a result that already holds it changes nothing, and the order of the
 * files does not change the merged records.
 */
import type { IsoTime, Job, JobField, MergeConflict, Reading } from '../model/job';
import { canonicalJson, fnv1a64Hex, sameJson } from './canonical';
import { ASSET_FIELDS, JOB_FIELDS, type AssetField, type JobPayload, type RecordConflict } from './format';
import { sortPayload, sortReadings } from './order';
import { IdTable } from './id-table';
import { VARIANT_SUFFIX } from './schema';

/** One input to a merge. */
export interface MergeSource {
  /** File name or device: becomes `droppedFrom` of the conflicts it loses. */
  name: string;
  /**
   * When the source's records were current: a file's exportedAt; for a store, the time it was
   * read (or the latest exportedAt it imported). Dates asset and technician fields.
   */
  at: IsoTime;
  payload: JobPayload;
}

/** Two different readings that came in under one id. */
export interface ReadingClash {
  id: string;
  jobId: string;
  /** The id the other reading is kept under. */
  renamedTo: string;
  /** Sources that held the renamed reading. */
  from: string[];
}

export interface MergeCounts {
  jobs: { added: number; updated: number; unchanged: number };
  readings: { added: number; duplicates: number };
  assets: { added: number; updated: number; unchanged: number };
  technicians: { added: number; updated: number; unchanged: number };
}

export interface MergeResult {
  /** Everything: the base and all sources merged, in file order. */
  payload: JobPayload;
  /** Records new or changed compared with the base (all of them without a base): what to write. */
  changes: JobPayload;
  /** Job-field conflicts found by this merge and not recorded before. */
  newConflicts: MergeConflict[];
  newRecordConflicts: RecordConflict[];
  readingClashes: ReadingClash[];
  /** Compared with the base. */
  counts: MergeCounts;
}

interface Version<T> {
  record: T;
  source: MergeSource;
  fromBase: boolean;
}

const compareText = (a: string, b: string): number => (a < b ? -1 : a > b ? 1 : 0);

/** Canonical JSON of a field value, with '' for "no value" (sorts before every value). */
const canonicalValue = (value: unknown): string => (value === undefined ? '' : canonicalJson(value));

function conflictIdentity(conflict: MergeConflict): string {
  return JSON.stringify([conflict.jobId, conflict.field, conflict.droppedEditedAt, canonicalValue(conflict.dropped)]);
}

function recordConflictIdentity(conflict: RecordConflict): string {
  return JSON.stringify([conflict.record, conflict.id, conflict.field, conflict.droppedAt, conflict.dropped ?? null]);
}

/** Every field of a reading in a fixed order: equal keys mean equal readings. */
function readingKey(reading: Reading, id = reading.id): string {
  return JSON.stringify([
    id,
    reading.jobId,
    reading.kind,
    reading.target ?? null,
    reading.value,
    reading.text,
    reading.takenAt,
    reading.phase,
    reading.expectedLow ?? null,
    reading.expectedHigh ?? null,
    reading.verdict ?? null,
    reading.supersedes ?? null,
    reading.note ?? null,
  ]);
}

/** The id a reading was first given: strips a variant suffix that matches its content. */
function baseReadingId(reading: Reading): string {
  const id = reading.id;
  // "~" 17 characters from the end, then 16 hex digits: a renamed copy, if the digits match.
  if (id.length <= 17 || id.charCodeAt(id.length - 17) !== 0x7e || !VARIANT_SUFFIX.test(id)) return id;
  const base = id.slice(0, -17);
  return `${base}~${fnv1a64Hex(readingKey(reading, base))}` === id ? base : id;
}

interface Tagged {
  source: MergeSource;
  fromBase: boolean;
}

/**
 * Records of all sources grouped by key, in the order keys are first seen. Each record has a
 * place in one numbering of all sources' records; an IdTable (id-table.ts) finds a key's group
 * and each group is a chain of places in an Int32Array, so a million readings cost no object
 * per record and no rehashing map (which cost most of a re-import's merge, bench/exchange.ts).
 */
class Groups<T> {
  /** Where each source's records start in the numbering. */
  private readonly starts: number[] = [];
  private readonly records: T[][] = [];
  private readonly keys: string[];
  /** The next place in the same group, or -1. */
  private readonly next: Int32Array;
  /** For the first place of a group: its last place (where the chain grows). Else -1. */
  private readonly last: Int32Array;

  constructor(
    private readonly sources: readonly Tagged[],
    list: (payload: JobPayload) => T[],
    key: (record: T) => string,
  ) {
    let count = 0;
    for (const { source } of sources) {
      const records = list(source.payload);
      this.starts.push(count);
      this.records.push(records);
      count += records.length;
    }
    this.keys = new Array(count);
    this.next = new Int32Array(count).fill(-1);
    this.last = new Int32Array(count).fill(-1);
    const table = new IdTable(count, (place) => this.keys[place]!);
    let place = 0;
    for (const records of this.records) {
      for (const record of records) {
        this.keys[place] = key(record);
        const first = table.add(place);
        if (first === -1) this.last[place] = place;
        else {
          this.next[this.last[first]!] = place;
          this.last[first] = place;
        }
        place += 1;
      }
    }
  }

  private sourceOf(place: number): number {
    let s = this.starts.length - 1;
    while (this.starts[s]! > place) s -= 1;
    return s;
  }

  record(place: number): T {
    const s = this.sourceOf(place);
    return this.records[s]![place - this.starts[s]!]!;
  }

  /** Whether the record at `place` is the base's. */
  fromBase(place: number): boolean {
    return this.sources[this.sourceOf(place)]!.fromBase;
  }

  version(place: number): Version<T> {
    const tagged = this.sources[this.sourceOf(place)]!;
    return { record: this.record(place), source: tagged.source, fromBase: tagged.fromBase };
  }

  /** Each group in first-seen order: its key, its first place, and all its places when more than one. */
  *groups(): Generator<{ key: string; first: number; places: number[] | undefined }> {
    for (let place = 0; place < this.keys.length; place++) {
      if (this.last[place] === -1) continue;
      if (this.next[place] === -1) {
        yield { key: this.keys[place]!, first: place, places: undefined };
        continue;
      }
      const places: number[] = [];
      for (let at = place; at !== -1; at = this.next[at]!) places.push(at);
      yield { key: this.keys[place]!, first: place, places };
    }
  }

  /** Each group's merged record, in first-seen order. */
  merged(merge: (versions: Version<T>[], key: string) => T): T[] {
    const out: T[] = [];
    for (const { key, first, places } of this.groups()) out.push(places === undefined ? this.record(first) : merge(places.map((place) => this.version(place)), key));
    return out;
  }
}

/** Whether two readings are the same, field by field (what sameJson says, for this one shape). */
function sameReading(a: Reading, b: Reading): boolean {
  return (
    a === b ||
    (a.id === b.id &&
      a.jobId === b.jobId &&
      a.kind === b.kind &&
      a.value === b.value &&
      a.text === b.text &&
      a.takenAt === b.takenAt &&
      a.phase === b.phase &&
      a.target === b.target &&
      a.expectedLow === b.expectedLow &&
      a.expectedHigh === b.expectedHigh &&
      a.verdict === b.verdict &&
      a.supersedes === b.supersedes &&
      a.note === b.note)
  );
}

// ---------------------------------------------------------------------------------------------
// Jobs
// ---------------------------------------------------------------------------------------------

interface FieldCandidate {
  value: unknown;
  at: IsoTime;
  explicit: boolean;
  canonical: string;
  from: string;
}

function fieldCandidate(version: Version<Job>, field: JobField): FieldCandidate {
  const job = version.record;
  const value = job[field];
  const edited = job.edits[field];
  return {
    value,
    at: edited ?? job.createdAt,
    explicit: edited !== undefined,
    canonical: canonicalValue(value),
    from: version.source.name,
  };
}

const laterCandidate = (a: FieldCandidate, b: FieldCandidate): boolean =>
  a.at > b.at || (a.at === b.at && a.canonical > b.canonical);

function mergeJob(versions: Version<Job>[], conflicts: MergeConflict[]): Job {
  const first = versions[0]!.record;
  if (versions.length === 1) return first;
  if (versions.every((version) => sameJson(version.record, first))) return first;

  const jobId = first.id;
  const merged: Record<string, unknown> = { id: jobId };
  const edits: Partial<Record<JobField, IsoTime>> = {};
  let updatedAt = first.updatedAt;
  let winningStatus = '';
  for (const field of JOB_FIELDS) {
    const candidates = versions.map((version) => fieldCandidate(version, field));
    let winner = candidates[0]!;
    for (const candidate of candidates) if (laterCandidate(candidate, winner)) winner = candidate;
    if (winner.value !== undefined) merged[field] = winner.value;
    // Dated even when the time came from createdAt, so that merging the result again with any
    // of its inputs compares the same (winner time, value) and keeps it.
    if (winner.value !== undefined || candidates.some((candidate) => candidate.explicit)) edits[field] = winner.at;
    if (winner.at > updatedAt) updatedAt = winner.at;
    if (field === 'status') winningStatus = winner.canonical;
    // One conflict per distinct (value, time) that lost; named after the first source by name.
    const losers = new Map<string, { candidate: FieldCandidate; from: string }>();
    for (const candidate of candidates) {
      if (candidate.canonical === winner.canonical) continue;
      const key = `${candidate.at}\u0000${candidate.canonical}`;
      const known = losers.get(key);
      if (!known || compareText(candidate.from, known.from) < 0) losers.set(key, { candidate, from: candidate.from });
    }
    for (const { candidate, from } of losers.values()) {
      const conflict: MergeConflict = {
        jobId,
        field,
        kept: winner.value,
        keptEditedAt: winner.at,
        dropped: candidate.value,
        droppedEditedAt: candidate.at,
        droppedFrom: from,
      };
      if (winner.value === undefined) delete conflict.kept;
      if (candidate.value === undefined) delete conflict.dropped;
      conflicts.push(conflict);
    }
  }
  let createdAt = first.createdAt;
  let startedAt: IsoTime | undefined;
  let finishedAt: IsoTime | undefined;
  for (const { record } of versions) {
    if (record.createdAt < createdAt) createdAt = record.createdAt;
    if (record.updatedAt > updatedAt) updatedAt = record.updatedAt;
    if (record.startedAt !== undefined && (startedAt === undefined || record.startedAt < startedAt)) startedAt = record.startedAt;
    const sameStatus = canonicalValue(record.status) === winningStatus;
    if (sameStatus && record.finishedAt !== undefined && (finishedAt === undefined || record.finishedAt > finishedAt)) {
      finishedAt = record.finishedAt;
    }
  }
  merged.createdAt = createdAt;
  merged.updatedAt = updatedAt;
  if (startedAt !== undefined) merged.startedAt = startedAt;
  if (finishedAt !== undefined) merged.finishedAt = finishedAt;
  merged.edits = edits;
  return merged as unknown as Job;
}

// ---------------------------------------------------------------------------------------------
// Assets and technicians
// ---------------------------------------------------------------------------------------------

function mergeFlatRecord<T extends { id: string }>(
  versions: Version<T>[],
  kind: RecordConflict['record'],
  fields: readonly string[],
  conflicts: RecordConflict[],
): T {
  const first = versions[0]!.record;
  if (versions.length === 1) return first;
  if (versions.every((version) => sameJson(version.record, first))) return first;
  const merged: Record<string, unknown> = { id: first.id };
  for (const field of fields) {
    const candidates = versions.map((version) => ({
      value: (version.record as Record<string, unknown>)[field] as string | undefined,
      at: version.source.at,
      from: version.source.name,
    }));
    const later = (a: (typeof candidates)[number], b: (typeof candidates)[number]): boolean => {
      if ((a.value === undefined) !== (b.value === undefined)) return a.value !== undefined;
      return a.at > b.at || (a.at === b.at && (a.value ?? '') > (b.value ?? ''));
    };
    let winner = candidates[0]!;
    for (const candidate of candidates) if (later(candidate, winner)) winner = candidate;
    if (winner.value !== undefined) merged[field] = winner.value;
    const losers = new Map<string, (typeof candidates)[number]>();
    for (const candidate of candidates) {
      if (candidate.value === winner.value || candidate.value === undefined) continue;
      const key = `${candidate.at}\u0000${candidate.value}`;
      const known = losers.get(key);
      if (!known || compareText(candidate.from, known.from) < 0) losers.set(key, candidate);
    }
    for (const loser of losers.values()) {
      const conflict: RecordConflict = {
        record: kind,
        id: first.id,
        field: field as AssetField | 'name',
        keptAt: winner.at,
        droppedAt: loser.at,
        droppedFrom: loser.from,
      };
      if (winner.value !== undefined) conflict.kept = winner.value;
      if (loser.value !== undefined) conflict.dropped = loser.value;
      conflicts.push(conflict);
    }
  }
  return merged as T;
}

// ---------------------------------------------------------------------------------------------
// Readings
// ---------------------------------------------------------------------------------------------

function mergeReadingGroup(baseId: string, versions: Version<Reading>[], out: Reading[], clashes: ReadingClash[]): number {
  // The usual group: the same reading from the store and a file, or from two files.
  const first = versions[0]!.record;
  if (first.id === baseId && versions.every((version) => sameJson(version.record, first))) {
    out.push(first);
    return versions.length - 1;
  }
  // Distinct contents, each as it reads under the base id.
  const contents = new Map<string, { reading: Reading; fromBase: boolean; sources: Set<string> }>();
  for (const { record, source, fromBase } of versions) {
    const key = readingKey(record, baseId);
    const known = contents.get(key);
    if (known) {
      known.sources.add(source.name);
      known.fromBase ||= fromBase && record.id === baseId;
    } else {
      const reading = record.id === baseId ? record : { ...record, id: baseId };
      contents.set(key, { reading, fromBase: fromBase && record.id === baseId, sources: new Set([source.name]) });
    }
  }
  const keys = [...contents.keys()].sort();
  const keeper = keys.find((key) => contents.get(key)!.fromBase) ?? keys[0]!;
  for (const key of keys) {
    const content = contents.get(key)!;
    if (key === keeper) {
      out.push(content.reading);
      continue;
    }
    const renamedTo = `${baseId}~${fnv1a64Hex(key)}`;
    out.push({ ...content.reading, id: renamedTo });
    // A clash is news only when no source already held the renamed copy.
    const alreadyRenamed = versions.some((version) => version.record.id === renamedTo);
    if (!alreadyRenamed) clashes.push({ id: baseId, jobId: content.reading.jobId, renamedTo, from: [...content.sources].sort() });
  }
  return versions.length - keys.length;
}

// ---------------------------------------------------------------------------------------------
// The merge
// ---------------------------------------------------------------------------------------------

function unionConflicts<T>(lists: T[][], identity: (conflict: T) => string, from: (conflict: T) => string): Map<string, T> {
  const known = new Map<string, T>();
  for (const list of lists) {
    for (const conflict of list) {
      const key = identity(conflict);
      const existing = known.get(key);
      if (!existing || compareText(from(conflict), from(existing)) < 0) known.set(key, conflict);
    }
  }
  return known;
}

/**
 * Merges the sources into the base (or into nothing). Each payload must be consistent (as
 * readJobFile returns them). Returns the merged records in file order, the records to write
 * over the base, the conflicts this merge found, and counts; never throws for data.
 */
export function mergePayloads(sources: readonly MergeSource[], options: { base?: MergeSource } = {}): MergeResult {
  const all = [
    ...(options.base ? [{ source: options.base, fromBase: true }] : []),
    ...sources.map((source) => ({ source, fromBase: false })),
  ];
  const basePayload = options.base?.payload;

  const foundConflicts: MergeConflict[] = [];
  const foundRecordConflicts: RecordConflict[] = [];
  const readingClashes: ReadingClash[] = [];
  let jobs: Job[];
  let assets: JobPayload['assets'];
  let technicians: JobPayload['technicians'];
  let readings: Reading[];
  let duplicateReadings = 0;
  /** Readings no base reading has the id of: the ones to write (all of them without a base). */
  let newReadings: Reading[] = [];
  const only = all.length === 1 ? all[0]!.source.payload : undefined;
  if (only && !only.readings.some((reading) => baseReadingId(reading) !== reading.id)) {
    // One consistent source (a first import): its ids are unique and nothing can collide.
    ({ jobs, assets, technicians, readings } = only);
    if (!all[0]!.fromBase) newReadings = readings;
  } else {
    jobs = new Groups(all, (p) => p.jobs, (job) => job.id).merged((versions) => mergeJob(versions, foundConflicts));
    assets = new Groups(all, (p) => p.assets, (asset) => asset.id).merged((versions) =>
      mergeFlatRecord(versions, 'asset', ASSET_FIELDS, foundRecordConflicts),
    );
    technicians = new Groups(all, (p) => p.technicians, (technician) => technician.id).merged((versions) =>
      mergeFlatRecord(versions, 'technician', ['name'], foundRecordConflicts),
    );
    const readingGroups = new Groups(all, (p) => p.readings, baseReadingId);
    readings = [];
    for (const { key: baseId, first, places } of readingGroups.groups()) {
      if (places === undefined) {
        // One reading under this id: kept as it is (a renamed copy keeps its name).
        const reading = readingGroups.record(first);
        readings.push(reading);
        if (!readingGroups.fromBase(first)) newReadings.push(reading);
        continue;
      }
      const reading = readingGroups.record(first);
      if (reading.id === baseId && places.every((place) => sameReading(readingGroups.record(place), reading))) {
        // The usual group: the same reading from the store and a file, or from two files.
        readings.push(reading);
        duplicateReadings += places.length - 1;
        if (!places.some((place) => readingGroups.fromBase(place))) newReadings.push(reading);
        continue;
      }
      const versions = places.map((place) => readingGroups.version(place));
      const start = readings.length;
      duplicateReadings += mergeReadingGroup(baseId, versions, readings, readingClashes);
      // Written over the base: those whose id no base reading of the group has.
      const baseIds = new Set(versions.filter((version) => version.fromBase).map((version) => version.record.id));
      for (let i = start; i < readings.length; i++) if (!baseIds.has(readings[i]!.id)) newReadings.push(readings[i]!);
    }
  }

  const knownConflicts = unionConflicts(
    all.map(({ source }) => source.payload.conflicts),
    conflictIdentity,
    (conflict) => conflict.droppedFrom ?? '',
  );
  const newConflicts: MergeConflict[] = [];
  for (const conflict of foundConflicts) {
    const key = conflictIdentity(conflict);
    if (knownConflicts.has(key)) continue;
    knownConflicts.set(key, conflict);
    newConflicts.push(conflict);
  }
  const knownRecordConflicts = unionConflicts(
    all.map(({ source }) => source.payload.recordConflicts),
    recordConflictIdentity,
    (conflict) => conflict.droppedFrom ?? '',
  );
  const newRecordConflicts: RecordConflict[] = [];
  for (const conflict of foundRecordConflicts) {
    const key = recordConflictIdentity(conflict);
    if (knownRecordConflicts.has(key)) continue;
    knownRecordConflicts.set(key, conflict);
    newRecordConflicts.push(conflict);
  }

  const payload = sortPayload({
    jobs,
    readings,
    assets,
    technicians,
    conflicts: [...knownConflicts.values()],
    recordConflicts: [...knownRecordConflicts.values()],
  });
  const { changes, counts } = compareWithBase(payload, basePayload, duplicateReadings, newReadings);
  return { payload, changes, newConflicts, newRecordConflicts, readingClashes, counts };
}

function compareWithBase(
  payload: JobPayload,
  base: JobPayload | undefined,
  duplicates: number,
  newReadings: readonly Reading[],
): { changes: JobPayload; counts: MergeCounts } {
  if (base === undefined) {
    const added = (n: number) => ({ added: n, updated: 0, unchanged: 0 });
    return {
      changes: payload,
      counts: {
        jobs: added(payload.jobs.length),
        readings: { added: payload.readings.length, duplicates },
        assets: added(payload.assets.length),
        technicians: added(payload.technicians.length),
      },
    };
  }
  const changedRecords = <T extends { id: string }>(merged: T[], before: T[] | undefined) => {
    const byId = new Map((before ?? []).map((record) => [record.id, record] as const));
    const changed: T[] = [];
    let added = 0;
    let updated = 0;
    for (const record of merged) {
      const old = byId.get(record.id);
      if (old === undefined) {
        added += 1;
        changed.push(record);
      } else if (old !== record && !sameJson(old, record)) {
        updated += 1;
        changed.push(record);
      }
    }
    return { changed, counts: { added, updated, unchanged: merged.length - added - updated } };
  };
  const jobs = changedRecords(payload.jobs, base?.jobs);
  const assets = changedRecords(payload.assets, base?.assets);
  const technicians = changedRecords(payload.technicians, base?.technicians);
  const readings = newReadings.length === payload.readings.length ? payload.readings : sortReadings(newReadings, payload.jobs);
  const baseConflicts = new Set((base?.conflicts ?? []).map(conflictIdentity));
  const baseRecordConflicts = new Set((base?.recordConflicts ?? []).map(recordConflictIdentity));
  const changes: JobPayload = {
    jobs: jobs.changed,
    readings,
    assets: assets.changed,
    technicians: technicians.changed,
    conflicts: payload.conflicts.filter((conflict) => !baseConflicts.has(conflictIdentity(conflict))),
    recordConflicts: payload.recordConflicts.filter((conflict) => !baseRecordConflicts.has(recordConflictIdentity(conflict))),
  };
  const counts: MergeCounts = {
    jobs: jobs.counts,
    readings: { added: readings.length, duplicates },
    assets: assets.counts,
    technicians: technicians.counts,
  };
  return { changes, counts };
}
