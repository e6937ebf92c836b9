// Files of `tiercake compare` (src/output/compareOutputs.ts, compareTables.ts): every file
// listed in comparison.json (and in the folder's marker) is written, the residual picture is
// data minus model pixel for pixel in the camera convention a[row, col] (row 0 at the top),
// the CSV tables have their column names on the first line and a CSVW metadata sidecar,
// and comparison.json reports the fit's numbers unchanged. Writers compute nothing: each
// value is compared with the fit result it comes from.

import { readFileSync, rmSync } from 'node:fs';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { comparePictures, comparisonSummary, writeCompareFiles, type CompareProvenance, type ComparePhysics } from '../../src/output/compareOutputs.js';
import { fitTable, profileTable } from '../../src/output/compareTables.js';
import { writeOutputFolder } from '../../src/output/outputFolder.js';
import { checkOutputTarget } from '../../src/output/outputTarget.js';
import { readMarker } from '../../src/output/outputMarker.js';
import { decodeNpy } from '../../src/formats/npy.js';
import type { CompareFit } from '../../src/pipeline/compareFit.js';
import { smallCompareFit } from '../helpers/smallCompareFit.js';

let fit: CompareFit;
let dir = '';
let provenance: CompareProvenance;
const physics: ComparePhysics = { eos: { available: false, reason: 'not asked' }, thermometry: { available: false, reason: 'one shot' } };
beforeAll(async () => {
  const made = await smallCompareFit();
  fit = made.fit;
  dir = made.dir;
  provenance = { scenarioPath: made.scenarioPath, overrides: ['particles.atoms=80'], imagePath: join(dir, 'small.npy'), scaleFrom: 'command-line options' };
});
afterAll(() => rmSync(dir, { recursive: true, force: true }));

describe('compare files', () => {
  it('writes every listed file, and the marker lists the same files', async () => {
    const out = join(dir, 'cmp');
    let files: string[] = [];
    await writeOutputFolder(checkOutputTarget(out, { option: '--out' }), { command: 'compare', scenarioHash: null }, (folder) => {
      files = writeCompareFiles(fit, provenance, physics, folder, (images) => `<html>${images.length} images</html>`);
    });
    const summary = JSON.parse(readFileSync(join(out, 'comparison.json'), 'utf8'));
    expect(summary.files).toEqual(files);
    const marker = readMarker(out);
    expect(marker !== null && !('error' in marker) && [...marker.files].sort()).toEqual([...files].sort());
    expect(readFileSync(join(out, 'report.html'), 'utf8')).toBe('<html>3 images</html>');
    // The residual .npy is data - model in the camera convention: shape (rows, columns) =
    // (ny, nx), row r holds grid y = ny - 1 - r.
    const { nx, ny } = fit.measured;
    const residual = decodeNpy(readFileSync(join(out, 'images', 'residual.npy')));
    expect(residual.shape).toEqual([ny, nx]);
    for (let i = 0; i < nx; i++) for (let j = 0; j < ny; j++) expect(residual.data[(ny - 1 - j) * nx + i]).toBe(fit.data[i * ny + j] - fit.model[i * ny + j]);
    const model = decodeNpy(readFileSync(join(out, 'images', 'model.npy')));
    expect(model.shape).toEqual([ny, nx]);
    for (let i = 0; i < nx; i++) for (let j = 0; j < ny; j++) expect(model.data[(ny - 1 - j) * nx + i]).toBe(fit.model[i * ny + j]);
    const sidecar = JSON.parse(readFileSync(join(out, 'images', 'model.json'), 'utf8'));
    expect(sidecar.arrayOrder).toBe('row = y (top first), column = x');
    expect(sidecar.shape).toEqual([ny, nx]);
    // Every CSV: names on the first line, and its CSVW sidecar lists the same columns.
    for (const table of ['fit.csv', 'profiles.csv']) {
      const header = readFileSync(join(out, table), 'utf8').split('\n')[0].split(',');
      const meta = JSON.parse(readFileSync(join(out, `${table}-metadata.json`), 'utf8'));
      expect(meta['@context']).toBe('http://www.w3.org/ns/csvw');
      expect(meta.tableSchema.columns.map((c: { name: string }) => c.name)).toEqual(header);
    }
  });

  it('comparison.json carries the fit unchanged', () => {
    const s = comparisonSummary(fit, provenance, ['x']) as Record<string, any>;
    expect(s.fit.parameters.map((p: { name: string }) => p.name)).toEqual(['atoms', 'centreXPixels', 'centreYPixels']);
    expect(s.fit.parameters[0].best).toBe(fit.parameters[0].best);
    expect(s.fit.reducedChiSquare).toBe(fit.fit.reducedChiSquare);
    expect(s.fit.covariance).toEqual(Array.from(fit.fit.covariance));
    expect(s.model.atoms).toBe(fit.best.atoms);
    expect(s.centre.fittedTrapCentrePixels).toEqual([fit.parameters[1].best, fit.parameters[2].best]);
    expect(s.scenario).toEqual({ file: provenance.scenarioPath, name: 'small', overrides: ['particles.atoms=80'] });
    expect(s.image.atomsAfterBackground).toBeCloseTo(fit.measured.totalAtoms - fit.background * fit.measured.usedPixels, 12);
    expect(s.fit.degreesOfFreedom).toBe(fit.fit.degreesOfFreedom);
    expect(s.warnings).toEqual(fit.warnings);
  });

  it('profiles.csv holds the radial profiles of the fit, one row per bin; fit.csv one row per parameter', () => {
    const rows = profileTable(fit).csv.split('\n').filter((l) => l.length > 0);
    expect(rows[0]).toBe('radius_sites,bin_inner,pixels,measured_mean,measured_standard_error,measured_scatter_error,model_mean,model_band');
    expect(rows.length - 1).toBe(fit.profile.radius.length);
    const first = rows[1].split(',').map(Number);
    expect(first[3]).toBe(fit.profile.measuredMean[0]);
    expect(first[6]).toBe(fit.profile.modelMean[0]);
    const table = fitTable(fit).csv.split('\n').filter((l) => l.length > 0);
    expect(table[0].split(',').slice(0, 5)).toEqual(['name', 'unit', 'start', 'best', 'uncertainty']);
    expect(table[1].split(',')[3]).toBe(String(fit.parameters[0].best));
    expect(table.length - 1).toBe(fit.parameters.length);
  });

  it('the pictures are the data and the model on the measured grid', () => {
    const pictures = comparePictures(fit, provenance);
    expect(pictures.images.map((i) => i.file)).toEqual(['images/side_by_side.png', 'images/residual.png', 'images/profiles.png']);
    const measured = decodeNpy(pictures.pictures[0].arrays.find((a) => a.file === 'images/measured.npy')!.bytes);
    const { nx, ny } = fit.measured;
    for (let i = 0; i < nx; i++) for (let j = 0; j < ny; j++) expect(measured.data[(ny - 1 - j) * nx + i]).toBe(fit.data[i * ny + j]);
  });
});
