// The ensemble a command describes (src/pipeline/ensemble/ensembleSetup.ts): 10
// realisations in blocks of 4 are blocks of 4, 4 and 2; shard 1 of 2 owns blocks 1-2
// (floor(k M / K) split: src/pipeline/ensemble/blockPlan.ts), 6 realisations; its blocks
// are complete after 4 and 6 of them (counted by hand); a lattice below PARALLEL_MIN_SITES
// runs realisations side by side under 'auto'; a scenario without disorder is refused.
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { blocksCompleted, ensembleSetup } from '../../../src/pipeline/ensemble/ensembleSetup.js';
import { planBlocks } from '../../../src/pipeline/ensemble/blockPlan.js';
import { prepareScenario } from '../../../src/pipeline/prepareScenario.js';
import { landscapeFileHashes, scenarioHash } from '../../../src/scenario/scenarioHash.js';

const dir = mkdtempSync(join(tmpdir(), 'tiercake-ensemblesetup-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));
const base = { name: 'box', energyUnit: 'U', truncation: { nmax: 4 }, lattice: { shape: [6, 6] }, hubbard: { hopping: 0.02 }, particles: { chemicalPotential: 0.5 } };
const withDisorder = join(dir, 'box.json');
writeFileSync(withDisorder, JSON.stringify({ ...base, disorder: { kind: 'box', width: 0.4, seed: 'run1' } }));
const clean = join(dir, 'clean.json');
writeFileSync(clean, JSON.stringify(base));
const choices = { realisations: 10, blockSize: 4, binsPerAtom: 5, shard: null, parallelOver: 'auto' as const };

describe('ensembleSetup', () => {
  it('plans every block for a complete run, one shard\'s for a shard', () => {
    const prepared = prepareScenario(withDisorder);
    const all = ensembleSetup(prepared, choices);
    expect(all.blocks).toEqual([0, 1, 2]);
    expect(all.toRun).toBe(10);
    expect(all.siteCount).toBe(36);
    expect(all.parallelOver).toBe('realisations');
    expect(all.identity.baseSeed).toBe('run1');
    expect(all.identity.bins.binCount).toBe(4 * 5);
    expect(all.identity.scenarioHash).toBe(scenarioHash(prepared.scenario, 'whole', landscapeFileHashes(prepared.resolved)));
    const one = ensembleSetup(prepared, { ...choices, shard: { index: 1, count: 2 }, parallelOver: 'lattice' });
    expect(one.blocks).toEqual([1, 2]);
    expect(one.toRun).toBe(6);
    expect(one.parallelOver).toBe('lattice');
  });

  it('counts the blocks complete after the first realisations', () => {
    const plan = planBlocks(10, 4);
    expect([0, 3, 4, 5, 6].map((done) => blocksCompleted(plan, [1, 2], done))).toEqual([0, 0, 1, 1, 2]);
    expect([3, 4, 8, 9, 10].map((done) => blocksCompleted(plan, [0, 1, 2], done))).toEqual([0, 1, 2, 2, 3]);
  });

  it('refuses a scenario without disorder, naming the block to add', () => {
    expect(() => ensembleSetup(prepareScenario(clean), choices)).toThrow(/^disorder: the scenario has no disorder block, so every realisation would be the same/);
  });
});
