/**
 * Small dense linear algebra for the solver's node and state matrices (a handful of rows).
 * Row-major Float64Arrays; no allocation in the hot path.
 */

/**
 * LU factorisation with partial pivoting, in place.
 * @param a      n×n row-major matrix; overwritten by L (unit, below diagonal) and U
 * @param n      order
 * @param pivots receives the row permutation
 * @returns false when a pivot is zero or not finite (singular matrix)
 */
export function luFactor(a: Float64Array, n: number, pivots: Int32Array): boolean {
  for (let k = 0; k < n; k++) {
    let p = k;
    let best = Math.abs(a[k * n + k]!);
    for (let i = k + 1; i < n; i++) {
      const v = Math.abs(a[i * n + k]!);
      if (v > best) {
        best = v;
        p = i;
      }
    }
    pivots[k] = p;
    if (!(best > 0) || !Number.isFinite(best)) return false;
    if (p !== k) {
      for (let j = 0; j < n; j++) {
        const t = a[k * n + j]!;
        a[k * n + j] = a[p * n + j]!;
        a[p * n + j] = t;
      }
    }
    const inv = 1 / a[k * n + k]!;
    for (let i = k + 1; i < n; i++) {
      const f = a[i * n + k]! * inv;
      if (f === 0) continue;
      a[i * n + k] = f;
      for (let j = k + 1; j < n; j++) a[i * n + j] = a[i * n + j]! - f * a[k * n + j]!;
    }
  }
  return true;
}

/**
 * Solves A·x = b with the factors from `luFactor`; b is overwritten by x.
 * @param offset start of b inside the array (lets one array hold several right-hand sides)
 */
export function luSolve(lu: Float64Array, n: number, pivots: Int32Array, b: Float64Array, offset = 0): void {
  for (let k = 0; k < n; k++) {
    const p = pivots[k]!;
    if (p !== k) {
      const t = b[offset + k]!;
      b[offset + k] = b[offset + p]!;
      b[offset + p] = t;
    }
  }
  for (let i = 1; i < n; i++) {
    let s = b[offset + i]!;
    for (let j = 0; j < i; j++) s -= lu[i * n + j]! * b[offset + j]!;
    b[offset + i] = s;
  }
  for (let i = n - 1; i >= 0; i--) {
    let s = b[offset + i]!;
    for (let j = i + 1; j < n; j++) s -= lu[i * n + j]! * b[offset + j]!;
    b[offset + i] = s / lu[i * n + i]!;
  }
}
