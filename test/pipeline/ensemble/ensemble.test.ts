// Disorder ensembles, shards and merge (issue 6, items 5-6).
//
// What each check is measured against:
// - Merged shards against the single run, byte for byte: the design promise of
//   src/ensemble/blockPlan.ts (fixed blocks, combined in block order).
// - Per-site mean and spread against the textbook two-pass formulas, mean = sum x / R and
//   s^2 = sum (x - mean)^2 / (R - 1), evaluated here on realisations solved one by one
//   through `solveScenario` with the documented seeds "<seed>/r"; phase fractions, the
//   spanning fraction and the histograms against direct counts of the same solutions.
//   The one-pass update with pairwise block merging (Welford, Technometrics 4, 419 (1962);
//   Chan, Golub & LeVeque, Am. Stat. 37, 242 (1983)) agrees with two-pass to rounding:
//   tolerance 1e-12 on O(1) values, a few hundred ulps, far below any physical scale.
// - W = 0: the average of identical fields is that field, exactly (Welford's update adds
//   d / c with d = 0 after the first value; the block merge adds d nB / n with d = 0).
// - Spanning limits: J = 0 gives phi = 0 on every site (the site problems decouple:
//   Psi_i = sum_j J phi_j = 0, so each site sits in a Fock state), hence no superfluid
//   site and a spanning fraction of 0; zJ/U = 0.8, far above the mean-field n = 1 lobe
//   tip zJ/U = 3 - 2 sqrt 2 = 0.172 (van Oosten, van der Straten & Stoof, PRA 63, 053601
//   (2001)), with weak disorder W = 0.1 U, leaves no Mott region, so the cloud is one
//   connected superfluid in every realisation: fraction 1.
// - J = 0, box width W = 0.6 U, mu = U/2 inside the window W/2 < mu < U - W/2: every site
//   is a Mott site with n = 1 exactly (DESIGN.md section 1; Fisher et al., PRB 40, 546
//   (1989)), so the mean density is 1, the spread 0 and the histogram a single bin at n = 1.
// - Thread independence: DESIGN.md section 1 (red-black sweeps) and section 3 (named seeds).
import { afterAll, describe, expect, it } from 'vitest';
import { existsSync, mkdtempSync, readFileSync, readdirSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { CommanderError } from 'commander';
import { buildProgram, type CommandContext } from '../../../src/cli/main.js';
import { ExitCode, InputError } from '../../../src/scenario/inputError.js';
import { registerEnsemble, runEnsembleCommand, type EnsembleHooks } from '../../../src/cli/commands/ensemble.js';
import { registerMerge } from '../../../src/cli/commands/merge.js';
import { resolveShard, parseShardOption } from '../../../src/pipeline/shardChoice.js';
import { shardFolderName } from '../../../src/output/shardSet.js';
import { prepareScenario } from '../../../src/pipeline/prepareScenario.js';
import { solveScenario } from '../../../src/pipeline/solveScenario.js';
import { decodeNpy } from '../../../src/formats/npy.js';
import { PhaseCode, phaseNames } from '../../../src/observables/phaseCodes.js';
import { blockCoverage, blockRange, planBlocks, shardBlocks } from '../../../src/pipeline/ensemble/blockPlan.js';
import { addRealisation, combineBlocks, createBlockPartial } from '../../../src/pipeline/ensemble/blockPartial.js';
import { ensembleStatistics } from '../../../src/pipeline/ensemble/ensembleStatistics.js';
import { binOf, histogramBins } from '../../../src/pipeline/ensemble/histogramBins.js';
import { seededRandom } from '../../../src/numerics/seededRandom.js';
import type { RealisationResult } from '../../../src/pipeline/ensemble/solveRealisation.js';

const dir = mkdtempSync(join(tmpdir(), 'tiercake-ensemble-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

/** Runs the command line with `ensemble` and `merge` registered (maps errors to exit codes as main.ts does). */
async function tiercake(argv: string[]): Promise<{ code: number; message: string }> {
  const context: CommandContext = { exitCode: ExitCode.done };
  const program = buildProgram(context);
  const names = program.commands.map((c) => c.name());
  if (!names.includes('ensemble')) registerEnsemble(program, context);
  if (!names.includes('merge')) registerMerge(program, context);
  program.configureOutput({ writeErr: () => {}, writeOut: () => {} });
  try {
    await program.parseAsync(argv, { from: 'user' });
    return { code: context.exitCode, message: '' };
  } catch (err) {
    if (err instanceof InputError) return { code: ExitCode.badInput, message: err.message };
    if (err instanceof CommanderError) return { code: ExitCode.badInput, message: err.message };
    throw err;
  }
}

function scenarioFile(name: string, body: Record<string, unknown>): string {
  const path = join(dir, `${name}.json`);
  writeFileSync(path, JSON.stringify({ name, energyUnit: 'U', truncation: { nmax: 4 }, ...body }));
  return path;
}

/**
 * A small trapped layer with box disorder at small hopping: n = 1 Mott regions and
 * superfluid that the disorder breaks up, so the superfluid spans the bulk of the cloud in
 * some realisations (2 of the 6 used below) and not in others.
 */
const trappedBody = (seed: string, width = 0.8) => ({
  lattice: { shape: [16, 16], boundary: 'open' },
  hubbard: { hopping: 0.022 },
  trap: { coefficient: 0.012 },
  disorder: { kind: 'box', width, seed },
  particles: { chemicalPotential: 1.0 },
});

const compared = [
  'fields/density_mean.npy',
  'fields/density_spread.npy',
  'fields/condensate_mean.npy',
  'fields/condensate_spread.npy',
  'fields/phase_fraction.npy',
  'histograms.csv',
  'realisations.csv',
];

function summaryWithoutProvenance(folder: string): unknown {
  const s = JSON.parse(readFileSync(join(folder, 'summary.json'), 'utf8')) as Record<string, unknown>;
  delete s.provenance;
  return s;
}

function npy(folder: string, name: string): { data: Float64Array; shape: number[] } {
  return decodeNpy(new Uint8Array(readFileSync(join(folder, 'fields', `${name}.npy`))));
}

const base = ['--realisations', '6', '--block-size', '2', '--threads', '1', '--quiet'];
const trapped = scenarioFile('trapped', trappedBody('wobble'));
const single = join(dir, 'single');

describe('ensemble: shards merged equal the single run', () => {
  it('K = 2, 3 and 4 (one shard empty, index from the environment) give the same bytes as one run', async () => {
    expect((await tiercake(['ensemble', trapped, ...base, '--out', single])).code).toBe(0);
    for (const f of [...compared, 'summary.json', 'report.html', 'images/density_mean.png', 'images/density_spread.png', 'images/histograms.png']) {
      expect(existsSync(join(single, f))).toBe(true);
    }
    // 6 realisations in blocks of 2 = blocks 0, 1, 2. K = 2 -> {0}, {1, 2}; K = 3 -> {0}, {1}, {2};
    // K = 4 -> {}, {0}, {1}, {2}.
    for (const k of [0, 1]) expect((await tiercake(['ensemble', trapped, ...base, '--shard', `${k}/2`, '--out', join(dir, 'k2')])).code).toBe(0);
    for (const k of [0, 1, 2]) expect((await tiercake(['ensemble', trapped, ...base, '--shard', `${k}/3`, '--out', join(dir, 'k3')])).code).toBe(0);
    for (const k of [0, 1, 2, 3]) {
      process.env.TIERCAKE_TEST_TASK = String(k);
      const r = await tiercake(['ensemble', trapped, ...base, '--shard-from-env', 'TIERCAKE_TEST_TASK', '--shards', '4', '--out', join(dir, 'k4')]);
      expect(r.code).toBe(0);
    }
    delete process.env.TIERCAKE_TEST_TASK;
    expect(readdirSync(join(dir, 'k2')).sort()).toEqual(['shard-0-of-2', 'shard-1-of-2']);
    const header = JSON.parse(readFileSync(join(dir, 'k2', 'shard-1-of-2', 'shard.json'), 'utf8'));
    expect(header.blocks.map((b: { block: number }) => b.block)).toEqual([1, 2]);
    expect(JSON.parse(readFileSync(join(dir, 'k4', 'shard-0-of-4', 'shard.json'), 'utf8')).blocks).toEqual([]);

    // The collecting folder, or the shard folders one by one, in any order.
    expect((await tiercake(['merge', join(dir, 'k2'), '--out', join(dir, 'm2'), '--quiet'])).code).toBe(0);
    const k3 = ['shard-2-of-3', 'shard-0-of-3', 'shard-1-of-3'].map((s) => join(dir, 'k3', s));
    expect((await tiercake(['merge', ...k3, '--out', join(dir, 'm3'), '--quiet'])).code).toBe(0);
    expect((await tiercake(['merge', join(dir, 'k4'), '--out', join(dir, 'm4'), '--quiet'])).code).toBe(0);
    for (const merged of ['m2', 'm3', 'm4']) {
      for (const f of compared) expect(readFileSync(join(dir, merged, f)).equals(readFileSync(join(single, f))), `${merged}/${f}`).toBe(true);
      expect(summaryWithoutProvenance(join(dir, merged))).toEqual(summaryWithoutProvenance(single));
    }
  });

  it('per-site mean, spread, phase fractions, spanning and histograms match direct counts over realisations solved one by one', async () => {
    const seeds = Array.from({ length: 6 }, (_, r) => `wobble/${r}`);
    const solved: Awaited<ReturnType<typeof solveScenario>>[] = [];
    // The documented way to reproduce one realisation alone: `solve --set disorder.seed=<seed>/r`.
    for (const seed of seeds) solved.push(await solveScenario(prepareScenario(trapped, [`disorder.seed=${seed}`]), { threads: 1 }));
    const n = solved[0].fields.density.length;
    const R = solved.length;
    const twoPass = (pick: (k: number) => Float64Array) => {
      const mean = new Float64Array(n);
      const spread = new Float64Array(n);
      for (let i = 0; i < n; i++) {
        let s = 0;
        for (let k = 0; k < R; k++) s += pick(k)[i];
        mean[i] = s / R;
        let ss = 0;
        for (let k = 0; k < R; k++) ss += (pick(k)[i] - mean[i]) ** 2;
        spread[i] = Math.sqrt(ss / (R - 1));
      }
      return { mean, spread };
    };
    const density = twoPass((k) => solved[k].fields.density);
    const condensate = twoPass((k) => solved[k].fields.condensateDensity);
    const check = (name: string, expected: Float64Array) => {
      const got = npy(single, name);
      expect(got.shape).toEqual([16, 16]);
      let worst = 0;
      for (let i = 0; i < n; i++) worst = Math.max(worst, Math.abs(got.data[i] - expected[i]));
      expect(worst, name).toBeLessThan(1e-12);
    };
    check('density_mean', density.mean);
    check('density_spread', density.spread);
    check('condensate_mean', condensate.mean);
    check('condensate_spread', condensate.spread);
    // The disorder really differs between realisations: the spread is not zero.
    expect(Math.max(...density.spread)).toBeGreaterThan(0.01);

    const fractions = npy(single, 'phase_fraction');
    expect(fractions.shape).toEqual([phaseNames.length, 16, 16]);
    for (let p = 0; p < phaseNames.length; p++) {
      for (let i = 0; i < n; i++) {
        const count = solved.filter((a) => a.classification.codes[i] === p).length;
        expect(fractions.data[p * n + i]).toBe(count / R);
      }
    }
    const summary = JSON.parse(readFileSync(join(single, 'summary.json'), 'utf8'));
    const spans = solved.filter((a) => a.classification.superfluidSpans).length;
    expect(spans).toBeGreaterThan(0); // the scenario is chosen so that both outcomes occur
    expect(spans).toBeLessThan(R);
    expect(summary.results.superfluidSpanningRealisations).toBe(spans);
    expect(summary.results.superfluidSpanningFraction).toBe(spans / R);
    expect(summary.ensemble.seedRule).toContain('"wobble/0"');

    // Histograms: bins of 1/20 atom over [0, nmax = 4], non-empty sites of every realisation.
    const rows = readFileSync(join(single, 'histograms.csv'), 'utf8').split('\n').filter((l) => l && !l.startsWith('#')).slice(1).map((l) => l.split(',').map(Number));
    expect(rows.length).toBe(80);
    const expectedDensity = new Array(80).fill(0);
    const expectedCondensate = new Array(80).fill(0);
    for (const a of solved) {
      for (let i = 0; i < n; i++) {
        if (a.classification.codes[i] === PhaseCode.empty) continue;
        expectedDensity[Math.min(79, Math.floor(a.fields.density[i] * 20))]++;
        expectedCondensate[Math.min(79, Math.floor(a.fields.condensateDensity[i] * 20))]++;
      }
    }
    expect(rows.map((r) => r[2])).toEqual(expectedDensity);
    expect(rows.map((r) => r[4])).toEqual(expectedCondensate);
  });
});

describe('ensemble: threads', () => {
  const loader = ['--import', new URL('../../register-ts.mjs', import.meta.url).href];
  const hooks: EnsembleHooks = {
    realisationWorker: { filename: new URL('../../../src/pipeline/ensemble/realisationWorker.ts', import.meta.url).href, execArgv: loader },
    sweepWorker: { filename: new URL('../../../src/solver/sweepWorker.ts', import.meta.url).href, execArgv: loader },
  };
  it('identical files for 1 and 2 threads, realisations side by side or one lattice split over threads', async () => {
    for (const mode of ['realisations', 'lattice']) {
      const out = join(dir, `threads-${mode}`);
      const code = await runEnsembleCommand(trapped, { realisations: '6', blockSize: '2', threads: '2', parallelOver: mode, set: [], out, quiet: true }, hooks);
      expect(code).toBe(0);
      const summary = JSON.parse(readFileSync(join(out, 'summary.json'), 'utf8'));
      expect(summary.provenance).toMatchObject({ threads: 2, parallelOver: mode });
      for (const f of compared) expect(readFileSync(join(out, f)).equals(readFileSync(join(single, f))), `${mode}: ${f}`).toBe(true);
    }
  });
});

describe('merge refuses incomplete, overlapping and mixed shard sets', () => {
  it('exit code 2 with the missing or duplicated blocks named, and nothing written', async () => {
    const out = join(dir, 'refused');
    const missing = await tiercake(['merge', join(dir, 'k3', 'shard-0-of-3'), join(dir, 'k3', 'shard-2-of-3'), '--out', out]);
    expect(missing.code).toBe(2);
    expect(missing.message).toMatch(/block 1 is missing from blocks 0-2/);
    expect(missing.message).toContain('shard 1 of 3');

    const overlap = await tiercake(['merge', join(dir, 'k2'), join(dir, 'k3', 'shard-1-of-3'), '--out', out]);
    expect(overlap.code).toBe(2);
    expect(overlap.message).toMatch(/block 1 is held by more than one shard/);
    expect(overlap.message).toContain('shard-1-of-2');

    const other = scenarioFile('trapped-wider', trappedBody('wobble', 0.6));
    expect((await tiercake(['ensemble', other, ...base, '--shard', '1/2', '--out', join(dir, 'other')])).code).toBe(0);
    const mixed = await tiercake(['merge', join(dir, 'k2', 'shard-0-of-2'), join(dir, 'other'), '--out', out]);
    expect(mixed.code).toBe(2);
    expect(mixed.message).toContain('scenario');

    const sizes = await tiercake(['ensemble', trapped, '--realisations', '6', '--block-size', '3', '--threads', '1', '--quiet', '--shard', '1/2', '--out', join(dir, 'b3')]);
    expect(sizes.code).toBe(0);
    const blockSizes = await tiercake(['merge', join(dir, 'k2', 'shard-0-of-2'), join(dir, 'b3'), '--out', out]);
    expect(blockSizes.code).toBe(2);
    expect(blockSizes.message).toContain('block size');
    expect(existsSync(out)).toBe(false);
  });

  it('bad ensemble options and scenarios without disorder give exit code 2', async () => {
    const clean = scenarioFile('clean-no-disorder', { ...trappedBody('x'), disorder: undefined });
    const out = join(dir, 'never');
    for (const args of [
      ['ensemble', clean, ...base, '--out', out],
      ['ensemble', trapped, '--threads', '1', '--out', out],
      ['ensemble', trapped, ...base, '--shard', '3/3', '--out', out],
      ['ensemble', trapped, ...base, '--shard', '0/2', '--shard-from-env', '--shards', '2', '--out', out],
      ['ensemble', trapped, ...base, '--shard-from-env', 'TIERCAKE_UNSET_VARIABLE', '--shards', '2', '--out', out],
      ['ensemble', trapped, ...base, '--parallel-over', 'everything', '--out', out],
      ['merge', join(dir, 'no-such-folder'), '--out', out],
    ]) {
      expect((await tiercake(args)).code, args.join(' ')).toBe(2);
    }
    expect(existsSync(out)).toBe(false);
  });
});

describe('ensemble limits', () => {
  it('W = 0: the mean density is the clean solve exactly, the spread is zero, and a clean superfluid always spans', async () => {
    const body = { ...trappedBody('zero', 0), hubbard: { hopping: 0.2 }, particles: { chemicalPotential: 1.0 } };
    const out = join(dir, 'w0');
    expect((await tiercake(['ensemble', scenarioFile('w0', body), '--realisations', '5', '--block-size', '2', '--threads', '1', '--quiet', '--out', out])).code).toBe(0);
    const clean = await solveScenario(prepareScenario(scenarioFile('w0-clean', { ...body, disorder: undefined }), []), { threads: 1 });
    const mean = npy(out, 'density_mean').data;
    for (let i = 0; i < mean.length; i++) expect(mean[i]).toBe(clean.fields.density[i]);
    expect(npy(out, 'density_spread').data.every((s) => s === 0)).toBe(true);
    expect(clean.classification.counts.mott).toBe(0);
    const summary = JSON.parse(readFileSync(join(out, 'summary.json'), 'utf8'));
    expect(summary.results.superfluidSpanningFraction).toBe(1);
  });

  it('weak disorder deep in the superfluid: spanning fraction 1', async () => {
    const body = { ...trappedBody('weak', 0.1), hubbard: { hopping: 0.2 }, particles: { chemicalPotential: 1.0 } };
    const out = join(dir, 'weak');
    expect((await tiercake(['ensemble', scenarioFile('weak', body), '--realisations', '4', '--threads', '1', '--quiet', '--out', out])).code).toBe(0);
    const summary = JSON.parse(readFileSync(join(out, 'summary.json'), 'utf8'));
    expect(summary.results.superfluidSpanningFraction).toBe(1);
    expect(summary.results.meanSitesPerPhase.mott).toBe(0);
  });

  it('J = 0 inside the Mott window: no superfluid (fraction 0), every site at n = 1, one histogram bin', async () => {
    const body = {
      lattice: { shape: [16, 16], boundary: 'periodic' },
      hubbard: { hopping: 1e-300 },
      disorder: { kind: 'box', width: 0.6, seed: 'atomic' },
      particles: { chemicalPotential: 0.5 },
    };
    const out = join(dir, 'atomic');
    expect((await tiercake(['ensemble', scenarioFile('atomic', body), '--realisations', '4', '--threads', '1', '--quiet', '--out', out])).code).toBe(0);
    const summary = JSON.parse(readFileSync(join(out, 'summary.json'), 'utf8'));
    expect(summary.results.superfluidSpanningFraction).toBe(0);
    expect(summary.results.meanSitesPerPhase.superfluid).toBe(0);
    expect(summary.results.meanSitesPerPhase.mott).toBe(256);
    expect(npy(out, 'density_mean').data.every((x) => x === 1)).toBe(true);
    expect(npy(out, 'density_spread').data.every((x) => x === 0)).toBe(true);
    const rows = readFileSync(join(out, 'histograms.csv'), 'utf8').split('\n').filter((l) => l && !l.startsWith('#')).slice(1).map((l) => l.split(',').map(Number));
    const filled = rows.filter((r) => r[2] > 0);
    expect(filled).toEqual([[1, 1.05, 4 * 256, 1, 0, 0]]);
  });
});

describe('blocks, shards and accumulation (pure)', () => {
  it('every split into K shards holds every block exactly once', () => {
    for (const [n, b] of [[1, 1], [6, 2], [17, 4], [100, 7]]) {
      const plan = planBlocks(n, b);
      let total = 0;
      for (let k = 0; k < plan.blockCount; k++) total += blockRange(plan, k).count;
      expect(total).toBe(n);
      for (const K of [1, 2, 3, 5, plan.blockCount, plan.blockCount + 3]) {
        const held = Array.from({ length: K }, (_, k) => shardBlocks(plan, k, K)).flat();
        expect(blockCoverage(plan, held)).toEqual({ missing: [], duplicated: [], outOfRange: [] });
      }
    }
  });

  it('block merging agrees with the two-pass mean and variance, and depends only on the block size', () => {
    // Random per-site values with a large offset, where the naive sum of squares loses digits.
    const siteCount = 5;
    const R = 23;
    const random = seededRandom('ensemble-accumulation');
    const values = Array.from({ length: R }, () => Float64Array.from({ length: siteCount }, () => 1e4 + random.normal()));
    const bins = histogramBins(1, 4);
    const result = (r: number): RealisationResult => ({
      record: { index: r, converged: true, sweeps: 1, nmaxUsed: 1, mu: 0, temperature: 0, atoms: 0, condensedAtoms: 0, superfluidSpans: r % 3 === 0, superfluidClusters: 1, largestClusterSites: 1, phaseSites: [0, 5, 0, 0, 0], superfluidFraction: null, superfluidFractionError: null, stiffnessConverged: true },
      density: values[r],
      condensateDensity: new Float64Array(siteCount).fill(0.5),
      phaseCodes: new Uint8Array(siteCount).fill(PhaseCode.superfluid),
    });
    const accumulate = (blockSize: number, blocks: number[]) => {
      const plan = planBlocks(R, blockSize);
      return blocks.map((b) => {
        const p = createBlockPartial(blockRange(plan, b), siteCount, bins);
        for (let r = p.range.first; r < p.range.first + p.range.count; r++) addRealisation(p, result(r), bins);
        return p;
      });
    };
    for (const blockSize of [1, 4, 23]) {
      const plan = planBlocks(R, blockSize);
      const all = Array.from({ length: plan.blockCount }, (_, b) => b);
      const stats = ensembleStatistics(combineBlocks(accumulate(blockSize, all), bins));
      for (let i = 0; i < siteCount; i++) {
        let s = 0;
        for (const v of values) s += v[i];
        const mean = s / R;
        let ss = 0;
        for (const v of values) ss += (v[i] - mean) ** 2;
        // Means of ~1e4: 1e-10 relative is a few thousand ulps of rounding at most.
        expect(Math.abs(stats.densityMean[i] - mean)).toBeLessThan(1e-8);
        expect(Math.abs(stats.densitySpread[i] - Math.sqrt(ss / (R - 1)))).toBeLessThan(1e-9);
      }
      expect(stats.spanningRealisations).toBe(8); // r = 0, 3, ..., 21
      // Accumulating the blocks separately (as shards do) and combining gives the same bits.
      const halves = [...accumulate(blockSize, all.filter((b) => b % 2 === 1)), ...accumulate(blockSize, all.filter((b) => b % 2 === 0))].sort((a, b) => a.range.block - b.range.block);
      const again = ensembleStatistics(combineBlocks(halves, bins));
      expect(Buffer.from(again.densitySpread.buffer).equals(Buffer.from(stats.densitySpread.buffer))).toBe(true);
      expect(Buffer.from(again.densityMean.buffer).equals(Buffer.from(stats.densityMean.buffer))).toBe(true);
    }
    expect(() => combineBlocks(accumulate(4, [1, 0]), bins)).toThrow(/increasing order/);
  });

  it('histogram bins: [k/b, (k+1)/b), the top edge in the last bin, above nmax overflow', () => {
    const bins = histogramBins(2, 10);
    expect([0, 0.05, 0.1, 1, 1.99, 2, 2.0001, -1e-17].map((x) => binOf(bins, x))).toEqual([0, 0, 1, 10, 19, 19, -1, 0]);
  });

  it('shard options: k/K counted from 0, or the index from an environment variable', () => {
    expect(parseShardOption('2/8')).toMatchObject({ index: 2, count: 8 });
    expect(() => parseShardOption('8/8')).toThrow(/count from 0/);
    expect(() => parseShardOption('2of8')).toThrow(/k\/K/);
    expect(resolveShard(undefined, true, 4, { SLURM_ARRAY_TASK_ID: '3' })).toEqual({ index: 3, count: 4, source: 'SLURM_ARRAY_TASK_ID' });
    expect(resolveShard(undefined, 'MY_TASK', 4, { MY_TASK: '0' })).toMatchObject({ index: 0, source: 'MY_TASK' });
    expect(resolveShard(undefined, undefined, undefined, {})).toBeNull();
    expect(() => resolveShard(undefined, true, 4, { SLURM_ARRAY_TASK_ID: '4' })).toThrow(/--array=0-3/);
    expect(() => resolveShard(undefined, true, undefined, { SLURM_ARRAY_TASK_ID: '1' })).toThrow(/--shards: required/);
    expect(() => resolveShard(undefined, 'configs/x.json', 4, {})).toThrow(/not an environment variable name/);
    expect(shardFolderName({ index: 3, count: 16 })).toBe('shard-03-of-16');
  });
});
