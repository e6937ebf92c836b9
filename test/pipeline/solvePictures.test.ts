// The camera pictures of a solve (src/pipeline/solvePictures.ts): the cloud handed to the
// camera model carries the laboratory mass and Gaussian Wannier widths l = sqrt(2) x rms
// width / spacing (none in dimensionless mode), and the in-situ picture holds the atoms of
// the lattice (the camera only moves atoms between pixels).

import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { cloudForImaging, solvePictures } from '../../src/pipeline/solvePictures.js';
import { prepareScenario } from '../../src/pipeline/prepareScenario.js';
import { solveScenario } from '../../src/pipeline/solveScenario.js';
import { atomicMassUnitKg } from '../../src/physics/constants.js';

const dir = mkdtempSync(join(tmpdir(), 'tiercake-pictures-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

function file(name: string, body: Record<string, unknown>): string {
  const path = join(dir, `${name}.json`);
  writeFileSync(path, JSON.stringify({ name, ...body }));
  return path;
}

describe('solvePictures', () => {
  it('dimensionless mode: no mass, no Wannier width; the in-situ picture holds every atom', async () => {
    const a = await solveScenario(prepareScenario(file('dimless', { energyUnit: 'U', lattice: { shape: [10, 10] }, hubbard: { hopping: 0.02 }, trap: { coefficient: 0.02 }, particles: { atoms: 60 }, solver: { compressibility: false } })), { threads: 1 });
    const cloud = cloudForImaging(a);
    expect(cloud.massKg).toBeNull();
    expect(cloud.wannierWidthSites).toBeNull();
    expect(cloud.density).toBe(a.fields.density);
    const set = solvePictures(a);
    const inSitu = set.pictures.find((p) => p.name === 'in_situ')!;
    const total = inSitu.picture.values.reduce((s, v) => s + v, 0);
    expect(Math.abs(total - a.outcome.solve.totals.atoms)).toBeLessThan(1e-9 * a.outcome.solve.totals.atoms);
    expect(set.summary.timeOfFlight).toMatchObject({ written: false });
  });

  it('laboratory mode: the 87Rb mass and l = sqrt(2) x rms width per axis, in lattice spacings', async () => {
    const prepared = prepareScenario(
      file('lab', { energyUnit: 'Hz', lattice: { shape: [12, 12] }, laboratory: { species: '87Rb', wavelengthNm: 1064, depthEr: 12, transverse: { trapFrequencyHz: 9000 } }, trap: { frequencyHz: 60 }, particles: { atoms: 40 }, solver: { compressibility: false } }),
    );
    const a = await solveScenario(prepared, { threads: 1 });
    const cloud = cloudForImaging(a);
    // 86.909 u (87Rb, recalled from memory to 5 digits; 1e-4 relative).
    expect(Math.abs((cloud.massKg as number) / (86.909 * atomicMassUnitKg) - 1)).toBeLessThan(1e-4);
    const lab = prepared.resolved.laboratory!;
    const spacingNm = lab.latticeSpacingUm * 1000;
    expect(spacingNm).toBeCloseTo(532, 9);
    expect(cloud.wannierWidthSites).toEqual(lab.hubbard.latticeAxes.slice(0, 2).map((axis) => (Math.SQRT2 * axis.wannierWidthNm) / spacingNm));
    expect(solvePictures(a).summary.timeOfFlight).toMatchObject({ written: true });
  });
});
