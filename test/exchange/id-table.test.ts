import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { IdTable } from '../../src/exchange/id-table';

/** What the table should say, worked out with a plain Map: the first index of each id. */
function firstIndexes(ids: readonly string[]): number[] {
  const first = new Map<string, number>();
  return ids.map((id, i) => {
    const earlier = first.get(id);
    if (earlier === undefined) first.set(id, i);
    return earlier ?? -1;
  });
}

describe('the id table', () => {
  it('finds every repeated id and the first record that had it, as a Map would', () => {
    fc.assert(
      fc.property(fc.array(fc.oneof(fc.string({ maxLength: 6 }), fc.uuid(), fc.constantFrom('r-1', 'r-1~0123456789abcdef', '')), { maxLength: 300 }), (ids) => {
        const table = new IdTable(ids.length, (i) => ids[i]!);
        expect(ids.map((_, i) => table.add(i))).toEqual(firstIndexes(ids));
        for (const id of ids) expect(table.indexOf(id)).toBe(ids.indexOf(id));
        expect(table.indexOf('not among them \u0000')).toBe(-1);
      }),
    );
  });

  it('stays right when many ids share a hash slot (the table is full to one half)', () => {
    // 4096 ids in a table of 8192 slots: probes cross many taken slots.
    const ids = Array.from({ length: 4096 }, (_, i) => `job-${i.toString(36)}`);
    const table = new IdTable(ids.length, (i) => ids[i]!);
    expect(ids.map((_, i) => table.add(i)).every((earlier) => earlier === -1)).toBe(true);
    const again = [...ids, ...ids.slice(0, 100)];
    const both = new IdTable(again.length, (i) => again[i]!);
    expect(again.map((_, i) => both.add(i))).toEqual(firstIndexes(again));
  });
});
