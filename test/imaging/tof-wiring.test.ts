// The time-of-flight picture as `solve` writes it (src/imaging/cameraPictures.ts wired to
// timeOfFlightPicture.ts): the model named in the title and the sidecar, pixel scales of the
// camera actually used, the far-field check as a warning when the far-field picture is used
// too early, a log-scale view, and the visibility measured on the picture and on n(k).
// Reference for the scales: k per pixel = m p / (hbar t) with p = camera pixel / magnification
// (the far-field reading x = hbar k t / m), with hbar = h / 2 pi, h = 6.62607015e-34 J s
// (exact, SI 2019); the example is a 13 um pixel behind a magnification of 2 at 15 ms.

import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { prepareScenario } from '../../src/pipeline/prepareScenario.js';
import { solveScenario, type SolveArtifacts } from '../../src/pipeline/solveScenario.js';
import { cloudForImaging, solvePictures } from '../../src/pipeline/solvePictures.js';
import { cameraPictures } from '../../src/imaging/cameraPictures.js';
import { cameraPictureFiles } from '../../src/output/cameraOutputs.js';
import { TimeOfFlightSchema } from '../../src/scenario/imagingSchema.js';
import { solveWarnings } from '../../src/pipeline/runWarnings.js';
import { structureFactorOnlyNote } from '../../src/imaging/wannierEnvelope.js';

const dir = mkdtempSync(join(tmpdir(), 'tiercake-tof-wiring-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

const hbar = 6.62607015e-34 / (2 * Math.PI);

let lab: SolveArtifacts;
let dimensionless: SolveArtifacts;
beforeAll(async () => {
  const labPath = join(dir, 'lab.json');
  writeFileSync(
    labPath,
    JSON.stringify({
      name: 'tof-layer',
      lattice: { shape: [16, 16] },
      laboratory: { species: '87Rb', wavelengthNm: 1064, depthEr: 9, transverse: { trapFrequencyHz: 8000 } },
      trap: { frequencyHz: 70 },
      particles: { atoms: 150 },
      truncation: { nmax: 5 },
      solver: { compressibility: false },
    }),
  );
  lab = await solveScenario(prepareScenario(labPath), { threads: 1 });
  const hubbardPath = join(dir, 'hubbard.json');
  writeFileSync(
    hubbardPath,
    JSON.stringify({ name: 'tof-hubbard', energyUnit: 'U', lattice: { shape: [12, 12] }, hubbard: { hopping: 0.04 }, trap: { coefficient: 0.03 }, particles: { chemicalPotential: 0.5 }, solver: { compressibility: false } }),
  );
  dimensionless = await solveScenario(prepareScenario(hubbardPath), { threads: 1 });
});

describe('time of flight in the camera pictures', () => {
  it('far field at 15 ms with a 13 um pixel at magnification 2: scales of that pixel, a tof-near-field warning, the model in the title', () => {
    const tof = TimeOfFlightSchema.parse({ flightTimeMs: 15, cameraPixelUm: 13, magnification: 2, model: 'far-field' });
    const set = cameraPictures(cloudForImaging(lab), undefined, tof);
    const entry = set.pictures.find((p) => p.name === 'time_of_flight')!;
    expect(entry.title).toContain('far-field approximation');
    const meta = entry.extra as Record<string, number | string>;
    const massKg = lab.resolved.laboratory!.massKg;
    const perPixel = (massKg * 6.5e-6) / (hbar * 15e-3) * 1e-6; // 1/um
    expect(meta.wavenumberPerPixelInverseUm as number).toBeCloseTo(perPixel, 10);
    expect(meta.momentumPerPixelHbarKL as number).toBeCloseTo(perPixel / (Math.PI / lab.resolved.latticeSpacingUm!), 10);
    expect(meta).not.toHaveProperty('momentumPixelPerUm');
    expect(entry.picture.pixelUm).toBeCloseTo(6.5, 12);
    expect(set.notices.map((n) => [n.code, n.severity])).toEqual([['tof-near-field', 'warning']]);
    expect(solveWarnings(lab, set.notices).map((w) => w.code)).toContain('tof-near-field');
    const files = cameraPictureFiles(set);
    expect(files.images.map((i) => i.file)).toContain('images/time_of_flight_log.png');
    const sidecar = JSON.parse(files.texts.find((t) => t.file === 'images/time_of_flight.json')!.text);
    expect(sidecar).toMatchObject({ timeOfFlightModel: 'far-field', flightTimeMs: 15, lengthUnit: 'um' });
    expect(sidecar.pixelSize).toBeCloseTo(6.5, 12);
  });

  it('free expansion (the default): the notice is information, not a warning; V on the picture and on n(k)', () => {
    const set = solvePictures(lab);
    const entry = set.pictures.find((p) => p.name === 'time_of_flight')!;
    expect(entry.title).toContain('free expansion');
    expect(set.notices.every((n) => n.severity === 'info')).toBe(true);
    expect(solveWarnings(lab, set.notices)).toEqual(lab.readingWarnings);
    const v = set.summary.visibility as Record<string, unknown>;
    expect(v.measuredOn).toMatch(/time-of-flight picture \(free expansion\)/);
    expect(typeof v.value).toBe('number');
    expect(typeof v.momentumDistributionValue).toBe('number');
    expect(String(v.envelope)).toMatch(/Wannier function/);
  });

  it('dimensionless mode: no picture, the visibility of the structure factor alone, said so', () => {
    const set = solvePictures(dimensionless);
    expect(set.pictures.some((p) => p.name === 'time_of_flight')).toBe(false);
    expect((set.summary.visibility as { envelope: string }).envelope).toBe(structureFactorOnlyNote);
    expect(set.notices).toEqual([]);
  });
});
