// Files of an ensemble (src/output/ensembleOutputs.ts) from synthetic realisations whose
// statistics are known by hand: the .npy fields are the statistics with the lattice shape,
// the histogram fractions of all bins and the overflow add up to one, and summary.json
// lists every file it sits beside.

import { mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { ensembleFieldFiles, ensembleWarnings, histogramTable, writeEnsembleFiles, type EnsembleOutcome } from '../../src/output/ensembleOutputs.js';
import { writeOutputFolder } from '../../src/output/outputFolder.js';
import { checkOutputTarget } from '../../src/output/outputTarget.js';
import { decodeNpy } from '../../src/formats/npy.js';
import { planBlocks, blockRange } from '../../src/pipeline/ensemble/blockPlan.js';
import { addRealisation, combineBlocks, createBlockPartial } from '../../src/pipeline/ensemble/blockPartial.js';
import { ensembleStatistics } from '../../src/pipeline/ensemble/ensembleStatistics.js';
import { histogramBins } from '../../src/pipeline/ensemble/histogramBins.js';
import { ensembleContextOf } from '../../src/pipeline/ensemble/solveRealisation.js';
import { prepareScenario } from '../../src/pipeline/prepareScenario.js';
import { PhaseCode } from '../../src/observables/phaseCodes.js';
import { scenarioHash } from '../../src/scenario/scenarioHash.js';

const dir = mkdtempSync(join(tmpdir(), 'tiercake-ensemble-out-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

describe('ensemble files', () => {
  it('fields are the statistics; histogram fractions sum to one; the summary lists every file', async () => {
    const path = join(dir, 'e.json');
    writeFileSync(path, JSON.stringify({ name: 'e', energyUnit: 'U', lattice: { shape: [2, 3] }, hubbard: { hopping: 0.02 }, disorder: { kind: 'box', width: 0.1, seed: 'e' }, particles: { chemicalPotential: 0.5 }, truncation: { nmax: 3 } }));
    const prepared = prepareScenario(path);
    const plan = planBlocks(2, 2);
    const bins = histogramBins(3, 2);
    // Two realisations: densities 1 and 3 on every site, mean 2, spread sqrt(2) (n - 1 = 1).
    const p = createBlockPartial(blockRange(plan, 0), 6, bins);
    for (const [r, n] of [[0, 1], [1, 3]] as const) {
      addRealisation(p, {
        record: { index: r, converged: true, sweeps: 1, nmaxUsed: 3, mu: 0.5, temperature: 0, atoms: 6 * n, condensedAtoms: 0, superfluidSpans: false, superfluidClusters: 0, largestClusterSites: 0, phaseSites: [0, 0, 6, 0, 0], superfluidFraction: null, superfluidFractionError: null, stiffnessConverged: true },
        density: new Float64Array(6).fill(n),
        condensateDensity: new Float64Array(6),
        phaseCodes: new Uint8Array(6).fill(PhaseCode.mott),
      }, bins);
    }
    const total = combineBlocks([p], bins);
    const stats = ensembleStatistics(total);
    const outcome: EnsembleOutcome = { scenario: prepared.scenario, scenarioHash: scenarioHash(prepared.scenario), baseSeed: 'e', plan, bins, context: ensembleContextOf(prepared.resolved), total, stats, provenance: { kind: 'test' } };
    const fields = ensembleFieldFiles(outcome);
    const mean = decodeNpy(fields.find((f) => f.file === 'fields/density_mean.npy')!.bytes);
    expect(mean.shape).toEqual([2, 3]);
    expect(Array.from(mean.data)).toEqual([2, 2, 2, 2, 2, 2]);
    const spread = decodeNpy(fields.find((f) => f.file === 'fields/density_spread.npy')!.bytes);
    for (const v of spread.data) expect(v).toBeCloseTo(Math.SQRT2, 14);
    const table = histogramTable(outcome);
    // Density 3 = nmax falls in the last bin; 12 samples (6 sites x 2 realisations).
    expect(table.samples).toBe(12);
    expect(table.densityFraction.reduce((s, v) => s + v, 0)).toBeCloseTo(1, 14);
    const out = join(dir, 'out');
    let files: string[] = [];
    await writeOutputFolder(checkOutputTarget(out, { option: '--out' }), { command: 'ensemble', scenarioHash: outcome.scenarioHash }, (folder) => {
      files = writeEnsembleFiles(outcome, folder, () => '<html></html>');
    });
    expect(JSON.parse(readFileSync(join(out, 'summary.json'), 'utf8')).files).toEqual(files);
  });

  it('warnings: realisations that did not converge, and a mean cloud on the open face of a trapped lattice', async () => {
    const path = join(dir, 'w.json');
    // A trapped 2 x 3 lattice: every site is a face site, so a filled cloud touches the open faces.
    writeFileSync(path, JSON.stringify({ name: 'w', energyUnit: 'U', lattice: { shape: [2, 3] }, hubbard: { hopping: 0.02 }, trap: { coefficient: 0.01 }, disorder: { kind: 'box', width: 0.1, seed: 'w' }, particles: { chemicalPotential: 0.5 }, truncation: { nmax: 3 } }));
    const prepared = prepareScenario(path);
    const plan = planBlocks(2, 2);
    const bins = histogramBins(3, 2);
    const p = createBlockPartial(blockRange(plan, 0), 6, bins);
    for (const r of [0, 1]) {
      addRealisation(p, {
        record: { index: r, converged: r === 0, sweeps: 1, nmaxUsed: 3, mu: 0.5, temperature: 0, atoms: 6, condensedAtoms: 0, superfluidSpans: false, superfluidClusters: 0, largestClusterSites: 0, phaseSites: [0, 0, 6, 0, 0], superfluidFraction: null, superfluidFractionError: null, stiffnessConverged: true },
        density: new Float64Array(6).fill(1),
        condensateDensity: new Float64Array(6),
        phaseCodes: new Uint8Array(6).fill(PhaseCode.mott),
      }, bins);
    }
    const total = combineBlocks([p], bins);
    const outcome: EnsembleOutcome = { scenario: prepared.scenario, scenarioHash: scenarioHash(prepared.scenario), baseSeed: 'w', plan, bins, context: ensembleContextOf(prepared.resolved), total, stats: ensembleStatistics(total), provenance: { kind: 'test' } };
    const codes = ensembleWarnings(outcome).map((w) => w.code);
    expect(codes).toEqual(['not-converged', 'cloud-at-edge']);
    expect(ensembleWarnings(outcome)[0].message).toMatch(/1 of 2 realisations did not converge \(indices 1\)/);
    // The same cloud without a trap: the faces are walls by design, only the convergence warning stays.
    const untrapped = { ...outcome, scenario: { ...outcome.scenario, trap: undefined } } as unknown as EnsembleOutcome;
    expect(ensembleWarnings(untrapped).map((w) => w.code)).toEqual(['not-converged']);
  });
});
