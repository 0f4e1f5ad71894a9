/**
 * Small hand-made records for the exchange tests, with the awkward text an export must carry,
 * and helpers to build files (including deliberately broken ones with a correct digest).
 */
import { canonicalJson, sha256Hex } from '../../src/exchange/canonical';
import { generateDemo } from '../../src/exchange/demo';
import { FORMAT_ID, SCHEMA_VERSION, type JobPayload } from '../../src/exchange/format';
import type { Job, Reading } from '../../src/model/job';

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
 * A file object with any content and a correct digest: what a buggy or hostile writer could
 * make. `envelope` members override the defaults; the digest is computed last.
 */
export async function sealedText(envelope: Record<string, unknown>): Promise<string> {
  const body: Record<string, unknown> = {
    format: FORMAT_ID,
    schemaVersion: SCHEMA_VERSION,
    exportedAt: T3,
    exportedBy: { device: 'test' },
    ...envelope,
  };
  delete body.sha256;
  const sha256 = await sha256Hex(canonicalJson(body));
  return JSON.stringify({ ...body, sha256 });
}
