// A small compare fit for the tests of its writers and report: a 12 x 12 layer, its own
// noise-free in-situ picture as the measured image (50 counts per atom), N fitted.
import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { runCompareFit, type CompareFit } from '../../src/pipeline/compareFit.js';
import { prepareScenario } from '../../src/pipeline/prepareScenario.js';
import { solveScenario } from '../../src/pipeline/solveScenario.js';
import { solvePictures } from '../../src/pipeline/solvePictures.js';
import { measuredFromGrid } from '../../src/imaging/measuredImage.js';

export async function smallCompareFit(): Promise<{ fit: CompareFit; scenarioPath: string; dir: string }> {
  const dir = mkdtempSync(join(tmpdir(), 'tiercake-small-fit-'));
  const scenarioPath = join(dir, 'small.json');
  writeFileSync(
    scenarioPath,
    JSON.stringify({ name: 'small', energyUnit: 'U', lattice: { shape: [12, 12] }, hubbard: { hopping: 0.02 }, trap: { coefficient: 0.03 }, particles: { atoms: 80 }, truncation: { nmax: 5 } }),
  );
  const truth = await solveScenario(prepareScenario(scenarioPath), { threads: 1 });
  const picture = solvePictures(truth).pictures.find((p) => p.name === 'in_situ')!.picture;
  // Atoms per pixel on the model's grid, weighted as a picture of 50 detected counts per atom.
  const measured = measuredFromGrid(picture, { pixelUm: picture.pixelUm, countsPerAtom: 50 });
  const fit = await runCompareFit({ prepared: prepareScenario(scenarioPath), measured, fit: ['atoms'], maxIterations: 20, threads: 1 });
  return { fit, scenarioPath, dir };
}
