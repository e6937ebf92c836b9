// Camera pictures written with every solve (src/imaging/cameraPictures.ts, written by
// src/output/cameraOutputs.ts): atom number
// conservation, the 16-bit PNG + sidecar scale, the parity-projected wedding cake, and
// the time-of-flight picture and visibility. Each check names its outside reference.

import { afterAll, describe, expect, it } from 'vitest';
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { PNG } from 'pngjs';
import { cameraPictureFiles } from '../../src/output/cameraOutputs.js';
import { cameraPictures as cameraPictureSet } from '../../src/imaging/cameraPictures.js';
import type { CloudForImaging } from '../../src/imaging/cameraOptics.js';
import type { CameraSettings, TimeOfFlightSettings } from '../../src/scenario/imagingSchema.js';
import { cloudForImaging } from '../../src/pipeline/solvePictures.js';
import { prepareScenario } from '../../src/pipeline/prepareScenario.js';
import { solveScenario } from '../../src/pipeline/solveScenario.js';
import { ParameterError } from '../../src/physics/parameterError.js';
import { CameraSchema, TimeOfFlightSchema } from '../../src/scenario/imagingSchema.js';
import { decodeNpy } from '../../src/formats/npy.js';
import { seededRandom } from '../../src/numerics/seededRandom.js';
import { InputError } from '../../src/scenario/inputError.js';

const workDir = mkdtempSync(join(tmpdir(), 'tiercake-camera-test-'));
afterAll(() => rmSync(workDir, { recursive: true, force: true }));

function sum(values: ArrayLike<number>): number {
  let s = 0;
  for (let i = 0; i < values.length; i++) s += values[i];
  return s;
}

/** A smooth random cloud on `shape`: density, P_odd in [0, 1], phi <= sqrt(n). */
function syntheticCloud(shape: number[], seed: string, extra: Partial<CloudForImaging> = {}): CloudForImaging {
  const sites = shape.reduce((a, b) => a * b, 1);
  const random = seededRandom(seed);
  const density = Float64Array.from({ length: sites }, () => 2.5 * random.uniform());
  const parityOdd = Float64Array.from({ length: sites }, () => random.uniform());
  const orderParameter = Float64Array.from(density, (n) => 0.5 * Math.sqrt(n));
  return {
    name: 'synthetic',
    shape,
    latticeSpacingUm: null,
    massKg: null,
    density,
    parityOdd,
    orderParameter,
    trapCentre: shape.map((n) => (n - 1) / 2),
    wannierWidthSites: null,
    ...extra,
  };
}

/** The pictures of a cloud as the files a solve writes. */
function cameraPictures(cloud: CloudForImaging, camera?: CameraSettings, tof?: TimeOfFlightSettings) {
  return cameraPictureFiles(cameraPictureSet(cloud, camera, tof));
}

function arrayOf(pictures: ReturnType<typeof cameraPictures>, file: string): Uint8Array {
  const found = pictures.arrays.find((a) => a.file === file);
  if (found === undefined) throw new Error(`missing ${file}; have ${pictures.arrays.map((a) => a.file).join(', ')}`);
  return found.bytes;
}

/** Picture point (x index i, y index j, y up) of a picture .npy stored a[row, col], row 0 at the top. */
function at(npy: { shape: number[]; data: ArrayLike<number> }, i: number, j: number): number {
  const [ny, nx] = npy.shape;
  return npy.data[(ny - 1 - j) * nx + i];
}

function sidecarOf(pictures: ReturnType<typeof cameraPictures>, file: string): Record<string, unknown> {
  const found = pictures.texts.find((t) => t.file === file);
  if (found === undefined) throw new Error(`missing ${file}`);
  return JSON.parse(found.text) as Record<string, unknown>;
}

