import type { ComponentChildren } from 'preact';

/** A safety caution: a warning sign and the words, set apart from the step (DOMAIN.md §8). */
export function Caution({ title, children }: { title: string; children: ComponentChildren }) {
  return (
    <aside class="caution" role="note" aria-label={title}>
      <p class="caution-title">
        <span aria-hidden="true">⚠</span> {title}
      </p>
      <div>{children}</div>
    </aside>
  );
}
