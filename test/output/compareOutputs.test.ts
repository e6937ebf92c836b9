// Files of `tiercake compare` (src/output/compareOutputs.ts): every file listed in
// comparison.json (and in the folder's marker) is written, the residual picture is data
// minus model pixel for pixel, profiles.csv holds the fitted profiles, and comparison.json
// reports the fit's numbers unchanged. Writers compute nothing: each value is compared with
// the fit result it comes from.

import { readFileSync, rmSync } from 'node:fs';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { comparePictures, comparisonSummary, compareProfilesCsv, writeCompareFiles, type CompareProvenance } from '../../src/output/compareOutputs.js';
import { writeOutputFolder } from '../../src/output/outputFolder.js';
import { checkOutputTarget } from '../../src/output/outputTarget.js';
import { readMarker } from '../../src/output/outputMarker.js';
import { decodeNpy } from '../../src/formats/npy.js';
import type { CompareFit } from '../../src/pipeline/compareFit.js';
import { smallCompareFit } from '../helpers/smallCompareFit.js';

let fit: CompareFit;
let dir = '';
let provenance: CompareProvenance;
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
      files = writeCompareFiles(fit, provenance, folder, (images) => `<html>${images.length} images</html>`);
    });
    const summary = JSON.parse(readFileSync(join(out, 'comparison.json'), 'utf8'));
    expect(summary.files).toEqual(files);
    const marker = readMarker(out);
    expect(marker !== null && !('error' in marker) && [...marker.files].sort()).toEqual([...files].sort());
    expect(readFileSync(join(out, 'report.html'), 'utf8')).toBe('<html>3 images</html>');
    // The residual .npy is data - model, shape (nx, ny).
    const residual = decodeNpy(readFileSync(join(out, 'images', 'residual.npy')));
    expect(residual.shape).toEqual([fit.measured.nx, fit.measured.ny]);
    for (let i = 0; i < residual.data.length; i++) expect(residual.data[i]).toBe(fit.data[i] - fit.model[i]);
    const model = decodeNpy(readFileSync(join(out, 'images', 'model.npy')));
    expect(Array.from(model.data)).toEqual(Array.from(fit.model));
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
    expect(s.image.atomsAfterBackground).toBeCloseTo(fit.measured.totalAtoms - fit.background * fit.data.length, 12);
  });

  it('profiles.csv holds the radial profiles of the fit, one row per bin', () => {
    const text = compareProfilesCsv(fit, provenance);
    const rows = text.split('\n').filter((l) => l.length > 0 && !l.startsWith('#'));
    expect(rows[0]).toBe('radius_sites,bin_inner,pixels,measured_mean,measured_standard_error,model_mean');
    expect(rows.length - 1).toBe(fit.profile.meanRadius.length);
    const first = rows[1].split(',').map(Number);
    expect(first[3]).toBe(fit.profile.fields.measured.mean[0]);
    expect(first[5]).toBe(fit.profile.fields.model.mean[0]);
  });

  it('the pictures are the data and the model on the measured grid', () => {
    const pictures = comparePictures(fit, provenance);
    expect(pictures.images.map((i) => i.file)).toEqual(['images/side_by_side.png', 'images/residual.png', 'images/profiles.png']);
    const measured = decodeNpy(pictures.measured.arrays.find((a) => a.file === 'images/measured.npy')!.bytes);
    expect(Array.from(measured.data)).toEqual(Array.from(fit.data));
  });
});
