// The files of a finished scan from plain rows (src/output/scanOutputs.ts), made-up rows
// with every reading known: scan.csv has the documented header (each column described in
// summary.json, in the same order), one line per point in grid order, the shell columns of
// every filling that occurs (nan and 0 where a point has no such shell), NaN as 'nan'
// (src/formats/csv.ts); summary.json's totals are counted here by hand; writeScanFiles
// stages the CSV, the summary, the figures and the report.
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { scanColumns, scanCsv, scanFillings, scanSummary, writeScanFiles, type ScanOutcome } from '../../src/output/scanOutputs.js';
import { OutputFolder } from '../../src/output/outputFolder.js';
import { checkOutputTarget } from '../../src/output/outputTarget.js';
import { planScan } from '../../src/pipeline/scan/scanPlan.js';
import { madeUpOutcome, madeUpRow } from '../helpers/scanRows.js';

const dir = mkdtempSync(join(tmpdir(), 'tiercake-scanoutputs-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));
const plan = planScan([{ path: 'hubbard.hopping', values: [0.01, 0.02, 0.03], spacing: 'list' }], 2);
// point 2 holds a second shell (filling 2) and did not converge
const rows = [
  madeUpRow(plan, 0),
  madeUpRow(plan, 1),
  madeUpRow(plan, 2, { converged: false, shells: [{ filling: 1, innerRadius: 2, outerRadius: 4, sites: 30, radiusFrom: 'annulus' }, { filling: 2, innerRadius: 0, outerRadius: 2, sites: 12, radiusFrom: 'sites' }] }),
];
const outcome: ScanOutcome = madeUpOutcome(plan, rows);

describe('scan.csv', () => {
  const lines = scanCsv(outcome).trimEnd().split('\n');
  const header = lines[0].split(',');
  const at = (line: number, name: string): string => lines[line].split(',')[header.indexOf(name)];

  it('the header is the described columns; one line per point', () => {
    expect(header).toEqual(scanColumns(outcome).map((c) => c.name));
    expect(header.slice(0, 2)).toEqual(['hubbard.hopping', 'atoms']);
    expect(lines).toHaveLength(1 + 3);
  });

  it('writes each reading of its point, shells of every filling, NaN as nan', () => {
    expect(scanFillings(rows)).toEqual([1, 2]);
    expect([1, 2, 3].map((l) => at(l, 'hubbard.hopping'))).toEqual(['0.01', '0.02', '0.03']);
    expect([1, 2, 3].map((l) => at(l, 'atoms'))).toEqual(['1000', '1010', '1020']);
    expect([1, 2, 3].map((l) => at(l, 'converged'))).toEqual(['1', '1', '0']);
    expect([1, 2, 3].map((l) => at(l, 'warm_start'))).toEqual(['0', '1', '0']);
    expect(at(3, 'shell_2_sites')).toBe('12');
    expect(at(1, 'shell_2_sites')).toBe('0');
    expect(at(1, 'shell_2_outer_radius')).toBe('nan');
    expect(at(1, 'superfluid_fraction')).toBe('nan');
    expect(at(2, 'shell_1_outer_radius')).toBe('3.1');
  });
});

describe('scan.csv columns', () => {
  it('each column holds its own reading: every reading distinct, matched by hand to its column name', () => {
    // one row whose readings are all different primes, so a column reading another field shows
    const distinct = madeUpRow(plan, 1, {
      atoms: 1009, chemicalPotential: 0.13, condensedAtoms: 401, condensateFraction: 0.37, superfluidFraction: 0.41,
      superfluidFractionError: 0.043, entropy: 47, entropyPerAtom: 0.053, temperature: 0.059, characteristicDensity: 61,
      characteristicLength: 6.7, centralDensity: 0.71, centralPhase: 3, nmax: 5, sweeps: 73, muEvaluations: 7,
      realisations: 11, superfluidFractionSpread: 0.079, compressibilityPerSite: 0.083,
    });
    const text = scanCsv(madeUpOutcome(plan, [distinct])).trimEnd().split('\n');
    const names = text[0].split(',');
    const cells = text[1].split(',');
    const expected: Record<string, number> = {
      atoms: 1009, chemical_potential: 0.13, condensed_atoms: 401, condensate_fraction: 0.37, superfluid_fraction: 0.41,
      superfluid_fraction_error: 0.043, entropy: 47, entropy_per_atom: 0.053, temperature: 0.059, characteristic_density: 61,
      characteristic_length: 6.7, central_density: 0.71, central_phase: 3, nmax: 5, sweeps: 73, mu_evaluations: 7,
      realisations: 11, superfluid_fraction_spread: 0.079, compressibility_per_site: 0.083,
    };
    for (const [name, value] of Object.entries(expected)) expect(Number(cells[names.indexOf(name)]), name).toBe(value);
  });
});

describe('summary.json', () => {
  it('counts the points that did not converge and the mean sweeps of warm and cold starts', () => {
    const s = scanSummary(outcome);
    expect(s.converged).toBe(false);
    expect(s.notConvergedPoints).toEqual([2]);
    // sweeps 100 + point; point 1 warm, points 0 and 2 cold
    expect(s.sweeps).toEqual({ total: 303, meanWarmStarted: 101, meanColdStarted: 101 });
    expect(s).toMatchObject({ points: 3, chains: 2, chainLength: 2, scanHash: '2'.repeat(64), provenance: outcome.provenance });
    expect((s.columns as Array<{ name: string }>).map((c) => c.name)).toEqual(scanColumns(outcome).map((c) => c.name));
  });

  it('writeScanFiles stages the table, the summary, the figures and the report', () => {
    const folder = new OutputFolder(checkOutputTarget(join(dir, 'scan'), { option: '--out' }), { command: 'scan', scenarioHash: outcome.scenarioHash });
    let imageCount = -1;
    writeScanFiles(outcome, folder, (images) => {
      imageCount = images.length;
      return '<html></html>';
    });
    const files = folder.written();
    expect(files.slice(0, 2)).toEqual(['scan.csv', 'summary.json']);
    expect(files[files.length - 1]).toBe('report.html');
    expect(files.filter((f) => f.startsWith('images/') && f.endsWith('.png'))).toHaveLength(imageCount);
    expect(imageCount).toBeGreaterThanOrEqual(2);
    folder.discard();
  });
});
