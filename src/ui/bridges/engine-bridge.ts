/**
 * The app's only way to the engine: a Web Worker started on first use (its chunk is not part of
 * the first screen). Requests are answered in order; a crashed worker fails what was waiting and
 * is started afresh on the next request.
 */
import type { ReadingsInput } from '../../engine/diagnosis/types';
import type { SupplyResult, SupplySpecInput } from '../../engine/types';
import type { DiagnoseAnswer, DiagnosisSetup, WorkerAnswer, WorkerError, WorkerRequest } from '../../worker/protocol';

/** An engine request that failed: the supply is not valid (`kind` "spec") or the worker failed. */
export class EngineError extends Error {
  readonly kind: WorkerError['kind'];
  readonly field: string | undefined;
  readonly problem: string | undefined;

  constructor(error: WorkerError) {
    super(error.message);
    this.name = 'EngineError';
    this.kind = error.kind;
    this.field = error.field;
    this.problem = error.problem;
  }
}

export interface EngineClient {
  /** Expected readings of a supply (with about `waveformPoints` samples when asked). */
  expect(spec: SupplySpecInput, waveformPoints?: number): Promise<SupplyResult>;
  /** Bands, verdicts, ranked faults and the next reading. */
  diagnose(setup: DiagnosisSetup, readings: ReadingsInput): Promise<DiagnoseAnswer>;
}

type Waiting = { resolve: (answer: WorkerAnswer) => void; reject: (error: unknown) => void };
type RequestBody = WorkerRequest extends infer R ? (R extends WorkerRequest ? Omit<R, 'id'> : never) : never;

/**
 * A client over a worker made by `start` (the default starts src/worker/engine-worker.ts as a
 * module worker; tests pass their own).
 */
export function createEngineClient(start: () => Worker = startEngineWorker): EngineClient {
  let worker: Worker | undefined;
  let nextId = 1;
  const waiting = new Map<number, Waiting>();

  const failAll = (error: unknown) => {
    for (const entry of waiting.values()) entry.reject(error);
    waiting.clear();
  };

  const ensureWorker = (): Worker => {
    if (worker !== undefined) return worker;
    const started = start();
    started.addEventListener('message', (event: MessageEvent<WorkerAnswer>) => {
      const entry = waiting.get(event.data.id);
      waiting.delete(event.data.id);
      entry?.resolve(event.data);
    });
    started.addEventListener('error', (event) => {
      event.preventDefault();
      started.terminate();
      if (worker === started) worker = undefined;
      failAll(new EngineError({ kind: 'failed', message: `The calculator stopped (${event.message || 'worker error'}). Try again.` }));
    });
    worker = started;
    return started;
  };

  const send = (body: RequestBody): Promise<WorkerAnswer> =>
    new Promise((resolve, reject) => {
      const id = nextId++;
      waiting.set(id, { resolve, reject });
      try {
        ensureWorker().postMessage({ ...body, id });
      } catch (error) {
        waiting.delete(id);
        reject(new EngineError({ kind: 'failed', message: `The calculator could not start: ${String(error)}` }));
      }
    });

  return {
    async expect(spec, waveformPoints) {
      const answer = await send(waveformPoints === undefined ? { type: 'expect', spec } : { type: 'expect', spec, waveformPoints });
      if (!answer.ok) throw new EngineError(answer.error);
      if (answer.type !== 'expect') throw new EngineError({ kind: 'failed', message: 'unexpected answer' });
      return answer.result;
    },
    async diagnose(setup, readings) {
      const answer = await send({ type: 'diagnose', setup, readings });
      if (!answer.ok) throw new EngineError(answer.error);
      if (answer.type !== 'diagnose') throw new EngineError({ kind: 'failed', message: 'unexpected answer' });
      return answer.result;
    },
  };
}

function startEngineWorker(): Worker {
  return new Worker(new URL('../../worker/engine-worker.ts', import.meta.url), { type: 'module', name: 'engine' });
}

let shared: EngineClient | undefined;

/** The app's one engine client (its worker starts on the first request). */
export function engine(): EngineClient {
  shared ??= createEngineClient();
  return shared;
}
