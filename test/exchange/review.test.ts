import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import type { Job } from '../../src/model/job';
import {
  assetReadingSeries,
  buildReviewIndex,
  faultsByMonth,
  filterJobs,
  firstVisitFixRate,
  jobDate,
  partsUsed,
  timeOnJobByTechnician,
  type ReviewFilter,
} from '../../src/exchange/review';
import { selectForExport } from '../../src/exchange/write';
import { demoPayload, smallPayload, T0, T2, T3 } from './fixtures';

const shop = demoPayload(300, 8);
const index = buildReviewIndex(shop);

/** The filter written the obvious way, to compare against. */
function naiveFilter(jobs: readonly Job[], filter: ReviewFilter): number[] {
  const assets = new Map(shop.assets.map((a) => [a.id, a]));
  return jobs.flatMap((job, i) => {
    const date = jobDate(job);
    if (filter.from !== undefined && Date.parse(date) < Date.parse(filter.from)) return [];
    if (filter.to !== undefined && Date.parse(date) >= Date.parse(filter.to)) return [];
    if (filter.technicianIds && !filter.technicianIds.includes(job.technicianId)) return [];
    if (filter.faults && !filter.faults.includes(job.finish?.faultFound ?? '')) return [];
    if (filter.topologies && !(job.supply && filter.topologies.includes(job.supply.topology))) return [];
    if (filter.assetId !== undefined && job.assetId !== filter.assetId) return [];
    const customer = filter.customer?.trim().toLowerCase();
    if (customer && !`${job.customer}\n${job.site}`.toLowerCase().includes(customer)) return [];
    const words = filter.asset?.trim().toLowerCase();
    const asset = job.assetId === undefined ? undefined : assets.get(job.assetId);
    if (words && !(asset && [asset.kind, asset.make, asset.model, asset.serial, asset.tag].some((w) => w?.toLowerCase().includes(words)))) return [];
    return [i];
  });
}

const time = fc.integer({ min: Date.parse('2025-11-01T00:00:00Z'), max: Date.parse('2026-12-01T00:00:00Z') }).map((ms) => new Date(ms).toISOString());
const filters: fc.Arbitrary<ReviewFilter> = fc.record(
  {
    technicianIds: fc.subarray(shop.technicians.map((t) => t.id)),
    from: time,
    to: time,
    faults: fc.subarray(['', 'capacitor-low', 'diode-open', 'no-ac', 'overload', 'line-low', 'capacitor-esr']),
    topologies: fc.subarray(['half-wave', 'center-tap', 'bridge', 'doubler'] as const),
    customer: fc.constantFrom('laundrette', 'FOXMERE', 'kitchen', ' care ', 'nowhere'),
    assetId: fc.constantFrom(...shop.assets.slice(0, 5).map((a) => a.id)),
    asset: fc.constantFrom('boiler', 'wm-', 'tag-0', 'zz'),
  },
  { requiredKeys: [] },
);

describe('review filter', () => {
  it('lets through exactly the jobs the obvious filter does', () => {
    fc.assert(
      fc.property(filters, (filter) => {
        expect([...filterJobs(index, filter)]).toEqual(naiveFilter(shop.jobs, filter));
      }),
      { numRuns: 300 },
    );
  });

  it('lets everything through with no filter', () => {
    expect(filterJobs(index, {}).length).toBe(shop.jobs.length);
  });
});

