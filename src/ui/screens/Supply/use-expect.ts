import { useEffect, useState } from 'preact/hooks';
import type { SupplyResult, SupplySpecInput } from '../../../engine/types';
import type { EngineClient } from '../../bridges/engine-bridge';

/** The engine's figures for a supply, recomputed in the worker when the spec changes. */
export function useExpect(engine: EngineClient, spec: SupplySpecInput | undefined, waveformPoints?: number): { result: SupplyResult | null; error: string | null } {
  const [state, setState] = useState<{ result: SupplyResult | null; error: string | null }>({ result: null, error: null });
  const key = spec === undefined ? '' : JSON.stringify(spec);
  useEffect(() => {
    if (spec === undefined) {
      setState({ result: null, error: null });
      return;
    }
    let live = true;
    engine.expect(spec, waveformPoints).then(
      (result) => live && setState({ result, error: null }),
      (error: unknown) => live && setState({ result: null, error: error instanceof Error ? error.message : String(error) }),
    );
    return () => {
      live = false;
    };
  }, [engine, key, waveformPoints]);
  return state;
}
