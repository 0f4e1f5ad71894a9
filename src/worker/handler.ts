/**
 * The engine worker's work, apart from the message plumbing so it can be tested in Node.
 * Keeps the last few prepared diagnoses: simulating a supply takes tens of engine solves, ranking
 * new readings against it a few milliseconds.
 */
import { expectReadings, SpecError } from '../engine';
import { diagnoseReadings, prepareDiagnosis, readingGuide, type PreparedDiagnosis } from '../engine/diagnosis';
import type { MeterKind } from '../engine/diagnosis/types';
import type { DiagnoseAnswer, DiagnosisSetup, WorkerAnswer, WorkerError, WorkerRequest } from './protocol';

/** Prepared supplies kept (one per open job is the common case; a few cover switching between jobs). */
const KEEP_PREPARED = 4;

export interface EngineHandler {
  handle(request: WorkerRequest): WorkerAnswer;
}

/** A handler with its own cache of prepared diagnoses. `now` gives milliseconds (for prepareMs). */
export function createHandler(now: () => number = () => performance.now()): EngineHandler {
  const prepared = new Map<string, PreparedDiagnosis>();

  const prepare = (setup: DiagnosisSetup): { value: PreparedDiagnosis; ms: number } => {
    const key = JSON.stringify([setup.spec, setup.meter ?? null, setup.tolerances ?? null]);
    const kept = prepared.get(key);
    if (kept !== undefined) {
      // Most recently used goes last, so the oldest is dropped first.
      prepared.delete(key);
      prepared.set(key, kept);
      return { value: kept, ms: 0 };
    }
    const start = now();
    const value = prepareDiagnosis(setup);
    const ms = now() - start;
    prepared.set(key, value);
    while (prepared.size > KEEP_PREPARED) prepared.delete(prepared.keys().next().value as string);
    return { value, ms };
  };

  const diagnose = (setup: DiagnosisSetup, readings: WorkerRequest & { type: 'diagnose' }): DiagnoseAnswer => {
    const { value, ms } = prepare(setup);
    const diagnosis = diagnoseReadings(value, readings.readings);
    const meterKind: MeterKind = setup.meter?.kind ?? 'true-rms-ac';
    const guides = diagnosis.bands.map((band) => readingGuide(setup.spec.topology, band.kind, band.target, meterKind));
    return { diagnosis, guides, prepareMs: ms };
  };

  return {
    handle(request) {
      try {
        if (request.type === 'expect') {
          const options = request.waveformPoints === undefined ? {} : { waveformPoints: request.waveformPoints };
          return { id: request.id, ok: true, type: 'expect', result: expectReadings(request.spec, options) };
        }
        return { id: request.id, ok: true, type: 'diagnose', result: diagnose(request.setup, request) };
      } catch (error) {
        return { id: request.id, ok: false, error: describeError(error) };
      }
    },
  };
}

function describeError(error: unknown): WorkerError {
  if (error instanceof SpecError) return { kind: 'spec', message: error.message, field: error.field, problem: error.problem };
  return { kind: 'failed', message: error instanceof Error ? error.message : String(error) };
}
