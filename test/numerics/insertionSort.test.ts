// insertionSortAscending against a hand-worked case and against the JavaScript built-in
// Array.prototype.sort with a numeric comparator (an outside reference) on random lists,
// including ties and the sizes 0 and 1; the entries beyond n must stay untouched.
import { describe, expect, it } from 'vitest';
import { insertionSortAscending } from '../../src/numerics/insertionSort.js';
import { seededRandom } from '../../src/numerics/seededRandom.js';

describe('insertionSortAscending', () => {
  it('sorts a hand-worked list and leaves the tail alone', () => {
    const v = Float64Array.from([3, -1, 2, 2, 0.5, 99, -7]);
    insertionSortAscending(v, 5);
    expect(Array.from(v)).toEqual([-1, 0.5, 2, 2, 3, 99, -7]);
    const one = Float64Array.from([4, 1]);
    insertionSortAscending(one, 1);
    expect(Array.from(one)).toEqual([4, 1]);
    insertionSortAscending(one, 0);
    expect(Array.from(one)).toEqual([4, 1]);
  });

  it('agrees with the built-in sort on random lists with ties', () => {
    const random = seededRandom('insertion-sort');
    for (let trial = 0; trial < 50; trial++) {
      const n = 1 + (trial % 17);
      const v = Float64Array.from({ length: n }, () => Math.round(8 * random.uniform()) - 4 + (trial % 2) * random.uniform());
      const reference = Array.from(v).sort((a, b) => a - b);
      insertionSortAscending(v, n);
      expect(Array.from(v)).toEqual(reference);
    }
  });
});
