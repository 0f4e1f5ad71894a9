import type { ComponentChildren } from 'preact';
import { useEffect, useRef } from 'preact/hooks';

/**
 * A screen's heading. It takes focus when the screen opens, so keyboard and screen-reader
 * users start at the top of the new screen rather than at the link they pressed.
 */
export function ScreenTitle({ children, focus = true, id }: { children: ComponentChildren; focus?: boolean; id?: string }) {
  const ref = useRef<HTMLHeadingElement>(null);
  useEffect(() => {
    if (focus) ref.current?.focus({ preventScroll: false });
  }, [focus]);
  return (
    <h1 tabIndex={-1} ref={ref} class="screen-title" id={id}>
      {children}
    </h1>
  );
}