describe('camera pictures conserve atoms', () => {
  // The camera model only moves atoms between pixels: column summation, area-weighted
  // resampling and a normalised PSF each keep the total (DESIGN.md section 4). Tolerance
  // 1e-9 relative: the sums run over a few thousand terms, rounding is ~1e-13.
  it('in-situ, parity and noise-free pictures hold the atoms of the sites, in 2D and along each 3D axis', () => {
    const cases: Array<{ shape: number[]; axis: 'x' | 'y' | 'z' }> = [
      { shape: [18, 14], axis: 'z' },
      { shape: [10, 12, 8], axis: 'x' },
      { shape: [10, 12, 8], axis: 'y' },
      { shape: [10, 12, 8], axis: 'z' },
    ];
    for (const { shape, axis } of cases) {
      const cloud = syntheticCloud(shape, `conserve/${shape.length}/${axis}`);
      const camera = CameraSchema.parse({ imagingAxis: axis, magnification: 40, cameraPixelSites: 13, psf: { sigmaSites: 0.7 } });
      const pictures = cameraPictures(cloud, camera);
      const inSitu = decodeNpy(arrayOf(pictures, 'images/in_situ.npy'));
      const parity = decodeNpy(arrayOf(pictures, 'images/parity_expected.npy'));
      expect(Math.abs(sum(inSitu.data) - sum(cloud.density)) / sum(cloud.density)).toBeLessThan(1e-9);
      expect(Math.abs(sum(parity.data) - sum(cloud.parityOdd)) / sum(cloud.parityOdd)).toBeLessThan(1e-9);
      // Object-plane pixel = camera pixel / magnification (13 / 40 sites here).
      // In lattice spacings here (no lattice spacing known): the neutral key, with its unit.
      expect(sidecarOf(pictures, 'images/in_situ.json').pixelSize).toBeCloseTo(13 / 40, 12);
      expect(sidecarOf(pictures, 'images/in_situ.json').lengthUnit).toBe('sites');
    }
  });

  it('a cropped frame reports the atoms it cuts off, so that picture + outside = sites', () => {
    const cloud = syntheticCloud([30, 30], 'conserve/crop');
    const camera = CameraSchema.parse({ cameraPixelSites: 1, psf: { sigmaSites: 0 }, framePixels: [20, 24] });
    const pictures = cameraPictures(cloud, camera);
    const entry = (pictures.summary.pictures as Array<Record<string, number | string>>).find((p) => p.name === 'in_situ');
    const inSitu = decodeNpy(arrayOf(pictures, 'images/in_situ.npy'));
    expect(inSitu.shape).toEqual([24, 20]); // rows (y), columns (x): framePixels [x, y] = [20, 24]
    const outside = Number(entry?.atomsOutsideFrame);
    expect(outside).toBeGreaterThan(0);
    expect(Math.abs(sum(inSitu.data) + outside - sum(cloud.density)) / sum(cloud.density)).toBeLessThan(1e-9);
  });

  it('a single parity shot shows exactly its bright sites, and shot noise keeps the mean', () => {
    const cloud = syntheticCloud([24, 20], 'conserve/shot');
    const camera = CameraSchema.parse({ cameraPixelSites: 1, psf: { sigmaSites: 0.5 }, noise: { kind: 'photon', countsPerAtom: 50, seed: 'shot-test' } });
    const pictures = cameraPictures(cloud, camera);
    const shot = decodeNpy(arrayOf(pictures, 'images/parity_shot.npy'));
    const bright = Number(sidecarOf(pictures, 'images/parity_shot.json').brightSites);
    expect(Math.abs(sum(shot.data) - bright)).toBeLessThan(1e-9 * bright);
    // Poisson counts: the total has standard deviation sqrt(N c) / c atoms for c counts
    // per atom (Poisson sum rule); 5 standard deviations cannot fail by chance in practice.
    const noisy = decodeNpy(arrayOf(pictures, 'images/in_situ_shot.npy'));
    const total = sum(cloud.density);
    expect(Math.abs(sum(noisy.data) - total)).toBeLessThan(5 * Math.sqrt(total * 50) / 50);
  });
});

