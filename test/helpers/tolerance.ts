/**
 * The one tolerance helper for numeric comparisons in tests. A value passes when it is within
 * `rel` of the expected value's size, or within `abs` (for expected values near zero).
 */
import { expect } from 'vitest';

export interface Tolerance {
  /** Relative tolerance, e.g. 0.01 for 1 %. */
  rel?: number;
  /** Absolute tolerance in the quantity's unit. */
  abs?: number;
}

/** Relative deviation |actual − expected| / |expected| (Infinity when expected is 0 and actual is not). */
export function relativeError(actual: number, expected: number): number {
  if (actual === expected) return 0;
  return Math.abs(actual - expected) / Math.abs(expected);
}

/** True when actual is within the tolerance of expected. */
export function withinTolerance(actual: number, expected: number, tol: Tolerance): boolean {
  if (!Number.isFinite(actual)) return false;
  const diff = Math.abs(actual - expected);
  return diff <= (tol.abs ?? 0) || diff <= (tol.rel ?? 0) * Math.abs(expected);
}

/**
 * Asserts closeness with a message that names the quantity, both values and the deviation.
 * @param label what is compared and the source of the expected value
 */
export function expectClose(actual: number, expected: number, tol: Tolerance, label: string): void {
  const ok = withinTolerance(actual, expected, tol);
  const pct = (100 * relativeError(actual, expected)).toFixed(3);
  expect(ok, `${label}: got ${actual}, expected ${expected} (off by ${pct} %; allowed rel ${tol.rel ?? 0}, abs ${tol.abs ?? 0})`).toBe(true);
}
