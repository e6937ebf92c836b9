// The readings of a `solve` run as a user meets them (issues 13 and 22): summary.json,
// stderr and report.html, through the command line in this process (runCli). Each check is
// against the run's own pipeline results or an outside reference named beside it:
// - the local-density-approximation labels are written as fields (lda_phase.npy,
//   lda_mott_filling.npy) equal to the classification's, with the comparison in summary.json;
// - an empty cloud (mu = -5 U: no atoms in mean field, the vacuum is stable for mu < -zJ)
//   gives null fractions and the `empty-cloud` warning, on stderr once and atop the report;
// - a cloud cut by its lattice gives `cloud-at-edge`;
// - every field file is in the fields index with its unit, and the energy fields are in the
//   scenario's energy unit: with energyUnit "nK" site_potential.npy is the Hz run's divided by
//   k_B/h x 1 nK = 20.8366... Hz (CODATA 2018, exact), compressibility multiplied by it;
// - the shells at an entropy per atom of 0.3 (a cold T > 0 cloud) are in summary.json and
//   in the report, with the atomic-limit reference of each shell (Gerbier, PRL 99, 120405 (2007));
// - shell radii use scenario.profiles.binWidthSites;
// - `-t 2` on a lattice below the parallel threshold says why one thread ran.

import { mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it, vi } from 'vitest';
import { runCli } from '../../src/cli/main.js';
import { decodeNpy, encodeNpy } from '../../src/formats/npy.js';
import { prepareScenario } from '../../src/pipeline/prepareScenario.js';
import { PARALLEL_MIN_SITES, solveScenario } from '../../src/pipeline/solveScenario.js';
import { scaledRadii, shellSummary } from '../../src/observables/shellSummary.js';
import { plateauCentre } from '../../src/observables/atomicLimit.js';

