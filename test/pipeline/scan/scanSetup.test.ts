// The scan a command describes, checked before any work (src/pipeline/scan/scanSetup.ts):
// the plan follows the axes (3 x 2 points in chains of 8 by default: one chain), --set
// reaches every point, and the refusals name the option or the point: --fixed without the
// characteristic-density axis, --realisations without disorder or above the limit, a value
// the schema refuses at a later point (named with its values), a text scanned as a number.
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { scanSetup } from '../../../src/pipeline/scan/scanSetup.js';
import { MAX_REALISATIONS_PER_POINT, type ScanAxis } from '../../../src/pipeline/scan/scanPlan.js';
import { loadScenario } from '../../../src/scenario/loadScenario.js';
import { scenarioHash } from '../../../src/scenario/scenarioHash.js';
import { InputError } from '../../../src/scenario/inputError.js';

const dir = mkdtempSync(join(tmpdir(), 'tiercake-scansetup-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));
const file = join(dir, 'layer.json');
writeFileSync(file, JSON.stringify({ name: 'layer', energyUnit: 'U', truncation: { nmax: 4 }, lattice: { shape: [8, 8] }, hubbard: { hopping: 0.02 }, trap: { coefficient: 0.02 }, particles: { chemicalPotential: 1.2 } }));
const memory = 2 ** 30;
const hopping = (values: number[]): ScanAxis => ({ path: 'hubbard.hopping', values, spacing: 'list' });

describe('scanSetup', () => {
  it('plans the grid, holds the trap by default, and applies --set to every point', () => {
    const setup = scanSetup(file, [hopping([0.01, 0.02, 0.03]), { path: 'particles.chemicalPotential', values: [1, 1.2], spacing: 'list' }], { set: ['trap.coefficient=0.03'] }, memory);
    expect(setup.plan).toMatchObject({ pointCount: 6, chainLength: 8, chainCount: 1, counts: [3, 2], realisations: 1 });
    expect(setup.hold).toBe('trap');
    expect(setup.keepPoints).toBe(false);
    expect(setup.scenarioHash).toBe(scenarioHash(loadScenario(file, ['trap.coefficient=0.03']).scenario));
    expect(setup.base.scenario.trap?.coefficient).toBe(0.03);
    const point = setup.prepare(['hubbard.hopping=0.05']);
    expect(point.scenario.hubbard?.hopping).toBe(0.05);
    expect(point.scenario.trap?.coefficient).toBe(0.03);
  });

  it('refuses --fixed without the characteristic-density axis and --realisations without disorder or above the limit', () => {
    expect(() => scanSetup(file, [hopping([0.01, 0.02])], { fixed: 'atoms' }, memory)).toThrow('--fixed: only used with --vary characteristicDensity=...; leave it out');
    expect(() => scanSetup(file, [hopping([0.01, 0.02])], { realisations: 3 }, memory)).toThrow(/^--realisations: the scenario has no disorder block/);
    expect(() => scanSetup(file, [hopping([0.01])], { realisations: MAX_REALISATIONS_PER_POINT + 1 }, memory)).toThrow(`--realisations: at most ${MAX_REALISATIONS_PER_POINT} disorder realisations per scan point`);
  });

  it('names the point whose scenario the schema refuses, before any work', () => {
    let caught: unknown;
    try {
      scanSetup(file, [hopping([0.01, 0.02, -0.5])], {}, memory);
    } catch (err) {
      caught = err;
    }
    expect(caught).toBeInstanceOf(InputError);
    expect((caught as Error).message).toMatch(/^scan point 2 \(hubbard\.hopping=-0\.5\): .*hopping/s);
    // a one-point scan's message is the scenario's own
    expect(() => scanSetup(file, [hopping([-0.5])], {}, memory)).toThrow(/^(?!scan point)/);
  });

  it('refuses to scan a value that is not a number in the scenario', () => {
    expect(() => scanSetup(file, [{ path: 'name', values: [1, 2], spacing: 'list' }], {}, memory)).toThrow(InputError);
  });
});
