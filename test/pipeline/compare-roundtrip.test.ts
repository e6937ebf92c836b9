// `tiercake compare` end to end: an image synthesised by tiercake with known N and T and
// seeded shot noise is fitted back (the round trip asked for in issue 7), plus the pieces
// it rests on: the measured-image loader (the replayed Levenberg-Marquardt fit has its own
// file, compareFitReplay.test.ts), and
// bad input that must stop with a message naming the option and leave no output behind.

import { afterAll, describe, expect, it } from 'vitest';
import { existsSync, mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { PNG } from 'pngjs';
import { prepareScenario } from '../../src/pipeline/prepareScenario.js';
import { solveScenario } from '../../src/pipeline/solveScenario.js';
import { cameraPictureFiles } from '../../src/output/cameraOutputs.js';
import { cameraPictures } from '../../src/imaging/cameraPictures.js';
import { cloudForImaging } from '../../src/pipeline/solvePictures.js';
import { runCompareCommand } from '../../src/cli/commands/compare.js';
import { InputError } from '../../src/scenario/inputError.js';
import { CameraSchema } from '../../src/scenario/imagingSchema.js';
import { decodeMeasuredImage, orientField, MeasuredImageError } from '../../src/imaging/measuredImage.js';
import { encodeNpy } from '../../src/formats/npy.js';
import type { PlanarField } from '../../src/imaging/planarField.js';

const workDir = mkdtempSync(join(tmpdir(), 'tiercake-compare-test-'));
afterAll(() => rmSync(workDir, { recursive: true, force: true }));

/** An invented 2D layer: energies in U, J = 0.02 U, normal fluid at kT = 0.15 U. */
const trueAtoms = 250;
const trueKT = 0.15;
const scenarioPath = join(workDir, 'layer.json');
writeFileSync(
  scenarioPath,
  JSON.stringify({
    name: 'roundtrip-layer',
    energyUnit: 'U',
    lattice: { shape: [24, 24] },
    hubbard: { hopping: 0.02 },
    trap: { coefficient: 0.01 },
    particles: { atoms: trueAtoms },
    temperature: { kT: trueKT },
    truncation: { nmax: 5 },
  }),
);

describe('compare round trip', () => {
  // Issue 7 asks for N within 1 % and T within 10 %. With photon shot noise of 1000
  // detected counts per atom the scatter of the fitted values over 8 noise seeds was
  // 0.1 % in N and 0.4 % in kT (quoted uncertainties 0.16 % and 0.5 %), so both bounds
  // sit far outside the noise: a failure means a real error, not bad luck. (Atom shot
  // noise alone, sqrt(N) = 16 atoms, could never pin N to 1 %.)
  it('fits N within 1 % and kT within 10 % from a noisy 16-bit exposure and its sidecar', async () => {
    const truth = await solveScenario(prepareScenario(scenarioPath, []), { threads: 1 });
    expect(Math.abs(truth.outcome.solve.totals.atoms - trueAtoms)).toBeLessThan(1e-3);
    const camera = CameraSchema.parse({ cameraPixelSites: 1, psf: { sigmaSites: 0.5 }, noise: { kind: 'photon', countsPerAtom: 1000, seed: 'roundtrip' } });
    const pictures = cameraPictureFiles(cameraPictures(cloudForImaging(truth), camera));
    const pngFile = pictures.arrays.find((a) => a.file === 'images/in_situ_shot.gray16.png');
    const sidecar = pictures.texts.find((t) => t.file === 'images/in_situ_shot.json');
    if (pngFile === undefined || sidecar === undefined) throw new Error('the noisy exposure was not written');
    writeFileSync(join(workDir, 'shot.gray16.png'), pngFile.bytes);
    writeFileSync(join(workDir, 'shot.json'), sidecar.text);

    const out = join(workDir, 'fit');
    const code = await runCompareCommand(scenarioPath, {
      image: join(workDir, 'shot.gray16.png'),
      // Start the temperature a third below the truth; N starts from the image total.
      set: ['temperature.kT=0.1'],
      fit: 'atoms,temperature',
      out,
      threads: '1',
      maxIterations: '15',
      quiet: true,
    });
    expect(code).toBe(0);
    const result = JSON.parse(readFileSync(join(out, 'comparison.json'), 'utf8'));
    const byName = Object.fromEntries(result.fit.parameters.map((p: { name: string }) => [p.name, p]));
    expect(Math.abs(byName.atoms.best - trueAtoms) / trueAtoms).toBeLessThan(0.01);
    expect(Math.abs(byName.kT.best - trueKT) / trueKT).toBeLessThan(0.1);
    // The quoted uncertainties must cover the truth (4 standard uncertainties).
    expect(Math.abs(byName.atoms.best - trueAtoms)).toBeLessThan(4 * byName.atoms.uncertainty);
    expect(Math.abs(byName.kT.best - trueKT)).toBeLessThan(4 * byName.kT.uncertainty);
    // The trap centre of the 24-site lattice sits at site 11.5, pixel 11.5 + margin 3.
    expect(Math.abs(byName.centreXPixels.best - 14.5)).toBeLessThan(0.1);
    expect(result.fit.converged).toBe(true);
    expect(result.image.scaleFrom).toContain('shot.json');
    for (const file of ['report.html', 'profiles.csv', 'images/side_by_side.png', 'images/residual.png', 'images/residual.npy', 'images/profiles.png', 'images/model.npy']) {
      expect(existsSync(join(out, file)), file).toBe(true);
    }
    // The report shows the radial profile once (its own section, the figure of images/profiles.png).
    const html = readFileSync(join(out, 'report.html'), 'utf8');
    expect(html.match(/radial profiles<\/text>/g)).toHaveLength(1);
    expect(html.match(/>trap-scaled radius \([^)]+\)<\/text>/g)).toHaveLength(1);
    expect(html.match(/<img /g)).toBeNull(); // every picture is an inlined figure, none a second raster copy
  });
});

