// The README's commands for camera data ("Comparing with camera data", between the
// compare-commands markers) run exactly as written, as child processes of the built tool, in
// a folder that holds what they name: configs/rb-layer-lab.json, the three raw frames of a
// shot as atoms.tif, probe.tif and dark.tif, the same shot as run7.h5 (datasets /shot/atoms,
// /shot/probe, /shot/dark) and a folder shots/ of four such HDF5 files. The frames are made
// from the scenario itself (solved, imaged by the fit's own camera model with the trap centre
// off the frame centre) by the camera core's test helper: the modified Beer-Lambert law of
// Reinaudi et al., Opt. Lett. 32, 3143 (2007), I_sat = 15000 counts, with a dark frame and
// Poisson photon counts. Each command must end with exit code 0 and give N within 2 % and the
// centre within 0.3 pixel of the truth.

import { spawn } from 'node:child_process';
import { copyFileSync, mkdirSync, mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import h5wasm from 'h5wasm';
import { prepareScenario, scenarioOptics } from '../../src/pipeline/prepareScenario.js';
import { solveScenario } from '../../src/pipeline/solveScenario.js';
import { createPictureRenderer } from '../../src/pipeline/compareFitPicture.js';
import { planarToCamera } from '../../src/imaging/cameraConvention.js';
import { rawAbsorptionFrames, type RawFrames } from '../imaging/camera/syntheticFrames.js';
import { buildTiff } from '../imaging/camera/tiffBytes.js';

const cli = fileURLToPath(new URL('../../dist/main.js', import.meta.url));
const scenarioFile = fileURLToPath(new URL('../../configs/rb-layer-lab.json', import.meta.url));
const readme = readFileSync(new URL('../../README.md', import.meta.url), 'utf8');
const sandbox = mkdtempSync(join(tmpdir(), 'tiercake-readme-compare-'));
afterAll(() => rmSync(sandbox, { recursive: true, force: true }));

/** The commands of the block: comment lines dropped, `node dist/main.js` and its arguments. */
function readmeCommands(): string[][] {
  const start = readme.indexOf('<!-- compare-commands:start -->');
  const end = readme.indexOf('<!-- compare-commands:end -->');
  expect(start).toBeGreaterThan(0);
  return readme
    .slice(start, end)
    .split('\n')
    .filter((l) => l.startsWith('node dist/main.js '))
    .map((l) => l.trim().split(/\s+/).slice(2));
}

const width = 64;
const height = 60;
const pixelUm = 0.532;
const centreGrid = { x: 31.4, y: 28.7 };
let trueAtoms = 0;

beforeAll(async () => {
  mkdirSync(join(sandbox, 'configs'));
  copyFileSync(scenarioFile, join(sandbox, 'configs', 'rb-layer-lab.json'));
  const prepared = prepareScenario(scenarioFile);
  const truth = await solveScenario(prepared, { threads: 1 });
  trueAtoms = truth.outcome.solve.totals.atoms;
  const optics = { ...scenarioOptics(prepared.resolved), pixelUm };
  const renderer = createPictureRenderer(prepared.resolved.geometry.shape, optics, width, height, false);
  const atoms = planarToCamera({ values: renderer.render(truth.fields.density, { centreX: centreGrid.x, centreY: centreGrid.y, angleRad: 0, psfSigmaUm: optics.psfSigmaUm, offset: 0 }), nx: width, ny: height }).values;
  const frames = (seed: string): RawFrames =>
    rawAbsorptionFrames({
      atomsPerPixel: { width, height, values: atoms },
      pixelAreaUm2: pixelUm * pixelUm,
      crossSectionUm2: (3 * 0.780241 ** 2) / (2 * Math.PI), // 87Rb D2 (Steck, "Rubidium 87 D Line Data")
      probePeakCounts: 20000,
      probeWaistPixels: 200,
      saturationCounts: 15000,
      alpha: 1,
      darkCounts: 200,
      seed,
    });
  const shot = frames('readme/shot');
  const tiff = (image: { values: Float64Array }) => buildTiff([{ width, height, values: image.values }], 'uint16');
  writeFileSync(join(sandbox, 'atoms.tif'), tiff(shot.withAtoms));
  writeFileSync(join(sandbox, 'probe.tif'), tiff(shot.probeOnly));
  writeFileSync(join(sandbox, 'dark.tif'), tiff(shot.dark));
  const { FS } = await h5wasm.ready;
  const hdf5 = (f: RawFrames): Uint8Array => {
    const path = `/readme-${Math.random().toString(36).slice(2)}.h5`;
    const file = new h5wasm.File(path, 'w');
    const group = file.create_group('shot');
    for (const [name, image] of [['atoms', f.withAtoms], ['probe', f.probeOnly], ['dark', f.dark]] as const) group.create_dataset({ name, data: Uint16Array.from(image.values), shape: [height, width] });
    file.close();
    const bytes = (FS!.readFile(path) as Uint8Array).slice();
    FS!.unlink(path);
    return bytes;
  };
  writeFileSync(join(sandbox, 'run7.h5'), hdf5(shot));
  mkdirSync(join(sandbox, 'shots'));
  for (let k = 1; k <= 4; k++) writeFileSync(join(sandbox, 'shots', `shot${k}.h5`), hdf5(frames(`readme/stack/${k}`)));
}, 120_000);

function run(args: string[]): Promise<{ code: number; stderr: string }> {
  return new Promise((resolve, reject) => {
    const child = spawn(process.execPath, [cli, ...args], { cwd: sandbox, stdio: ['ignore', 'ignore', 'pipe'], env: { ...process.env, NO_COLOR: '1' } });
    let stderr = '';
    child.stderr.on('data', (d: Buffer) => (stderr += d.toString('utf8')));
    child.on('error', reject);
    child.on('close', (code) => resolve({ code: code ?? -1, stderr }));
  });
}

describe('the README commands for camera data', () => {
  it('three commands: TIFF frames, HDF5 datasets, a folder of shots', () => {
    const commands = readmeCommands();
    expect(commands).toHaveLength(3);
    expect(commands.map((c) => c[0])).toEqual(['compare', 'compare', 'compare']);
  });

  it.each([0, 1, 2])('command %i runs and gives N within 2 percent and the centre within 0.3 pixel', async (k) => {
    const args = readmeCommands()[k];
    const r = await run([...args, '--threads', '1']);
    expect(r.code, r.stderr).toBe(0);
    expect(r.stderr).toMatch(/compare: solve 1:/); // progress on stderr
    const out = args[args.indexOf('--out') + 1];
    const result = JSON.parse(readFileSync(join(sandbox, out, 'comparison.json'), 'utf8'));
    const atoms = result.fit.parameters.find((p: { name: string }) => p.name === 'atoms');
    expect(Math.abs(atoms.best - trueAtoms) / trueAtoms).toBeLessThan(0.02);
    const [x, y] = result.centre.fittedTrapCentrePixels;
    expect(Math.abs(x - centreGrid.x)).toBeLessThan(0.3);
    expect(Math.abs(y - (height - 1 - centreGrid.y))).toBeLessThan(0.3);
    expect(result.fit.parameters.map((p: { name: string }) => p.name)).toContain('kT');
    expect(result.equationOfState.file).toBe('equation_of_state.csv');
    if (args.includes('--shots')) expect(result.thermometry.shots).toBe(4);
  }, 180_000);
});
