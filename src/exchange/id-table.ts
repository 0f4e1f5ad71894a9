/**
 * A hash table of the ids of one list of records, for the reference checks of a file with
 * hundreds of thousands of readings: sized once from the list's length, slots in one Int32Array,
 * so it never rehashes and holds no object per entry. (A Set of half a million ids grows by
 * rehashing into ever larger tables; on the machines measured that cost more than the rest of
 * the reference checks together: bench/exchange.ts.)
 *
 * Open addressing with linear probing (Knuth, TAOCP vol. 3, §6.4, algorithm L), FNV-1a over the
 * UTF-16 code units as the hash (Fowler–Noll–Vo, IETF draft-eastlake-fnv).
 */

/** 32-bit FNV-1a over a string's UTF-16 code units. */
function hashText(text: string): number {
  let hash = 0x811c9dc5;
  for (let i = 0; i < text.length; i++) {
    hash ^= text.charCodeAt(i);
    hash = Math.imul(hash, 0x01000193);
  }
  return hash >>> 0;
}

export class IdTable {
  /** Record index + 1 per slot; 0 is an empty slot. */
  private readonly slots: Int32Array;
  /** The hash of each slot's id: most probes end on a differing hash, without reading the id. */
  private readonly hashes: Int32Array;
  private readonly mask: number;

  /**
   * @param count  how many ids will be added (at most)
   * @param idOf   the id of the record at an index
   */
  constructor(
    count: number,
    private readonly idOf: (index: number) => string,
  ) {
    let size = 16;
    // At most half full, so probes stay short.
    while (size < count * 2) size *= 2;
    this.slots = new Int32Array(size);
    this.hashes = new Int32Array(size);
    this.mask = size - 1;
  }

  /** Adds record `index` by its id; returns the index of an earlier record with that id, or -1. */
  add(index: number): number {
    const id = this.idOf(index);
    const hash = hashText(id) | 0;
    let slot = hash & this.mask;
    for (;;) {
      const held = this.slots[slot]!;
      if (held === 0) {
        this.slots[slot] = index + 1;
        this.hashes[slot] = hash;
        return -1;
      }
      if (this.hashes[slot] === hash && this.idOf(held - 1) === id) return held - 1;
      slot = (slot + 1) & this.mask;
    }
  }

  /** The index of the first record added with this id, or -1. */
  indexOf(id: string): number {
    const hash = hashText(id) | 0;
    let slot = hash & this.mask;
    for (;;) {
      const held = this.slots[slot]!;
      if (held === 0) return -1;
      if (this.hashes[slot] === hash && this.idOf(held - 1) === id) return held - 1;
      slot = (slot + 1) & this.mask;
    }
  }
}
