/**
 * The shop review's arithmetic: filtering jobs and the figures behind its charts. Pure and
 * synchronous over plain arrays, so it runs on the main thread for a few thousand jobs or in a
 * worker for the large stores; `buildReviewIndex` does the per-job work once, and each filter
 * is then one pass over typed arrays.
 */
import type { Topology } from '../engine/types';
import { jobDate, type Asset, type IsoTime, type Job, type Reading } from '../model/job';
import type { JobPayload } from './format';

/** What the reviewer narrows the jobs to. Every part left out matches everything. */
export interface ReviewFilter {
  technicianIds?: readonly string[];
  /** Jobs whose date (startedAt, else createdAt) is at or after `from` and before `to`. */
  from?: IsoTime;
  to?: IsoTime;
  /** finish.faultFound values; "" matches jobs without one. */
  faults?: readonly string[];
  topologies?: readonly Topology[];
  /** Case-insensitive text found in the customer or the site. */
  customer?: string;
  /** One asset by id. */
  assetId?: string;
  /** Case-insensitive text found in the asset's kind, make, model, serial or tag. */
  asset?: string;
}

/** The jobs with the columns the filter reads, computed once. */
export interface ReviewIndex {
  jobs: readonly Job[];
  /** Job date, milliseconds since 1970 (startedAt, else createdAt). */
  dateMs: Float64Array;
  technicianIds: readonly string[];
  /** Index into technicianIds per job. */
  technician: Int32Array;
  faults: readonly string[];
  /** Index into faults per job ("" for none). */
  fault: Int32Array;
  /** Index into TOPOLOGY_ORDER per job, -1 without a supply. */
  topology: Int8Array;
  /** Lower-case "customer\nsite" per job. */
  customerText: readonly string[];
  /** Lower-case asset words per job ("" without an asset). */
  assetText: readonly string[];
}

const TOPOLOGY_ORDER: readonly Topology[] = ['half-wave', 'center-tap', 'bridge', 'doubler'];

function interned(values: readonly string[]): { list: string[]; codes: Int32Array } {
  const map = new Map<string, number>();
  const codes = new Int32Array(values.length);
  values.forEach((value, i) => {
    let code = map.get(value);
    if (code === undefined) {
      code = map.size;
      map.set(value, code);
    }
    codes[i] = code;
  });
  return { list: [...map.keys()], codes };
}

export { jobDate };

/** Builds the filter's columns from the records (one pass over jobs and assets). */
export function buildReviewIndex(payload: Pick<JobPayload, 'jobs' | 'assets'>): ReviewIndex {
  const { jobs } = payload;
  const assets = new Map<string, Asset>(payload.assets.map((asset) => [asset.id, asset]));
  const dateMs = new Float64Array(jobs.length);
  const topology = new Int8Array(jobs.length);
  const customerText: string[] = new Array(jobs.length);
  const assetText: string[] = new Array(jobs.length);
  jobs.forEach((job, i) => {
    dateMs[i] = Date.parse(jobDate(job));
    topology[i] = job.supply ? TOPOLOGY_ORDER.indexOf(job.supply.topology) : -1;
    customerText[i] = `${job.customer}\n${job.site}`.toLowerCase();
    const asset = job.assetId === undefined ? undefined : assets.get(job.assetId);
    assetText[i] = asset ? [asset.kind, asset.make, asset.model, asset.serial, asset.tag].filter(Boolean).join('\n').toLowerCase() : '';
  });
  const technicians = interned(jobs.map((job) => job.technicianId));
  const faults = interned(jobs.map((job) => job.finish?.faultFound ?? ''));
  return {
    jobs,
    dateMs,
    technicianIds: technicians.list,
    technician: technicians.codes,
    faults: faults.list,
    fault: faults.codes,
    topology,
    customerText,
    assetText,
  };
}

function codeSet(wanted: readonly string[] | undefined, list: readonly string[]): Uint8Array | undefined {
  if (wanted === undefined) return undefined;
  const set = new Set(wanted);
  return Uint8Array.from(list, (value) => (set.has(value) ? 1 : 0));
}

/**
 * Indices (into index.jobs, ascending) of the jobs the filter lets through.
 * Unknown technician or fault ids simply match nothing.
 */
export function filterJobs(index: ReviewIndex, filter: ReviewFilter): Int32Array {
  const n = index.jobs.length;
  const technicians = codeSet(filter.technicianIds, index.technicianIds);
  const faults = codeSet(filter.faults, index.faults);
  const topologies = filter.topologies ? new Set(filter.topologies.map((t) => TOPOLOGY_ORDER.indexOf(t))) : undefined;
  const fromMs = filter.from === undefined ? -Infinity : Date.parse(filter.from);
  const toMs = filter.to === undefined ? Infinity : Date.parse(filter.to);
  const customer = filter.customer?.trim().toLowerCase() || undefined;
  const asset = filter.asset?.trim().toLowerCase() || undefined;
  const out = new Int32Array(n);
  let count = 0;
  for (let i = 0; i < n; i++) {
    const date = index.dateMs[i]!;
    if (date < fromMs || date >= toMs) continue;
    if (technicians && !technicians[index.technician[i]!]) continue;
    if (faults && !faults[index.fault[i]!]) continue;
    if (topologies && !topologies.has(index.topology[i]!)) continue;
    if (filter.assetId !== undefined && index.jobs[i]!.assetId !== filter.assetId) continue;
    if (customer && !index.customerText[i]!.includes(customer)) continue;
    if (asset && !index.assetText[i]!.includes(asset)) continue;
    out[count++] = i;
  }
  return out.slice(0, count);
}

// ---------------------------------------------------------------------------------------------
// Chart figures
// ---------------------------------------------------------------------------------------------