describe('measured image loader', () => {
  // Orientation by hand: a marker at (x, y) = (2, 0) on a 4 x 3 grid. Counter-clockwise
  // rotation by 90 degrees with x right and y up maps (x, y) -> (-y, x), shifted into
  // the 3 x 4 grid: (3 - 1 - 0, 2) = (2, 2). Mirroring x first sends it to (1, 0).
  it('rotates counter-clockwise and mirrors as documented', () => {
    const values = new Float64Array(12);
    values[2 * 3 + 0] = 7;
    const rotated = orientField({ values, nx: 4, ny: 3 }, 90, false);
    expect([rotated.nx, rotated.ny]).toEqual([3, 4]);
    expect(rotated.values[2 * 4 + 2]).toBe(7);
    const mirrored = orientField({ values, nx: 4, ny: 3 }, 0, true);
    expect(mirrored.values[1 * 3 + 0]).toBe(7);
    // Four quarter turns are the identity; two are the half turn.
    let field: PlanarField = { values, nx: 4, ny: 3 };
    for (let k = 0; k < 4; k++) field = orientField(field, 90, false);
    expect(Array.from(field.values)).toEqual(Array.from(values));
    const twice = orientField(orientField({ values, nx: 4, ny: 3 }, 90, false), 90, false);
    expect(Array.from(twice.values)).toEqual(Array.from(orientField({ values, nx: 4, ny: 3 }, 180, false).values));
  });

  it('reads a PNG as displayed (column = x, row from the top = -y) and divides by the counts per atom', () => {
    // A 5 x 4 16-bit greyscale PNG written with pngjs, one bright pixel at column 3, row 0.
    const png = new PNG({ width: 5, height: 4, bitDepth: 16, colorType: 0, inputColorType: 0, inputHasAlpha: false });
    const grey = new Uint16Array(20);
    grey[0 * 5 + 3] = 600;
    png.data = Buffer.from(grey.buffer);
    const bytes = PNG.sync.write(png, { bitDepth: 16, colorType: 0, inputColorType: 0, inputHasAlpha: false });
    const image = decodeMeasuredImage(new Uint8Array(bytes), 'frame.png', { pixelUm: 0.5, countsPerAtom: 200 });
    expect([image.nx, image.ny]).toEqual([5, 4]);
    expect(image.values[3 * 4 + 3]).toBeCloseTo(3, 12); // x = 3, y = 4 - 1 - 0
    expect(image.totalAtoms).toBeCloseTo(3, 12);
  });

  it('reads integer .npy frames and names the option at fault', () => {
    // An int32 .npy written by the project's writer, read as counts with 4 per atom.
    const counts = Int32Array.from({ length: 12 }, (_, i) => 4 * i);
    const npy = encodeNpy(counts, [3, 4]);
    const image = decodeMeasuredImage(npy, 'counts.npy', { pixelUm: 1, countsPerAtom: 4 });
    expect(Array.from(image.values)).toEqual(Array.from({ length: 12 }, (_, i) => i));
    const pngBytes = PNG.sync.write(Object.assign(new PNG({ width: 4, height: 4 }), {}));
    const fail = (f: () => unknown, option: string) => {
      try {
        f();
      } catch (err) {
        expect(err).toBeInstanceOf(MeasuredImageError);
        expect((err as MeasuredImageError).option).toBe(option);
        expect((err as Error).message.startsWith(option)).toBe(true);
        return;
      }
      throw new Error(`expected an error naming ${option}`);
    };
    fail(() => decodeMeasuredImage(new Uint8Array(pngBytes), 'rgba.png', { pixelUm: 1 }), '--counts-per-atom');
    fail(() => decodeMeasuredImage(new Uint8Array(pngBytes), 'rgba.png', { pixelUm: 1, countsPerAtom: 1 }), '--image'); // colour PNG
    fail(() => decodeMeasuredImage(npy, 'counts.npy', { pixelUm: 1, rotateDeg: 45 }), '--rotate');
    fail(() => decodeMeasuredImage(npy, 'counts.npy', { pixelUm: 0 }), '--pixel-um');
    fail(() => decodeMeasuredImage(encodeNpy(new Float64Array([1, NaN, 2, 3, 4, 5, 6, 7, 8]), [3, 3]), 'nan.npy', { pixelUm: 1 }), '--image');
    fail(() => decodeMeasuredImage(new TextEncoder().encode('hello, not an image'), 'notes.txt', { pixelUm: 1 }), '--image');
  });
});

describe('compare refuses bad input', () => {
  it('needs a pixel size for an .npy without sidecar, and writes nothing', async () => {
    const frame = join(workDir, 'bare.npy');
    writeFileSync(frame, encodeNpy(new Float64Array(64).fill(1), [8, 8]));
    const out = join(workDir, 'never');
    await expect(runCompareCommand(scenarioPath, { image: frame, set: [], out, threads: '1', quiet: true })).rejects.toThrow(InputError);
    await expect(runCompareCommand(scenarioPath, { image: frame, set: [], out, threads: '1', quiet: true })).rejects.toThrow(/--pixel-um/);
    await expect(
      runCompareCommand(scenarioPath, { image: frame, pixelUm: '1', fit: 'atoms,entropy', set: [], out, threads: '1', quiet: true }),
    ).rejects.toThrow(/--fit/);
    await expect(runCompareCommand(scenarioPath, { image: join(workDir, 'missing.npy'), pixelUm: '1', set: [], out, threads: '1', quiet: true })).rejects.toThrow(
      /--image/,
    );
    expect(existsSync(out)).toBe(false);
  });
});
