/** Shared by the component tests: a store on fake-indexeddb and the engine run in-process. */
import 'fake-indexeddb/auto';
import type { ReadingsInput } from '../../src/engine/diagnosis/types';
import type { SupplySpecInput } from '../../src/engine/types';
import { openStore } from '../../src/store/db';
import type { Database } from '../../src/store/schema';
import type { EngineClient } from '../../src/ui/bridges/engine-bridge';
import { EngineError } from '../../src/ui/bridges/engine-bridge';
import { createHandler } from '../../src/worker/handler';
import type { DiagnosisSetup } from '../../src/worker/protocol';

let count = 0;

/** A database no other test uses. */
export function freshDb(): Promise<Database> {
  count += 1;
  return openStore({ name: `ui-${process.pid}-${count}-${Math.random().toString(36).slice(2)}` });
}

/** The worker's own handler, called in-process: the screens get real engine answers. */
export function inProcessEngine(): EngineClient & { calls: string[] } {
  const handler = createHandler();
  let id = 0;
  const calls: string[] = [];
  return {
    calls,
    async expect(spec: SupplySpecInput, waveformPoints?: number) {
      calls.push('expect');
      const answer = handler.handle(waveformPoints === undefined ? { id: ++id, type: 'expect', spec } : { id: ++id, type: 'expect', spec, waveformPoints });
      if (!answer.ok) throw new EngineError(answer.error);
      if (answer.type !== 'expect') throw new Error('wrong answer');
      return answer.result;
    },
    async diagnose(setup: DiagnosisSetup, readings: ReadingsInput) {
      calls.push('diagnose');
      const answer = handler.handle({ id: ++id, type: 'diagnose', setup, readings });
      if (!answer.ok) throw new EngineError(answer.error);
      if (answer.type !== 'diagnose') throw new Error('wrong answer');
      return answer.result;
    },
  };
}

/** A promise with its resolve handle, for writes the test finishes when it wants. */
export function deferred<T>(): { promise: Promise<T>; resolve: (value: T) => void } {
  let resolve!: (value: T) => void;
  const promise = new Promise<T>((r) => (resolve = r));
  return { promise, resolve };
}
