// The notes `tiercake submit` prints with its scripts or job ids (no I/O): for now one,
// when the job array has more shard tasks than the work has units to share out, so that
// the last tasks would start, find nothing to do and finish.

import type { BatchWork } from '../pipeline/batchWork.js';

export function submitNotes(shards: number, work: Pick<BatchWork, 'kind' | 'units' | 'unitName'>): string[] {
  if (shards <= work.units) return [];
  const fewer = work.kind === 'scan' ? ' or a shorter --chain-length' : ' or a smaller --block-size';
  return [`note: ${shards} shards for ${work.units} ${work.unitName}: shards ${work.units}-${shards - 1} get no work (use fewer shards${fewer})`];
}
