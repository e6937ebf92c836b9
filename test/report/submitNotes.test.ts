// The notes of `tiercake submit` (src/report/submitNotes.ts): none while every shard task
// gets work; with more tasks than units, which tasks idle (counted by hand: 3 blocks in 5
// shards leave shards 3 and 4) and what would shorten the units of that kind of work.
// Mutation tried: `shards <= work.units` -> `shards < work.units`: the equal case fails.
import { describe, expect, it } from 'vitest';
import { submitNotes } from '../../src/report/submitNotes.js';

describe('submit notes', () => {
  it('says nothing while every shard has work', () => {
    expect(submitNotes(3, { kind: 'ensemble', units: 3, unitName: 'blocks' })).toEqual([]);
    expect(submitNotes(1, { kind: 'scan', units: 4, unitName: 'chains' })).toEqual([]);
  });

  it('names the idle shards and the option that makes more units', () => {
    expect(submitNotes(5, { kind: 'ensemble', units: 3, unitName: 'blocks' })).toEqual(['note: 5 shards for 3 blocks: shards 3-4 get no work (use fewer shards or a smaller --block-size)']);
    expect(submitNotes(4, { kind: 'scan', units: 2, unitName: 'chains' })).toEqual(['note: 4 shards for 2 chains: shards 2-3 get no work (use fewer shards or a shorter --chain-length)']);
  });
});