describe('16-bit PNG and its sidecar', () => {
  // The PNG is decoded here with pngjs directly (not the project's decoder); the sidecar
  // promises atoms = grey x atomsPerGreyLevel and the same layout as the .npy, a[row, col]
  // with row 0 at the top (PNG rows are stored from the top, PNG specification section
  // 4.1). Rounding to the nearest grey level errs by at most half a level.
  it('reproduces the float image within half a grey level, and noisy counts exactly', () => {
    const cloud = syntheticCloud([16, 22], 'gray16');
    const camera = CameraSchema.parse({ cameraPixelSites: 0.5, psf: { sigmaSites: 0.6 }, noise: { kind: 'photon', countsPerAtom: 20, seed: 'g' } });
    const pictures = cameraPictures(cloud, camera);
    for (const name of ['in_situ', 'in_situ_shot', 'parity_expected']) {
      const float = decodeNpy(arrayOf(pictures, `images/${name}.npy`));
      const sidecar = sidecarOf(pictures, `images/${name}.json`);
      const png = PNG.sync.read(Buffer.from(arrayOf(pictures, `images/${name}.gray16.png`)), { skipRescale: true });
      const [ny, nx] = float.shape;
      expect([png.width, png.height]).toEqual([nx, ny]);
      expect([sidecar.widthPx, sidecar.heightPx]).toEqual([nx, ny]);
      expect(sidecar.arrayOrder).toBe('row = y (top first), column = x');
      const scale = Number(sidecar.atomsPerGreyLevel);
      const samples = png.data as unknown as Uint16Array; // RGBA, grey in R (pngjs with skipRescale)
      let worst = 0;
      for (let r = 0; r < ny; r++) {
        for (let c = 0; c < nx; c++) {
          const grey = samples[4 * (r * nx + c)];
          worst = Math.max(worst, Math.abs(grey * scale - float.data[r * nx + c]));
        }
      }
      if (name === 'in_situ_shot') {
        // Whole counts at 20 per atom fit in 16 bits: stored exactly (grey = counts).
        expect(scale).toBe(1 / 20);
        expect(worst).toBeLessThan(1e-12);
      } else {
        expect(worst).toBeLessThanOrEqual(0.5 * scale * (1 + 1e-9));
      }
    }
  });
});

describe('parity-projected wedding cake', () => {
  // At J -> 0 and T = 0 each site holds n = ceil((mu - eps)/U) atoms (Fock states filling
  // the trap up to mu, Fisher et al., PRB 40, 546 (1989)), and pair loss leaves n mod 2:
  // odd shells bright, even shells dark (Bakr et al., Science 329, 547 (2010); Sherson et
  // al., Nature 467, 68 (2010)). Sites within 0.05 U of a shell edge are skipped: there
  // the tiny hopping may still mix two fillings.
  it('is 1 on odd shells and 0 on even shells, site by site through an ideal camera', async () => {
    const path = join(workDir, 'cake.json');
    const mu = 2.5;
    const k = 0.04;
    writeFileSync(
      path,
      JSON.stringify({
        name: 'cake',
        energyUnit: 'U',
        lattice: { shape: [20, 20] },
        hubbard: { hopping: 1e-7 },
        trap: { coefficient: k },
        particles: { chemicalPotential: mu },
        truncation: { nmax: 5 },
      }),
    );
    const solved = await solveScenario(prepareScenario(path, ['solver.compressibility=false']), { threads: 1 });
    // One pixel per site, no blur: pixel (i + 1, j + 1) is site (i, j) (one-pixel margin).
    const camera = CameraSchema.parse({ cameraPixelSites: 1, psf: { sigmaSites: 0 } });
    const pictures = cameraPictures(cloudForImaging(solved), camera);
    const expected = decodeNpy(arrayOf(pictures, 'images/parity_expected.npy'));
    const shot = decodeNpy(arrayOf(pictures, 'images/parity_shot.npy'));

    const fillings = new Set<number>();
    let checked = 0;
    for (let x = 0; x < 20; x++) {
      for (let y = 0; y < 20; y++) {
        const eps = k * ((x - 9.5) ** 2 + (y - 9.5) ** 2);
        const level = mu - eps;
        if (Math.abs(level - Math.round(level)) < 0.05) continue;
        const n = level > 0 ? Math.ceil(level) : 0;
        fillings.add(n);
        expect(Math.abs(at(expected, x + 1, y + 1) - (n % 2))).toBeLessThan(1e-6);
        expect(at(shot, x + 1, y + 1)).toBeCloseTo(n % 2, 12);
        checked++;
      }
    }
    expect([...fillings].sort()).toEqual([0, 1, 2, 3]);
    expect(checked).toBeGreaterThan(300);
  });
});

