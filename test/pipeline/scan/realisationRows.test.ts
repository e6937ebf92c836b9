// One scan row from the rows of R disorder realisations (src/pipeline/scan/realisationRows.ts),
// checked against the textbook two-pass mean and sample standard deviation
// sqrt(sum (x - mean)^2 / (R - 1)) computed here, direct counts of the labels, and the
// stated shell rule (radii over the realisations with the shell, sites over all).
import { describe, expect, it } from 'vitest';
import { combineRealisationRows } from '../../../src/pipeline/scan/realisationRows.js';
import type { ScanRow } from '../../../src/pipeline/scan/scanRow.js';
import type { StiffnessPhase } from '../../../src/pipeline/scan/stiffnessPhase.js';

function row(k: number, fs: number, phase: StiffnessPhase | null, shells: ScanRow['shells']): ScanRow {
  return {
    point: 5,
    values: [0.8, 0.02],
    converged: k !== 2,
    sweeps: 10 + k,
    muEvaluations: 1,
    warmStart: false,
    nmax: 3 + k,
    atoms: 60 + k,
    chemicalPotential: 0.5,
    condensedAtoms: 6 + k,
    condensateFraction: (6 + k) / (60 + k),
    superfluidFraction: fs,
    superfluidFractionError: 1e-6 * (k + 1),
    entropy: 0,
    entropyPerAtom: 0,
    temperature: 0,
    characteristicDensity: NaN,
    characteristicLength: NaN,
    centralDensity: 1,
    centralPhase: k === 0 ? 3 : 1,
    phaseSites: [0, 10 + k, 50, 4 - k, 0],
    shells,
    compressibilityPerSite: 0.1 * k,
    stiffnessPhase: phase,
    realisations: 1,
    superfluidFractionSpread: NaN,
    phaseShares: null,
  };
}

describe('combineRealisationRows', () => {
  const shell = (sites: number, inner: number): ScanRow['shells'][number] => ({ filling: 1, innerRadius: inner, outerRadius: 6, sites, radiusFrom: 'annulus' });
  const rows = [row(0, 0.01, 'boseGlass', [shell(40, 0)]), row(1, 0.03, 'superfluid', [shell(30, 2)]), row(2, 0.005, 'boseGlass', [])];
  const c = combineRealisationRows(rows);

  it('means, sample spread, largest numerical error, sums', () => {
    const fs = [0.01, 0.03, 0.005];
    const mean = fs.reduce((a, b) => a + b, 0) / 3;
    const spread = Math.sqrt(fs.reduce((a, b) => a + (b - mean) ** 2, 0) / 2);
    expect(c.superfluidFraction).toBeCloseTo(mean, 15);
    expect(c.superfluidFractionSpread).toBeCloseTo(spread, 15);
    expect(c.superfluidFractionError).toBe(3e-6);
    expect(c.atoms).toBeCloseTo(61, 12);
    expect(c.compressibilityPerSite).toBeCloseTo(0.1, 15);
    expect(c.sweeps).toBe(10 + 11 + 12);
    expect(c.nmax).toBe(5);
    expect(c.converged).toBe(false);
    expect(c.realisations).toBe(3);
    expect(c.phaseSites[1]).toBeCloseTo(11, 12);
  });

  it('majority label with the share of each, majority central phase', () => {
    expect(c.stiffnessPhase).toBe('boseGlass');
    // STIFFNESS_PHASES order: mott, boseGlass, superfluid, normalFluid, empty
    expect(c.phaseShares).toEqual([0, 2 / 3, 1 / 3, 0, 0]);
    expect(c.centralPhase).toBe(1);
  });

  it('shell radii over the realisations that have the shell, sites over all', () => {
    expect(c.shells).toHaveLength(1);
    expect(c.shells[0].innerRadius).toBe(1);
    expect(c.shells[0].sites).toBeCloseTo(70 / 3, 12);
  });

  it('no label when a realisation is unlabelled; one row comes back unchanged', () => {
    const u = combineRealisationRows([rows[0], row(1, 0.02, null, [])]);
    expect(u.stiffnessPhase).toBeNull();
    expect(u.phaseShares).toBeNull();
    expect(combineRealisationRows([rows[1]])).toBe(rows[1]);
    expect(() => combineRealisationRows([])).toThrow();
  });
});
