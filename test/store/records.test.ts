import { afterEach, beforeEach, describe, expect, it } from 'vitest';
import type { Database } from '../../src/store/schema';
import {
  addReading,
  assetsById,
  createJob,
  currentReadings,
  deleteDraft,
  describeStoreError,
  findSameAsset,
  getDraft,
  getJob,
  getSettings,
  jobsForAsset,
  listJobs,
  listTechnicians,
  matchJobs,
  putAsset,
  putDraft,
  putTechnician,
  readingsForAsset,
  readingsForJob,
  requestPersistentStorage,
  setJobField,
  setJobFields,
  updateSettings,
  DEFAULT_SETTINGS,
} from '../../src/store';
import { assetFixture, openFresh, readingFixture } from './fixtures';

let db: Database;
beforeEach(async () => {
  db = await openFresh();
});
afterEach(() => db.close());

const newJob = { customer: 'R. Alvarez', site: '14 Quarry Lane', technicianId: 't1', complaint: 'Dead' };

describe('jobs', () => {
  it('stores a new open job with an edit time on every field it was given', async () => {
    const job = await createJob(db, newJob, '2026-03-02T09:00:00.000Z');
    expect(await getJob(db, job.id)).toEqual(job);
    expect(job.status).toBe('open');
    expect(Object.keys(job.edits).sort()).toEqual(['complaint', 'customer', 'site', 'status', 'technicianId']);
  });

  it('edits one field, stamping its edit time and the job’s updated time', async () => {
    const job = await createJob(db, newJob, '2026-03-02T09:00:00.000Z');
    await setJobField(db, job.id, 'complaint', 'Dead, fuse blown', '2026-03-02T09:10:00.000Z');
    const stored = await getJob(db, job.id);
    expect(stored?.complaint).toBe('Dead, fuse blown');
    expect(stored?.edits.complaint).toBe('2026-03-02T09:10:00.000Z');
    expect(stored?.edits.customer).toBe('2026-03-02T09:00:00.000Z');
    expect(stored?.updatedAt).toBe('2026-03-02T09:10:00.000Z');
  });

  it('keeps both of two edits to different fields made at once', async () => {
    const job = await createJob(db, newJob);
    await Promise.all([setJobField(db, job.id, 'customer', 'B. Osei'), setJobField(db, job.id, 'site', 'Unit 4')]);
    const stored = await getJob(db, job.id);
    expect([stored?.customer, stored?.site]).toEqual(['B. Osei', 'Unit 4']);
  });

  it('records the finish time when a job is finished and clears it when reopened', async () => {
    const job = await createJob(db, newJob);
    const finished = await setJobField(db, job.id, 'status', 'finished', '2026-03-02T10:00:00.000Z');
    expect(finished.finishedAt).toBe('2026-03-02T10:00:00.000Z');
    const reopened = await setJobField(db, job.id, 'status', 'open', '2026-03-02T10:05:00.000Z');
    expect(reopened.finishedAt).toBeUndefined();
  });

  it('rejects an edit to a job that does not exist', async () => {
    await expect(setJobField(db, 'missing', 'site', 'x')).rejects.toThrow('no job missing');
  });

  it('lists jobs most recently changed first', async () => {
    const a = await createJob(db, newJob, '2026-03-01T08:00:00.000Z');
    const b = await createJob(db, newJob, '2026-03-02T08:00:00.000Z');
    await setJobField(db, a.id, 'site', 'Unit 9', '2026-03-03T08:00:00.000Z');
    expect((await listJobs(db)).map((job) => job.id)).toEqual([a.id, b.id]);
  });

  it('finds jobs by customer, site or any part of the asset, ignoring case and accents', async () => {
    const asset = assetFixture({ kind: 'boiler', make: 'Corrin', model: 'C24', serial: 'ZK-4471', tag: 'PLANT-3' });
    await putAsset(db, asset);
    const onBoiler = await createJob(db, { ...newJob, customer: 'José Müller', site: 'Mill Street', assetId: asset.id });
    const other = await createJob(db, { ...newJob, customer: 'Ana Brook', site: 'Harbour Road' });
    const jobs = await listJobs(db);
    const assets = await assetsById(db);
    const ids = (query: string) => matchJobs(jobs, assets, query).map((job) => job.id);
    expect(ids('jose')).toEqual([onBoiler.id]);
    expect(ids('MULLER mill')).toEqual([onBoiler.id]);
    expect(ids('zk-44')).toEqual([onBoiler.id]);
    expect(ids('plant-3')).toEqual([onBoiler.id]);
    expect(ids('harbour')).toEqual([other.id]);
    expect(ids('  ').sort()).toEqual([onBoiler.id, other.id].sort());
    expect(ids('nowhere')).toEqual([]);
  });
});

