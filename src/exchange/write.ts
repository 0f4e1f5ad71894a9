/**
 * Writing a job file: records in, the file's text out (canonical JSON with its digest).
 */
import type { IsoTime, Job } from '../model/job';
import { sha256Hex } from './canonical';
import { FORMAT_ID, SCHEMA_VERSION, type ExchangeProblem, type ExportedBy, type JobFile, type JobPayload } from './format';
import { sortPayload } from './order';
import { checkPayload, checkReferences, digestText, formatProblem } from './parse';
import { Checker, checkExportedBy, INVALID, isoTime } from './schema';

/** Records that cannot be written as they are (a bug upstream, or a store holding bad data). */
export class ExportError extends Error {
  override name = 'ExportError';
  constructor(readonly problems: ExchangeProblem[]) {
    super(`cannot export: ${problems.slice(0, 3).map(formatProblem).join('; ')}${problems.length > 3 ? ` (and ${problems.length - 3} more)` : ''}`);
  }
}

export interface WriteOptions {
  exportedAt: IsoTime;
  exportedBy?: ExportedBy;
}

/**
 * Checks and orders the records and builds the file object with its digest.
 * Throws ExportError when a record breaks the format (the same checks an import makes), so a
 * file this writes always reads back. Rejects when the runtime has no WebCrypto.
 */
export async function buildJobFile(payload: JobPayload, options: WriteOptions): Promise<{ file: JobFile; text: string }> {
  const c = new Checker('export');
  c.enter('exportedAt');
  const exportedAt = isoTime(options.exportedAt, c);
  c.leave();
  c.enter('exportedBy');
  const exportedBy = checkExportedBy(options.exportedBy ?? {}, c);
  c.leave();
  const checked = checkPayload(sortPayload(payload), c);
  if (checked) checkReferences(checked, c);
  if (c.problemCount > 0 || !checked || exportedAt === INVALID || exportedBy === INVALID) throw new ExportError(c.problems);
  const body: Omit<JobFile, 'sha256'> = {
    format: FORMAT_ID,
    schemaVersion: SCHEMA_VERSION,
    exportedAt: exportedAt as string,
    exportedBy: exportedBy as ExportedBy,
    payload: checked,
  };
  const canonical = digestText(body);
  const sha256 = await sha256Hex(canonical);
  // "sha256" sorts after "schemaVersion", so appending it keeps the whole file canonical JSON.
  return { file: { ...body, sha256 }, text: `${canonical.slice(0, -1)},"sha256":"${sha256}"}\n` };
}

/** The file's text for these records (see buildJobFile). */
export async function writeJobFile(payload: JobPayload, options: WriteOptions): Promise<string> {
  return (await buildJobFile(payload, options)).text;
}

/** What to export from a store's records. */
export type ExportSelection =
  | { kind: 'all' }
  | { kind: 'jobs'; jobIds: readonly string[] }
  /** Jobs created from `from` (inclusive) to `to` (exclusive); either end may be left open. */
  | { kind: 'dates'; from?: IsoTime; to?: IsoTime };

/**
 * The records an export of `selection` carries: the chosen jobs, all their readings and
 * conflicts, and the assets and technicians they name (and those records' conflicts).
 */
export function selectForExport(store: JobPayload, selection: ExportSelection): JobPayload {
  if (selection.kind === 'all') return store;
  let keep: (job: Job) => boolean;
  if (selection.kind === 'jobs') {
    const ids = new Set(selection.jobIds);
    keep = (job) => ids.has(job.id);
  } else {
    const { from, to } = selection;
    keep = (job) => (from === undefined || job.createdAt >= from) && (to === undefined || job.createdAt < to);
  }
  const jobs = store.jobs.filter(keep);
  const jobIds = new Set(jobs.map((job) => job.id));
  const assetIds = new Set(jobs.flatMap((job) => (job.assetId === undefined ? [] : [job.assetId])));
  const technicianIds = new Set(jobs.map((job) => job.technicianId));
  return {
    jobs,
    readings: store.readings.filter((reading) => jobIds.has(reading.jobId)),
    assets: store.assets.filter((asset) => assetIds.has(asset.id)),
    technicians: store.technicians.filter((technician) => technicianIds.has(technician.id)),
    conflicts: store.conflicts.filter((conflict) => jobIds.has(conflict.jobId)),
    recordConflicts: store.recordConflicts.filter((conflict) =>
      conflict.record === 'asset' ? assetIds.has(conflict.id) : technicianIds.has(conflict.id),
    ),
  };
}
