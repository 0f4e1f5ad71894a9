/**
 * The shop review's work, kept where it cannot hold up a tap: the index over every job is built
 * once, then each filter is one pass and the chart figures are computed beside it. Plain data in
 * and out, so it runs in the review worker (review-worker.ts) or, in tests and where workers are
 * missing, in-process.
 */
import {
  buildReviewIndex,
  faultsByMonth,
  filterJobs,
  firstVisitFixRate,
  jobDate,
  partsUsed,
  timeOnJobByTechnician,
  type ReviewFilter,
  type ReviewIndex,
} from '../exchange/review';
import type { Asset, Job } from '../model/job';

/** One job as the review table shows it. */
export interface ReviewRow {
  id: string;
  date: string;
  customer: string;
  site: string;
  technicianId: string;
  asset: string;
  topology?: string;
  fault?: string;
  outcome?: string;
  minutes?: number;
}

export interface ReviewAnswer {
  /** Jobs in the store, and how many the filter let through. */
  total: number;
  matched: number;
  /** The most recent matching jobs, newest first (at most `rowLimit`). */
  rows: ReviewRow[];
  /** The values the filter's lists offer (over every job, not only the matched ones). */
  technicianIds: string[];
  faults: string[];
  /** The units among the matched jobs, when there are few enough to list (≤ 60). */
  assets: { id: string; words: string; jobs: number }[] | null;
  faultsByMonth: { month: string; counts: Record<string, number> }[];
  fixRate: { month: string; jobs: number; firstVisitFixes: number }[];
  timeOnJob: { technicianId: string; jobs: number; medianMinutes: number }[];
  parts: [string, number][];
}

function assetWords(asset: Asset | undefined): string {
  if (asset === undefined) return '';
  return [asset.kind, asset.make, asset.model, asset.serial ? `s/n ${asset.serial}` : ''].filter(Boolean).join(' ');
}

function rowOf(job: Job, assets: ReadonlyMap<string, Asset>): ReviewRow {
  const row: ReviewRow = {
    id: job.id,
    date: jobDate(job),
    customer: job.customer,
    site: job.site,
    technicianId: job.technicianId,
    asset: assetWords(job.assetId === undefined ? undefined : assets.get(job.assetId)),
  };
  if (job.supply) row.topology = job.supply.topology;
  if (job.finish?.faultFound) row.fault = job.finish.faultFound;
  if (job.finish?.outcome) row.outcome = job.finish.outcome;
  if (job.startedAt && job.finishedAt) row.minutes = Math.round((Date.parse(job.finishedAt) - Date.parse(job.startedAt)) / 60_000);
  return row;
}

/** The review over one set of records: load once, then ask as often as the filter changes. */
export class ReviewWork {
  private index: ReviewIndex;
  private assets: Map<string, Asset>;

  constructor(records: { jobs: Job[]; assets: Asset[] }) {
    this.index = buildReviewIndex(records);
    this.assets = new Map(records.assets.map((asset) => [asset.id, asset]));
  }

  /** The matched jobs' table rows and chart figures. */
  query(filter: ReviewFilter, rowLimit = 100): ReviewAnswer {
    const index = this.index;
    const selected = filterJobs(index, filter);
    // Newest first for the table: the selection is in store order, so sort a copy by date.
    const byDate = Array.from(selected).sort((a, b) => index.dateMs[b]! - index.dateMs[a]!);
    const rows = byDate.slice(0, rowLimit).map((i) => rowOf(index.jobs[i]!, this.assets));
    const assetCounts = new Map<string, number>();
    for (let k = 0; k < selected.length && assetCounts.size <= 60; k++) {
      const assetId = index.jobs[selected[k]!]!.assetId;
      if (assetId !== undefined) assetCounts.set(assetId, (assetCounts.get(assetId) ?? 0) + 1);
    }
    return {
      total: index.jobs.length,
      matched: selected.length,
      rows,
      technicianIds: [...index.technicianIds],
      faults: index.faults.filter((fault) => fault !== ''),
      assets:
        assetCounts.size > 60
          ? null
          : [...assetCounts].map(([id, jobs]) => ({ id, jobs, words: assetWords(this.assets.get(id)) || id })).sort((a, b) => (a.words < b.words ? -1 : 1)),
      faultsByMonth: [...faultsByMonth(index, selected)].map(([month, counts]) => ({ month, counts: Object.fromEntries(counts) })),
      fixRate: [...firstVisitFixRate(index, selected)].map(([month, entry]) => ({ month, ...entry })),
      timeOnJob: [...timeOnJobByTechnician(index, selected)].map(([technicianId, entry]) => ({
        technicianId,
        jobs: entry.jobs,
        medianMinutes: entry.medianMinutes,
      })),
      parts: partsUsed(index, selected).slice(0, 12),
    };
  }
}
