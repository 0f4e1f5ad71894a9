import { describe, expect, it } from 'vitest';
import { readingGuide } from '../../src/engine/diagnosis';
import { LIVE_READING_KINDS, POWER_OFF_READING_KINDS, type ReadingKind } from '../../src/engine/diagnosis/types';
import { diodeLabels } from '../../src/engine/spec';
import { TOPOLOGIES, type SupplySpecInput } from '../../src/engine/types';
import { createEngineClient, EngineError } from '../../src/ui/bridges/engine-bridge';
import { schematicPoints } from '../../src/ui/components/Schematic';
import { createHandler } from '../../src/worker/handler';
import type { WorkerAnswer, WorkerRequest } from '../../src/worker/protocol';

/** A stand-in for the Web Worker: answers through the real handler, later, or crashes on demand. */
class FakeWorker extends EventTarget {
  static started = 0;
  readonly handler = createHandler();
  crashNext = false;
  terminated = false;
  constructor() {
    super();
    FakeWorker.started += 1;
  }
  postMessage(request: WorkerRequest) {
    queueMicrotask(() => {
      if (this.crashNext) {
        const event = new Event('error') as Event & { message: string };
        event.message = 'boom';
        this.dispatchEvent(event);
        return;
      }
      const answer: WorkerAnswer = this.handler.handle(request);
      this.dispatchEvent(Object.assign(new Event('message'), { data: answer }));
    });
  }
  terminate() {
    this.terminated = true;
  }
}

const spec: SupplySpecInput = { topology: 'bridge', source: { vrms: 14, hz: 50, ohms: 0.8 }, diode: { preset: 'silicon' }, capacitor: { farads: 0.0022 }, load: { amps: 0.5 } };

describe('the engine bridge', () => {
  it('matches each answer to its request, whatever order they are sent in', async () => {
    let worker: FakeWorker | undefined;
    const client = createEngineClient(() => (worker = new FakeWorker()) as unknown as Worker);
    const [a, b] = await Promise.all([client.expect(spec), client.expect({ ...spec, source: { ...spec.source, vrms: 20 } })]);
    expect(b.dc).toBeGreaterThan(a.dc);
    expect(worker).toBeDefined();
  });

  it('turns a refused spec into an EngineError naming the field', async () => {
    const client = createEngineClient(() => new FakeWorker() as unknown as Worker);
    const error = await client.expect({ ...spec, load: { amps: -1 } }).catch((e: unknown) => e);
    expect(error).toBeInstanceOf(EngineError);
    expect((error as EngineError).kind).toBe('spec');
    expect((error as EngineError).field).toMatch(/^load/);
  });

  it('fails what was waiting when the worker dies, and starts a new one for the next request', async () => {
    const workers: FakeWorker[] = [];
    const client = createEngineClient(() => {
      const worker = new FakeWorker();
      workers.push(worker);
      return worker as unknown as Worker;
    });
    await client.expect(spec);
    workers[0]!.crashNext = true;
    await expect(client.expect(spec)).rejects.toMatchObject({ kind: 'failed' });
    expect(workers[0]!.terminated).toBe(true);
    await expect(client.expect(spec)).resolves.toHaveProperty('dc');
    expect(workers).toHaveLength(2);
  });
});

describe('the schematics', () => {
  it('draw every probe point the diagnosis can ask for, on every topology and regulator', () => {
    for (const topology of TOPOLOGIES) {
      for (const regulator of ['none', 'linear', 'zener'] as const) {
        const points = new Set(schematicPoints(topology, regulator, true));
        const kinds: ReadingKind[] = [...LIVE_READING_KINDS, ...POWER_OFF_READING_KINDS];
        for (const kind of kinds) {
          if (kind === 'regulatorOut' && regulator === 'none') continue;
          const targets =
            kind === 'diodeForward' || kind === 'diodeReverse' ? diodeLabels(topology) : kind === 'capacitance' || kind === 'esr' ? (topology === 'doubler' ? ['C1', 'C2'] : ['C1']) : [undefined];
          for (const target of targets) {
            const guide = readingGuide(topology, kind, target, 'true-rms-ac');
            expect(points.has(guide.probes.red), `${topology}/${regulator} ${kind} ${target ?? ''}: red on ${guide.probes.red}`).toBe(true);
            expect(points.has(guide.probes.black), `${topology}/${regulator} ${kind} ${target ?? ''}: black on ${guide.probes.black}`).toBe(true);
          }
        }
      }
    }
  });
});
