/**
 * Small hand-made records for the exchange tests, with the awkward text an export must carry,
 * and helpers to build files (including deliberately broken ones with a correct digest).
 */
import { createHash } from 'node:crypto';
import { canonicalJson, sha256Hex } from '../../src/exchange/canonical';
import { generateDemo } from '../../src/exchange/demo';
import { FORMAT_ID, type JobPayload } from '../../src/exchange/format';
import type { Job, MergeConflict, Reading } from '../../src/model/job';

export const T0 = '2026-03-02T09:00:00.000Z';
export const T1 = '2026-03-02T10:15:00.000Z';
export const T2 = '2026-03-03T08:30:00.000Z';
export const T3 = '2026-03-04T16:45:00.000Z';

function job(id: string, overrides: Partial<Job> = {}): Job {
  return {
    id,
    createdAt: T0,
    updatedAt: T1,
    startedAt: T0,
    customer: 'Foxmere Bakery',
    site: 'Kitchen',
    assetId: 'asset-1',
    technicianId: 'tech-1',
    complaint: 'Resets mid-cycle',
    supply: { topology: 'bridge', source: { vrms: 12, hz: 50, ohms: 0.8 }, capacitor: { farads: 0.001, esr: 0.08 }, load: { amps: 0.25 } },
    status: 'open',
    edits: { customer: T0, site: T0, assetId: T0, technicianId: T0, complaint: T0, supply: T0, status: T0 },
    ...overrides,
  };
}

function reading(id: string, jobId: string, overrides: Partial<Reading> = {}): Reading {
  return { id, jobId, kind: 'dcOut', value: 13.58, text: '13.58', takenAt: T1, phase: 'before', expectedLow: 11.5, expectedHigh: 15.1, verdict: 'in', ...overrides };
}

/** Three jobs, two assets, two technicians, readings with every awkward text. */
export function smallPayload(): JobPayload {
  return {
    technicians: [
      { id: 'tech-1', name: 'Ada Quill' },
      { id: 'tech-2', name: '=Tomas "TB" Brenner, senior' },
    ],
    assets: [
      { id: 'asset-1', kind: 'washing machine', make: 'Ostrel', model: 'WM-700', serial: '-00417', tag: '@TAG-7', customer: 'Foxmere Bakery', site: 'Kitchen' },
      { id: 'asset-2', kind: 'boiler', customer: 'Greywick Café', site: 'Plant room\nback door' },
    ],
    jobs: [
      job('job-a'),
      job('job-b', {
        customer: '+Greywick Café, "the one by the bridge"',
        site: 'Plant room\nback door',
        assetId: 'asset-2',
        technicianId: 'tech-2',
        complaint: 'Kondensator gewölbt; condensateur gonflé; 1000 µF, ESR 2,3 Ω 😕',
        status: 'finished',
        finishedAt: T3,
        finish: { faultFound: 'capacitor-low', suspectedPart: 'C1', actionTaken: 'Replaced C1', partsUsed: ['1000 µF 25 V electrolytic'], outcome: 'fixed', notes: '\tcustomer said:\r\n"it just clicks"' },
        edits: { customer: T0, site: T0, assetId: T0, technicianId: T0, complaint: T0, status: T3, finish: T3 },
        updatedAt: T3,
      }),
      job('job-c', { assetId: undefined, createdAt: T2, startedAt: undefined, updatedAt: T2, edits: { complaint: T2 } }),
    ].map((j) => JSON.parse(JSON.stringify(j)) as Job),
    readings: [
      reading('r-1', 'job-a'),
      reading('r-2', 'job-a', { kind: 'rippleAc', value: 0.412, text: '412mV', expectedLow: 0.46, expectedHigh: 0.84, verdict: 'low', note: '=1+1 from the office' }),
      reading('r-3', 'job-a', { kind: 'diodeReverse', target: 'D2', value: 'OL', text: 'OL', expectedLow: undefined, expectedHigh: undefined, verdict: 'in' }),
      reading('r-4', 'job-b', { kind: 'diodeForward', target: 'D1', value: -0.55, text: '-0,55', expectedLow: -0.8, expectedHigh: -0.4, note: '-reversed leads' }),
      reading('r-5', 'job-b', { kind: 'capacitance', target: 'C1', value: 0.000468, text: '468µF', expectedLow: 0.0007, expectedHigh: 0.0012, verdict: 'low', phase: 'before' }),
      reading('r-6', 'job-b', { kind: 'dcOut', value: 1.358, text: '1.358', verdict: 'low' }),
      reading('r-7', 'job-b', { kind: 'dcOut', value: 13.58, text: '13,58', supersedes: 'r-6', takenAt: T3, phase: 'after', note: 'Messung bei offenem Deckel, "warm"' }),
      reading('r-8', 'job-c', { kind: 'mainsAc', value: 231, text: '231', expectedLow: 204.63, expectedHigh: 255.83, note: '\rstray CR' }),
    ].map((r) => JSON.parse(JSON.stringify(r)) as Reading),
    conflicts: [],
    recordConflicts: [],
  };
}

/** A demo of `jobs` jobs, cached per (jobs, seed) for the test run. */
const demoCache = new Map<string, JobPayload>();
export function demoPayload(jobs: number, seed = 11): JobPayload {
  const key = `${jobs}:${seed}`;
  let payload = demoCache.get(key);
  if (!payload) {
    payload = generateDemo({ jobs, seed });
    demoCache.set(key, payload);
  }
  return JSON.parse(JSON.stringify(payload)) as JobPayload;
}

