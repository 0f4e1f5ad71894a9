/**
 * The job file: what a technician's device exports and the shop imports. One JSON object,
 * documented field by field in docs/exchange-format.md (keep the two in step).
 *
 * Pure types and constants; no DOM, no Node. The limits below are part of the format: a reader
 * refuses a file that exceeds them, so a hostile or broken file cannot exhaust memory or hang the
 * import, and the doc states the same numbers.
 */
import type { Asset, IsoTime, Job, JobField, MergeConflict, Reading, Technician } from '../model/job';

/** The `format` member of every job file. A JSON file without it is not ours. */
export const FORMAT_ID = 'ripplewright-jobs';

/**
 * The schema version this code writes. A reader meeting a higher number says the file was made
 * by a newer version; the number goes up whenever a field is added, removed or changes meaning,
 * or the layout changes (readers refuse fields they do not know, so additions need a new
 * version). Version 1 was one JSON object; version 2 is JSON Lines (docs/exchange-format.md).
 */
export const SCHEMA_VERSION = 2;

/** Every version this code reads: all that were ever written. */
export const READABLE_VERSIONS: readonly number[] = [1, 2];

/** Who made the file: all optional, shown to the person importing. */
export interface ExportedBy {
  technicianId?: string;
  name?: string;
  /** The device or program, e.g. "phone of A. Quill" or "ripplewright merge". */
  device?: string;
}

/** Asset and technician fields that merge one by one (their records carry no edit times). */
export type AssetField = 'kind' | 'make' | 'model' | 'serial' | 'tag' | 'customer' | 'site';
export type TechnicianField = 'name';

/**
 * An asset or technician field that had two values in a merge. These records have no edit times,
 * so the value from the more recently exported file won (see merge.ts); the other is kept here.
 */
export interface RecordConflict {
  record: 'asset' | 'technician';
  id: string;
  field: AssetField | TechnicianField;
  /** Absent when the winning record had no value for the field. */
  kept?: string;
  /** When the file the kept value came from was exported. */
  keptAt: IsoTime;
  dropped?: string;
  droppedAt: IsoTime;
  droppedFrom?: string;
}

/**
 * The records a file carries. Every reading's job is in `jobs`; every job's technician is in
 * `technicians`, and its asset (when it names one) in `assets`.
 */
export interface JobPayload {
  jobs: Job[];
  readings: Reading[];
  assets: Asset[];
  technicians: Technician[];
  /** Job fields that lost a merge, kept for the reviewer (MergeConflict in src/model/job.ts). */
  conflicts: MergeConflict[];
  /** Asset and technician fields that lost a merge. */
  recordConflicts: RecordConflict[];
}

/**
 * The whole file as parsed and checked. `sha256` is the file's digest: in version 2 over the
 * bytes before the seal line (digest.ts), in version 1 over the canonical JSON of the rest.
 */
export interface JobFile {
  format: typeof FORMAT_ID;
  schemaVersion: number;
  exportedAt: IsoTime;
  exportedBy: ExportedBy;
  payload: JobPayload;
  /** Lowercase hex SHA-256 of the canonical JSON of this object without `sha256`. */
  sha256: string;
}

/** One thing wrong with a file, located as closely as the reader could. */
export interface ExchangeProblem {
  /** File name as the user chose it. */
  file: string;
  /** The job the problem belongs to, when it belongs to one. */
  jobId?: string;
  /** The record, in words: "reading 5c1e…", "asset a1", "technician t2". */
  record?: string;
  /** The line of a version-2 file the problem is on (1 is the head). */
  line?: number;
  /** Path of the value inside the file, e.g. "payload.readings[12].value". */
  field?: string;
  message: string;
}

/** Limits a reader enforces (docs/exchange-format.md, "Limits"). */
export const LIMITS = Object.freeze({
  /**
   * Bytes per file. V8 strings hold at most 2^29 − 24 UTF-16 units (about 536 million), so a
   * file under this size always decodes into one string (V8 source, String::kMaxLength).
   */
  fileBytes: 500_000_000,
  /**
   * Bytes per line of a version-2 file, its newline not counted. Writers cut lines near 64 KiB;
   * one job with every text at its longest is under 1 MiB, so no sound record needs more.
   */
  lineBytes: 16_777_216,
  jobs: 1_000_000,
  readings: 10_000_000,
  assets: 1_000_000,
  technicians: 100_000,
  conflicts: 1_000_000,
  /** Ids: 1 to this many characters of A–Z a–z 0–9 . _ : ~ - */
  idChars: 100,
  /** Names, customers, sites, models, serials, typed meter text, part names. */
  shortTextChars: 500,
  /** Complaints, notes, the action taken. */
  longTextChars: 20_000,
  partsPerJob: 200,
  /** Problems listed per file before the rest are counted as "and N more". */
  problemsListed: 100,
});

/** The job fields, in the order the doc lists them (also the order conflicts are reported in). */
export const JOB_FIELDS: readonly JobField[] = [
  'customer',
  'site',
  'assetId',
  'technicianId',
  'complaint',
  'supply',
  'nameplate',
  'status',
  'finish',
  'meter',
];

export const ASSET_FIELDS: readonly AssetField[] = ['kind', 'make', 'model', 'serial', 'tag', 'customer', 'site'];

/** An empty payload, for a fresh store or a merge with no base. */
export function emptyPayload(): JobPayload {
  return { jobs: [], readings: [], assets: [], technicians: [], conflicts: [], recordConflicts: [] };
}
