/**
 * A small seeded random source for the demo data: the same seed gives the same numbers on every
 * machine and runtime (32-bit integer arithmetic only, no Math.random).
 */

/**
 * sfc32 ("small fast counting", Chris Doty-Humphrey, from the PractRand suite; passes its tests
 * to 2^40 bytes), seeded through splitmix32 so that nearby seeds give unrelated streams (common
 * practice; constants from Vigna's SplitMix and the MurmurHash3 finaliser).
 */
export class SeededRandom {
  private a: number;
  private b: number;
  private c: number;
  private d: number;

  constructor(seed: number) {
    let state = seed >>> 0;
    const splitmix = (): number => {
      state = (state + 0x9e3779b9) >>> 0;
      let z = state;
      z = Math.imul(z ^ (z >>> 16), 0x85ebca6b);
      z = Math.imul(z ^ (z >>> 13), 0xc2b2ae35);
      return (z ^ (z >>> 16)) >>> 0;
    };
    this.a = splitmix();
    this.b = splitmix();
    this.c = splitmix();
    this.d = splitmix();
    // Warm-up rounds, as the generator's author recommends.
    for (let i = 0; i < 12; i++) this.uint32();
  }

  /** A whole number in [0, 2^32). */
  uint32(): number {
    const t = (((this.a + this.b) >>> 0) + this.d) >>> 0;
    this.d = (this.d + 1) >>> 0;
    this.a = this.b ^ (this.b >>> 9);
    this.b = (this.c + (this.c << 3)) >>> 0;
    this.c = ((this.c << 21) | (this.c >>> 11)) >>> 0;
    this.c = (this.c + t) >>> 0;
    return t;
  }

  /** A number in [0, 1). */
  next(): number {
    return this.uint32() / 4294967296;
  }

  /** A whole number from `low` to `high` inclusive. */
  int(low: number, high: number): number {
    return low + Math.floor(this.next() * (high - low + 1));
  }

  /** True with probability `p`. */
  chance(p: number): boolean {
    return this.next() < p;
  }

  pick<T>(items: readonly T[]): T {
    const item = items[Math.floor(this.next() * items.length)];
    if (item === undefined) throw new RangeError('pick from an empty list');
    return item;
  }

  /** One of `items`, chosen with the given relative weights. */
  weighted<T>(items: readonly (readonly [T, number])[]): T {
    const total = items.reduce((sum, [, weight]) => sum + weight, 0);
    let left = this.next() * total;
    for (const [item, weight] of items) {
      left -= weight;
      if (left < 0) return item;
    }
    return items[items.length - 1]![0];
  }

  /** A standard normal deviate (Box–Muller transform; Box & Muller, 1958). */
  normal(): number {
    const u = 1 - this.next();
    const v = this.next();
    return Math.sqrt(-2 * Math.log(u)) * Math.cos(2 * Math.PI * v);
  }

  /** Text in the form of a version-4 UUID (RFC 9562 §5.4), from this stream. */
  uuid(): string {
    const hex = (n: number) => (n >>> 0).toString(16).padStart(8, '0');
    const a = hex(this.uint32());
    const b = hex(this.uint32());
    const c = hex(this.uint32());
    const d = hex(this.uint32());
    const variant = ((parseInt(c[0]!, 16) & 0x3) | 0x8).toString(16);
    return `${a}-${b.slice(0, 4)}-4${b.slice(5, 8)}-${variant}${c.slice(1, 4)}-${c.slice(4, 8)}${d}`;
  }
}
