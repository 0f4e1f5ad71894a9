/// <reference lib="webworker" />
/**
 * The Web Worker that runs the engine and the diagnosis off the main thread, so a solve never
 * holds up a tap. One request in, one answer out, in order.
 */
import { createHandler } from './handler';
import type { WorkerRequest } from './protocol';

const scope = self as unknown as DedicatedWorkerGlobalScope;
const handler = createHandler();

scope.addEventListener('message', (event: MessageEvent<WorkerRequest>) => {
  scope.postMessage(handler.handle(event.data));
});
