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
  return {
    jobs,
    readings: sortReadings(payload.readings, jobs),
    assets: [...payload.assets].sort((a, b) => compareText(a.id, b.id)),
    technicians: [...payload.technicians].sort((a, b) => compareText(a.id, b.id)),
    conflicts: [...payload.conflicts].sort(compareConflicts),
    recordConflicts: [...payload.recordConflicts].sort(compareRecordConflicts),
  };
}

const compareReadingsInJob = (a: Reading, b: Reading): number =>
  compareText(a.jobId, b.jobId) || compareText(a.takenAt, b.takenAt) || compareText(a.id, b.id);

/**
 * Readings in job order, then by (takenAt, id): a counting sort by job (one map lookup per
 * reading, no per-job arrays), then a sort of each job's few readings. Readings of jobs not in
 * `jobs` go last, by (jobId, takenAt, id).
 */
export function sortReadings(readings: readonly Reading[], jobs: readonly Job[]): Reading[] {
  const jobIndex = new Map<string, number>();
  jobs.forEach((job, i) => jobIndex.set(job.id, i));
  const buckets = jobs.length + 1; // the last holds readings of jobs not in the payload
  const bucketOf = new Int32Array(readings.length);
  const starts = new Int32Array(buckets + 1);
  readings.forEach((reading, i) => {
    const bucket = jobIndex.get(reading.jobId) ?? jobs.length;
    bucketOf[i] = bucket;
    starts[bucket + 1]! += 1;
  });
  for (let b = 0; b < buckets; b++) starts[b + 1]! += starts[b]!;
  const next = starts.slice(0, buckets);
  const out: Reading[] = new Array(readings.length);
  readings.forEach((reading, i) => {
    out[next[bucketOf[i]!]!++] = reading;
  });
  for (let b = 0; b < buckets; b++) {
    const start = starts[b]!;
    const end = starts[b + 1]!;
    if (end - start < 2) continue;
    if (end - start > 32) {
      const sorted = out.slice(start, end).sort(compareReadingsInJob);
      for (let i = start; i < end; i++) out[i] = sorted[i - start]!;
      continue;
    }
    // Insertion sort: a job has a handful of readings, usually already in order.
    for (let i = start + 1; i < end; i++) {
      const reading = out[i]!;
      let j = i - 1;
      while (j >= start && compareReadingsInJob(out[j]!, reading) > 0) {
        out[j + 1] = out[j]!;
        j -= 1;
      }
      out[j + 1] = reading;
    }
  }
  return out;
}
