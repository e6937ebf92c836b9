// The fields index (src/output/fieldIndex.ts) describes exactly the .npy files a solve
// writes (src/output/solveOutputs.ts fieldFiles), with the dtype each file really has:
// single-site and cluster runs (the bond fields), with and without the LDA labels.
// A reader of summary.json relies on this list to load the folder.

import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { fieldAxes, fieldEntries } from '../../src/output/fieldIndex.js';
import { fieldFiles } from '../../src/output/solveOutputs.js';
import { decodeNpy } from '../../src/formats/npy.js';
import { prepareScenario } from '../../src/pipeline/prepareScenario.js';
import { solveScenario } from '../../src/pipeline/solveScenario.js';

const dir = mkdtempSync(join(tmpdir(), 'tiercake-field-index-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

const dtypeOf: Record<string, string> = { '<f8': 'float64', '|u1': 'uint8', '<i4': 'int32' };

async function indexAgainstFiles(name: string, solver: Record<string, unknown>, boundary: string | string[] = 'open') {
  const path = join(dir, `${name}.json`);
  writeFileSync(
    path,
    JSON.stringify({ name, energyUnit: 'U', lattice: { shape: [4, 6], boundary }, hubbard: { hopping: 0.03 }, trap: { coefficient: 0.05 }, particles: { chemicalPotential: 0.6 }, truncation: { nmax: 3 }, solver }),
  );
  const a = await solveScenario(prepareScenario(path), { threads: 1 });
  const files = fieldFiles(a);
  const entries = fieldEntries({
    shape: a.resolved.geometry.shape,
    energyUnit: 'U',
    compressibilityComputed: a.outcome.compressibility !== null,
    finiteTemperature: false,
    localDensity: a.classification.localDensity !== undefined,
    ...(a.cluster !== null ? { clusterBondAxes: a.cluster.bondCorrelation.map((_, d) => d) } : {}),
    ...(a.stiffness !== null ? { stiffnessAxes: a.stiffness.axes.filter((x) => x.localFraction !== null).map((x) => x.axis) } : {}),
  });
  expect(entries.map((e) => e.file).sort()).toEqual(files.map((f) => f.file).sort());
  for (const f of files) {
    const npy = decodeNpy(f.bytes);
    const entry = entries.find((e) => e.file === f.file)!;
    expect(dtypeOf[npy.header.descr] ?? npy.header.descr, f.file).toBe(entry.dtype);
    expect(npy.shape).toEqual([4, 6]);
    expect(entry.meaning.length).toBeGreaterThan(10);
  }
  return entries;
}

describe('fields index', () => {
  it('lists exactly the files of a single-site solve, with their dtypes', async () => {
    const entries = await indexAgainstFiles('single', { compressibility: false });
    expect(entries.some((e) => e.file.startsWith('fields/bond_'))).toBe(false);
  });

  it('lists the local superfluid fraction of a stiffness solve on its periodic axis only', async () => {
    const entries = await indexAgainstFiles('stiffness', { stiffness: true, compressibility: false }, ['periodic', 'open']);
    expect(entries.filter((e) => e.file.startsWith('fields/superfluid_fraction_')).map((e) => e.file)).toEqual(['fields/superfluid_fraction_x.npy']);
  });

  it('lists the bond fields of a cluster solve (one pair per axis)', async () => {
    const entries = await indexAgainstFiles('clusters', { cluster: [2, 2], compressibility: false });
    expect(entries.filter((e) => e.file.startsWith('fields/bond_')).map((e) => e.file)).toEqual([
      'fields/bond_correlation_x.npy',
      'fields/bond_exact_x.npy',
      'fields/bond_correlation_y.npy',
      'fields/bond_exact_y.npy',
    ]);
  });

  it('states the axis order of a 3D field', () => {
    const a = fieldAxes([3, 4, 5]);
    expect(a.axes).toEqual(['x', 'y', 'z']);
    expect(a.order).toMatch(/\(nx, ny, nz\), axis 0 = lattice x, axis 1 = y, axis 2 = z; C order/);
  });
});