/** "2026-03" for a job's month (UTC). */
const monthOf = (job: Job): string => jobDate(job).slice(0, 7);

/** Faults found per month: month → fault id → jobs. Jobs without a fault are left out. */
export function faultsByMonth(index: ReviewIndex, selected: ArrayLike<number>): Map<string, Map<string, number>> {
  const months = new Map<string, Map<string, number>>();
  for (let k = 0; k < selected.length; k++) {
    const job = index.jobs[selected[k]!]!;
    const fault = job.finish?.faultFound;
    if (fault === undefined || fault === 'healthy') continue;
    const month = monthOf(job);
    let counts = months.get(month);
    if (!counts) months.set(month, (counts = new Map()));
    counts.set(fault, (counts.get(fault) ?? 0) + 1);
  }
  return new Map([...months.entries()].sort(([a], [b]) => (a < b ? -1 : 1)));
}

/**
 * First-visit fix rate per month: of the finished jobs with outcome fixed or not-fixed, the
 * share fixed with no further job on the same asset within `returnDays` (default 30, common
 * practice for a "repeat call").
 */
export function firstVisitFixRate(index: ReviewIndex, selected: ArrayLike<number>, returnDays = 30): Map<string, { jobs: number; firstVisitFixes: number }> {
  const byAsset = new Map<string, number[]>();
  index.jobs.forEach((job, i) => {
    if (job.assetId === undefined) return;
    const list = byAsset.get(job.assetId);
    if (list) list.push(i);
    else byAsset.set(job.assetId, [i]);
  });
  const windowMs = returnDays * 86_400_000;
  const months = new Map<string, { jobs: number; firstVisitFixes: number }>();
  for (let k = 0; k < selected.length; k++) {
    const i = selected[k]!;
    const job = index.jobs[i]!;
    const outcome = job.finish?.outcome;
    if (job.status !== 'finished' || (outcome !== 'fixed' && outcome !== 'not-fixed')) continue;
    const month = monthOf(job);
    const entry = months.get(month) ?? { jobs: 0, firstVisitFixes: 0 };
    months.set(month, entry);
    entry.jobs += 1;
    if (outcome !== 'fixed') continue;
    const date = index.dateMs[i]!;
    const siblings = job.assetId === undefined ? [] : (byAsset.get(job.assetId) ?? []);
    const returned = siblings.some((j) => j !== i && index.dateMs[j]! > date && index.dateMs[j]! - date <= windowMs);
    if (!returned) entry.firstVisitFixes += 1;
  }
  return new Map([...months.entries()].sort(([a], [b]) => (a < b ? -1 : 1)));
}

/** Minutes on job (startedAt to finishedAt) per technician id: count, median and mean. */
export function timeOnJobByTechnician(index: ReviewIndex, selected: ArrayLike<number>): Map<string, { jobs: number; medianMinutes: number; meanMinutes: number }> {
  const minutes = new Map<string, number[]>();
  for (let k = 0; k < selected.length; k++) {
    const job = index.jobs[selected[k]!]!;
    if (job.startedAt === undefined || job.finishedAt === undefined) continue;
    const value = (Date.parse(job.finishedAt) - Date.parse(job.startedAt)) / 60_000;
    const list = minutes.get(job.technicianId);
    if (list) list.push(value);
    else minutes.set(job.technicianId, [value]);
  }
  const out = new Map<string, { jobs: number; medianMinutes: number; meanMinutes: number }>();
  for (const [technicianId, list] of minutes) {
    list.sort((a, b) => a - b);
    const middle = list.length >> 1;
    const median = list.length % 2 ? list[middle]! : (list[middle - 1]! + list[middle]!) / 2;
    out.set(technicianId, { jobs: list.length, medianMinutes: median, meanMinutes: list.reduce((a, b) => a + b, 0) / list.length });
  }
  return out;
}

/** Parts used, by the part's text, most used first. */
export function partsUsed(index: ReviewIndex, selected: ArrayLike<number>): [string, number][] {
  const counts = new Map<string, number>();
  for (let k = 0; k < selected.length; k++) {
    for (const part of index.jobs[selected[k]!]!.finish?.partsUsed ?? []) counts.set(part, (counts.get(part) ?? 0) + 1);
  }
  return [...counts.entries()].sort((a, b) => b[1] - a[1] || (a[0] < b[0] ? -1 : 1));
}

/**
 * One asset's readings of one kind across its visits, oldest first: the series that shows a
 * capacitor ageing (ripple creeping up). Superseded readings are left out.
 */
export function assetReadingSeries(
  payload: Pick<JobPayload, 'jobs' | 'readings'>,
  assetId: string,
  kind: Reading['kind'],
  phase: Reading['phase'] = 'before',
): { jobId: string; takenAt: IsoTime; value: number | 'OL'; expectedLow?: number; expectedHigh?: number }[] {
  const jobs = new Set(payload.jobs.filter((job) => job.assetId === assetId).map((job) => job.id));
  const superseded = new Set(payload.readings.flatMap((r) => (r.supersedes === undefined ? [] : [r.supersedes])));
  return payload.readings
    .filter((r) => jobs.has(r.jobId) && r.kind === kind && r.phase === phase && !superseded.has(r.id))
    .sort((a, b) => (a.takenAt < b.takenAt ? -1 : a.takenAt > b.takenAt ? 1 : 0))
    .map((r) => {
      const point: { jobId: string; takenAt: IsoTime; value: number | 'OL'; expectedLow?: number; expectedHigh?: number } = {
        jobId: r.jobId,
        takenAt: r.takenAt,
        value: r.value,
      };
      if (r.expectedLow !== undefined) point.expectedLow = r.expectedLow;
      if (r.expectedHigh !== undefined) point.expectedHigh = r.expectedHigh;
      return point;
    });
}
