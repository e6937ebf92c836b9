// Direct tests of the ensemble runner and one realisation (src/pipeline/ensemble):
// realisation r is exactly the scenario solved with disorder.seed = "S/r" (the seed rule of
// realisationSeed.ts, checked against solveScenario, an independent path through the
// pipeline), the worker entry point gives the same bits as the main thread, and
// runEnsembleBlocks hands blocks over in order, each the sum of its own realisations, and
// stops when asked.

import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { Piscina } from 'piscina';
import { realisationSeed, withRealisationSeed } from '../../../src/pipeline/ensemble/realisationSeed.js';
import { ensembleContextOf, realisationScenario, solveRealisation, type RealisationResult } from '../../../src/pipeline/ensemble/solveRealisation.js';
import runRealisationTask from '../../../src/pipeline/ensemble/realisationWorker.js';
import { runEnsembleBlocks } from '../../../src/pipeline/ensemble/runEnsemble.js';
import { planBlocks, blockRange } from '../../../src/pipeline/ensemble/blockPlan.js';
import { addRealisation, createBlockPartial, type BlockPartial } from '../../../src/pipeline/ensemble/blockPartial.js';
import { histogramBins } from '../../../src/pipeline/ensemble/histogramBins.js';
import { prepareScenario } from '../../../src/pipeline/prepareScenario.js';
import { solveScenario } from '../../../src/pipeline/solveScenario.js';
import { loadScenario } from '../../../src/scenario/loadScenario.js';
import { InputError } from '../../../src/scenario/inputError.js';

const dir = mkdtempSync(join(tmpdir(), 'tiercake-run-ensemble-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

const body = {
  name: 'box-layer',
  energyUnit: 'U',
  lattice: { shape: [8, 8] },
  hubbard: { hopping: 0.03 },
  trap: { coefficient: 0.02 },
  disorder: { kind: 'box', width: 0.5, seed: 'runner' },
  particles: { chemicalPotential: 0.8 },
  truncation: { nmax: 4 },
};
const path = join(dir, 'box-layer.json');
writeFileSync(path, JSON.stringify(body));
const raw = loadScenario(path).raw;

const same = (a: Float64Array | Uint8Array, b: Float64Array | Uint8Array): boolean => Buffer.from(a.buffer, a.byteOffset, a.byteLength).equals(Buffer.from(b.buffer, b.byteOffset, b.byteLength));

describe('one realisation', () => {
  it('is the scenario solved with disorder.seed = "S/r", bit for bit', async () => {
    expect(realisationSeed('runner', 3)).toBe('runner/3');
    expect(() => realisationSeed('runner', -1)).toThrow(RangeError);
    expect((withRealisationSeed(raw, 'runner', 3).disorder as { seed: string }).seed).toBe('runner/3');
    expect((raw.disorder as { seed: string }).seed).toBe('runner'); // the input is not changed
    const r = await solveRealisation(raw, 'runner', 3);
    const alone = await solveScenario(prepareScenario(path, ['disorder.seed=runner/3']), { threads: 1 });
    expect(same(r.density, alone.fields.density)).toBe(true);
    expect(same(r.phaseCodes, alone.classification.codes)).toBe(true);
    expect(r.record).toMatchObject({ index: 3, converged: true, atoms: alone.outcome.solve.totals.atoms, mu: alone.outcome.solve.mu });
  });

  it('the worker entry point gives the same bits as the main thread', async () => {
    const direct = await solveRealisation(raw, 'runner', 1);
    // The entry point hands its result to piscina wrapped for transfer (Piscina.move).
    const moved = (await runRealisationTask({ scenario: raw, baseSeed: 'runner', index: 1 })) as unknown as Record<symbol, RealisationResult>;
    const viaWorker = moved[Piscina.valueSymbol];
    expect(same(viaWorker.density, direct.density)).toBe(true);
    expect(same(viaWorker.condensateDensity, direct.condensateDensity)).toBe(true);
    expect(viaWorker.record).toEqual(direct.record);
  });

  it('a seed too long for the schema is an input error naming the realisation', () => {
    expect(() => realisationScenario({ ...raw, disorder: { ...(raw.disorder as object), seed: 'x'.repeat(250) } }, 'x'.repeat(250), 7)).toThrow(InputError);
    expect(ensembleContextOf(prepareScenario(path).resolved)).toMatchObject({ shape: [8, 8], periodic: [false, false], mode: 'hubbard' });
  });
});

describe('runEnsembleBlocks', () => {
  it('delivers each block in order, equal to the sum of its own realisations', async () => {
    const plan = planBlocks(5, 2);
    const bins = histogramBins(4, 10);
    const blocks: BlockPartial[] = [];
    const progress: number[] = [];
    const result = await runEnsembleBlocks({
      raw,
      baseSeed: 'runner',
      plan,
      blocks: [0, 2],
      bins,
      siteCount: 64,
      threads: 1,
      parallelOver: 'realisations',
      onBlock: (p) => blocks.push(p),
      onRealisation: ({ done }) => progress.push(done),
    });
    expect(result).toMatchObject({ blocksDone: [0, 2], stopped: false, threadsUsed: 1 });
    expect(blocks.map((b) => b.range.block)).toEqual([0, 2]);
    expect(progress).toEqual([1, 2, 3]);
    // Block 2 holds realisation 4 alone; block 0 realisations 0 and 1.
    for (const block of blocks) {
      const expected = createBlockPartial(blockRange(plan, block.range.block), 64, bins);
      for (let r = block.range.first; r < block.range.first + block.range.count; r++) addRealisation(expected, await solveRealisation(raw, 'runner', r), bins);
      expect(same(block.density.mean, expected.density.mean)).toBe(true);
      expect(same(block.density.m2, expected.density.m2)).toBe(true);
      expect(block.records.map((r) => r.index)).toEqual(expected.records.map((r) => r.index));
    }
  });

  it('stops between realisations when asked and hands over no unfinished block', async () => {
    const plan = planBlocks(6, 3);
    let calls = 0;
    const blocks: number[] = [];
    const result = await runEnsembleBlocks({
      raw,
      baseSeed: 'runner',
      plan,
      blocks: [0, 1],
      bins: histogramBins(4, 10),
      siteCount: 64,
      threads: 1,
      parallelOver: 'realisations',
      onBlock: (p) => blocks.push(p.range.block),
      shouldStop: () => ++calls > 4,
    });
    expect(result.stopped).toBe(true);
    expect(blocks.length).toBeLessThan(2);
  });

  it('refuses blocks that are not strictly increasing (a caller bug)', async () => {
    await expect(
      runEnsembleBlocks({ raw, baseSeed: 'runner', plan: planBlocks(4, 2), blocks: [1, 0], bins: histogramBins(4, 10), siteCount: 64, threads: 1, parallelOver: 'realisations', onBlock: () => {} }),
    ).rejects.toThrow(/strictly increasing/);
  });
});
