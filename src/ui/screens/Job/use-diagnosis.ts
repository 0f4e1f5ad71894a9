import { useEffect, useMemo, useRef, useState } from 'preact/hooks';
import type { ReadingsInput } from '../../../engine/diagnosis/types';
import type { Job } from '../../../model/job';
import type { DiagnoseAnswer, DiagnosisSetup } from '../../../worker/protocol';
import { EngineError, type EngineClient } from '../../bridges/engine-bridge';

export interface DiagnosisState {
  answer: DiagnoseAnswer | null;
  /** A request is under way (the shown answer may be for earlier readings). */
  working: boolean;
  error: EngineError | null;
}

/** The diagnosis setup of a job (null before its supply is described). */
export function setupOf(job: Job): DiagnosisSetup | null {
  if (job.supply === undefined) return null;
  const setup: DiagnosisSetup = { spec: job.supply };
  if (job.meter !== undefined) setup.meter = job.meter;
  const region = job.nameplate?.region;
  if (region === 'ansi-120-a' || region === 'ansi-120-b' || region === 'en-230' || region === 'jp-100-50' || region === 'jp-100-60') {
    setup.tolerances = { region };
  }
  return setup;
}

/** While the supply is being typed it changes on every key: wait this long for a pause. */
const SETUP_PAUSE_MS = 300;

/**
 * Runs the diagnosis in the worker whenever the supply or the readings change. Answers that
 * arrive for an older request than the latest are dropped, so the screen never goes back.
 */
export function useDiagnosis(engine: EngineClient, setup: DiagnosisSetup | null, readings: ReadingsInput): DiagnosisState {
  const [state, setState] = useState<DiagnosisState>({ answer: null, working: setup !== null, error: null });
  const setupKey = useMemo(() => (setup === null ? '' : JSON.stringify(setup)), [setup]);
  const readingsKey = JSON.stringify(readings);
  const sequence = useRef(0);
  const lastSetup = useRef<string | null>(null);

  useEffect(() => {
    if (setup === null) {
      setState({ answer: null, working: false, error: null });
      lastSetup.current = null;
      return;
    }
    const id = ++sequence.current;
    const setupChanged = lastSetup.current !== null && lastSetup.current !== setupKey;
    lastSetup.current = setupKey;
    setState((previous) => ({ ...previous, working: true }));
    const run = () =>
      engine.diagnose(setup, readings).then(
        (answer) => id === sequence.current && setState({ answer, working: false, error: null }),
        (error: unknown) =>
          id === sequence.current &&
          setState((previous) => ({
            answer: setupChanged ? null : previous.answer,
            working: false,
            error: error instanceof EngineError ? error : new EngineError({ kind: 'failed', message: String(error) }),
          })),
      );
    if (!setupChanged) {
      void run();
      return;
    }
    const timer = setTimeout(() => void run(), SETUP_PAUSE_MS);
    return () => clearTimeout(timer);
  }, [engine, setupKey, readingsKey]);

  return state;
}
