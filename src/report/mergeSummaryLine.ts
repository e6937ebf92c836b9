// The line a merged result's report gives as its provenance (ensemble or scan shards).

/**
 * The provenance line of a merged report: shards that held work, shards given, and their
 * compute time in total (`kind`: '' for ensemble shards, 'scan ' for scan shards).
 */
export function mergeProvenanceLine(kind: '' | 'scan ', runs: ReadonlyArray<{ units: number; seconds: number }>): string {
  const used = runs.filter((r) => r.units > 0);
  return `merge of ${used.length} ${kind}shard${used.length === 1 ? '' : 's'} (${runs.length} given); compute time ${used.reduce((t, s) => t + s.seconds, 0).toFixed(1)} s in total`;
}
