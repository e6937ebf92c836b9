// Default output folders (src/output/defaultOutputFolders.ts): the names the --out help
// texts of solve, evolve, ensemble, scan, submit and merge promise (src/cli/options.ts and
// the commands' overrides, written out here by hand), and a shard's own folder inside the
// folder that collects the shards (the shard name written out: index padded to the width
// of K - 1).
// Mutation tried: '-scan-shards' -> '-shards-scan' in SUFFIX: the scan shards case fails.
import { describe, expect, it } from 'vitest';
import { defaultOutputFolder, runOutputFolder } from '../../src/output/defaultOutputFolders.js';

describe('default output folders', () => {
  it('names each result out/<scenario name><suffix> as the help texts say', () => {
    expect(defaultOutputFolder('solve', 'layer')).toBe('out/layer');
    expect(defaultOutputFolder('evolve', 'layer')).toBe('out/layer-evolve');
    expect(defaultOutputFolder('ensemble', 'layer')).toBe('out/layer-ensemble');
    expect(defaultOutputFolder('ensemble shards', 'layer')).toBe('out/layer-shards');
    expect(defaultOutputFolder('scan', 'layer')).toBe('out/layer-scan');
    expect(defaultOutputFolder('scan shards', 'layer')).toBe('out/layer-scan-shards');
    expect(defaultOutputFolder('submission', 'layer')).toBe('out/layer-cluster');
  });

  it('puts a shard into its own folder inside the collecting folder, a complete run into the folder itself', () => {
    expect(runOutputFolder('out/layer-shards', null)).toBe('out/layer-shards');
    expect(runOutputFolder('out/layer-shards', { index: 1, count: 2 })).toBe('out/layer-shards/shard-1-of-2');
    expect(runOutputFolder('/x/c', { index: 3, count: 12 })).toBe('/x/c/shard-03-of-12');
  });
});
