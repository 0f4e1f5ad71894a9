import type { Verdict } from '../../engine/diagnosis/types';

const WORDS: Record<Verdict, { icon: string; text: string }> = {
  in: { icon: '✓', text: 'In range' },
  low: { icon: '▼', text: 'Low' },
  high: { icon: '▲', text: 'High' },
};

/** A verdict by icon and word as well as colour (WCAG 2.2 SC 1.4.1). */
export function VerdictBadge({ verdict }: { verdict: Verdict }) {
  const { icon, text } = WORDS[verdict];
  return (
    <span class={`verdict verdict-${verdict}`} data-verdict={verdict}>
      <span aria-hidden="true">{icon}</span> {text}
    </span>
  );
}
