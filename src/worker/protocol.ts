/**
 * Messages between the app and the engine worker. Everything here is structured-clone data:
 * requests carry the supply as JSON input, answers carry plain results.
 */
import type { Diagnosis, MeterSettings, NextReading, ReadingsInput, ToleranceSettings } from '../engine/diagnosis/types';
import type { SupplyResult, SupplySpecInput } from '../engine/types';

/** What the diagnosis of one supply depends on (its simulation is kept while this stays the same). */
export interface DiagnosisSetup {
  spec: SupplySpecInput;
  meter?: MeterSettings;
  tolerances?: ToleranceSettings;
}

export type WorkerRequest =
  /** The engine's expected readings for a supply, optionally with waveform samples. */
  | { id: number; type: 'expect'; spec: SupplySpecInput; waveformPoints?: number }
  /** Bands, verdicts, ranked faults and the next reading for the readings so far. */
  | { id: number; type: 'diagnose'; setup: DiagnosisSetup; readings: ReadingsInput };

export interface DiagnoseAnswer {
  diagnosis: Diagnosis;
  /** How to take every reading that has a band (so any reading can be chosen instead of the suggested one). */
  guides: NextReading[];
  /** Milliseconds spent simulating the supply (0 when the earlier simulation was reused). */
  prepareMs: number;
}

export type WorkerAnswer =
  | { id: number; ok: true; type: 'expect'; result: SupplyResult }
  | { id: number; ok: true; type: 'diagnose'; result: DiagnoseAnswer }
  | { id: number; ok: false; error: WorkerError };

export interface WorkerError {
  /** "spec": the supply as described is not valid (see `field`); "failed": anything else. */
  kind: 'spec' | 'failed';
  message: string;
  /** The spec field at fault, e.g. "capacitor.farads" (for kind "spec"). */
  field?: string;
  /** What is wrong with that field, without the field's path (for showing under the field). */
  problem?: string;
}