describe('readings', () => {
  it('stores a reading under its job’s asset and marks the job as changed', async () => {
    const asset = assetFixture();
    await putAsset(db, asset);
    const job = await createJob(db, { ...newJob, assetId: asset.id }, '2026-03-02T09:00:00.000Z');
    const reading = readingFixture(job.id, { takenAt: '2026-03-02T09:20:00.000Z' });
    await addReading(db, reading);
    expect(await readingsForJob(db, job.id)).toEqual([{ ...reading, assetId: asset.id }]);
    expect((await getJob(db, job.id))?.updatedAt).toBe('2026-03-02T09:20:00.000Z');
  });

  it('refuses a reading for a job that does not exist and stores nothing', async () => {
    const reading = readingFixture('no-such-job');
    await expect(addReading(db, reading)).rejects.toThrow('no job');
    expect(await db.get('readings', reading.id)).toBeUndefined();
  });

  it('refuses a second reading with the same id instead of overwriting it', async () => {
    const job = await createJob(db, newJob);
    const reading = readingFixture(job.id);
    await addReading(db, reading);
    await expect(addReading(db, { ...reading, value: 1 })).rejects.toThrow();
    expect((await readingsForJob(db, job.id))[0]?.value).toBe(reading.value);
  });

  it('gives an asset’s readings across all its jobs, oldest first', async () => {
    const asset = assetFixture();
    await putAsset(db, asset);
    const march = await createJob(db, { ...newJob, assetId: asset.id }, '2026-03-02T09:00:00.000Z');
    const june = await createJob(db, { ...newJob, assetId: asset.id }, '2026-06-10T09:00:00.000Z');
    const unrelated = await createJob(db, newJob);
    const late = readingFixture(june.id, { takenAt: '2026-06-10T09:05:00.000Z', value: 12.2 });
    const early = readingFixture(march.id, { takenAt: '2026-03-02T09:05:00.000Z', value: 14.9 });
    await addReading(db, late);
    await addReading(db, early);
    await addReading(db, readingFixture(unrelated.id));
    expect((await readingsForAsset(db, asset.id)).map((r) => r.id)).toEqual([early.id, late.id]);
    expect((await jobsForAsset(db, asset.id)).map((j) => j.id)).toEqual([june.id, march.id]);
  });

  it('treats a correction as replacing the reading it supersedes', () => {
    const first = readingFixture('j', { value: 41.5, text: '41,5' });
    const fix = readingFixture('j', { value: 14.15, text: '14,15', supersedes: first.id });
    const other = readingFixture('j', { kind: 'rippleAc', value: 0.4 });
    expect(currentReadings([first, fix, other])).toEqual([fix, other]);
  });
});