const dir = mkdtempSync(join(tmpdir(), 'tiercake-solve-readings-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

interface Run {
  code: number;
  stdout: string;
  stderr: string;
  out: string;
  summary: Record<string, any>;
  report: string;
}

async function solve(name: string, body: Record<string, unknown>, extra: string[] = []): Promise<Run> {
  const path = join(dir, `${name}.json`);
  writeFileSync(path, JSON.stringify({ name, ...body }));
  const out = join(dir, `out-${name}`);
  let stdout = '';
  let stderr = '';
  const o = vi.spyOn(process.stdout, 'write').mockImplementation((chunk) => {
    stdout += String(chunk);
    return true;
  });
  const e = vi.spyOn(process.stderr, 'write').mockImplementation((chunk) => {
    stderr += String(chunk);
    return true;
  });
  let code: number;
  try {
    code = await runCli(['solve', path, '--out', out, '--quiet', ...extra]);
  } finally {
    o.mockRestore();
    e.mockRestore();
  }
  const summary = JSON.parse(readFileSync(join(out, 'summary.json'), 'utf8'));
  return { code, stdout, stderr, out, summary, report: readFileSync(join(out, 'report.html'), 'utf8') };
}

const field = (run: Run, name: string): Float64Array => decodeNpy(readFileSync(join(run.out, 'fields', `${name}.npy`))).data;

const layer = {
  energyUnit: 'U',
  lattice: { shape: [34, 34] },
  hubbard: { hopping: 0.015 },
  trap: { coefficient: 0.008 },
  particles: { chemicalPotential: 1.5 },
  truncation: { nmax: 5 },
};

describe('phases, local-density labels and the fields index', () => {
  it('writes the LDA label fields, the full phases block and a unit for every field file', async () => {
    const run = await solve('layer', layer, ['--threads', '2']);
    expect(run.code).toBe(0);
    const truth = await solveScenario(prepareScenario(join(dir, 'layer.json')), { threads: 1 });
    const lda = truth.classification.localDensity!;
    expect(Array.from(field(run, 'lda_phase'))).toEqual(Array.from(lda.codes));
    expect(Array.from(field(run, 'lda_mott_filling'))).toEqual(Array.from(lda.mottFilling));
    const phases = run.summary.phases;
    expect(phases.localDensity).toMatchObject({ agree: lda.comparison.agree, disagree: lda.comparison.disagree, files: ['fields/lda_phase.npy', 'fields/lda_mott_filling.npy'] });
    expect(phases.shellStatistics.map((s: { filling: number }) => s.filling)).toEqual([1, 2]);
    expect(phases.bulk.sites).toBe(truth.classification.bulk.sites);
    for (const key of ['enclosingClusters', 'rimSuperfluidSites', 'meltedPlateauSites', 'fluctuationMeasure', 'superfluidPuddleSites', 'spanningRule']) expect(phases).toHaveProperty(key);
    // Every fields/*.npy the run wrote is in the index, with a unit and a meaning; the lattice axis order is stated.
    const written = (run.summary.files as string[]).filter((f) => f.startsWith('fields/'));
    const index = run.summary.fields.files as Array<{ file: string; unit: string; meaning: string }>;
    expect(index.map((f) => f.file).sort()).toEqual([...written].sort());
    expect(index.every((f) => f.unit.length > 0 && f.meaning.length > 20)).toBe(true);
    expect(index.find((f) => f.file === 'fields/site_potential.npy')!.unit).toBe('U');
    expect(index.find((f) => f.file === 'fields/compressibility.npy')!.unit).toBe('atoms per site per U');
    expect(run.summary.fields.axes).toEqual(['x', 'y']);
    expect(run.summary.fields.order).toMatch(/axis 0 = lattice x, axis 1 = y; C order/);
    // Every image file is indexed too (figures and camera pictures).
    const images = (run.summary.files as string[]).filter((f) => f.startsWith('images/') && !f.endsWith('.json'));
    expect((run.summary.images as Array<{ file: string }>).map((i) => i.file).sort()).toEqual([...images].sort());
    // 34 x 34 = 1156 sites: one thread, and the reason is given.
    expect(run.stdout).toContain(`1 thread: 1156 sites are below the parallel threshold of ${PARALLEL_MIN_SITES} sites`);
    expect(run.summary.threadsNote).toMatch(/below the parallel threshold/);
    expect(run.summary.warnings).toEqual([]);
    expect(run.stderr).not.toContain('warning');
  });

  it('shell radii come from the scenario\'s radial bin width', async () => {
    const run = await solve('layer-bins', { ...layer, profiles: { binWidthSites: 2.5 } });
    const a = await solveScenario(prepareScenario(join(dir, 'layer-bins.json')), { threads: 1 });
    const radius = scaledRadii(a.resolved.geometry.shape, a.resolved.trapCentre, a.axisScale);
    const wide = shellSummary(a.fields.density, a.fields.condensateDensity, a.classification.codes, a.classification.mottFilling, radius, 2.5);
    const narrow = shellSummary(a.fields.density, a.fields.condensateDensity, a.classification.codes, a.classification.mottFilling, radius, 1);
    expect(run.summary.shells.map((s: { outerRadius: number }) => s.outerRadius)).toEqual(wide.shells.map((s) => s.outerRadius));
    expect(wide.shells.map((s) => s.outerRadius)).not.toEqual(narrow.shells.map((s) => s.outerRadius));
  });
});

describe('warnings: summary.json, stderr once each, and the top of the report', () => {
  it('an empty cloud: fractions and visibility are null, not nonsense', async () => {
    const run = await solve('empty', { ...layer, particles: { chemicalPotential: -5 } });
    expect(run.summary.results.atoms).toBeLessThan(1e-6);
    expect(run.summary.results.condensateFraction).toBeNull();
    expect(run.summary.results.entropyPerAtom).toBeNull();
    expect(run.summary.imaging.visibility.value).toBeNull();
    expect(Object.values(run.summary.phases.atomFractionPerPhase).every((v) => v === null)).toBe(true);
    const codes = (run.summary.warnings as Array<{ code: string }>).map((w) => w.code);
    expect(codes).toEqual(['empty-cloud']);
    expect(run.stderr.split('\n').filter((l) => l.startsWith('tiercake: warning: empty-cloud:'))).toHaveLength(1);
    expect(run.stdout).toContain('condensate fraction undefined (no atoms)');
    expect(run.report).toContain('empty-cloud');
  });

  it('a cloud cut by the lattice edge: cloud-at-edge with the size that would hold it', async () => {
    const run = await solve('clipped', { ...layer, lattice: { shape: [10, 10] }, trap: { coefficient: 0.002 } });
    const warning = (run.summary.warnings as Array<{ code: string; message: string }>).find((w) => w.code === 'cloud-at-edge');
    expect(warning?.message).toMatch(/a lattice of about \[\d+, \d+\] sites/);
    expect(run.stderr).toContain('tiercake: warning: cloud-at-edge:');
    expect(run.report).toContain('cloud-at-edge');
  });
});

describe('one energy unit per output folder', () => {
  const labBody = (energyUnit: string) => ({
    energyUnit,
    lattice: { shape: [14, 14] },
    laboratory: { species: '87Rb', wavelengthNm: 1064, depthEr: 11, transverse: { trapFrequencyHz: 8000 } },
    trap: { frequencyHz: 60 },
    particles: { atoms: 120 },
    temperature: { nanokelvin: 1 },
    truncation: { nmax: 5 },
  });
  it('energyUnit nK: site_potential.npy in nK and compressibility.npy per nK, the summary says nK', async () => {
    const hz = await solve('lab-hz', labBody('Hz'));
    const nk = await solve('lab-nk', labBody('nK'));
    const hzPerNk = 20.83661912; // k_B / h x 1e-9 K (CODATA 2018: k_B and h exact)
    expect(nk.summary.energyUnit).toBe('nK');
    expect(nk.summary.scenario.energyUnit).toBe('nK');
    const epsHz = field(hz, 'site_potential');
    const epsNk = field(nk, 'site_potential');
    const kappaHz = field(hz, 'compressibility');
    const kappaNk = field(nk, 'compressibility');
    let worst = 0;
    for (let i = 0; i < epsHz.length; i++) {
      worst = Math.max(worst, Math.abs(epsNk[i] * hzPerNk - epsHz[i]) / Math.max(1, Math.abs(epsHz[i])));
      worst = Math.max(worst, Math.abs(kappaNk[i] / hzPerNk - kappaHz[i]) / Math.max(1e-12, Math.abs(kappaHz[i]) + 1e-6));
    }
    expect(worst).toBeLessThan(1e-9);
    const index = nk.summary.fields.files as Array<{ file: string; unit: string }>;
    expect(index.find((f) => f.file === 'fields/site_potential.npy')!.unit).toBe('nK');
    // Bare energies in the summary follow the folder's unit: the last mu of the search is mu in nK.
    const history = nk.summary.convergence.chemicalPotentialSearch;
    expect(history.energyUnit).toBe('nK');
    expect(history.atomHistory.at(-1).mu).toBeCloseTo(nk.summary.parameters.chemicalPotential.nK, 9);
    // The profiles carry the same columns in every mode (dimensionless runs fill radius_um and local_mu_hz with nan).
    const header = (run: Run) => readFileSync(join(run.out, 'profiles.csv'), 'utf8').split('\n')[0];
    const dimensionless = await solve('dimensionless-profile', layer);
    expect(header(nk)).toBe(header(dimensionless));
    expect(header(hz)).toBe(header(nk));
  });
});

describe('shells at an ordinary temperature (entropy per atom 0.3)', () => {
  it('the n = 1 and n = 2 plateaus are shells in summary.json and in the report, beside the atomic limit', async () => {
    const run = await solve('warm-layer', {
      energyUnit: 'U',
      lattice: { shape: [48, 48] },
      hubbard: { hopping: 0.01 },
      trap: { coefficient: 0.004 },
      particles: { atoms: 1600 },
      temperature: { entropyPerAtom: 0.3 },
      truncation: { nmax: 5 },
    });
    expect(run.code).toBe(0);
    expect(run.summary.warnings).toEqual([]);
    // kT about 0.09 U: above 0.08 U, where an absolute bound U dn/dmu < 0.05 rejects every site even at J = 0.
    const kT = run.summary.parameters.kT.U as number;
    expect(kT).toBeGreaterThan(0.08);
    const shells = run.summary.shells as Array<{ filling: number; sites: number; innerRadius: number }>;
    expect(shells.map((s) => s.filling)).toEqual([1, 2]);
    expect(shells.every((s) => s.sites > 100)).toBe(true);
    expect(shells[1].innerRadius).toBe(0); // the central shell starts at 0
    const stats = (run.summary.phases.shellStatistics as Array<Record<string, any>>).find((s) => s.filling === 1)!;
    // The atomic limit (J = 0) at the plateau centre mu = U/2 and the same kT, computed here.
    const centre = plateauCentre(1, 1, kT, 5);
    expect(stats.atomicReference.numberVariance).toBeCloseTo(centre.numberVariance, 12);
    expect(stats.maxFluctuationRatio).toBeLessThanOrEqual(run.summary.phases.thresholds.compressibilityMin);
    expect(run.stdout).toMatch(/shells: n=1 \(\d+ sites\), n=2 \(\d+ sites\)/);
    expect(run.report).toContain('Thermal fluctuations of each shell');
    expect(run.report).not.toContain('no Mott shell');
  });
});

describe('landscape terms are listed in summary.json and the report', () => {
  it('a per-site term read from a file next to the scenario', async () => {
    const eps = Float64Array.from({ length: 34 * 34 }, (_, i) => 0.01 * ((i % 34) - 17));
    writeFileSync(join(dir, 'tilt.npy'), encodeNpy(eps, [34, 34]));
    const run = await solve('with-landscape', { ...layer, landscape: [{ kind: 'sites', name: 'tilt', file: 'tilt.npy' }] });
    const terms = run.summary.landscape.terms as Array<{ name: string; kind: string; file: { sha256: string } }>;
    expect(terms.map((t) => [t.name, t.kind])).toEqual([['tilt', 'sites']]);
    expect(terms[0].file.sha256).toMatch(/^[0-9a-f]{64}$/);
    expect(run.report).toContain('Landscape terms');
    expect(run.report).toContain('tilt');
  });
});