/**
 * A version-1 file object (one JSON object, docs/exchange-format.md "Version 1") with any content
 * and a correct digest: what a buggy or hostile writer could make. `envelope` members override
 * the defaults; the digest (SHA-256 of the RFC 8785 canonical JSON without `sha256`) is computed
 * last.
 */
export async function sealedText(envelope: Record<string, unknown>): Promise<string> {
  const body: Record<string, unknown> = {
    format: FORMAT_ID,
    schemaVersion: 1,
    exportedAt: T3,
    exportedBy: { device: 'test' },
    ...envelope,
  };
  delete body.sha256;
  const sha256 = await sha256Hex(canonicalJson(body));
  return JSON.stringify({ ...body, sha256 });
}

/** The small payload with job-field and record conflicts, so that every kind of block has records (the demo has none). */
export function conflictPayload(): JobPayload {
  const payload = smallPayload();
  payload.conflicts = [
    { jobId: 'job-b', field: 'customer', kept: payload.jobs[1]!.customer, keptEditedAt: T0, dropped: 'Greywick Café (old name)', droppedEditedAt: T0, droppedFrom: 'phone of T. Brenner' },
    // The losing version had no value: `dropped` is left out.
    { jobId: 'job-a', field: 'status', kept: 'open', keptEditedAt: T0, droppedEditedAt: T0 } as MergeConflict,
  ];
  payload.recordConflicts = [
    { record: 'asset', id: 'asset-1', field: 'model', kept: 'WM-700', keptAt: T3, dropped: 'WM-70O', droppedAt: T2, droppedFrom: 'tablet.json' },
    { record: 'technician', id: 'tech-2', field: 'name', kept: payload.technicians[1]!.name, keptAt: T3, droppedAt: T2 },
  ];
  // A merge's second reading under a taken id (docs: "<id>~<16 hex digits>").
  payload.readings.push({ ...payload.readings[1]!, id: 'r-2~0123456789abcdef', value: 0.413, text: '413mV' });
  return payload;
}

// ---------------------------------------------------------------------------------------------
// Version 2 (JSON Lines). Everything here is computed independently of src/exchange: the digest
// with node:crypto, the lines with JSON.stringify.
// ---------------------------------------------------------------------------------------------

/** Bytes per digest piece, as docs/exchange-format.md "The digest" states (65 536). */
export const PIECE_BYTES = 65_536;

/**
 * The version-2 digest by its definition in docs/exchange-format.md, with node:crypto's SHA-256
 * (FIPS 180-4): cut the body into 65 536-byte pieces, hash each, hash the piece digests one after
 * another. Lowercase hex.
 */
export function referenceDigestHex(body: Uint8Array | string): string {
  const bytes = typeof body === 'string' ? Buffer.from(body, 'utf8') : body;
  const list = createHash('sha256');
  for (let at = 0; at < bytes.length; at += PIECE_BYTES) {
    list.update(createHash('sha256').update(bytes.subarray(at, at + PIECE_BYTES)).digest());
  }
  return list.digest('hex');
}

/**
 * A version-2 file from any lines, with a seal holding a correct digest: what a buggy or hostile
 * writer could make. A string is taken as the line's text exactly (no line feed); anything else
 * is written with JSON.stringify (so non-ASCII stays unescaped, as another writer may leave it).
 */
export function sealedLines(lines: readonly unknown[]): string {
  const body = lines.map((line) => `${typeof line === 'string' ? line : JSON.stringify(line)}\n`).join('');
  return `${body}{"sha256":"${referenceDigestHex(body)}"}\n`;
}

export type Counts = Record<'technicians' | 'assets' | 'jobs' | 'readings' | 'conflicts' | 'recordConflicts', number>;

/** How many records of each kind a payload holds, as a head's `counts`. */
export function countsOf(payload: JobPayload): Counts {
  return {
    technicians: payload.technicians.length,
    assets: payload.assets.length,
    jobs: payload.jobs.length,
    readings: payload.readings.length,
    conflicts: payload.conflicts.length,
    recordConflicts: payload.recordConflicts.length,
  };
}

/** A version-2 head (format first), with `overrides` replacing or adding members. */
export function headLine(counts: Partial<Counts>, overrides: Record<string, unknown> = {}): Record<string, unknown> {
  const all: Counts = { technicians: 0, assets: 0, jobs: 0, readings: 0, conflicts: 0, recordConflicts: 0, ...counts };
  return { format: FORMAT_ID, schemaVersion: 2, exportedAt: T3, exportedBy: { device: 'test' }, counts: all, ...overrides };
}

/** The lines of a file's text (each without its line feed), the text after the last one dropped. */
export function linesOf(text: string): string[] {
  const lines = text.split('\n');
  lines.pop();
  return lines;
}

/**
 * Readings as one table of columns (docs/exchange-format.md, "The reading table"), written here
 * independently of lines.ts: `jobs` is the file's list of job ids, which gives each `job` value.
 * Optional columns no reading uses are left out.
 */
export function readingTable(readings: readonly Reading[], jobs: readonly string[]): Record<string, unknown[]> {
  const columns = ['id', 'job', 'kind', 'target', 'value', 'text', 'takenAt', 'phase', 'expectedLow', 'expectedHigh', 'verdict', 'supersedes', 'note'] as const;
  const optional = new Set(['target', 'expectedLow', 'expectedHigh', 'verdict', 'supersedes', 'note']);
  const table: Record<string, unknown[]> = {};
  for (const column of columns) {
    const values = readings.map((reading) => (column === 'job' ? jobs.indexOf(reading.jobId) : (reading[column] ?? null)));
    if (optional.has(column) && values.every((value) => value === null)) continue;
    table[column] = values;
  }
  return table;
}
