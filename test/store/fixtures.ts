/** Typed fixtures for the store tests: a fresh database per test, records built from the model. */
import 'fake-indexeddb/auto';
import type { Asset, Job, Reading } from '../../src/model/job';
import { openStore, type OpenOptions } from '../../src/store/db';

let counter = 0;

/** A database no other test has used (fake-indexeddb keeps every name in one process). */
export function freshName(): string {
  counter += 1;
  return `test-${process.pid}-${counter}-${Math.random().toString(36).slice(2)}`;
}

export function openFresh(options: OpenOptions = {}) {
  return openStore({ name: freshName(), ...options });
}

export function assetFixture(overrides: Partial<Asset> = {}): Asset {
  return { id: crypto.randomUUID(), kind: 'washing machine', make: 'Haldwick', model: 'WX-7', serial: 'SN-001', customer: 'R. Alvarez', site: '14 Quarry Lane', ...overrides };
}

export function jobFixture(overrides: Partial<Job> = {}): Job {
  const at = '2026-03-02T09:00:00.000Z';
  return {
    id: crypto.randomUUID(),
    createdAt: at,
    updatedAt: at,
    customer: 'R. Alvarez',
    site: '14 Quarry Lane',
    technicianId: crypto.randomUUID(),
    complaint: 'Dead, no display',
    status: 'open',
    edits: { customer: at },
    ...overrides,
  };
}

export function readingFixture(jobId: string, overrides: Partial<Reading> = {}): Reading {
  return { id: crypto.randomUUID(), jobId, kind: 'dcOut', value: 14.8, text: '14,8', takenAt: '2026-03-02T09:05:00.000Z', phase: 'before', ...overrides };
}
