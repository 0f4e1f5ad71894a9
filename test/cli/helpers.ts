import { once } from 'node:events';
import { Readable, Writable } from 'node:stream';
import type { CliIo } from '../../src/cli/command';

/** A writable that keeps everything written to it. */
export class TextSink extends Writable {
  text = '';
  override _write(chunk: Buffer | string, _encoding: BufferEncoding, done: () => void): void {
    this.text += chunk.toString();
    done();
    this.emit('written');
  }
  lines(): string[] {
    return this.text.split('\n').filter((line) => line !== '');
  }
  /** Resolves once at least `count` complete lines have been written. */
  async untilLines(count: number): Promise<void> {
    while (this.lines().length < count) await once(this, 'written');
  }
}

/** In-memory streams for running a command in-process; stdin holds `input`. */
export function memoryIo(input = ''): CliIo & { stdout: TextSink; stderr: TextSink } {
  return { stdin: Readable.from([input]), stdout: new TextSink(), stderr: new TextSink() };
}

/** A bridge supply that every solver should handle: 12 V 50 Hz, silicon diodes, 2200 µF, 33 Ω. */
export const BRIDGE_SPEC = {
  topology: 'bridge',
  source: { vrms: 12, hz: 50, ohms: 0.5 },
  diode: { preset: 'silicon' },
  capacitor: { farads: 2200e-6, esr: 0.05 },
  load: { ohms: 33 },
};

/** A half-wave supply with a current load, to tell two results apart. */
export const HALF_WAVE_SPEC = {
  topology: 'half-wave',
  source: { vrms: 9, hz: 60 },
  capacitor: { farads: 1000e-6 },
  load: { amps: 0.1 },
};

/** The bridge spec with a negative capacitance, which the spec parser must refuse. */
export const BAD_CAPACITOR_SPEC = { ...BRIDGE_SPEC, capacitor: { farads: -1 } };
