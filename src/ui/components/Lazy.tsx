import type { ComponentType } from 'preact';
import { useEffect, useState } from 'preact/hooks';

type Loader<P> = () => Promise<ComponentType<P>>;

const loaded = new Map<Loader<never>, ComponentType<never>>();

/**
 * Renders a component whose code is fetched on first use (a screen, the chart), showing a short
 * note while it loads and a plain message with a retry if it cannot be fetched.
 * @param load  a stable function (module level) returning the component, e.g. via import()
 */
export function Lazy<P extends object>({ load, props, what }: { load: Loader<P>; props: P; what: string }) {
  const [found, setComponent] = useState<{ load: Loader<P>; component: ComponentType<P> } | undefined>(() => {
    const component = loaded.get(load as Loader<never>) as ComponentType<P> | undefined;
    return component === undefined ? undefined : { load, component };
  });
  // Only what `load` itself gave: a reused Lazy switched to another screen must not show the old one.
  const component = found?.load === load ? found.component : (loaded.get(load as Loader<never>) as ComponentType<P> | undefined);
  const [failed, setFailed] = useState(false);
  const [attempt, setAttempt] = useState(0);
  useEffect(() => {
    if (component !== undefined) return;
    let live = true;
    load().then(
      (loadedComponent) => {
        loaded.set(load as Loader<never>, loadedComponent as ComponentType<never>);
        if (live) setComponent({ load, component: loadedComponent });
      },
      () => live && setFailed(true),
    );
    return () => {
      live = false;
    };
  }, [load, attempt, component]);
  if (component !== undefined) {
    const Screen = component;
    return <Screen {...props} />;
  }
  if (failed) {
    return (
      <div class="notice problem" role="alert">
        <p>The {what} could not be loaded. If this is the first visit, open the app once with a signal so it can store itself.</p>
        <button type="button" class="secondary" onClick={() => { setFailed(false); setAttempt(attempt + 1); }}>
          Try again
        </button>
      </div>
    );
  }
  return <p class="loading" role="status">Loading the {what}…</p>;
}