describe('assets and technicians', () => {
  it('recognises the same unit at the same customer by its serial, or its tag without one', async () => {
    const bySerial = assetFixture({ serial: 'AB-12' });
    const byTag = assetFixture({ serial: undefined, tag: 'PUMP-2', customer: 'Dockside Ltd' });
    await putAsset(db, bySerial);
    await putAsset(db, byTag);
    expect((await findSameAsset(db, { customer: ' r. alvarez ', site: '', serial: 'ab-12' }))?.id).toBe(bySerial.id);
    expect((await findSameAsset(db, { customer: 'Dockside Ltd', site: '', tag: 'pump-2' }))?.id).toBe(byTag.id);
    expect(await findSameAsset(db, { customer: 'Someone else', site: '', serial: 'AB-12' })).toBeUndefined();
    expect(await findSameAsset(db, { customer: 'R. Alvarez', site: '' })).toBeUndefined();
  });

  it('lists technicians by name', async () => {
    await putTechnician(db, { id: '2', name: 'Zofia' });
    await putTechnician(db, { id: '1', name: 'Amir' });
    expect((await listTechnicians(db)).map((t) => t.name)).toEqual(['Amir', 'Zofia']);
  });
});

describe('settings and drafts', () => {
  it('gives the defaults before anything is saved', async () => {
    expect(await getSettings(db)).toEqual(DEFAULT_SETTINGS);
  });

  it('keeps the other settings when one group changes', async () => {
    await updateSettings(db, { theme: 'sunlight' });
    await updateSettings(db, { meter: { ...DEFAULT_SETTINGS.meter, kind: 'average-responding' } });
    const settings = await getSettings(db);
    expect(settings.theme).toBe('sunlight');
    expect(settings.meter.kind).toBe('average-responding');
    expect(settings.units).toEqual(DEFAULT_SETTINGS.units);
  });

  it('keeps half-typed text until the draft is deleted', async () => {
    await putDraft(db, 'job1:supply', { capacitor: '2200,' });
    expect((await getDraft(db, 'job1:supply'))?.fields).toEqual({ capacitor: '2200,' });
    await deleteDraft(db, 'job1:supply');
    expect(await getDraft(db, 'job1:supply')).toBeUndefined();
  });
});

describe('storage errors', () => {
  it('says plainly when storage is full', () => {
    expect(describeStoreError(new DOMException('quota', 'QuotaExceededError'))).toContain('storage for this app is full');
  });

  it('asks for persistent storage once and reports what the browser said', async () => {
    let asked = 0;
    const storage = { persisted: async () => false, persist: async () => ((asked += 1), true) } as unknown as StorageManager;
    expect(await requestPersistentStorage(storage)).toBe(true);
    expect(asked).toBe(1);
    const already = { persisted: async () => true, persist: async () => ((asked += 1), true) } as unknown as StorageManager;
    expect(await requestPersistentStorage(already)).toBe(true);
    expect(asked).toBe(1);
    const broken = { persisted: async () => { throw new Error('no'); } } as unknown as StorageManager;
    expect(await requestPersistentStorage(broken)).toBe(false);
  });
});

describe('several job fields at once', () => {
  it('writes the supply and its nameplate in one edit, stamping both', async () => {
    const db2 = await openFresh();
    const job = await createJob(db2, newJob, '2026-03-02T09:00:00.000Z');
    const supply = { topology: 'bridge' as const, source: { vrms: 13, hz: 50 }, load: { amps: 0.5 } };
    await setJobFields(db2, job.id, { supply, nameplate: { region: 'en-230', secondaryVolts: 12 } }, '2026-03-02T09:30:00.000Z');
    const stored = await getJob(db2, job.id);
    expect(stored?.supply).toEqual(supply);
    expect(stored?.nameplate?.secondaryVolts).toBe(12);
    expect([stored?.edits.supply, stored?.edits.nameplate]).toEqual(['2026-03-02T09:30:00.000Z', '2026-03-02T09:30:00.000Z']);
    db2.close();
  });
});

describe('record ids', () => {
  it('builds version-4 UUID text from random bytes where randomUUID is missing (RFC 9562 §5.4)', async () => {
    const { uuidFromBytes } = await import('../../src/store/ids');
    const id = uuidFromBytes(new Uint8Array(16).fill(0xff));
    expect(id).toBe('ffffffff-ffff-4fff-bfff-ffffffffffff');
    expect(uuidFromBytes(new Uint8Array(16))).toMatch(/^00000000-0000-4000-8000-000000000000$/);
  });
});
