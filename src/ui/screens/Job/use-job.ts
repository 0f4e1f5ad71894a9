import { useCallback, useEffect, useState } from 'preact/hooks';
import type { Asset, Job, JobField, Reading } from '../../../model/job';
import { getAsset } from '../../../store/assets';
import { newId, nowIso } from '../../../store/ids';
import { getJob, jobsForAsset, setJobFields } from '../../../store/jobs';
import { addReading, readingsForAsset, readingsForJob } from '../../../store/readings';
import type { Database, StoredReading } from '../../../store/schema';
import type { Saver } from '../../saver';

export interface JobData {
  job: Job;
  asset: Asset | undefined;
  /** This job's readings, oldest first (superseded ones included). */
  readings: StoredReading[];
  /** The asset's readings from its other jobs, oldest first, with those jobs. */
  history: StoredReading[];
  historyJobs: Map<string, Job>;
}

/** A reading as a screen makes it: the rest (id, job, time) is filled in here. */
export type NewReading = Omit<Reading, 'id' | 'jobId' | 'takenAt'>;

export interface JobActions {
  /** Writes job fields; resolves to false when the write failed (the saver shows why). */
  setFields(patch: Partial<Pick<Job, JobField>>, what: string): Promise<boolean>;
  /** Writes a reading; resolves to it once stored, or null when the write failed. */
  addReading(reading: NewReading, what: string): Promise<StoredReading | null>;
}

export type JobState = { state: 'loading' } | { state: 'missing' } | { state: 'ready'; data: JobData };

/** Loads a job with its asset, readings and the asset's history, and writes through the saver. */
export function useJob(db: Database, saver: Saver, jobId: string): [JobState, JobActions] {
  const [state, setState] = useState<JobState>({ state: 'loading' });

  useEffect(() => {
    let live = true;
    setState({ state: 'loading' });
    void (async () => {
      const job = await getJob(db, jobId);
      if (job === undefined) return live && setState({ state: 'missing' });
      const [asset, readings, assetReadings, assetJobs] = await Promise.all([
        job.assetId === undefined ? undefined : getAsset(db, job.assetId),
        readingsForJob(db, jobId),
        job.assetId === undefined ? [] : readingsForAsset(db, job.assetId),
        job.assetId === undefined ? [] : jobsForAsset(db, job.assetId),
      ]);
      const history = assetReadings.filter((reading) => reading.jobId !== jobId);
      const historyJobs = new Map(assetJobs.filter((other) => other.id !== jobId).map((other) => [other.id, other]));
      if (live) setState({ state: 'ready', data: { job, asset, readings, history, historyJobs } });
    })();
    return () => {
      live = false;
    };
  }, [db, jobId]);

  const setFields = useCallback(
    async (patch: Partial<Pick<Job, JobField>>, what: string) => {
      const result = await saver.save(what, () => setJobFields(db, jobId, patch));
      if (!result.ok) return false;
      setState((previous) => (previous.state === 'ready' ? { state: 'ready', data: { ...previous.data, job: result.value } } : previous));
      return true;
    },
    [db, saver, jobId],
  );

  const add = useCallback(
    async (reading: NewReading, what: string) => {
      const full: Reading = { ...reading, id: newId(), jobId, takenAt: nowIso() };
      const result = await saver.save(what, () => addReading(db, full));
      if (!result.ok) return null;
      const stored = result.value;
      setState((previous) =>
        previous.state === 'ready'
          ? {
              state: 'ready',
              data: {
                ...previous.data,
                readings: [...previous.data.readings, stored],
                job: { ...previous.data.job, updatedAt: stored.takenAt > previous.data.job.updatedAt ? stored.takenAt : previous.data.job.updatedAt },
              },
            }
          : previous,
      );
      return stored;
    },
    [db, saver, jobId],
  );

  return [state, { setFields, addReading: add }];
}
