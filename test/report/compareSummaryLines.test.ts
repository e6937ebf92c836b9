// Direct test of src/report/compareSummaryLines.ts: the stdout lines of `compare`, written out
// by hand for a fit result built in the test: the parameters with their uncertainties
// (toPrecision 6 and 2; the atom number without a unit), the bootstrap beside them for a
// stack, the chi-square line with its pixels, the plain Beer-Lambert caution only for
// absorption without saturation counts, and the fluctuation thermometry only when available.

import { describe, expect, it } from 'vitest';
import { compareSummaryLines, type CompareSummaryInput } from '../../src/report/compareSummaryLines.js';
import type { FitParameterRow } from '../../src/pipeline/compareFitParameters.js';
import type { ThermometryReading } from '../../src/pipeline/compareThermometry.js';

const row = (name: FitParameterRow['name'], unit: string, best: number, uncertainty: number, bootstrap: number | null): FitParameterRow => ({
  name,
  unit,
  start: best,
  best,
  uncertainty,
  uncertaintyFromSigma: uncertainty,
  uncertaintyScaledByReducedChiSquare: uncertainty,
  bootstrapUncertainty: bootstrap,
  lower: null,
  upper: null,
  atBound: false,
});

const base: CompareSummaryInput = {
  scenarioName: 'rb-layer',
  imagePath: 'data/run7/atoms.tif',
  result: {
    parameters: [row('atoms', 'atoms', 1234.5678, 12.3456, null), row('kT', 'U', 0.31234567, 0.0123, null)],
    fit: { converged: true, solves: 17, reducedChiSquare: 1.023456, degreesOfFreedom: 402, chiSquarePixels: 'signal' } as CompareSummaryInput['result']['fit'],
  },
  measurement: { kind: 'counts', countsPerAtom: 2, unitSource: '--counts-per-atom' },
  thermometry: { available: false, reason: 'a single shot' },
  outPath: '/tmp/cmp',
};

describe('compareSummaryLines', () => {
  it('lists a converged fit of one picture', () => {
    expect(compareSummaryLines(base)).toEqual([
      'rb-layer: compared with atoms.tif (fit converged, 17 solves)',
      '  atoms = 1234.57 ± 12',
      '  kT = 0.312346 ± 0.012 U',
      '  reduced chi-square 1.023 (402 degrees of freedom, pixels above the noise)',
      '  results in /tmp/cmp',
    ]);
  });
  it('adds the bootstrap, the Beer-Lambert caution and the thermometry of a stack', () => {
    const thermometry = { available: true, kT: 0.29876, kTUncertainty: 0.04321, energyUnit: 'U', usableBins: 7, shotCount: 40 } as ThermometryReading;
    const lines = compareSummaryLines({
      ...base,
      result: { parameters: [row('atoms', 'atoms', 980, 9.5, 11.25)], fit: { ...base.result.fit, converged: false, chiSquarePixels: 'all' } },
      measurement: { kind: 'absorption', crossSection: 0.29, crossSectionSource: 'test' },
      thermometry,
    });
    expect(lines).toEqual([
      'rb-layer: compared with atoms.tif (fit NOT converged, 17 solves)',
      '  atoms = 980.000 ± 9.5 (bootstrap ± 11)',
      '  reduced chi-square 1.023 (402 degrees of freedom, all used pixels)',
      '  plain Beer-Lambert (no --saturation-counts): atom numbers are low unless the probe is far below saturation',
      '  fluctuation thermometry: kT = 0.2988 ± 0.043 U (7 bins, 40 shots)',
      '  results in /tmp/cmp',
    ]);
    const saturated = compareSummaryLines({ ...base, measurement: { kind: 'absorption', crossSection: 0.29, crossSectionSource: 'test', saturationCounts: 3000 } });
    expect(saturated.some((l) => l.includes('Beer-Lambert'))).toBe(false);
  });
  it('says there is no temperature when no bin was usable, instead of printing NaN', () => {
    const thermometry = { available: true, kT: NaN, kTUncertainty: NaN, energyUnit: 'U', usableBins: 0, shotCount: 12 } as ThermometryReading;
    const lines = compareSummaryLines({ ...base, thermometry });
    expect(lines).toContain('  fluctuation thermometry: no temperature, no radial bin was usable (12 shots; warning no-usable-bins)');
    expect(lines.join('\n')).not.toMatch(/NaN/);
  });
  it('names raw absorption frames by the frames with atoms first, not by the last path', () => {
    const lines = compareSummaryLines({ ...base, imagePath: 'run7/atoms.npy,run7/probe.npy,run7/dark.npy' });
    expect(lines[0]).toBe('rb-layer: compared with atoms.npy, probe.npy, dark.npy (fit converged, 17 solves)');
  });
});
