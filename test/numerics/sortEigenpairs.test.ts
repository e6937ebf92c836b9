// sortEigenpairsAscending against orders worked out by hand: the values must come out
// ascending and every row must travel with its value, including ties and the sizes 1 and 2.
import { describe, expect, it } from 'vitest';
import { sortEigenpairsAscending } from '../../src/numerics/sortEigenpairs.js';

describe('sortEigenpairsAscending', () => {
  it('sorts 3 values and carries each row along (hand-worked: 3, 1, 2 -> 1, 2, 3)', () => {
    const values = Float64Array.from([3, 1, 2]);
    // row j is tagged with its value so a lost pairing shows up
    const rows = Float64Array.from([30, 31, 32, 10, 11, 12, 20, 21, 22]);
    sortEigenpairsAscending(values, rows, 3);
    expect(Array.from(values)).toEqual([1, 2, 3]);
    expect(Array.from(rows)).toEqual([10, 11, 12, 20, 21, 22, 30, 31, 32]);
  });

  it('keeps ties in their first-found order and handles negatives (hand-worked)', () => {
    // -1 (row a), 0.5 (row b), -1 (row c), -4 (row d): selection sort takes -4 first
    // (swap d<->a: -4, 0.5, -1, -1 with rows d b c a), then the first -1 at index 2
    // (swap with b: -4, -1, 0.5, -1 rows d c b a), then -1 at index 3 (rows d c a b).
    const values = Float64Array.from([-1, 0.5, -1, -4]);
    const rows = Float64Array.from([1, 1, 1, 1, 2, 2, 2, 2, 3, 3, 3, 3, 4, 4, 4, 4]);
    sortEigenpairsAscending(values, rows, 4);
    expect(Array.from(values)).toEqual([-4, -1, -1, 0.5]);
    expect(Array.from(rows)).toEqual([4, 4, 4, 4, 3, 3, 3, 3, 1, 1, 1, 1, 2, 2, 2, 2]);
  });

  it('leaves a sorted or single-entry system as it is and sorts n = 2', () => {
    const one = Float64Array.from([7]);
    const oneRow = Float64Array.from([5]);
    sortEigenpairsAscending(one, oneRow, 1);
    expect(Array.from(oneRow)).toEqual([5]);
    const two = Float64Array.from([2, -2]);
    const twoRows = Float64Array.from([0.6, 0.8, -0.8, 0.6]);
    sortEigenpairsAscending(two, twoRows, 2);
    expect(Array.from(two)).toEqual([-2, 2]);
    expect(Array.from(twoRows)).toEqual([-0.8, 0.6, 0.6, 0.8]);
  });

  it('only touches the first n entries (capacity-sized workspaces)', () => {
    const values = Float64Array.from([2, 1, -9]);
    const rows = Float64Array.from([1, 1, 2, 2, 99, 99, 99, 99, 99]);
    sortEigenpairsAscending(values, rows, 2);
    expect(Array.from(values)).toEqual([1, 2, -9]);
    expect(Array.from(rows)).toEqual([2, 2, 1, 1, 99, 99, 99, 99, 99]);
  });
});
