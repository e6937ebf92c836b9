// The provenance line of a merged report (src/report/mergeSummaryLine.ts): shards without
// work are given but not counted as used, and their time is not added (here 1.5 + 2.25 s).
import { describe, expect, it } from 'vitest';
import { mergeProvenanceLine } from '../../src/report/mergeSummaryLine.js';

describe('mergeProvenanceLine', () => {
  it('counts the shards that held work and adds their compute time', () => {
    const runs = [{ units: 2, seconds: 1.5 }, { units: 0, seconds: 9 }, { units: 1, seconds: 2.25 }];
    expect(mergeProvenanceLine('', runs)).toBe('merge of 2 shards (3 given); compute time 3.8 s in total');
    expect(mergeProvenanceLine('scan ', runs.slice(0, 1))).toBe('merge of 1 scan shard (1 given); compute time 1.5 s in total');
  });
});
