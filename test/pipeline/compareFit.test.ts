// The compare fit in memory (src/pipeline/compareFit.ts) on a noise-free picture of a
// known cloud: the fit must return the atom number and trap centre the picture was made
// with, and the atom-number uncertainty it carries through dN/dmu must equal the one of a
// fit parametrised by N itself, computed here independently: the Fisher matrix
// F = J^T W J with J from fixed-N solves at N +- dN and re-rendered centres, sigma_N =
// sqrt((F^-1)_NN) (Bevington & Robinson, 3rd ed., eq. 8.28; least squares is invariant
// under a change of parameters, the covariance transforms with its Jacobian).

import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { Matrix, inverse } from 'ml-matrix';
import { afterAll, describe, expect, it } from 'vitest';
import { runCompareFit } from '../../src/pipeline/compareFit.js';
import { prepareScenario } from '../../src/pipeline/prepareScenario.js';
import { solveScenario } from '../../src/pipeline/solveScenario.js';
import { solvePictures } from '../../src/pipeline/solvePictures.js';
import { modelNoiseSigma } from '../../src/pipeline/compareFitNoise.js';
import { cameraPicture } from '../../src/imaging/cameraOptics.js';
import { measuredFromGrid } from '../../src/imaging/measuredImage.js';
import { InputError } from '../../src/scenario/inputError.js';

const dir = mkdtempSync(join(tmpdir(), 'tiercake-compare-fit-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

const trueAtoms = 260;
const countsPerAtom = 100;
const body = {
  name: 'fit-layer',
  energyUnit: 'U',
  lattice: { shape: [20, 20] },
  hubbard: { hopping: 0.02 },
  trap: { coefficient: 0.012 },
  particles: { atoms: trueAtoms },
  truncation: { nmax: 5 },
  solver: { compressibility: false },
  camera: { cameraPixelSites: 1, psf: { sigmaSites: 0.6 } },
};
const path = join(dir, 'fit-layer.json');
writeFileSync(path, JSON.stringify(body));

async function noiseFreeImage() {
  const truth = await solveScenario(prepareScenario(path), { threads: 1 });
  const inSitu = solvePictures(truth).pictures.find((p) => p.name === 'in_situ')!.picture;
  return { truth, inSitu, measured: measuredFromGrid(inSitu, { pixelUm: 1, countsPerAtom }) };
}

describe('fit of N and the centre to a noise-free picture', () => {
  it('returns the atom number and the trap centre of the picture, and the N uncertainty of an N-parametrised fit', async () => {
    const { truth, inSitu, measured } = await noiseFreeImage();
    // The scenario's own atom number is not used: the fit starts from the image total.
    const fit = await runCompareFit({ prepared: prepareScenario(path, ['particles.atoms=200']), measured, fit: ['atoms'], maxIterations: 30, threads: 1 });
    const byName = Object.fromEntries(fit.parameters.map((p) => [p.name, p]));
    expect(fit.fit.converged).toBe(true);
    expect(fit.best.converged).toBe(true);
    // Noise-free: the minimum is the truth, to the solver's accuracy (phi to 1e-8).
    expect(Math.abs(byName.atoms.best - truth.outcome.solve.totals.atoms) / trueAtoms).toBeLessThan(1e-5);
    // The trap centre (lattice centre 9.5) sits at pixel 9.5 + the frame margin.
    const margin = -inSitu.xCentresUm[0] - 9.5;
    expect(Math.abs(byName.centreXPixels.best - (9.5 + margin))).toBeLessThan(1e-4);
    expect(Math.abs(byName.centreYPixels.best - (9.5 + margin))).toBeLessThan(1e-4);
    expect(fit.fit.reducedChiSquare).toBeLessThan(1e-6);
    expect(byName.atoms.uncertainty).toBe(byName.atoms.uncertaintyFromSigma); // chi2_nu < 1: not scaled
    // A noise-free picture scatters far less than its noise model: the only warning says so
    // (chi2_nu many times sqrt(2/nu) below 1, compareFitGoodness.test.ts).
    expect(fit.warnings.map((w) => w.code)).toEqual(['chi-square-far-from-one']);

    // Independent: Fisher matrix of (N, x0, y0) with the final weights.
    const { resolved } = prepareScenario(path);
    const sigma = modelNoiseSigma(fit.model, fit.noise.backgroundSigma, fit.noise.countsPerAtom as number);
    const n0 = byName.atoms.best;
    const dN = 1e-3 * n0;
    const solveAt = async (n: number) => (await solveScenario(prepareScenario(path, [`particles.atoms=${n}`, 'solver.atomTolerance=1e-12']), { threads: 1 })).fields.density;
    const [up, down] = [await solveAt(n0 + dN), await solveAt(n0 - dN)];
    // The rows report the centre in the given frame (row from the top); render on the grid (y up).
    const [x0, y0] = fit.centre.grid;
    expect(fit.centre.givenFrame).toEqual([byName.centreXPixels.best, byName.centreYPixels.best]);
    expect(y0).toBeCloseTo(measured.ny - 1 - byName.centreYPixels.best, 12);
    const render = (density: Float64Array, cx: number, cy: number) =>
      cameraPicture(density, resolved.geometry.shape, fit.optics, { nx: measured.nx, ny: measured.ny, firstXUm: -cx, firstYUm: -cy }).values;
    const dc = 1e-3;
    const centre = await solveAt(n0);
    const columns = [
      Float64Array.from(render(up, x0, y0), (v, i) => (v - render(down, x0, y0)[i]) / (2 * dN)),
      Float64Array.from(render(centre, x0 + dc, y0), (v, i) => (v - render(centre, x0 - dc, y0)[i]) / (2 * dc)),
      Float64Array.from(render(centre, x0, y0 + dc), (v, i) => (v - render(centre, x0, y0 - dc)[i]) / (2 * dc)),
    ];
    const fisher = new Matrix(3, 3);
    for (let a = 0; a < 3; a++) for (let b = 0; b < 3; b++) {
      let sum = 0;
      for (let i = 0; i < sigma.length; i++) sum += (columns[a][i] * columns[b][i]) / (sigma[i] * sigma[i]);
      fisher.set(a, b, sum);
    }
    const covariance = inverse(fisher);
    // Measured: 2e-5 for N, 1e-8 for the centre. 1e-3 allows for the central differences
    // here against the forward ones of the fit and for the weights of its last pass (from
    // the previous best model, not the final one).
    expect(Math.abs(byName.atoms.uncertaintyFromSigma / Math.sqrt(covariance.get(0, 0)) - 1)).toBeLessThan(1e-3);
    expect(Math.abs(byName.centreXPixels.uncertaintyFromSigma / Math.sqrt(covariance.get(1, 1)) - 1)).toBeLessThan(1e-3);
    // The reported covariance is that of (N, x0, y0): its diagonal gives the uncertainties.
    expect(Math.sqrt(fit.fit.covariance[0])).toBeCloseTo(byName.atoms.uncertaintyFromSigma, 12);
    // Residual, atoms in the picture, profiles: plain consequences of the best model.
    for (let i = 0; i < fit.residual.length; i++) expect(fit.residual[i]).toBeCloseTo(fit.data[i] - fit.model[i], 14);
    expect(fit.profile.measuredMean.length).toBe(fit.profile.modelMean.length);
    expect(fit.fit.solves).toBeLessThan(20);
  });

  it('refuses an empty --fit list and names it', async () => {
    const { measured } = await noiseFreeImage();
    await expect(runCompareFit({ prepared: prepareScenario(path), measured, fit: [], maxIterations: 5, threads: 1 })).rejects.toThrow(InputError);
  });
});
