/**
 * The job record shared by the store, the exchange formats, the screens and the command line.
 * Pure types and small pure helpers; no DOM, no storage.
 *
 * Identity and merging: every record has a stable random id (UUID v4 text). A job edited on two
 * devices merges field by field: each editable field carries the time it was last edited
 * (`edits`), the newer edit wins, and the loser is kept as a conflict. Readings are never
 * edited in place, only added (a correction is a new reading that `supersedes` the old one),
 * so merging readings is a union by id and loses nothing.
 */
import type { MeterSettings, ReadingKind, Verdict } from '../engine/diagnosis/types';
import type { SupplySpecInput } from '../engine/types';

/** ISO 8601 date-time text in UTC, e.g. "2026-12-01T09:30:00.000Z". */
export type IsoTime = string;

export interface Technician {
  id: string;
  name: string;
}

export interface Asset {
  id: string;
  /** What it is: "washing machine", "boiler", "control panel", "machine tool". */
  kind: string;
  make?: string;
  model?: string;
  serial?: string;
  /** The site's own asset tag. */
  tag?: string;
  /** Customer and site the asset belongs to. */
  customer: string;
  site: string;
}

/** How the technician described the supply from its nameplate (kept to show and re-derive). */
export interface SupplyNameplate {
  /** Mains region id (see ToleranceSettings.region). */
  region: string;
  /** Transformer secondary rating at rated load, volts RMS, and its VA. */
  secondaryVolts?: number;
  transformerVa?: number;
  capacitorMicrofarads?: number;
  capacitorVoltRating?: number;
  diodeKind?: string;
  regulator?: string;
  /** Expected load in amps or ohms as the technician gave it. */
  loadText?: string;
}

export interface Reading {
  id: string;
  jobId: string;
  kind: ReadingKind;
  /** Diode label or capacitor ("C1", "C2") for per-part readings. */
  target?: string;
  /** The value in SI units, or "OL". */
  value: number | 'OL';
  /** What was typed, exactly. */
  text: string;
  takenAt: IsoTime;
  /** Before the repair, or the re-test after it. */
  phase: 'before' | 'after';
  /** The expected band and verdict when the reading was taken (kept as they were then). */
  expectedLow?: number;
  expectedHigh?: number;
  verdict?: Verdict;
  /** A reading this one corrects (the old one stays, marked as superseded by this). */
  supersedes?: string;
  note?: string;
}

export type JobStatus = 'open' | 'finished';
export type JobOutcome = 'fixed' | 'not-fixed' | 'referred' | 'no-fault-found';

export interface JobFinish {
  suspectedPart?: string;
  /** The fault id from the diagnosis the technician settled on, if any. */
  faultFound?: string;
  actionTaken?: string;
  partsUsed: string[];
  outcome?: JobOutcome;
  notes?: string;
}

/** The fields of a job that are edited and merged one by one. */
export type JobField =
  | 'customer'
  | 'site'
  | 'assetId'
  | 'technicianId'
  | 'complaint'
  | 'supply'
  | 'nameplate'
  | 'status'
  | 'finish'
  | 'meter';

export interface Job {
  id: string;
  createdAt: IsoTime;
  /** Latest of all edit times. */
  updatedAt: IsoTime;
  startedAt?: IsoTime;
  finishedAt?: IsoTime;
  customer: string;
  site: string;
  assetId?: string;
  technicianId: string;
  complaint: string;
  supply?: SupplySpecInput;
  nameplate?: SupplyNameplate;
  meter?: MeterSettings;
  status: JobStatus;
  finish?: JobFinish;
  /** When each field was last edited, for merging. */
  edits: Partial<Record<JobField, IsoTime>>;
}

/** What lost a merge: kept for the reviewer to see. */
export interface MergeConflict {
  jobId: string;
  field: JobField;
  kept: unknown;
  keptEditedAt: IsoTime;
  dropped: unknown;
  droppedEditedAt: IsoTime;
  /** Where the dropped value came from (file name or device). */
  droppedFrom?: string;
}

/**
 * A job's date, as the shop review filters and the export by dates selects: when work on site
 * started, else when the job was made.
 */
export function jobDate(job: Pick<Job, 'startedAt' | 'createdAt'>): IsoTime {
  return job.startedAt ?? job.createdAt;
}
