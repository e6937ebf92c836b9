// Files of a solve (src/output/solveOutputs.ts): the central plane of a 3D field, one .npy
// per field with the lattice shape, the profile CSV header, the JSON replacer (NaN and
// infinities become null, which JSON can hold; typed arrays become lists) and
// summary.json listing every file it sits beside.

import { mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { centralPlane, fieldFiles, jsonReplacer, profilesCsv, writeSolveFiles } from '../../src/output/solveOutputs.js';
import { cameraPictureFiles } from '../../src/output/cameraOutputs.js';
import { writeOutputFolder } from '../../src/output/outputFolder.js';
import { checkOutputTarget } from '../../src/output/outputTarget.js';
import { readMarker } from '../../src/output/outputMarker.js';
import { decodeNpy } from '../../src/formats/npy.js';
import { prepareScenario } from '../../src/pipeline/prepareScenario.js';
import { solveScenario } from '../../src/pipeline/solveScenario.js';
import { solvePictures } from '../../src/pipeline/solvePictures.js';

const dir = mkdtempSync(join(tmpdir(), 'tiercake-solve-outputs-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

describe('solve outputs', () => {
  it('central plane: the z slice through the trap centre of a 3D field, C order', () => {
    // shape (2, 2, 3), value = flat index; centre z = 1.4 rounds to 1: indices (x*2 + y)*3 + 1.
    const field = Float64Array.from({ length: 12 }, (_, i) => i);
    const plane = centralPlane(field, [2, 2, 3], [0.5, 0.5, 1.4]);
    expect(Array.from(plane.values)).toEqual([1, 4, 7, 10]);
    expect([plane.nx, plane.ny]).toEqual([2, 2]);
  });

  it('JSON replacer: non-finite numbers as null, typed arrays as lists', () => {
    expect(JSON.stringify({ a: NaN, b: Infinity, c: Float64Array.of(1, 2), d: 3 }, jsonReplacer)).toBe('{"a":null,"b":null,"c":[1,2],"d":3}');
  });

  it('writes every field with the lattice shape, the profiles and a summary listing all files', async () => {
    const path = join(dir, 'small.json');
    writeFileSync(path, JSON.stringify({ name: 'small', energyUnit: 'U', lattice: { shape: [6, 5] }, hubbard: { hopping: 0.02 }, trap: { coefficient: 0.02 }, particles: { chemicalPotential: 0.6 } }));
    const a = await solveScenario(prepareScenario(path), { threads: 1 });
    const fields = fieldFiles(a);
    // 10 physics and label fields + the two local-density-approximation label fields.
    expect(fields.length).toBe(12);
    for (const f of fields) expect(decodeNpy(f.bytes).shape).toEqual([6, 5]);
    expect(Array.from(decodeNpy(fields.find((f) => f.file === 'fields/density.npy')!.bytes).data)).toEqual(Array.from(a.fields.density));
    // The header row is the first line (no comments): numpy and pandas read it without options.
    expect(profilesCsv(a).csv.split('\n')[0]).toMatch(/^radius_sites,radius_um,bin_inner_sites,sites,density_mean,/);
    const out = join(dir, 'out');
    let files: string[] = [];
    await writeOutputFolder(checkOutputTarget(out, { option: '--out' }), { command: 'solve', scenarioHash: null }, (folder) => {
      files = writeSolveFiles(a, cameraPictureFiles(solvePictures(a)), folder, () => '<html></html>');
    });
    const summary = JSON.parse(readFileSync(join(out, 'summary.json'), 'utf8'));
    expect(summary.files).toEqual(files);
    const marker = readMarker(out);
    expect(marker !== null && !('error' in marker) && [...marker.files].sort()).toEqual([...files].sort());
    expect(summary.results.atoms).toBe(a.outcome.solve.totals.atoms);
  });
});
