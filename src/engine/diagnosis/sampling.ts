/**
 * Seeded sampling for the tolerance Monte Carlo: a small PRNG and Latin hypercube designs, so a
 * seed gives the same bands on every device.
 */

/**
 * Mulberry32, a 32-bit PRNG (public-domain algorithm by Tommy Ettinger): fast, seedable, good
 * enough for sampling tolerances. Returns uniform numbers in [0, 1).
 */
export function mulberry32(seed: number): () => number {
  let a = seed >>> 0;
  return () => {
    a = (a + 0x6d2b79f5) >>> 0;
    let t = a;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

/**
 * Latin hypercube design: `count` points in [0, 1)^dims, each dimension split into `count`
 * equal strata with exactly one point in each (McKay, Beckman & Conover, Technometrics 1979).
 * Covers each tolerance's range evenly with few samples.
 * @returns rows of `dims` numbers
 */
export function latinHypercube(count: number, dims: number, random: () => number): number[][] {
  const rows: number[][] = Array.from({ length: count }, () => new Array<number>(dims).fill(0));
  for (let d = 0; d < dims; d++) {
    const order = Array.from({ length: count }, (_, i) => i);
    for (let i = count - 1; i > 0; i--) {
      const j = Math.floor(random() * (i + 1));
      const t = order[i]!;
      order[i] = order[j]!;
      order[j] = t;
    }
    for (let i = 0; i < count; i++) rows[i]![d] = (order[i]! + random()) / count;
  }
  return rows;
}

/** Linear-interpolated quantile of sorted values (type 7, as R's default). */
export function quantileSorted(sorted: ArrayLike<number>, q: number): number {
  const n = sorted.length;
  if (n === 0) return Number.NaN;
  const h = (n - 1) * q;
  const lo = Math.floor(h);
  const hi = Math.min(n - 1, lo + 1);
  return sorted[lo]! + (h - lo) * (sorted[hi]! - sorted[lo]!);
}
