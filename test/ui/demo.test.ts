import { afterEach, beforeEach, describe, expect, it } from 'vitest';
import { seedDemo } from '../../src/app-demo/seed';
import { DEMO_JOBS, DEMO_TECHNICIANS } from '../../src/app-demo/demo-jobs';
import { listTechnicians } from '../../src/store/assets';
import { listJobs } from '../../src/store/jobs';
import { readingsForAsset, readingsForJob } from '../../src/store/readings';
import type { Database } from '../../src/store/schema';
import { toReadingsInput } from '../../src/ui/readings';
import { setupOf } from '../../src/ui/screens/Job/use-diagnosis';
import { freshDb, inProcessEngine } from './helpers';

let db: Database;
beforeEach(async () => {
  db = await freshDb();
});
afterEach(() => db.close());

describe('the demo shop', () => {
  it('writes its technicians, open and finished jobs, and a unit visited twice', async () => {
    const now = Date.parse('2026-06-10T15:00:00.000Z');
    const result = await seedDemo(db, inProcessEngine(), now);
    expect(result.jobs).toBe(DEMO_JOBS.length);
    expect((await listTechnicians(db)).map((t) => t.name).sort()).toEqual([...DEMO_TECHNICIANS].sort());
    const jobs = await listJobs(db);
    expect(jobs.filter((j) => j.status === 'open')).toHaveLength(DEMO_JOBS.filter((d) => d.finish === undefined).length);
    const today = jobs.filter((j) => j.status === 'open').map((j) => new Date(j.createdAt).toDateString());
    expect(new Set(today)).toEqual(new Set([new Date(now).toDateString()]));
    const washer = jobs.filter((j) => j.customer === 'Foxmere Laundrette');
    expect(new Set(washer.map((j) => j.assetId)).size).toBe(1);
    expect((await readingsForAsset(db, washer[0]!.assetId!)).length).toBeGreaterThan((await readingsForJob(db, washer[0]!.id)).length);
  });

  it('has readings that point the diagnosis to the fault each finished job found, and a re-test in range', async () => {
    const engine = inProcessEngine();
    await seedDemo(db, engine, Date.parse('2026-06-10T15:00:00.000Z'));
    for (const job of await listJobs(db)) {
      if (job.status !== 'finished' || job.finish?.faultFound === undefined) continue;
      const readings = await readingsForJob(db, job.id);
      const setup = setupOf(job);
      if (setup === null) throw new Error('demo job without a supply');
      const { diagnosis } = await engine.diagnose(setup, toReadingsInput(readings, 'before'));
      expect(diagnosis.ranked[0]?.fault, `${job.customer}`).toBe(job.finish.faultFound);
      for (const after of readings.filter((r) => r.phase === 'after')) expect(after.verdict, `${job.customer} ${after.kind} after`).toBe('in');
    }
  });
});