describe('time of flight and visibility', () => {
  // Far field: interference peaks at k = 2 pi / a, i.e. at x = h t / (m a) after a
  // flight t (Greiner et al., Nature 415, 39 (2002); DESIGN.md section 4). Constants:
  // h = 6.62607015e-34 J s (SI definition, exact), u = 1.66053906660e-27 kg (CODATA 2018),
  // 87Rb mass 86.90918053 u (recalled from memory; the one-pixel tolerance, 1.6 % of the
  // peak distance, needs only its first three digits), a = 1064 nm / 2.
  const h = 6.62607015e-34;
  const massKg = 86.90918053 * 1.6605390666e-27;
  const latticeSpacingUm = 0.532;
  const shape = [16, 16];
  const sites = 256;

  it('puts the first-order peaks at h t / (m a) within one pixel and gives V near 1 for a uniform superfluid', () => {
    const cloud: CloudForImaging = {
      name: 'superfluid',
      shape,
      latticeSpacingUm,
      massKg,
      density: new Float64Array(sites).fill(1),
      parityOdd: new Float64Array(sites).fill(0.4),
      orderParameter: new Float64Array(sites).fill(1),
      trapCentre: [7.5, 7.5],
      wannierWidthSites: 0.15,
    };
    const tof = TimeOfFlightSchema.parse({ flightTimeMs: 15 });
    const pictures = cameraPictures(cloud, undefined, tof);
    const image = decodeNpy(arrayOf(pictures, 'images/time_of_flight.npy'));
    const sidecar = sidecarOf(pictures, 'images/time_of_flight.json');
    const pixelUm = Number(sidecar.pixelUm);
    const first = sidecar.firstPixelCentreUm as { x: number; y: number };
    const [, nx] = image.shape;
    const peakUm = (h * 15e-3) / (massKg * latticeSpacingUm * 1e-6) * 1e6;
    // Brightest pixel in the right half along the x axis row through k = 0.
    const row0 = Math.round(-first.y / pixelUm);
    let bestX = 0;
    let bestValue = -1;
    for (let i = Math.ceil(nx / 2) + 5; i < nx; i++) {
      const v = at(image, i, row0);
      if (v > bestValue) {
        bestValue = v;
        bestX = first.x + i * pixelUm;
      }
    }
    expect(Math.abs(bestX - peakUm)).toBeLessThanOrEqual(pixelUm);
    // Gerbier et al., PRL 95, 050404 (2005): a large phase-coherent superfluid has V -> 1
    // (all weight in the peaks; the diagonal disks see only the side lobes of a 16-site
    // cloud, below 1 % of the peak weight here).
    const visibility = pictures.summary.visibility as { value: number; definition: string };
    expect(visibility.value).toBeGreaterThan(0.97);
    expect(visibility.definition).toContain('Gerbier');
  });

  it('gives V = 0 for a Mott insulator (phi = 0) and writes no time-of-flight picture without mass', () => {
    const cloud: CloudForImaging = {
      name: 'mott',
      shape,
      latticeSpacingUm: null,
      massKg: null,
      density: new Float64Array(sites).fill(1),
      parityOdd: new Float64Array(sites).fill(1),
      orderParameter: new Float64Array(sites),
      trapCentre: [7.5, 7.5],
      wannierWidthSites: null,
    };
    const pictures = cameraPictures(cloud);
    // phi = 0: only the flat incoherent part, the same in all eight disks (Gerbier 2005).
    expect(Math.abs((pictures.summary.visibility as { value: number }).value)).toBeLessThan(1e-12);
    expect(pictures.arrays.some((a) => a.file.includes('time_of_flight'))).toBe(false);
    expect((pictures.summary.timeOfFlight as { written: boolean }).written).toBe(false);
    // Dimensionless mode says so: lengths in lattice spacings.
    expect(pictures.summary.lengthUnit).toBe('sites');
    expect(String(pictures.summary.lengthUnitNote)).toContain('1 site = 1 length unit');
  });

  it('refuses a PSF from wavelength and NA in dimensionless mode, naming the setting', () => {
    const cloud = syntheticCloud([8, 8], 'psf');
    const camera = CameraSchema.parse({ psf: { wavelengthNm: 780, numericalAperture: 0.7 } });
    expect(() => cameraPictures(cloud, camera)).toThrow(ParameterError);
    expect(() => cameraPictures(cloud, camera)).toThrow(/camera\.psf/);
    // In a scenario the same setting is an input error, found before anything is solved.
    const path = join(workDir, 'psf-optics.json');
    writeFileSync(
      path,
      JSON.stringify({ name: 'psf-optics', energyUnit: 'U', lattice: { shape: [8, 8] }, hubbard: { hopping: 0.02 }, particles: { chemicalPotential: 0.5 }, camera: { psf: { wavelengthNm: 780, numericalAperture: 0.7 } } }),
    );
    expect(() => prepareScenario(path)).toThrow(InputError);
    expect(() => prepareScenario(path)).toThrow(/camera\.psf/);
  });
});
