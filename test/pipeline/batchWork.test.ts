// The work of a `tiercake submit` (src/pipeline/batchWork.ts): exactly one of --ensemble
// and --scan; options of the other kind refused naming the option; the arguments every
// shard task runs (the ensemble's block size always written out, so every task agrees;
// the scan's chain length likewise) and those of a resubmission; the units the shards
// split (10 realisations in blocks of 4: 3 blocks; 5 points in chains of 2: 3 chains);
// --vary is parsed only for a scan.
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { batchWork } from '../../src/pipeline/batchWork.js';
import type { ScanAxis } from '../../src/pipeline/scan/scanPlan.js';
import { loadScenario } from '../../src/scenario/loadScenario.js';
import { scenarioHash } from '../../src/scenario/scenarioHash.js';

const dir = mkdtempSync(join(tmpdir(), 'tiercake-batchwork-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));
const base = { name: 'box', energyUnit: 'U', truncation: { nmax: 4 }, lattice: { shape: [6, 6] }, hubbard: { hopping: 0.02 }, trap: { coefficient: 0.02 }, particles: { chemicalPotential: 0.5 } };
const disordered = join(dir, 'box.json');
writeFileSync(disordered, JSON.stringify({ ...base, disorder: { kind: 'box', width: 0.4, seed: 'w' } }));
const clean = join(dir, 'clean.json');
writeFileSync(clean, JSON.stringify(base));
const memory = 2 ** 30;
const axes = [{ path: 'hubbard.hopping', values: [0.01, 0.02, 0.03, 0.04, 0.05], spacing: 'list' }] as ScanAxis[];
const noAxes = (): ScanAxis[] => {
  throw new Error('--vary parsed for an ensemble');
};

describe('batchWork', () => {
  it('an ensemble: task and resubmission arguments, identity and blocks', () => {
    const w = batchWork(disordered, { ensemble: 10, set: ['hubbard.hopping=0.03'] }, noAxes, memory);
    expect(w.kind).toBe('ensemble');
    expect(w.workArgs).toEqual(['--realisations', '10', '--block-size', '4', '--set', 'hubbard.hopping=0.03']);
    expect(w.submitWorkArgs).toEqual(['--ensemble', '10', '--block-size', '4', '--set', 'hubbard.hopping=0.03']);
    expect(w.ensemble).toMatchObject({ realisations: 10, blockSize: 4 });
    expect(w.scenarioHash).toBe(scenarioHash(loadScenario(disordered, ['hubbard.hopping=0.03']).scenario));
    expect([w.units, w.unitName]).toEqual([3, 'blocks']);
    expect(w.scan).toBeNull();
  });

  it('a scan: the chain length written out, the scan setup kept', () => {
    const w = batchWork(clean, { scan: true, vary: ['hubbard.hopping=0.01,0.02,0.03,0.04,0.05'], chainLength: 2, keepPoints: true }, () => axes, memory);
    expect(w.workArgs).toEqual(['--vary', 'hubbard.hopping=0.01,0.02,0.03,0.04,0.05', '--chain-length', '2', '--keep-points']);
    expect(w.submitWorkArgs[0]).toBe('--scan');
    expect([w.units, w.unitName]).toEqual([3, 'chains']);
    expect(w.scan?.plan.pointCount).toBe(5);
    expect(w.ensemble).toBeNull();
  });

  it('refuses both kinds or neither, options of the other kind, and an ensemble without disorder', () => {
    expect(() => batchWork(clean, {}, noAxes, memory)).toThrow(/^submit: give either --ensemble N/);
    expect(() => batchWork(clean, { ensemble: 4, scan: true }, noAxes, memory)).toThrow(/^submit: give either --ensemble N/);
    expect(() => batchWork(disordered, { ensemble: 4, chainLength: 3 }, noAxes, memory)).toThrow('--chain-length: belongs to --scan, not to --ensemble; leave it out');
    expect(() => batchWork(clean, { vary: ['x=1'], binsPerAtom: 3 }, () => axes, memory)).toThrow('--bins-per-atom: belongs to --ensemble, not to --scan; leave it out');
    expect(() => batchWork(clean, { ensemble: 4 }, noAxes, memory)).toThrow(/^--ensemble: the scenario has no disorder block/);
  });
});