describe('chart figures', () => {
  it('counts faults per month, leaving out jobs without one', () => {
    const months = faultsByMonth(index, filterJobs(index, {}));
    const total = [...months.values()].flatMap((m) => [...m.values()]).reduce((a, b) => a + b, 0);
    expect(total).toBe(shop.jobs.filter((j) => j.finish?.faultFound !== undefined && j.finish.faultFound !== 'healthy').length);
    expect([...months.keys()]).toEqual([...months.keys()].sort());
  });

  it('does not count a fix as first-visit when the asset was visited again within 30 days', () => {
    const p = smallPayload();
    const finished = (id: string, startedAt: string, outcome: 'fixed' | 'not-fixed'): Job => ({
      ...p.jobs[0]!,
      id,
      startedAt,
      status: 'finished',
      finishedAt: startedAt,
      finish: { partsUsed: [], outcome },
    });
    const jobs = [finished('a', T0, 'fixed'), finished('b', T2, 'fixed'), finished('c', T3, 'not-fixed')];
    const small = buildReviewIndex({ jobs, assets: p.assets });
    const rate = firstVisitFixRate(small, filterJobs(small, {}));
    // a: revisited (b) within 30 days; b: revisited (c); c: not fixed.
    expect(rate.get('2026-03')).toEqual({ jobs: 3, firstVisitFixes: 0 });
    const alone = buildReviewIndex({ jobs: [jobs[2]!, jobs[0]!], assets: p.assets });
    expect(firstVisitFixRate(alone, [1]).get('2026-03')).toEqual({ jobs: 1, firstVisitFixes: 0 });
    expect(firstVisitFixRate(buildReviewIndex({ jobs: [jobs[0]!], assets: p.assets }), [0]).get('2026-03')).toEqual({ jobs: 1, firstVisitFixes: 1 });
  });

  it('gives each technician the median and mean of their minutes on job', () => {
    const times = timeOnJobByTechnician(index, filterJobs(index, {}));
    for (const technician of shop.technicians) {
      const minutes = shop.jobs
        .filter((j) => j.technicianId === technician.id && j.startedAt && j.finishedAt)
        .map((j) => (Date.parse(j.finishedAt!) - Date.parse(j.startedAt!)) / 60_000)
        .sort((a, b) => a - b);
      const entry = times.get(technician.id)!;
      expect(entry.jobs).toBe(minutes.length);
      expect(entry.meanMinutes).toBeCloseTo(minutes.reduce((a, b) => a + b, 0) / minutes.length, 9);
      expect(entry.medianMinutes).toBeGreaterThanOrEqual(minutes[Math.floor((minutes.length - 1) / 2)]!);
      expect(entry.medianMinutes).toBeLessThanOrEqual(minutes[Math.ceil((minutes.length - 1) / 2)]!);
    }
  });

  it('counts every part used, most used first', () => {
    const parts = partsUsed(index, filterJobs(index, {}));
    expect(parts.reduce((sum, [, n]) => sum + n, 0)).toBe(shop.jobs.reduce((sum, j) => sum + (j.finish?.partsUsed.length ?? 0), 0));
    for (let i = 1; i < parts.length; i++) expect(parts[i]![1]).toBeLessThanOrEqual(parts[i - 1]![1]);
  });

  it('lists one asset’s readings across visits in time order, without superseded ones', () => {
    const p = smallPayload();
    const series = assetReadingSeries(p, 'asset-2', 'dcOut');
    expect(series.map((point) => point.value)).toEqual([]);
    expect(assetReadingSeries(p, 'asset-2', 'dcOut', 'after').map((point) => point.value)).toEqual([13.58]);
    const all = assetReadingSeries(shop, shop.assets[0]!.id, 'rippleAc');
    for (let i = 1; i < all.length; i++) expect(all[i]!.takenAt >= all[i - 1]!.takenAt).toBe(true);
  });
});

describe('the export by dates and the review', () => {
  it('pick the same jobs for the same days, dating a job by when work started', () => {
    fc.assert(
      fc.property(time, time, (a, b) => {
        const [from, to] = a < b ? [a, b] : [b, a];
        const exported = selectForExport(shop, { kind: 'dates', from, to }).jobs.map((job) => job.id).sort();
        const reviewed = Array.from(filterJobs(index, { from, to }), (i) => shop.jobs[i]!.id).sort();
        expect(exported).toEqual(reviewed);
      }),
      { numRuns: 60 },
    );
  });

  it('takes a job made before the first day but worked on within the days', () => {
    const store = smallPayload();
    // job-a was made and started at T0; here work starts the next day.
    const job = store.jobs.find((j) => j.id === 'job-a')!;
    job.startedAt = '2026-03-03T09:00:00.000Z';
    const picked = selectForExport(store, { kind: 'dates', from: '2026-03-03T00:00:00.000Z', to: '2026-03-04T00:00:00.000Z' });
    expect(picked.jobs.map((j) => j.id).sort()).toEqual(['job-a', 'job-c']);
    expect(job.createdAt < '2026-03-03T00:00:00.000Z').toBe(true);
  });
});
