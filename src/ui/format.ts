export type DisplayUnit = 'V' | 'A' | 'Hz' | 'W';

/**
 * A reading as a meter would show it: three significant figures, with a milli prefix below one
 * volt, amp or watt (frequencies keep their unit). Returns "—" for a value that is not finite.
 */
export function formatQuantity(value: number, unit: DisplayUnit): string {
  if (!Number.isFinite(value)) return '—';
  const magnitude = Math.abs(value);
  if (unit !== 'Hz' && magnitude > 0 && magnitude < 1) return `${toThreeFigures(value * 1000)} m${unit}`;
  return `${toThreeFigures(value)} ${unit}`;
}

function toThreeFigures(value: number): string {
  // toPrecision switches to exponent form at 1000 and above; a whole number reads better there.
  return Math.abs(value) >= 1000 ? value.toFixed(0) : value.toPrecision(3);
}
