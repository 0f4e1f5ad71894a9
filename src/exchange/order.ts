/**
 * The one order records are written in, so that the same records always make the same file
 * (and the same digest) whatever order a store or a merge produced them in.
 */
import type { Job, MergeConflict, Reading } from '../model/job';
import { canonicalJson } from './canonical';
import type { JobPayload, RecordConflict } from './format';

const compareText = (a: string, b: string): number => (a < b ? -1 : a > b ? 1 : 0);

/** Jobs by creation time, then id. */
export function compareJobs(a: Job, b: Job): number {
  return compareText(a.createdAt, b.createdAt) || compareText(a.id, b.id);
}

function compareConflicts(a: MergeConflict, b: MergeConflict): number {
  return (
    compareText(a.jobId, b.jobId) ||
    compareText(a.field, b.field) ||
    compareText(a.droppedEditedAt, b.droppedEditedAt) ||
    compareText(canonicalJson(a.dropped ?? null), canonicalJson(b.dropped ?? null)) ||
    compareText(a.droppedFrom ?? '', b.droppedFrom ?? '')
  );
}

function compareRecordConflicts(a: RecordConflict, b: RecordConflict): number {
  return (
    compareText(a.record, b.record) ||
    compareText(a.id, b.id) ||
    compareText(a.field, b.field) ||
    compareText(a.droppedAt, b.droppedAt) ||
    compareText(a.dropped ?? '', b.dropped ?? '') ||
    compareText(a.droppedFrom ?? '', b.droppedFrom ?? '')
  );
}

/**
 * A copy of the payload in file order: jobs by (createdAt, id); readings grouped by job in job
 * order, then by (takenAt, id); assets and technicians by id; conflicts by job, field, time.
 * Readings of a job not in the payload go last, by (jobId, takenAt, id).
 */
export function sortPayload(payload: JobPayload): JobPayload {
  const jobs = [...payload.jobs].sort(compareJobs);
  const jobIndex = new Map<string, number>();
  jobs.forEach((job, i) => jobIndex.set(job.id, i));
  const orphan = jobs.length;
  const readings = [...payload.readings].sort(
    (a: Reading, b: Reading) =>
      (jobIndex.get(a.jobId) ?? orphan) - (jobIndex.get(b.jobId) ?? orphan) ||
      compareText(a.jobId, b.jobId) ||
      compareText(a.takenAt, b.takenAt) ||
      compareText(a.id, b.id),
  );
  return {
    jobs,
    readings,
    assets: [...payload.assets].sort((a, b) => compareText(a.id, b.id)),
    technicians: [...payload.technicians].sort((a, b) => compareText(a.id, b.id)),
    conflicts: [...payload.conflicts].sort(compareConflicts),
    recordConflicts: [...payload.recordConflicts].sort(compareRecordConflicts),
  };
}
