// The page's only way to the engine. It is a separate chunk loaded on first use, so the first
// screen does not wait for the solver; a later issue moves this behind a Web Worker.
type Engine = typeof import('../engine');

let loading: Promise<Engine> | undefined;

/**
 * Resolves to the engine module, loading its chunk once. A failed load (chunk missing while
 * offline before the app is cached) is forgotten so the next call tries again.
 */
export function loadEngine(): Promise<Engine> {
  loading ??= import('../engine').catch((error: unknown) => {
    loading = undefined;
    throw error;
  });
  return loading;
}
